/**
 * Tests of the fit record (core/outputs/record.ts): records of several kinds of run validate against
 * the JSON Schema in schema/fit-record.schema.json, checked with Ajv (a widely used JSON
 * Schema validator, draft 2020-12), and records broken in typical ways do not. Data sets from
 * R (test/e2e/fixtures/make-fixtures.R, test/fixtures/csv/make-fixtures.R,
 * test/reference/r/fits.R): MASS::mcycle, datasets::cars, datasets::cars with prior weights
 * 1 / speed, datasets::airquality (rows with NA are rejected).
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020';
import { runPipeline } from '../../../core/node/pipeline';
import { DEFAULT_OUTPUT, type FitPlan } from '../../../core/outputs/plan';
import { fitRecord, RECORD_FORMAT, RECORD_VERSION } from '../../../core/outputs/record';
import { fitCurve } from '../../../core/fit/index';
import { diagnose } from '../../../core/analysis/diagnose';
import { copyFixture } from '../node/runMain';

const REPO = join(__dirname, '..', '..', '..');
const schema = JSON.parse(readFileSync(join(REPO, 'schema', 'fit-record.schema.json'), 'utf8')) as Record<string, unknown>;
const validate = new Ajv2020({ allErrors: true, strict: true }).compile(schema);

function assertValid(record: unknown, what: string): void {
  const ok = validate(record);
  assert.ok(ok, `${what}: ${JSON.stringify(validate.errors, null, 1)}`);
}

function plan(over: Partial<FitPlan> & { columns: FitPlan['columns'] }): FitPlan {
  return { tune: true, options: { kind: 'natural-spline', resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1 }, output: DEFAULT_OUTPUT, ...over };
}

describe('fit record and its JSON Schema', () => {
  let dir = '';
  const records: Record<string, Record<string, unknown>> = {};

  before(async function () {
    this.timeout(120_000);
    dir = mkdtempSync(join(tmpdir(), 'knotwise-record-'));
    const mcycle = copyFixture('mcycle.csv', join(dir, 'mcycle.csv'));
    const cars = copyFixture('cars.csv', join(dir, 'cars.csv'));
    const fits = JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars_w: { x: number[]; y: number[]; w: number[] } } };
    const cw = fits.datasets.cars_w;
    const carsW = join(dir, 'cars_w.csv');
    writeFileSync(carsW, ['speed,dist,w', ...cw.x.map((x, i) => `${x},${cw.y[i]},${cw.w[i]}`)].join('\n') + '\n');
    const air = join(dir, 'airquality.csv');
    writeFileSync(air, readFileSync(join(REPO, 'test', 'fixtures', 'csv', 'airquality.csv')));
    const out = join(dir, 'out');
    const run = async (file: string, p: FitPlan): Promise<Record<string, unknown>> => (await runPipeline(file, p, out)).deliverables.record;
    records.tunedAuto = await run(mcycle, plan({ columns: { x: 'times', y: 'accel' }, output: { ...DEFAULT_OUTPUT, grid: { kind: 'auto', tolerance: 1 }, emit: ['c', 'ts', 'json'], report: true } }));
    records.fixedList = await run(
      cars,
      plan({
        columns: { x: 'speed', y: 'dist' },
        tune: false,
        options: { kind: 'polynomial', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0 },
        output: { ...DEFAULT_OUTPUT, grid: { kind: 'list', values: [0, 10, 20, 30] }, extrapolate: true, columns: ['x', 'fit'], flagNegative: true, digits: 6 },
      }),
    );
    records.weightedHoldout = await run(
      carsW,
      plan({
        columns: { x: 'speed', y: 'dist', weights: 'w' },
        options: { kind: 'smoothing-spline', candidates: [2, 3, 4, 5], resample: { kind: 'bootstrap', resamples: 20 }, rule: { kind: 'simplest-within', percent: 5 }, seed: 4, holdout: 0.2 },
        output: { ...DEFAULT_OUTPUT, grid: { kind: 'data' } },
      }),
    );
    records.poissonTuned = await run(
      cars,
      plan({
        columns: { x: 'speed', y: 'dist' },
        options: { kind: 'natural-spline', candidates: [2, 3, 4], resample: { kind: 'bootstrap', resamples: 20 }, rule: { kind: 'one-se' }, seed: 5, outcome: 'counts' },
      }),
    );
    records.shapeRobust = await run(
      cars,
      plan({
        columns: { x: 'speed', y: 'dist' },
        tune: false,
        options: { kind: 'natural-spline', candidates: [4], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0, shape: ['increasing'], robust: { k: 2 } },
      }),
    );
    records.rejectedLoo = await run(
      air,
      plan({ columns: { x: 'Temp', y: 'Ozone' }, options: { kind: 'natural-spline', resample: { kind: 'leave-one-out' }, rule: { kind: 'least-error' }, seed: 1 } }),
    );
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('the schema itself compiles in Ajv strict mode and names the record format', () => {
    assert.equal((schema.properties as Record<string, { const?: unknown }>).format?.const, RECORD_FORMAT);
    assert.equal((schema.properties as Record<string, { const?: unknown }>).version?.const, RECORD_VERSION);
  });

  it('records of tuned, fixed, weighted/held-out, rejected-row, Poisson and shape/robust runs validate against schema/fit-record.schema.json', () => {
    for (const [what, r] of Object.entries(records)) assertValid(r, what);
    // The runs really differ where the schema has alternatives.
    assert.equal((records.fixedList?.selection as unknown) ?? null, null);
    // R: sum(is.na(airquality$Ozone)) is 37 (from memory; the CSV writes them as NA).
    assert.equal((records.rejectedLoo?.data as { rejected: unknown[] }).rejected.length, 37);
    assert.equal((records.weightedHoldout?.data as { columns: { weights?: string } }).columns.weights, 'w');
    assert.equal((records.tunedAuto?.spec as { grid: { kind: string } }).grid.kind, 'auto');
    assert.equal((records.poissonTuned?.selection as { metric: string }).metric, 'deviance');
    assert.deepEqual((records.shapeRobust?.spec as { model: unknown }).model, { outcome: null, shape: ['increasing'], robust: { k: 2 }, trials: null });
    assert.equal((records.tunedAuto?.outputs as unknown[]).length, 9); // 3 emitted files, the report and 5 figures
  });

  it('a record holds everything needed to rebuild the table: data SHA-256 and path, the full spec, and the regenerate command', () => {
    const r = records.tunedAuto as Record<string, any>;
    assert.match(r.data.sha256, /^[0-9a-f]{64}$/);
    assert.equal(r.data.path, '../mcycle.csv');
    for (const key of [
      'curve',
      'tuned',
      'candidates',
      'candidatesDefault',
      'resampling',
      'seed',
      'rule',
      'tolerancePercent',
      'holdout',
      'grid',
      'gridDefault',
      'digits',
      'extrapolate',
      'columns',
      'flagNegative',
      'emit',
      'report',
      'level',
    ]) {
      assert.ok(key in r.spec, `spec.${key}`);
    }
    assert.equal(r.regenerate, 'knotwise fit ../mcycle.csv --x times --y accel --curve natural-spline --resampling folds:5 --rule one-se --seed 1 --grid auto:1 --emit c,ts,json --report --out .');
    assert.ok(r.table.interpolation.maxError <= 1 && r.table.interpolation.tolerance === 1);
    const f = records.fixedList as Record<string, any>;
    assert.deepEqual(f.table.extrapolated, [0, 30]);
    // Asked for x and fit; extrapolated is added because rows are flagged. The quadratic stays
    // above zero from 0 to 30 mph, so no negative column is added although it was declared.
    assert.deepEqual(f.table.columns, ['x', 'fit', 'extrapolated']);
    assert.deepEqual(f.table.negative, []);
    assert.match(f.caution, /not a certified calibration/);
  });

  it('the record carries each test with its effect size and verdict, the dispersion of counts, the drift in row order and every influential row', () => {
    const r = records.tunedAuto as Record<string, any>;
    const d = r.diagnostics;
    // MASS::mcycle: the residual checks run (n = 133, df below n).
    for (const key of ['shapiroWilk', 'durbinWatson', 'breuschPagan']) assert.equal(typeof d[key].flagged, 'boolean', key);
    assert.equal(typeof d.durbinWatson.lag1, 'number');
    assert.equal(typeof d.breuschPagan.spreadRatio, 'number');
    assert.equal(typeof d.shapiroWilk.skewness, 'number');
    assert.equal(d.exactFit, null);
    assert.equal(d.dispersion, null);
    assert.equal(typeof d.rowOrder.lag1, 'number');
    assert.equal(d.rowOrder.series, undefined, 'the plot series stays in the panel');
    assert.deepEqual(
      d.influence.thresholds.map((t: { rule: string }) => t.rule),
      ['outlier', 'cooks', 'leverage'],
    );
    assert.equal(d.influence.rows.length, d.influence.total);
    assert.equal(d.influence.shown, Math.min(10, d.influence.total));
    assert.deepEqual(
      d.influentialRows,
      d.influence.rows.map((row: { line: number }) => row.line),
    );
    const p = records.poissonTuned as Record<string, any>;
    assert.ok(['over', 'under', 'as-expected'].includes(p.diagnostics.dispersion.verdict), JSON.stringify(p.diagnostics.dispersion));
    assert.equal(p.diagnostics.breuschPagan, null);
    // poissonTuned tunes df 2, 3, 4: the edge is flagged exactly when the least mean deviance
    // (the record's own candidate errors) is at df 4, or df 4 is chosen (df 2 is never an edge).
    const cands = p.selection.candidates as { df: number; deviance: { mean: number } }[];
    const least = cands.reduce((a, b) => (b.deviance.mean < a.deviance.mean ? b : a));
    const upper = least.df === 4 || p.selection.df === 4;
    assert.deepEqual(p.selection.edge, upper ? { side: 'upper', df: 4, chosen: p.selection.df === 4, leastError: least.df === 4, widen: '2..8' } : null);
  });

  it('a record made without a plan or table summary (as the editor writes it) still validates', () => {
    const cars = (JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;
    const x = Float64Array.from(cars.x);
    const y = Float64Array.from(cars.y);
    const fit = fitCurve({ x, y }, { kind: 'natural-spline', df: 3 });
    const rec = fitRecord({
      dataFile: 'd.csv',
      dataSha256: 'e'.repeat(64),
      columns: { x: 'speed', y: 'dist' },
      rowsRead: 50,
      rowsUsed: 50,
      rejected: [],
      curve: 'natural-spline',
      fit,
      diagnostics: diagnose({ x, y }, fit),
      grid: { kind: 'data' },
      digits: 8,
      extrapolate: false,
      tableFile: 'd.curve.csv',
      tableSha256: 'f'.repeat(64),
    });
    assertValid(JSON.parse(JSON.stringify(rec)), 'record without plan');
    assert.equal((rec.table as { points: unknown }).points, null);
  });

  it('records broken in typical ways fail validation (so the schema is not vacuous)', () => {
    const base = JSON.parse(JSON.stringify(records.tunedAuto)) as Record<string, any>;
    const broken: [string, (r: Record<string, any>) => void][] = [
      ['missing data SHA-256', (r) => delete r.data.sha256],
      ['SHA-256 not hex', (r) => (r.data.sha256 = 'xyz')],
      ['unknown top-level key', (r) => (r.extra = 1)],
      ['unknown grid kind', (r) => (r.spec.grid = { kind: 'bogus' })],
      ['rule not understood', (r) => (r.spec.rule = 'best')],
      ['other format', (r) => (r.format = 'something-else')],
      ['newer version', (r) => (r.version = 4)],
      ['older version', (r) => (r.version = 1)],
      ['old key spec.family', (r) => ((r.spec.family = r.spec.curve), delete r.spec.curve)],
      ['old curve value', (r) => (r.spec.curve = 'natural')],
      ['old resampling value', (r) => (r.spec.resampling = 'cv:10')],
      ['old rule value', (r) => (r.spec.rule = '1se')],
      ['old outcome value', (r) => (r.spec.model.outcome = 'poisson')],
      ['old key fit.sigma', (r) => ((r.fit.sigma = r.fit.residualSd), delete r.fit.residualSd)],
      ['emitter not known', (r) => (r.spec.emit = ['rust'])],
      ['table column not known', (r) => (r.table.columns = ['x', 'fitted'])],
      ['missing regenerate command', (r) => delete r.regenerate],
      ['missing selection edge', (r) => delete r.selection.edge],
      ['edge on no known side', (r) => (r.selection.edge = { side: 'middle', df: 5, chosen: true, leastError: true, widen: '2..10' })],
      ['influence rule not known', (r) => (r.diagnostics.influence.rows = [{ line: 2, leverage: 0.1, cooksDistance: 2, studentized: 1, exceeds: ['cooks > 4/n'] }])],
      ['more than ten rows shown', (r) => (r.diagnostics.influence.shown = 11)],
      ['test without its verdict', (r) => r.diagnostics.durbinWatson && delete r.diagnostics.durbinWatson.flagged],
      ['dispersion verdict not known', (r) => (r.diagnostics.dispersion = { pearsonChi2: 1, residualDf: 1, ratio: 1, verdict: 'fine' })],
    ];
    for (const [what, mutate] of broken) {
      const r = JSON.parse(JSON.stringify(base)) as Record<string, any>;
      mutate(r);
      assert.equal(validate(r), false, `${what} should fail`);
    }
  });
});
