/**
 * The command line's outcome, shape and robust flags (core/node/cli.ts: --outcome, --trials,
 * --shape, --robust, --robust-k): JSON keys `model` and `fit.model`, the text summary, and
 * the refusals (exit code 2 with what and where). Reference values: R 4.2 glm with
 * splines::ns, MASS::rlm and brute-force constrained least squares, from
 * test/reference/fixtures/physics.json (test/reference/r/physics.R), compared at 1e-7
 * relative (IRLS tolerances; see test/reference/physics.test.ts). Data: datasets::discoveries,
 * MASS::menarche, MASS::mcycle and datasets::cars written to temporary CSV files.
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { type Run, runCheckIn, runMain } from './runMain';

const REPO = join(__dirname, '..', '..', '..');
const fixture = JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'physics.json'), 'utf8')) as {
  datasets: Record<string, { x: number[]; y: number[]; trials: number[] | null }>;
  glm: { dataset: string; df: number; deviance: number; fitted: number[] }[];
  rlm: { dataset: string; df: number; weights: number[]; scale: number }[];
  shape: { dataset: string; df: number; shape: string[]; rss: number; unconstrainedRss: number }[];
};
const REL = 1e-7;

const run = runMain;

function refused(r: Run, ...patterns: RegExp[]): void {
  assert.equal(r.code, 2, `exit code (stderr: ${r.stderr})`);
  assert.match(r.stderr, /^knotwise: /);
  assert.doesNotMatch(r.stderr, /internal error/);
  for (const p of patterns) assert.match(r.stderr, p);
}

function close(what: string, got: unknown, want: number): void {
  assert.equal(typeof got, 'number', what);
  assert.ok(Math.abs((got as number) - want) <= REL * Math.abs(want) + 1e-12, `${what}: ${String(got)}, R ${want}`);
}

describe('knotwise fit --outcome, --trials, --shape, --robust', () => {
  let dir = '';
  const csv = (name: string, header: string, rows: string[]): string => {
    const p = join(dir, name);
    writeFileSync(p, [header, ...rows].join('\n') + '\n');
    return p;
  };
  const d = (name: string): { x: number[]; y: number[]; trials: number[] | null } => fixture.datasets[name] as { x: number[]; y: number[]; trials: number[] | null };
  let discoveries = '';
  let menarche = '';
  let mcycle = '';
  let cars = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-cli-model-'));
    discoveries = csv(
      'discoveries.csv',
      'year,count',
      d('discoveries').x.map((x, i) => `${x},${d('discoveries').y[i]}`),
    );
    menarche = csv(
      'menarche.csv',
      'Age,Total,Menarche',
      d('menarche').x.map((x, i) => `${x},${(d('menarche').trials as number[])[i]},${d('menarche').y[i]}`),
    );
    mcycle = csv(
      'mcycle.csv',
      'times,accel',
      d('mcycle').x.map((x, i) => `${x},${d('mcycle').y[i]}`),
    );
    cars = csv(
      'cars.csv',
      'speed,dist',
      d('cars').x.map((x, i) => `${x},${d('cars').y[i]}`),
    );
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it("--outcome counts --json reports the model used and R glm's deviance and fitted counts (datasets::discoveries)", async () => {
    const r = await run('fit', discoveries, '--x', 'year', '--y', 'count', '--outcome', 'counts', '--df', '5', '--json');
    assert.equal(r.code, 0, r.stderr);
    const j = JSON.parse(r.stdout) as { model: unknown; fit: { model: Record<string, unknown>; fitted: number[] }; table: { columns: string[]; rows: number[][] } };
    assert.deepEqual(j.model, { outcome: 'counts', link: 'log', shape: [], robust: null, trials: null });
    const ref = fixture.glm.find((c) => c.dataset === 'discoveries' && c.df === 5);
    assert.ok(ref);
    close('fit.model.deviance', j.fit.model.deviance, ref.deviance);
    ref.fitted.forEach((v, i) => close(`fit.fitted[${i}]`, j.fit.fitted[i], v));
    assert.equal(j.fit.model.converged, true);
    const lo = j.table.columns.indexOf('ciLower');
    for (const row of j.table.rows) assert.ok((row[lo] as number) > 0, 'the confidence band of a count stays above 0');
  });

  it('--outcome proportions --trials gives R glm(cbind(successes, failures) ~ ns(x)) proportions and names the trials column (MASS::menarche)', async () => {
    const r = await run('fit', menarche, '--x', 'Age', '--y', 'Menarche', '--outcome', 'proportions', '--trials', 'Total', '--df', '5', '--json');
    assert.equal(r.code, 0, r.stderr);
    const j = JSON.parse(r.stdout) as { model: { trials: string; link: string }; fit: { fitted: number[] } };
    assert.equal(j.model.trials, 'Total');
    assert.equal(j.model.link, 'logit');
    const ref = fixture.glm.find((c) => c.dataset === 'menarche' && c.df === 5);
    assert.ok(ref);
    ref.fitted.forEach((v, i) => close(`fit.fitted[${i}]`, j.fit.fitted[i], v));
  });

  it('a record made with --trials is current under check, and a changed count is caught (MASS::menarche)', async () => {
    const r = await run('fit', menarche, '--x', 'Age', '--y', 'Menarche', '--outcome', 'proportions', '--trials', 'Total', '--df', '2,3,4', '--resampling', 'folds:5', '--quiet');
    assert.equal(r.code, 0, r.stderr);
    const record = menarche.replace(/\.csv$/, '.fit.json');
    const current = await runCheckIn(dir, record);
    assert.equal(current.code, 0, current.stdout + current.stderr);
    const text = readFileSync(menarche, 'utf8');
    writeFileSync(
      menarche,
      text.replace(/\n([^\n]*),(\d+)\n$/, (_m, head: string, total: string) => `\n${head},${Number(total) + 1}\n`),
    );
    const changed = await runCheckIn(dir, record);
    writeFileSync(menarche, text);
    assert.equal(changed.code, 1, changed.stdout + changed.stderr);
  });

  it('--robust lists the down-weighted rows by CSV line, as MASS::rlm weights them (MASS::mcycle)', async () => {
    const r = await run('fit', mcycle, '--x', 'times', '--y', 'accel', '--robust', '--df', '5', '--json');
    assert.equal(r.code, 0, r.stderr);
    const j = JSON.parse(r.stdout) as { model: { robust: { k: number } }; fit: { model: { robust: { scale: number; downweighted: { total: number; rows: { line: number; weight: number }[] } } } } };
    assert.deepEqual(j.model.robust, { k: 1.345 });
    const ref = fixture.rlm.find((c) => c.dataset === 'mcycle' && c.df === 5);
    assert.ok(ref);
    close('fit.model.robust.scale', j.fit.model.robust.scale, ref.scale);
    const want = ref.weights.map((w, i) => ({ line: i + 2, w })).filter((e) => e.w < 1);
    const got = j.fit.model.robust.downweighted.rows;
    assert.equal(j.fit.model.robust.downweighted.total, want.length);
    assert.deepEqual(
      got.map((g) => g.line).sort((a, b) => a - b),
      want.map((e) => e.line),
      'lines of the down-weighted rows (header is line 1)',
    );
    for (const g of got) close(`weight of line ${g.line}`, g.weight, (want.find((e) => e.line === g.line) as { w: number }).w);
    const text = await run('fit', mcycle, '--x', 'times', '--y', 'accel', '--robust', '--df', '5');
    assert.match(text.stdout, /^Model: continuous readings \(Gaussian, identity link\); Huber k = 1\.345, scale [0-9.]+, \d+ rows down-weighted \(lines \d+: /m);
  });

  it('--shape increasing reports the constraints and matches the brute-force constrained fit (datasets::cars)', async () => {
    const r = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--shape', 'increasing', '--df', '5', '--json');
    assert.equal(r.code, 0, r.stderr);
    const j = JSON.parse(r.stdout) as { model: { shape: string[] }; fit: { model: { constraints: { total: number; active: number; effectiveDf: number } }; residuals: number[] } };
    assert.deepEqual(j.model.shape, ['increasing']);
    assert.deepEqual(j.fit.model.constraints, { total: 6, active: 1, effectiveDf: 4 });
    const ref = fixture.shape.find((c) => c.dataset === 'cars' && c.df === 5);
    assert.ok(ref);
    close(
      'residual sum of squares',
      j.fit.residuals.reduce((s, v) => s + v * v, 0),
      ref.rss,
    );
  });

  it('refuses bad or contradictory model flags with exit code 2 and the reason', async () => {
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--trials', 'n'), /--trials needs --outcome proportions/);
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--outcome', 'proportions', '--trials', 'speed'), /--x and --trials name the same column "speed"/);
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--shape', 'wiggly'), /unknown shape "wiggly"/);
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--outcome', 'gamma'), /unknown outcome "gamma"; use continuous, counts, proportions/);
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--outcome', 'poisson'), /unknown outcome "poisson"/);
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--outcome', 'counts', '--robust'), /robust fitting applies to continuous readings only/);
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--curve', 'smoothing-spline', '--robust'), /the cubic smoothing spline has no robust fit/);
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--curve', 'natural'), /unknown curve "natural"; use natural-spline, polynomial, smoothing-spline/);
    refused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--robust-k', '0'), /--robust-k must be a positive number/);
    refused(
      await run('fit', cars, '--x', 'speed', '--y', 'dist', '--outcome', 'proportions', '--df', '3'),
      /cars\.csv, line 2, column "dist": proportions without a trials column must lie from 0 to 1/,
    );
  });

  it('--outcome counts refuses a reading that is not a whole number, or below 0, naming file, line and column (tuned and fixed df)', async () => {
    // Issue 14, item 4: Poisson counts are whole numbers of at least 0 (McCullagh & Nelder 1989, chapter 6; chapter from memory).
    const frac = csv('frac.csv', 'setting,defects', ['1,0', '2,3', '3,2.5', '4,4', '5,6', '6,5', '7,8', '8,9']);
    for (const extra of [[], ['--df', '3']]) {
      refused(await run('fit', frac, '--x', 'setting', '--y', 'defects', '--outcome', 'counts', ...extra), /frac\.csv, line 4, column "defects": counts must be whole numbers of at least 0; got 2\.5/);
    }
    const neg = csv('neg.csv', 'setting,defects', ['1,0', '2,-1', '3,2', '4,4', '5,6', '6,5', '7,8', '8,9']);
    refused(await run('fit', neg, '--x', 'setting', '--y', 'defects', '--outcome', 'counts', '--df', '3'), /neg\.csv, line 3, column "defects": counts must be whole numbers of at least 0; got -1/);
  });

  it('--trials rejects rows without trials by line and refuses successes above the trials, naming line and column', async () => {
    const bad = csv('trials.csv', 'dose,n,dead', ['1,10,0', '2,0,0', '3,10,4', '4,,1', '5,10,9', '6,10,10']);
    const r = await run('fit', bad, '--x', 'dose', '--y', 'dead', '--outcome', 'proportions', '--trials', 'n', '--df', '2', '--json');
    assert.equal(r.code, 0, r.stderr);
    const j = JSON.parse(r.stdout) as { data: { rejected: { line: number; column: string; reason: string }[] } };
    assert.deepEqual(
      j.data.rejected.map((x) => [x.line, x.column]),
      [
        [3, 'n'],
        [5, 'n'],
      ],
    );
    assert.match(j.data.rejected[0]?.reason ?? '', /number of trials 0 is not positive/);
    const over = csv('over.csv', 'dose,n,dead', ['1,10,0', '2,10,12', '3,10,4']);
    refused(
      await run('fit', over, '--x', 'dose', '--y', 'dead', '--outcome', 'proportions', '--trials', 'n', '--df', '2'),
      /over\.csv, line 3, column "dead": the number of successes must be from 0 to the number of trials \(10\); got 12/,
    );
  });
});
