/**
 * Tests of reading a fit record back into its plan (core/outputs/recordPlan.ts): every plan the
 * command line can express comes back unchanged from the record it wrote, and a bad record
 * is refused naming the key at fault; a record file's bytes are refused when empty, not
 * UTF-8, cut short or breaking the schema. Data: datasets::cars (Ezekiel 1930) from
 * test/e2e/fixtures/cars.csv (make-fixtures.R).
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { runPipeline } from '../../../core/node/pipeline';
import { DEFAULT_OUTPUT, type FitPlan } from '../../../core/outputs/plan';
import { readRecord, readRecordFile } from '../../../core/outputs/recordPlan';
import { copyFixture } from '../node/runMain';

/** The plan as JSON sees it (keys holding undefined dropped). */
function plain(p: FitPlan): unknown {
  return JSON.parse(JSON.stringify(p));
}

const PLANS: Record<string, FitPlan> = {
  'tuned with default candidates and the default grid': {
    columns: { x: 'speed', y: 'dist' },
    tune: true,
    options: { kind: 'natural-spline', candidates: undefined, resample: { kind: 'bootstrap', resamples: 20 }, rule: { kind: 'one-se' }, seed: 11, holdout: undefined },
    output: DEFAULT_OUTPUT,
  },
  'tuned with candidates, tolerance rule, holdout, automatic step, emitters, report': {
    columns: { x: 'speed', y: 'dist' },
    tune: true,
    options: { kind: 'polynomial', candidates: [1, 2, 3, 4], resample: { kind: 'folds', folds: 5, repeats: 3 }, rule: { kind: 'simplest-within', percent: 2.5 }, seed: 2, holdout: 0.2 },
    output: { grid: { kind: 'auto', tolerance: 0.5, start: 5, stop: 24 }, extrapolate: false, digits: 6, columns: ['x', 'fit', 'se'], flagNegative: true, emit: ['c', 'json'], report: true },
  },
  'fixed df with a shape constraint and robust fitting (model options)': {
    columns: { x: 'speed', y: 'dist' },
    tune: false,
    options: { kind: 'natural-spline', candidates: [4], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0, shape: ['increasing'], robust: true },
    output: DEFAULT_OUTPUT,
  },
  'fixed df with a Poisson outcome': {
    columns: { x: 'speed', y: 'dist' },
    tune: false,
    options: { kind: 'natural-spline', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0, outcome: 'counts' },
    output: DEFAULT_OUTPUT,
  },
  'fixed df with robust fitting at k = 2': {
    columns: { x: 'speed', y: 'dist' },
    tune: false,
    options: { kind: 'natural-spline', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0, robust: { k: 2 } },
    output: DEFAULT_OUTPUT,
  },
  'fixed df with a list grid and extrapolation': {
    columns: { x: 'speed', y: 'dist' },
    tune: false,
    options: { kind: 'smoothing-spline', candidates: [4.5], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0 },
    output: { ...DEFAULT_OUTPUT, grid: { kind: 'list', values: [0, 12.5, 30] }, extrapolate: true },
  },
};

describe('readRecord', () => {
  let dir = '';
  let data = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-plan-'));
    data = copyFixture('cars.csv', join(dir, 'cars.csv'));
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  for (const [what, plan] of Object.entries(PLANS)) {
    it(`readRecord gives back the plan that wrote the record: ${what}`, async function () {
      this.timeout(60_000);
      const run = await runPipeline(data, plan, join(dir, 'out'));
      const json = JSON.parse(JSON.stringify(run.deliverables.record)) as unknown;
      const back = readRecord(json, 'cars.fit.json');
      assert.deepEqual(plain(back.plan), plain(plan));
      assert.equal(back.dataPath, '../cars.csv');
      assert.equal(back.dataSha256, run.table.sha256);
      assert.equal(back.df, run.fit.df);
      assert.deepEqual(
        back.files.map((f) => f.file),
        run.deliverables.files.filter((f) => f.kind !== 'record').map((f) => f.name),
      );
    });
  }

  it('readRecord reads a hand-chosen df (rule df:<k>) as the manual rule', async function () {
    this.timeout(60_000);
    const run = await runPipeline(
      data,
      {
        ...(PLANS['tuned with default candidates and the default grid'] as FitPlan),
        options: { kind: 'natural-spline', candidates: [2, 3, 4, 5], resample: { kind: 'leave-one-out' }, rule: { kind: 'pick', df: 4 }, seed: 1 },
      },
      dir,
    );
    const back = readRecord(JSON.parse(JSON.stringify(run.deliverables.record)), 'x');
    assert.deepEqual(back.plan.options.rule, { kind: 'pick', df: 4 });
  });

  it('readRecord refuses other formats, newer versions and missing or mistyped keys, naming the record and the key', () => {
    const refuse = (json: unknown, pattern: RegExp): void => {
      assert.throws(
        () => readRecord(json, 'a.fit.json'),
        (e: unknown) => e instanceof InputError && e.place.file === 'a.fit.json' && pattern.test(e.message),
      );
    };
    refuse([], /not a fit record: the file is not a JSON object/);
    refuse({ format: 'x' }, /not a fit record: "format" is "x", expected "knotwise-fit-record"/);
    refuse({ format: 'knotwise-fit-record', version: 9 }, /version 9 was written by a newer Knotwise/);
    refuse({ format: 'knotwise-fit-record', version: 1 }, /version 1 was written by an earlier Knotwise whose words have changed/);
    refuse({ format: 'knotwise-fit-record', version: 3, tool: {}, data: { columns: {} } }, /"spec" must be an object/);
    const spec = { curve: 'natural-spline', candidates: [3], resampling: null, rule: 'pick:3', grid: { kind: 'count', start: 0, stop: 1, count: 'x' }, extrapolate: false, digits: 8, emit: [] };
    const rec = {
      format: 'knotwise-fit-record',
      version: 3,
      tool: { version: '0' },
      data: { file: 'a.csv', sha256: 'a', rowsUsed: 1, columns: { x: 'a', y: 'b' } },
      spec,
      fit: { df: 3 },
      table: { file: 't', sha256: 's' },
    };
    refuse(rec, /"spec.grid.count" must be a number/);
    refuse({ ...rec, spec: { ...spec, grid: { kind: 'data' }, candidates: [0.5] } }, /"spec.candidates\[0\]" must be a number of at least 1/);
    refuse({ ...rec, spec: { ...spec, grid: { kind: 'data' }, emit: ['rust'] } }, /"spec.emit\[0\]" must be one of c, ts, json/);
    refuse({ ...rec, spec: { ...spec, grid: { kind: 'data' }, curve: 'spline' } }, /"spec.curve" is not valid: unknown curve "spline"; use natural-spline, polynomial, smoothing-spline/);
    refuse({ ...rec, spec: { ...spec, grid: { kind: 'data' }, curve: 'natural' } }, /unknown curve "natural"/);
    refuse({ ...rec, spec: { ...spec, grid: { kind: 'data' }, tuned: true } }, /"spec.resampling" must be given for a tuned fit/);
    // The same record with a valid grid reads.
    assert.equal(readRecord({ ...rec, spec: { ...spec, grid: { kind: 'data' } } }, 'a.fit.json').plan.tune, false);
  });

  it('readRecordFile reads the bytes Knotwise wrote, and refuses empty, non-UTF-8, byte-order-marked, truncated and schema-breaking files', async function () {
    this.timeout(60_000);
    const run = await runPipeline(data, PLANS['fixed df with a Poisson outcome'] as FitPlan, join(dir, 'out'));
    const text = (run.deliverables.files.find((f) => f.kind === 'record') as { text: string }).text;
    const bytes = (t: string): Uint8Array => new TextEncoder().encode(t);
    const read = readRecordFile(bytes(text), 'cars.fit.json');
    assert.deepEqual(plain(read.run.plan), plain(readRecord(JSON.parse(text), 'x').plan));
    assert.deepEqual(read.json, JSON.parse(text));
    const refuse = (b: Uint8Array, pattern: RegExp): void => {
      assert.throws(
        () => readRecordFile(b, 'a.fit.json'),
        (e: unknown) => e instanceof InputError && e.place.file === 'a.fit.json' && pattern.test(e.message),
      );
    };
    refuse(new Uint8Array(0), /^not a fit record: the file is empty$/);
    refuse(bytes(' \n'), /^not a fit record: the file is empty \(white space only\)$/);
    refuse(Uint8Array.from([0x7b, 0xc3, 0x28, 0x7d]), /^not a fit record: the file is not UTF-8 text$/);
    refuse(bytes('\uFEFF' + text), /starts with a byte order mark/);
    refuse(bytes(text.slice(0, 400)), /^not valid JSON \(.*\); the file looks truncated$/);
    refuse(bytes(text.replace('"version": 3', '"version": 2')), /version 2 was written by an earlier Knotwise/);
    refuse(
      bytes(text.replace('"rowsRead": 50', '"rowsRead": -50').replace('"level": 0.95', '"level": 0.9')),
      /^the fit record does not follow its schema \(schema\/fit-record\.schema\.json, version 3\): "data\.rowsRead" must be at least 0; it is -50; "spec\.level" must be 0\.95; it is 0\.9$/,
    );
    const many = JSON.parse(text) as Record<string, unknown>;
    for (const k of ['fit', 'table', 'outputs', 'warnings', 'caution']) delete many[k];
    refuse(bytes(JSON.stringify(many)), /: "fit" is missing; "table" is missing; "outputs" is missing; and 2 more$/);
  });
});
