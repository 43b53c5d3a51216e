/**
 * Tests of the `knotwise fit` command line (core/node/cli.ts): the JSON keys documented as a
 * public interface (issue #2 item 4, issue #3 item 6), and bad input (issue #2 item 7): each
 * case exits with code 2 and a message that says what is wrong and where.
 *
 * Most tests call `main` in this process and capture stdout and stderr; two run the script
 * in a child process to check the real exit code. CSV files are written to a temporary
 * folder. Data: datasets::cars (Ezekiel 1930) in R's row order, with R 4.2 reference values
 * (`lm` with `splines::ns`, brute-force leave-one-out, `predict` bands) from
 * test/reference/fixtures/fits.json (test/reference/r/fits.R), compared at 1e-8 relative
 * with an absolute floor of 1e-10 times the scale of the quantity.
 */
import { strict as assert } from 'node:assert';
import { execFile } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { CAUTION } from '../../../core/outputs/record';
import { type Run, runMain } from './runMain';

const REL = 1e-8;
const ABS = 1e-10;
const REPO = join(__dirname, '..', '..', '..');
const CLI = join(REPO, 'core', 'node', 'cli.ts');

interface RCase {
  readonly dataset: string;
  /** The fixture's own name of the curve ('natural' is the natural cubic regression spline). */
  readonly family: string;
  readonly df: number;
  readonly fitted: number[];
  readonly residuals: number[];
  readonly hat: number[];
  readonly cooks: number[];
  readonly sigma: number;
  readonly rSquared: number;
  readonly aic: number;
  readonly bic: number;
  readonly looRmse: number;
  readonly gcv: number;
  readonly grid: number[];
  readonly predFit: number[];
  readonly predSe: number[];
  readonly ciLower: number[];
  readonly ciUpper: number[];
  readonly piLower: number[];
  readonly piUpper: number[];
}

const fixture = JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'fits.json'), 'utf8')) as {
  datasets: Record<string, { x: number[]; y: number[] }>;
  cases: RCase[];
};
const CARS = fixture.datasets.cars as { x: number[]; y: number[] };

function rCase(df: number): RCase {
  const c = fixture.cases.find((k) => k.dataset === 'cars' && k.family === 'natural' && k.df === df);
  if (!c) throw new Error(`no R case for cars natural df ${df}`);
  return c;
}

function checkClose(what: string, got: unknown, want: number, scale: number): void {
  assert.equal(typeof got, 'number', `${what} is a number`);
  const g = got as number;
  assert.ok(Math.abs(g - want) <= REL * Math.abs(want) + ABS * scale, `${what}: ${g}, R ${want} (tolerance ${REL} relative)`);
}

function checkArray(what: string, got: unknown, want: readonly number[], scale: number): void {
  assert.ok(Array.isArray(got), `${what} is an array`);
  assert.equal(got.length, want.length, `${what} length`);
  want.forEach((w, i) => checkClose(`${what}[${i}]`, got[i], w, scale));
}

const run = runMain;

/** Runs the CLI script in a child process (tsx loads the TypeScript). */
function runChild(...argv: string[]): Promise<Run> {
  return new Promise((resolve) => {
    execFile(process.execPath, ['--import', 'tsx', CLI, ...argv], { cwd: REPO, timeout: 60_000 }, (error, stdout, stderr) => {
      const code = error ? (typeof error.code === 'number' ? error.code : -1) : 0;
      resolve({ code, stdout, stderr });
    });
  });
}

/** Asserts exit code 2, nothing on stdout, and a one-line message on stderr matching every pattern. */
function assertRefused(r: Run, ...patterns: RegExp[]): void {
  assert.equal(r.code, 2, `exit code (stderr: ${r.stderr})`);
  assert.equal(r.stdout, '');
  assert.match(r.stderr, /^knotwise: /);
  assert.doesNotMatch(r.stderr, /internal error|\n\s+at /, 'no stack trace');
  for (const p of patterns) assert.match(r.stderr, p);
}

describe('knotwise fit (command line)', () => {
  let dir = '';
  /** Writes a file into the temporary folder and returns its path. */
  const file = (name: string, content: string | Buffer): string => {
    const p = join(dir, name);
    writeFileSync(p, content);
    return p;
  };
  const carsRows = (): string[] => CARS.x.map((x, i) => `${x},${CARS.y[i] as number}`);
  let cars = '';

  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-cli-'));
    cars = file('cars.csv', ['speed,dist', ...carsRows()].join('\n') + '\n');
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  describe('JSON output', () => {
    it('fit --json prints every documented key; fit.* holds the rows used in input order and matches R (cars, df 4, rows with NaN and Inf rejected by line)', async () => {
      // Rows 1..10 of cars, a NaN speed (line 12), rows 11..30, an Inf distance (line 33), the rest.
      const rows = carsRows();
      const text = ['speed,dist', ...rows.slice(0, 10), 'NaN,10', ...rows.slice(10, 30), '12,Inf', ...rows.slice(30)].join('\n') + '\n';
      const path = file('cars-with-gaps.csv', text);
      const r = rCase(4);
      const r0 = await run('fit', path, '--x', 'speed', '--y', 'dist', '--curve', 'natural-spline', '--df', '4', '--grid', r.grid.join(','), '--extrapolate', '--json');
      assert.equal(r0.code, 0, r0.stderr);
      assert.equal(r0.stderr, '');
      const out = JSON.parse(r0.stdout) as Record<string, any>;
      const sy = Math.max(...CARS.y.map(Math.abs));
      // Source: R 4.2, lm(dist ~ splines::ns(speed, df = 3)) on datasets::cars (fixture fits.json).
      assert.equal(out.fit.df, 4);
      checkArray('fit.fitted', out.fit.fitted, r.fitted, sy);
      checkArray('fit.residuals', out.fit.residuals, r.residuals, sy);
      checkArray('fit.leverage', out.fit.leverage, r.hat, 1);
      checkArray('fit.cooksDistance', out.fit.cooksDistance, r.cooks, 1);
      assert.equal(out.fit.curve, 'natural-spline');
      checkClose('fit.residualSd', out.fit.residualSd, r.sigma, sy);
      checkClose('fit.r2', out.fit.r2, r.rSquared, 1);
      checkClose('fit.aic', out.fit.aic, r.aic, 1);
      checkClose('fit.bic', out.fit.bic, r.bic, 1);
      checkClose('fit.looRmse', out.fit.looRmse, r.looRmse, sy);
      checkClose('fit.gcv', out.fit.gcv, r.gcv, sy * sy);
      assert.equal(out.data.rowsUsed, 50);
      assert.equal(out.data.rejected.length, 2);
      assert.deepEqual(
        out.data.rejected.map((j: { line: number }) => j.line),
        [12, 33],
      );
      assert.match(out.data.rejected[0].reason, /missing/);
      assert.match(out.data.rejected[1].reason, /not finite/);
      // Curve table at R's grid (two points beyond the data, allowed by --extrapolate).
      const cols: string[] = out.table.columns;
      for (const c of ['x', 'fit', 'se', 'ciLower', 'ciUpper', 'piLower', 'piUpper']) assert.ok(cols.includes(c), `table column ${c}`);
      assert.equal(out.table.rows.length, r.grid.length);
      const column = (name: string): number[] => out.table.rows.map((row: number[]) => row[cols.indexOf(name)]);
      checkArray('table x', column('x'), r.grid, 25);
      // Source: R 4.2 predict(..., interval = "confidence" / "prediction", level = 0.95).
      checkArray('table fit', column('fit'), r.predFit, sy);
      checkArray('table se', column('se'), r.predSe, sy);
      checkArray('table ciLower', column('ciLower'), r.ciLower, sy);
      checkArray('table ciUpper', column('ciUpper'), r.ciUpper, sy);
      checkArray('table piLower', column('piLower'), r.piLower, sy);
      checkArray('table piUpper', column('piUpper'), r.piUpper, sy);
      assert.equal(out.table.extrapolatedPoints, 2);
      assert.ok(out.diagnostics && Array.isArray(out.diagnostics.warnings), 'diagnostics');
      // One df and no tuning option: a plain fit, no tuning keys.
      assert.equal(out.candidates, undefined);
      assert.equal(out.selected, undefined);
    });

    it('fit --json with tuning options adds candidates (errors as {mean, se}, or skipped), selected and diagnostics', async () => {
      const r0 = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2,3,4,5,6,25', '--resampling', 'bootstrap:20', '--rule', 'one-se', '--seed', '3', '--json');
      assert.equal(r0.code, 0, r0.stderr);
      const out = JSON.parse(r0.stdout) as Record<string, any>;
      assert.deepEqual(
        out.candidates.map((c: { df: number }) => c.df),
        [2, 3, 4, 5, 6, 25],
      );
      for (const c of out.candidates) {
        if (c.df === 25) {
          // datasets::cars has 19 distinct speeds.
          assert.match(c.skipped, /needs at least 25 distinct x values; the data has 19/);
          continue;
        }
        assert.equal(c.skipped, undefined);
        for (const m of ['rmse', 'mae', 'maxAbs']) {
          assert.equal(typeof c.errors[m].mean, 'number', `df ${c.df} ${m}.mean`);
          assert.equal(typeof c.errors[m].se, 'number', `df ${c.df} ${m}.se`);
          assert.ok(c.errors[m].mean > 0 && c.errors[m].se > 0);
        }
        assert.equal(c.errors.rmse.values.length, 20);
      }
      assert.ok([2, 3, 4, 5, 6].includes(out.selected.df));
      assert.deepEqual(out.selected.rule, { kind: 'one-se' });
      assert.match(out.selected.reason, /One-SE threshold .* chosen\./);
      assert.equal(out.fit.df, out.selected.df);
      assert.equal(out.tuning.seed, 3);
      assert.equal(out.tuning.resampling, 'bootstrap:20');
      assert.equal(out.tuning.curve, 'natural-spline');
      assert.equal(typeof out.diagnostics, 'object');
      assert.ok(Array.isArray(out.diagnostics.warnings) && typeof out.diagnostics.influential === 'object');
      assert.ok(out.diagnostics.shapiroWilk && typeof out.diagnostics.shapiroWilk.pValue === 'number', 'Shapiro-Wilk result');
      // Same seed, same output (byte-identical JSON).
      const again = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2,3,4,5,6,25', '--resampling', 'bootstrap:20', '--rule', 'one-se', '--seed', '3', '--json');
      assert.equal(again.stdout, r0.stdout);
    });

    it('fit --resampling loo puts the exact leave-one-out RMSE into errors.rmse.mean (cars, against R brute-force refits)', async () => {
      const r0 = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2..6', '--resampling', 'leave-one-out', '--rule', 'least-error', '--json');
      assert.equal(r0.code, 0, r0.stderr);
      const out = JSON.parse(r0.stdout) as Record<string, any>;
      const sy = Math.max(...CARS.y.map(Math.abs));
      for (const c of out.candidates) {
        // Source: R 4.2, refits of lm(dist ~ ns(speed, df = k - 1)) without each row (fits.R).
        checkClose(`df ${c.df} errors.rmse.mean`, c.errors.rmse.mean, rCase(c.df).looRmse, sy);
      }
      // R's LOO RMSE for df 2..6: 15.697, 15.647, 15.791, 15.791, 16.026: lowest at df 3.
      assert.equal(out.selected.df, 3);
      checkClose('fit.looRmse of the chosen fit', out.fit.looRmse, rCase(3).looRmse, sy);
    });

    it('fit --resampling gcv puts the GCV score into errors.gcv.mean (cars, against R)', async () => {
      const r0 = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2..6', '--resampling', 'gcv', '--rule', 'least-error', '--json');
      assert.equal(r0.code, 0, r0.stderr);
      const out = JSON.parse(r0.stdout) as Record<string, any>;
      const sy = Math.max(...CARS.y.map(Math.abs));
      for (const c of out.candidates) {
        // Source: R 4.2, (rss / n) / (1 - df / n)^2 of lm with ns (fits.R).
        checkClose(`df ${c.df} errors.gcv.mean`, c.errors.gcv.mean, rCase(c.df).gcv, sy * sy);
      }
      assert.equal(out.selected.metric, 'gcv');
      // R's GCV for df 2..6: 246.387, 246.435, 252.061, 253.794, 262.315: lowest at df 2.
      assert.equal(out.selected.df, 2);
    });

    it('fit without --json prints a short summary with the rows used and the choice', async () => {
      const r0 = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2..4', '--resampling', 'folds:5', '--seed', '1');
      assert.equal(r0.code, 0, r0.stderr);
      assert.match(r0.stdout, /cars\.csv: 50 rows used, 0 rejected/);
      assert.match(r0.stdout, /Tuning \(folds:5, seed 1\)/);
      assert.match(r0.stdout, /One-SE threshold/);
    });
  });

  describe('summary and JSON of issue 14 (numbers that carry their evidence, edges, checks)', () => {
    it('the summary prints each candidate mean as the explanation does, and the residual checks in the words of the report', async () => {
      const r0 = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2..6', '--resampling', 'folds:5', '--seed', '1');
      assert.equal(r0.code, 0, r0.stderr);
      const why = /^Least mean RMSE (\S+) at df (\d+)/m.exec(r0.stdout);
      assert.ok(why, r0.stdout);
      assert.match(r0.stdout, new RegExp(`^  df ${why[2]}: RMSE ${(why[1] as string).replace('.', '\\.')} \\(SE `, 'm'));
      assert.match(r0.stdout, /^Check: Durbin-Watson \(do neighbours in x order move together\?\): DW = [\d.]+, p [=<] [\d.e-]+ \([^)]*\); lag-1 correlation -?[\d.]+: /m);
    });

    it('a least error at the largest candidate is flagged in the explanation and in --json selected.edge (cars, leave-one-out, df 2..3)', async () => {
      // R's exact leave-one-out RMSE of lm(dist ~ ns(speed, df = k - 1)): 15.697 at df 2, 15.647 at df 3 (fits.R), so the least is at the largest candidate.
      const r0 = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2..3', '--resampling', 'leave-one-out', '--rule', 'least-error', '--json');
      assert.equal(r0.code, 0, r0.stderr);
      const out = JSON.parse(r0.stdout) as Record<string, any>;
      assert.deepEqual(out.selected.edge, { side: 'upper', df: 3, chosen: true, leastError: true, widen: '2..6' });
      assert.match(out.selected.reason, /df 3 is the largest candidate and has the least error: the best df may lie beyond the candidates; widen them, e\.g\. --df 2\.\.6\./);
      const inner = await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2..6', '--resampling', 'leave-one-out', '--rule', 'least-error', '--json');
      assert.equal((JSON.parse(inner.stdout) as Record<string, any>).selected.edge, null);
    });
  });

  describe('bad input (issue #2 item 7): exit code 2 and a message saying what and where', () => {
    it('an empty file', async () => {
      const p = file('empty.csv', '');
      assertRefused(await run('fit', p, '--x', 'speed', '--y', 'dist'), /empty\.csv/, /the file is empty/);
    });

    it('a header without data rows', async () => {
      const p = file('header-only.csv', 'speed,dist\n');
      assertRefused(await run('fit', p, '--x', 'speed', '--y', 'dist'), /header-only\.csv, line 1/, /header row but no data rows/);
    });

    it('a chosen column that is not numeric, naming the column and a line', async () => {
      const p = file('names.csv', 'name,speed,dist\ncar a,4,2\ncar b,7,4\ncar c,8,16\n');
      assertRefused(await run('fit', p, '--x', 'name', '--y', 'dist'), /names\.csv/, /column "name" is not numeric/, /line 2/, /"car a" is not a number/);
    });

    it('a column with all values missing', async () => {
      const p = file('all-missing.csv', 'speed,dist\n4,NA\n7,\n8,-\n9,n/a\n');
      assertRefused(await run('fit', p, '--x', 'speed', '--y', 'dist'), /all-missing\.csv/, /no usable rows/, /line 2, column "dist": missing value/);
    });

    it('fewer distinct x than the df asked for', async () => {
      // The first 6 rows of cars have 4 distinct speeds (4, 4, 7, 7, 8, 9).
      const p = file('six-rows.csv', ['speed,dist', ...carsRows().slice(0, 6)].join('\n') + '\n');
      assertRefused(await run('fit', p, '--x', 'speed', '--y', 'dist', '--df', '5'), /six-rows\.csv/, /natural spline with df 5 needs at least 5 distinct x values; the data has 4/);
    });

    it('constant x, for one df and for the default tuning', async () => {
      const p = file('constant-x.csv', 'speed,dist\n10,2\n10,4\n10,7\n10,9\n');
      assertRefused(await run('fit', p, '--x', 'speed', '--y', 'dist', '--df', '2'), /constant-x\.csv/, /needs at least 2 distinct x values; the data has 1/);
      assertRefused(await run('fit', p, '--x', 'speed', '--y', 'dist'), /no candidate df could be evaluated/, /df 2: .*the data has 1/);
    });

    it('NaN and Inf strings: the rows are rejected with their line numbers and the fit still runs', async () => {
      const rows = carsRows();
      const text = ['speed,dist', 'NaN,3', ...rows.slice(0, 20), '15,inf', '-Infinity,20', ...rows.slice(20), '1e999,4'].join('\n') + '\n';
      const p = file('nan-inf.csv', text);
      const r0 = await run('fit', p, '--x', 'speed', '--y', 'dist', '--df', '3', '--json');
      assert.equal(r0.code, 0, r0.stderr);
      const out = JSON.parse(r0.stdout) as Record<string, any>;
      assert.equal(out.data.rowsUsed, 50);
      assert.deepEqual(
        out.data.rejected.map((j: { line: number; column: string }) => [j.line, j.column]),
        [
          [2, 'speed'],
          [23, 'dist'],
          [24, 'speed'],
          [55, 'speed'],
        ],
      );
      for (const j of out.data.rejected) assert.ok(typeof j.reason === 'string' && j.reason.length > 0);
      // The fit on the 50 good rows is R's (datasets::cars, ns with df = 2), 1e-8 relative.
      checkArray('fit.fitted', out.fit.fitted, rCase(3).fitted, Math.max(...CARS.y));
    });

    it('magnitudes of 1e308, naming the line and the CSV column', async () => {
      const p = file('huge.csv', 'speed,dist\n4,2\n7,4\n1e308,16\n9,10\n10,18\n');
      assertRefused(await run('fit', p, '--x', 'speed', '--y', 'dist', '--df', '2'), /huge\.csv, line 4, column "speed"/, /too large/);
      const q = file('huge-y.csv', 'speed,dist\n4,2\n7,-1e308\n8,16\n9,10\n10,18\n');
      assertRefused(await run('fit', q, '--x', 'speed', '--y', 'dist', '--df', '2'), /huge-y\.csv, line 3, column "dist"/, /too large/);
    });

    it('a binary file renamed .csv', async () => {
      // The PNG signature followed by the bytes 0..255 (as test/fixtures/csv/make-fixtures.R writes binary.bin).
      const p = file('picture.csv', Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, ...Array.from({ length: 256 }, (_, i) => i)]));
      assertRefused(await run('fit', p, '--x', 'speed', '--y', 'dist'), /picture\.csv/, /binary file, not CSV text/);
    });

    it('an unknown column, listing the columns there are', async () => {
      assertRefused(await run('fit', cars, '--x', 'sped', '--y', 'dist'), /cars\.csv, column "sped"/, /no column named "sped"; the columns are "speed", "dist"/);
    });

    it('bad --resampling syntax', async () => {
      for (const bad of ['bootstrap', 'cv:', 'boot:x', 'jackknife']) {
        assertRefused(
          await run('fit', cars, '--x', 'speed', '--y', 'dist', '--resampling', bad),
          new RegExp(`resampling "${bad}" is not understood`),
          /bootstrap:<resamples>, folds:<k>\[x<repeats>\], leave-one-out, gcv/,
        );
      }
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--resampling', 'bootstrap:1'), /the bootstrap takes 2 to 5000 resamples; got 1/);
    });

    it('bad --rule syntax', async () => {
      for (const bad of ['best', 'simplest-within', 'tol:2', '1se', 'df:3']) {
        assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--rule', bad), new RegExp(`rule "${bad}" is not understood`), /one-se, simplest-within:<percent>, least-error, pick:<df>/);
      }
    });

    it('bad --grid syntax', async () => {
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '3', '--grid', '0:10'), /grid "0:10"/, /not a number/);
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '3', '--grid', '10:5:count=3'), /stop must be greater than start/);
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '3', '--grid', '5:25:count=1'), /count must be a whole number/);
      // The bare third field is refused with the accepted forms (it reads as a count in some notations, a step in others).
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '3', '--grid', '5:25:5'), /grid "5:25:5"/, /count=<n>/, /step=<h>/);
      // A grid beyond the data (cars speeds 4..25) is refused unless --extrapolate is given.
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '3', '--grid', '0:30:count=7'), /2 grid point\(s\) lie outside the data range \[4, 25\]/);
    });

    it('bad --df, an unknown option, a missing file and missing --x/--y', async () => {
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--df', 'five'), /df "five"/);
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--colour'), /unknown option --colour for fit; run knotwise fit --help for its options/);
      assertRefused(await run('fit', join(dir, 'no-such.csv'), '--x', 'speed', '--y', 'dist'), /no-such\.csv: file not found/);
      assertRefused(await run('fit', cars, '--x', 'speed'), /fit needs --x <column> and --y <column>; missing: --y/);
      assertRefused(await run('fit', '--x', 'speed', '--y', 'dist'), /no data file given/);
      assertRefused(await run('fit', cars, '--x', 'speed', '--y', 'dist', '--holdout', '0.9'), /--holdout/);
    });
  });

  describe('as a process', () => {
    it('knotwise fit exits with 0 and prints one JSON object', async function () {
      this.timeout(60_000);
      const r0 = await runChild('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '3', '--json');
      assert.equal(r0.code, 0, r0.stderr);
      const out = JSON.parse(r0.stdout) as Record<string, any>;
      assert.equal(out.fit.df, 3);
      assert.equal(out.data.rowsUsed, 50);
    });

    it('knotwise fit exits with 2 on bad input, with the message on stderr', async function () {
      this.timeout(60_000);
      const r0 = await runChild('fit', cars, '--x', 'speed', '--y', 'dist', '--rule', 'best');
      assertRefused(r0, /rule "best" is not understood/);
    });
  });
});

describe('knotwise fit: table options, emitters and report (issue #5)', () => {
  let dir = '';
  let mcycle = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-cli5-'));
    // MASS::mcycle (Silverman 1985), written by test/e2e/fixtures/make-fixtures.R.
    mcycle = join(dir, 'mcycle.csv');
    writeFileSync(mcycle, readFileSync(join(REPO, 'test', 'e2e', 'fixtures', 'mcycle.csv')));
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('fit --json adds table.grid, table.interpolation, table.negativePoints, warnings, regenerate and caution', async () => {
    const r0 = await run('fit', mcycle, '--x', 'times', '--y', 'accel', '--df', '8', '--grid', 'auto:2', '--flag-negative', '--columns', 'x,fit', '--json');
    assert.equal(r0.code, 0, r0.stderr);
    const out = JSON.parse(r0.stdout) as Record<string, any>;
    assert.equal(out.table.grid.kind, 'count');
    assert.equal(out.table.rows.length, out.table.grid.count);
    assert.equal(out.table.interpolation.tolerance, 2);
    assert.ok(out.table.interpolation.maxError <= 2 && out.table.interpolation.maxError > 0);
    // mcycle's acceleration goes well below zero: the flag column is added and rows counted.
    assert.deepEqual(out.table.columns, ['x', 'fit', 'negative']);
    assert.ok(out.table.negativePoints > 0);
    assert.ok(out.warnings.some((w: string) => /below zero/.test(w)));
    assert.match(out.regenerate, /^knotwise fit mcycle\.csv --x times --y accel --curve natural-spline --df 8 --grid auto:2 --columns x,fit --flag-negative --out \.$/);
    assert.equal(out.caution, CAUTION);
    // Without --out the outputs go next to the data file (issue #5 item 5).
    assert.equal(out.written.table, join(dirname(mcycle), 'mcycle.curve.csv'));
  });

  it('fit without --json prints the table line with the interpolation error, the warnings and the caution', async () => {
    const r0 = await run('fit', mcycle, '--x', 'times', '--y', 'accel', '--df', '8', '--grid', '0:60:count=13', '--extrapolate');
    assert.equal(r0.code, 0, r0.stderr);
    assert.match(r0.stdout, /^Table: 13 rows; linear interpolation between rows stays within [0-9.e+-]+ of the curve$/m);
    assert.match(r0.stdout, /^Warning: 2 table row\(s\) lie outside the data range \[2\.4, 57\.6\] and are extrapolated \(x = 0, 60\)/m);
    assert.match(r0.stdout, /^Caution: This curve is an empirical fit to the readings shown, not a certified calibration\./m);
  });

  it('bad --columns, --emit and automatic grids exit 2 with a message', async () => {
    assertRefused(await run('fit', mcycle, '--x', 'times', '--y', 'accel', '--df', '8', '--columns', 'fit,se'), /must include x/);
    assertRefused(await run('fit', mcycle, '--x', 'times', '--y', 'accel', '--df', '8', '--emit', 'cobol', '--save'), /unknown emitter "cobol"/);
    assertRefused(await run('fit', mcycle, '--x', 'times', '--y', 'accel', '--df', '8', '--grid', 'auto:-1'), /tolerance of the automatic step must be a positive number/);
    assertRefused(await run('fit', mcycle, '--x', 'times', '--y', 'accel', '--df', '8', '--grid', 'auto:1e-9'), /not above the rounding of the printed table values/);
  });

  it('check --help prints its usage; an unknown check option exits 2', async () => {
    const h = await run('check', '--help');
    assert.equal(h.code, 0);
    assert.match(h.stdout, /^Usage:\n {2}knotwise check \[<record\.fit\.json> \| <folder> \.\.\.\]$/m);
    assertRefused(await run('check', '--everything'), /unknown option --everything for check; run knotwise check --help for its options/);
  });
});
