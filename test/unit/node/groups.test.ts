/**
 * Groups on the command line (issue 16): `fit --per <column>` tunes and fits each group
 * exactly as a file of its own rows (same options, same seed), `--channels` does the same
 * for several reading columns, `--shared-df` chooses one df from the pooled resampled RMSE,
 * the outputs (a table per group or one long table, the summary, the group record) are
 * rebuilt by `check`, and a row without a group is rejected with its line. Data:
 * datasets::CO2 (Potvin, Lechowicz & Tardif 1990) and datasets::EuStockMarkets, written by
 * test/e2e/fixtures/make-fixtures.R. The pooled error is checked against a brute-force
 * pooling of the separate runs' per-resample errors.
 */
import { strict as assert } from 'node:assert';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { REPO, runCheckIn, runMain } from './runMain';

const fixture = (name: string): string => join(REPO, 'test', 'e2e', 'fixtures', name);

/** The CO2 rows of each plant, in file order, with the header. */
function plants(): Map<string, string[]> {
  const [head, ...rows] = readFileSync(fixture('co2.csv'), 'utf8').trim().split('\n');
  const out = new Map<string, string[]>();
  for (const r of rows) {
    const plant = r.split(',')[0] as string;
    if (!out.has(plant)) out.set(plant, [head as string]);
    (out.get(plant) as string[]).push(r);
  }
  return out;
}

describe('groups on the command line', function () {
  this.timeout(180_000);
  let dir: string;
  let co2: string;
  const TUNE = ['--df', '2,3,4', '--resampling', 'folds:7', '--seed', '3'];

  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'kw-groups-'));
    co2 = join(dir, 'co2.csv');
    copyFileSync(fixture('co2.csv'), co2);
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  it('each group is fitted exactly as a file of its own rows: the same table bytes, df and reason; check finds them current', async () => {
    const run = await runMain('fit', co2, '--x', 'conc', '--y', 'uptake', '--per', 'plant', ...TUNE, '--quiet');
    assert.equal(run.code, 0, run.stderr);
    const record = JSON.parse(readFileSync(join(dir, 'co2.groups.fit.json'), 'utf8')) as { groups: { name: string; df: number; reason: string; table: string }[]; shared: unknown };
    assert.equal(record.groups.length, 12);
    assert.equal(record.shared, null);
    const alone = join(dir, 'alone');
    mkdirSync(alone);
    for (const [plant, rows] of plants()) {
      const file = join(alone, `${plant}.csv`);
      writeFileSync(file, rows.join('\n') + '\n');
      const single = await runMain('fit', file, '--x', 'conc', '--y', 'uptake', ...TUNE, '--quiet');
      assert.equal(single.code, 0, single.stderr);
      const g = record.groups.find((x) => x.name === plant);
      assert.ok(g, plant);
      assert.equal(readFileSync(join(dir, g.table), 'utf8'), readFileSync(join(alone, `${plant}.curve.csv`), 'utf8'), `${plant}: the same table`);
      const rec = JSON.parse(readFileSync(join(alone, `${plant}.fit.json`), 'utf8')) as { fit: { df: number }; selection: { reason: string } };
      assert.equal(g.df, rec.fit.df);
      assert.equal(g.reason, rec.selection.reason);
    }
    const summary = readFileSync(join(dir, 'co2.groups.csv'), 'utf8').trim().split('\n');
    assert.equal(summary[0], 'group,rows,df,residualSd,rmse,rmseSe,table');
    assert.equal(summary.length, 13);
    assert.equal((await runCheckIn(dir, 'co2.groups.fit.json')).code, 0);
    // A changed byte in one group's table is caught, naming the file.
    const table = join(dir, 'co2.Mc2.curve.csv');
    writeFileSync(
      table,
      readFileSync(table, 'utf8').replace(/\n(\d)/, (_m, d: string) => `\n${(Number(d) + 1) % 10}`),
    );
    const changed = await runCheckIn(dir, 'co2.groups.fit.json');
    assert.equal(changed.code, 1);
    assert.match(changed.stdout, /co2\.Mc2\.curve\.csv differs from the rebuilt table/);
    // A group record with a mistyped key could not be checked, and says which key.
    const recordPath = join(dir, 'co2.groups.fit.json');
    writeFileSync(recordPath, readFileSync(recordPath, 'utf8').replace('"sharedDf": false', '"sharedDf": "no"'));
    const broken = await runCheckIn(dir, 'co2.groups.fit.json');
    assert.equal(broken.code, 2);
    assert.match(broken.stdout + broken.stderr, /group record: "spec\.sharedDf" must be true or false/);
  });

  it("a shared df comes from the pooled resampled RMSE: with one row of each plant in each fold it is the root mean square of the plants' errors per fold", async () => {
    const run = await runMain('fit', co2, '--x', 'conc', '--y', 'uptake', '--per', 'plant', ...TUNE, '--shared-df', '--long-table', '--quiet');
    assert.equal(run.code, 0, run.stderr);
    const record = JSON.parse(readFileSync(join(dir, 'co2.groups.fit.json'), 'utf8')) as {
      shared: { df: number; candidates: { df: number; rmse: { mean: number } }[] };
      groups: { df: number; table: string }[];
      common: { df: number; F: number; words: string };
    };
    // Brute force: each plant alone (7 rows, 7 folds: one row per fold), its per-fold RMSE from --json.
    const perPlant: Map<number, number[]>[] = [];
    for (const [plant, rows] of plants()) {
      const file = join(dir, `${plant}.csv`);
      writeFileSync(file, rows.join('\n') + '\n');
      const single = await runMain('fit', file, '--x', 'conc', '--y', 'uptake', ...TUNE, '--json', '--print-only');
      const j = JSON.parse(single.stdout) as { candidates: { df: number; errors: { rmse: { values: number[] } } }[] };
      perPlant.push(new Map(j.candidates.map((c) => [c.df, c.errors.rmse.values])));
    }
    for (const c of record.shared.candidates) {
      const folds = (perPlant[0]?.get(c.df) as number[]).length;
      let sum = 0;
      for (let b = 0; b < folds; b++) sum += Math.sqrt(perPlant.reduce((s, m) => s + ((m.get(c.df) as number[])[b] as number) ** 2, 0) / perPlant.length);
      assert.ok(Math.abs(c.rmse.mean - sum / folds) < 1e-9 * (sum / folds), `df ${c.df}: ${c.rmse.mean} vs ${sum / folds}`);
    }
    assert.ok(record.groups.every((g) => g.df === record.shared.df));
    // One long table with the group column first, and the common-curve test at the shared df.
    const long = readFileSync(join(dir, 'co2.groups.curve.csv'), 'utf8').split('\n');
    assert.match(long[0] as string, /^group,x,fit,se,/);
    assert.equal(long.filter((l) => l.startsWith('Qn1,')).length, 101);
    assert.ok(record.groups.every((g) => g.table === 'co2.groups.curve.csv'));
    assert.equal(record.common.df, record.shared.df);
    assert.match(record.common.words, /plants/);
    assert.equal((await runCheckIn(dir, 'co2.groups.fit.json')).code, 0);
  });

  it('a row without a group is rejected with its line; --channels fits each reading column as a group of its own, as --y would', async () => {
    const lines = readFileSync(co2, 'utf8').split('\n');
    lines[5] = `,${(lines[5] as string).split(',').slice(1).join(',')}`;
    writeFileSync(co2, lines.join('\n'));
    const run = await runMain('fit', co2, '--x', 'conc', '--y', 'uptake', '--per', 'plant', '--df', '2,3', '--resampling', 'folds:5', '--print-only');
    assert.equal(run.code, 0, run.stderr);
    assert.match(run.stdout, /1 row rejected\n {2}line 6 \(plant\): the group cell is empty/);

    const eu = join(dir, 'eustocks.csv');
    copyFileSync(fixture('eustocks.csv'), eu);
    const ch = await runMain('fit', eu, '--x', 'day', '--channels', 'DAX,SMI,CAC,FTSE', '--df', '4,6,8', '--resampling', 'folds:5', '--quiet');
    assert.equal(ch.code, 0, ch.stderr);
    for (const name of ['DAX', 'FTSE']) {
      const alone = join(dir, name);
      mkdirSync(alone);
      copyFileSync(eu, join(alone, 'eustocks.csv'));
      assert.equal((await runMain('fit', join(alone, 'eustocks.csv'), '--x', 'day', '--y', name, '--df', '4,6,8', '--resampling', 'folds:5', '--quiet')).code, 0);
      assert.equal(readFileSync(join(dir, `eustocks.${name}.curve.csv`), 'utf8'), readFileSync(join(alone, 'eustocks.curve.csv'), 'utf8'), name);
    }
    assert.ok(existsSync(join(dir, 'eustocks.groups.fit.json')));
    assert.equal((await runCheckIn(dir, 'eustocks.groups.fit.json')).code, 0);
  });

  it("--emit and --inverse write each group's code and inverse table, the same bytes as its rows alone give; check rebuilds them; a turning curve names its group", async () => {
    // Monotone shape so every plant's curve has an inverse (datasets::CO2 uptake rises with conc).
    const MONO = [...TUNE, '--shape', 'increasing', '--emit', 'c,json', '--inverse'];
    // The column names typed in another case: the record and its commands use the header's labels.
    const run = await runMain('fit', co2, '--x', 'CONC', '--y', 'uptake', '--per', 'Plant', ...MONO, '--quiet');
    assert.equal(run.code, 0, run.stderr);
    const record = JSON.parse(readFileSync(join(dir, 'co2.groups.fit.json'), 'utf8')) as {
      version: number;
      spec: { emit: string[]; inverse: unknown };
      regenerate: string;
      groups: { name: string; inverse: { file: string; summary: { points: number } } | null }[];
    };
    assert.equal(record.version, 2);
    assert.deepEqual(record.spec.emit, ['c', 'json']);
    assert.ok(record.spec.inverse);
    assert.match(record.regenerate, / --x conc .* --per plant /);
    const alone = join(dir, 'alone');
    mkdirSync(alone);
    for (const [plant, rows] of [...plants()].slice(0, 3)) {
      const file = join(alone, `${plant}.csv`);
      writeFileSync(file, rows.join('\n') + '\n');
      const single = await runMain('fit', file, '--x', 'conc', '--y', 'uptake', ...MONO, '--quiet');
      assert.equal(single.code, 0, single.stderr);
      const g = record.groups.find((x) => x.name === plant);
      assert.equal(g?.inverse?.file, `co2.${plant}.inverse.csv`);
      assert.equal(readFileSync(join(dir, `co2.${plant}.inverse.csv`), 'utf8'), readFileSync(join(alone, `${plant}.inverse.csv`), 'utf8'), `${plant}: the same inverse table`);
      // The emitted JSON holds the same table values; only names and commands differ.
      const values = (f: string): { fit: number[] } => (JSON.parse(readFileSync(f, 'utf8')) as { columns: { fit: number[] } }).columns;
      assert.equal(values(join(dir, `co2.${plant}.curve.json`)).fit.length, 101);
      assert.deepEqual(values(join(dir, `co2.${plant}.curve.json`)), values(join(alone, `${plant}.curve.json`)));
      assert.match(readFileSync(join(dir, `co2.${plant}.inverse.h`), 'utf8'), new RegExp(`plant ${plant}`));
    }
    assert.equal((await runCheckIn(dir, 'co2.groups.fit.json')).code, 0);
    const inverse = join(dir, 'co2.Qn2.inverse.csv');
    writeFileSync(
      inverse,
      readFileSync(inverse, 'utf8').replace(/\n(\d)/, (_m, d: string) => `\n${(Number(d) + 1) % 10}`),
    );
    const changed = await runCheckIn(dir, 'co2.groups.fit.json');
    assert.equal(changed.code, 1);
    assert.match(changed.stdout, /co2\.Qn2\.inverse\.csv differs from the rebuilt one/);
    // Without the shape, some plant's curve turns within its range: the refusal names that plant.
    const turning = await runMain('fit', co2, '--x', 'conc', '--y', 'uptake', '--per', 'plant', ...TUNE, '--inverse', '--print-only');
    assert.equal(turning.code, 2);
    assert.match(turning.stderr, /plant \w+: the fitted curve turns at x = /);
  });

  it('--report writes one grouped review: every group in the summary with its df and table, the one-curve words, two standalone figures; check rebuilds it', async () => {
    const run = await runMain('fit', co2, '--x', 'conc', '--y', 'uptake', '--per', 'plant', ...TUNE, '--report', '--quiet');
    assert.equal(run.code, 0, run.stderr);
    const record = JSON.parse(readFileSync(join(dir, 'co2.groups.fit.json'), 'utf8')) as {
      spec: { report: boolean };
      common: { words: string };
      groups: { name: string; df: number; table: string }[];
      outputs: { kind: string; file: string }[];
    };
    assert.equal(record.spec.report, true);
    const report = readFileSync(join(dir, 'co2.groups.report.md'), 'utf8');
    assert.match(report, /^# Grouped fit of co2\.csv\n/);
    assert.match(report, /12 groups by plant, 84 rows used of 84 read \(0 rejected\)/);
    for (const g of record.groups) assert.ok(report.includes(`| ${g.name} | 7 | ${g.df} |`) && report.includes(`[${g.table}](${g.table})`), g.name);
    assert.ok(report.includes(record.common.words.replace(/</g, '\\<')), 'the one-curve words');
    assert.match(report, /knotwise check co2\.groups\.fit\.json/);
    for (const name of ['co2.groups.report.overlay.svg', 'co2.groups.report.small.svg']) {
      const svg = readFileSync(join(dir, name), 'utf8');
      assert.match(svg, /^<\?xml version="1\.0" encoding="UTF-8"\?>\n<svg [^>]*role="img"/);
      assert.match(svg, /<style>[^<]*\.kw-group-curve\{fill:none/, `${name} carries its own palette`);
      assert.ok(report.includes(`](${name})`), `${name} is shown`);
      assert.ok(record.outputs.some((o) => o.file === name && o.kind === 'figure'));
    }
    // Twelve plants: one curve each in the overlay, one small figure each, named above it.
    assert.equal((readFileSync(join(dir, 'co2.groups.report.overlay.svg'), 'utf8').match(/class="kw-group-curve/g) ?? []).length, 12);
    assert.equal((readFileSync(join(dir, 'co2.groups.report.small.svg'), 'utf8').match(/class="kw-small-name"/g) ?? []).length, 12);
    assert.equal((await runCheckIn(dir, 'co2.groups.fit.json')).code, 0);
    writeFileSync(join(dir, 'co2.groups.report.md'), report.replace('## Summary', '## Summery'));
    const changed = await runCheckIn(dir, 'co2.groups.fit.json');
    assert.equal(changed.code, 1);
    assert.match(changed.stdout, /co2\.groups\.report\.md differs from the rebuilt one/);
  });

  it('--holdout holds out rows within each group exactly as a file of its rows alone: the same table bytes and held-out numbers; the summary adds them; check rebuilds it', async () => {
    const HOLD = ['--df', '2,3', '--resampling', 'bootstrap:20', '--seed', '5', '--holdout', '0.3'];
    const run = await runMain('fit', co2, '--x', 'conc', '--y', 'uptake', '--per', 'plant', ...HOLD, '--quiet');
    assert.equal(run.code, 0, run.stderr);
    const record = JSON.parse(readFileSync(join(dir, 'co2.groups.fit.json'), 'utf8')) as {
      spec: { holdout: number };
      groups: { name: string; table: string; holdout: { rows: number; rmse: number } | null }[];
    };
    assert.equal(record.spec.holdout, 0.3);
    const alone = join(dir, 'alone');
    mkdirSync(alone);
    for (const [plant, rows] of [...plants()].slice(0, 4)) {
      const file = join(alone, `${plant}.csv`);
      writeFileSync(file, rows.join('\n') + '\n');
      const single = await runMain('fit', file, '--x', 'conc', '--y', 'uptake', ...HOLD, '--quiet');
      assert.equal(single.code, 0, single.stderr);
      const g = record.groups.find((x) => x.name === plant);
      assert.ok(g?.holdout, plant);
      assert.equal(readFileSync(join(dir, g.table), 'utf8'), readFileSync(join(alone, `${plant}.curve.csv`), 'utf8'), `${plant}: the same table`);
      const rec = JSON.parse(readFileSync(join(alone, `${plant}.fit.json`), 'utf8')) as { selection: { holdout: { rows: number; rmse: number } } };
      assert.deepEqual(g.holdout, rec.selection.holdout, `${plant}: the same held-out rows and errors`);
    }
    const summary = readFileSync(join(dir, 'co2.groups.csv'), 'utf8').split('\n');
    assert.equal(summary[0], 'group,rows,df,residualSd,rmse,rmseSe,heldOutRows,heldOutRmse,table');
    assert.equal((await runCheckIn(dir, 'co2.groups.fit.json')).code, 0);
    const shared = await runMain('fit', co2, '--x', 'conc', '--y', 'uptake', '--per', 'plant', ...HOLD, '--shared-df', '--print-only');
    assert.equal(shared.code, 2);
    assert.match(shared.stderr, /a df shared by the groups cannot be combined with held-out rows/);
  });

  it('--trials with --per: each group a binomial fit of its successes out of its trials, as its rows alone; check rebuilds it (MASS::menarche split into two groups by row)', async () => {
    // MASS::menarche (test/e2e/fixtures/menarche.csv), its rows dealt alternately into two groups.
    const [head, ...rows] = readFileSync(fixture('menarche.csv'), 'utf8').trim().split('\n');
    const half = (i: number): string => (i % 2 === 0 ? 'first' : 'second');
    const file = join(dir, 'men.csv');
    writeFileSync(file, [`half,${head}`, ...rows.map((r, i) => `${half(i)},${r}`)].join('\n') + '\n');
    const BIN = ['--x', 'Age', '--y', 'Menarche', '--outcome', 'proportions', '--trials', 'Total', '--df', '2,3,4', '--resampling', 'folds:5', '--seed', '2'];
    const run = await runMain('fit', file, ...BIN, '--per', 'half', '--quiet');
    assert.equal(run.code, 0, run.stderr);
    const record = JSON.parse(readFileSync(join(dir, 'men.groups.fit.json'), 'utf8')) as { spec: { model: { trials: string } }; groups: { name: string; table: string }[]; common: unknown };
    assert.equal(record.spec.model.trials, 'Total');
    assert.equal(record.common, null, 'the one-curve test is for continuous readings');
    for (const name of ['first', 'second']) {
      const alone = join(dir, `${name}.csv`);
      writeFileSync(alone, [head, ...rows.filter((_, i) => half(i) === name)].join('\n') + '\n');
      const single = await runMain('fit', alone, ...BIN, '--quiet');
      assert.equal(single.code, 0, single.stderr);
      const g = record.groups.find((x) => x.name === name);
      assert.ok(g);
      assert.equal(readFileSync(join(dir, g.table), 'utf8'), readFileSync(join(dir, `${name}.curve.csv`), 'utf8'), `${name}: the same table`);
    }
    assert.equal((await runCheckIn(dir, 'men.groups.fit.json')).code, 0);
    const again = (JSON.parse(readFileSync(join(dir, 'men.groups.fit.json'), 'utf8')) as { regenerate: string }).regenerate;
    assert.ok(again.includes(' --trials Total ') && !again.includes('--weights'), again);
    const channels = await runMain('fit', file, '--x', 'Age', '--channels', 'Menarche,Total', '--outcome', 'proportions', '--trials', 'Total', '--print-only');
    assert.equal(channels.code, 2);
    assert.match(channels.stderr, /several reading columns cannot share one trials column/);
  });

  it('bad group options say what is wrong', async () => {
    const cases: [string[], RegExp][] = [
      [['--per', 'nope'], /no column named "nope" to split the rows by/],
      [['--per', 'conc'], /--x and --per name the same column "conc"/],
      [['--shared-df'], /--shared-df needs groups/],
      [['--per', 'plant', '--shared-df', '--resampling', 'gcv'], /pooled resampled errors: use bootstrap/],
    ];
    for (const [args, message] of cases) {
      const r = await runMain('fit', co2, '--x', 'conc', '--y', 'uptake', ...args, '--print-only');
      assert.equal(r.code, 2, args.join(' '));
      assert.match(r.stderr, message);
    }
  });
});
