/**
 * Tests of the fit record's own schema validator (core/outputs/recordSchema.ts): it gives
 * the same verdict as Ajv (a widely used JSON Schema validator, draft 2020-12) on records
 * of several kinds of run and on 400 seeded random tamperings of them, names the key at
 * fault, and refuses a schema keyword it does not apply. Data: datasets::cars (Ezekiel
 * 1930) from test/e2e/fixtures/cars.csv (make-fixtures.R).
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv2020 from 'ajv/dist/2020';
import { runPipeline } from '../../../core/node/pipeline';
import { DEFAULT_OUTPUT, type FitPlan } from '../../../core/outputs/plan';
import { RECORD_SCHEMA, RecordSchema } from '../../../core/outputs/recordSchema';
import { RandomStream } from '../../../core/tune/rng';
import { copyFixture } from '../node/runMain';

const REPO = join(__dirname, '..', '..', '..');
const schema = JSON.parse(readFileSync(join(REPO, 'schema', 'fit-record.schema.json'), 'utf8')) as Record<string, unknown>;
const ajv = new Ajv2020({ allErrors: true, strict: true }).compile(schema);

type Json = null | boolean | number | string | Json[] | { [k: string]: Json };

/** Every path (keys and indices) to a value inside `v`, the root excluded. */
function paths(v: Json, at: (string | number)[] = [], out: (string | number)[][] = []): (string | number)[][] {
  const entries: [string | number, Json][] = Array.isArray(v) ? v.map((x, i) => [i, x]) : v !== null && typeof v === 'object' ? Object.entries(v) : [];
  for (const [k, x] of entries) {
    out.push([...at, k]);
    paths(x, [...at, k], out);
  }
  return out;
}

/** Replacements of another type or out of range, tried at random places. */
const ODD: readonly Json[] = [null, true, 0, -1, 0.5, 1e9, '', 'x', '0.1.0', [], [1], {}, { kind: 'data' }];

/** A copy of `rec` with one seeded random change: a value replaced, a key removed, or a key added. */
function tamper(rec: Json, rng: RandomStream): Json {
  const copy = JSON.parse(JSON.stringify(rec)) as Json;
  const all = paths(copy);
  const path = all[rng.int(all.length)] as (string | number)[];
  let parent = copy as Record<string | number, Json>;
  for (const k of path.slice(0, -1)) parent = parent[k] as Record<string | number, Json>;
  const last = path[path.length - 1] as string | number;
  const what = rng.int(4);
  if (what === 0 && typeof last === 'string') delete parent[last];
  else if (what === 1 && !Array.isArray(parent)) parent.unexpected = 1;
  else parent[last] = ODD[rng.int(ODD.length)] as Json;
  return copy;
}

describe('RECORD_SCHEMA (the record validator)', () => {
  let dir = '';
  const records: Json[] = [];

  before(async function () {
    this.timeout(60_000);
    dir = mkdtempSync(join(tmpdir(), 'knotwise-schema-'));
    const cars = copyFixture('cars.csv', join(dir, 'cars.csv'));
    const plans: FitPlan[] = [
      {
        columns: { x: 'speed', y: 'dist' },
        tune: true,
        options: { kind: 'natural-spline', candidates: [2, 3, 4, 5], resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'simplest-within', percent: 2 }, seed: 3, holdout: 0.2 },
        output: { ...DEFAULT_OUTPUT, grid: { kind: 'auto', tolerance: 1 }, emit: ['c', 'json'], report: true },
      },
      {
        columns: { x: 'speed', y: 'dist' },
        tune: false,
        options: { kind: 'natural-spline', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0, shape: ['increasing'], robust: { k: 2 } },
        output: { ...DEFAULT_OUTPUT, grid: { kind: 'list', values: [0, 10, 30] }, extrapolate: true, columns: ['x', 'fit'], flagNegative: true },
      },
      {
        columns: { x: 'speed', y: 'dist' },
        tune: false,
        options: { kind: 'natural-spline', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0, outcome: 'counts' },
        output: DEFAULT_OUTPUT,
      },
    ];
    for (const p of plans) records.push(JSON.parse(JSON.stringify((await runPipeline(cars, p, join(dir, 'out'))).deliverables.record)) as Json);
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('records of tuned, fixed, constrained and counts runs are valid for both validators', () => {
    for (const r of records) {
      assert.ok(ajv(r), JSON.stringify(ajv.errors));
      assert.deepEqual(RECORD_SCHEMA.problems(r), []);
    }
  });

  it('400 seeded random tamperings get the same verdict as from Ajv, and some of each verdict', () => {
    const rng = new RandomStream(2024);
    let invalid = 0;
    for (let i = 0; i < 400; i++) {
      const t = tamper(records[i % records.length] as Json, rng);
      const ours = RECORD_SCHEMA.problems(t);
      assert.equal(ours.length === 0, ajv(t), `tampering ${i}: ours ${JSON.stringify(ours.slice(0, 2))}, Ajv ${JSON.stringify(ajv.errors?.slice(0, 2))}`);
      if (ours.length) invalid++;
    }
    assert.ok(invalid > 100 && invalid < 400, `${invalid} of 400 invalid`);
  });

  it('problems name the key at fault and what is wrong', () => {
    const r = JSON.parse(JSON.stringify(records[1])) as Record<string, Record<string, Json>>;
    (r.fit as Record<string, Json>).df = '3';
    delete (r.data as Record<string, Json>).sha256;
    (r.spec as Record<string, Json>).emit = ['c', 'c'];
    (r.spec as Record<string, Json>).digits = 2.5;
    (r.table as Record<string, Json>).extra = 1;
    (r.spec as Record<string, Json>).columns = ['x', 'y'];
    assert.deepEqual(RECORD_SCHEMA.problems(r), [
      { path: 'data.sha256', message: 'is missing' },
      { path: 'spec.digits', message: 'must be a whole number; it is 2.5' },
      { path: 'spec.columns', message: 'is none of the allowed forms; it is ["x","y"]' },
      { path: 'spec.emit', message: 'must not repeat an item; "c" appears twice' },
      { path: 'fit.df', message: 'must be a number; it is "3"' },
      { path: 'table.extra', message: 'is not a key of this record format' },
    ]);
    assert.deepEqual(RECORD_SCHEMA.problems([]), [{ path: '(the record)', message: 'must be an object; it is []' }]);
  });

  it('a schema keyword the validator does not apply, or a reference outside the schema, is refused when the schema is loaded', () => {
    assert.throws(() => new RecordSchema({ type: 'object', properties: { a: { if: { type: 'string' } } } }), /keyword "if" at #\/properties\/a is not supported/);
    assert.throws(() => new RecordSchema({ $ref: 'https://example.invalid/s.json' }), /only local references/);
    assert.doesNotThrow(() => new RecordSchema(schema));
  });
});
