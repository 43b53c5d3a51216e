/**
 * Tests of one fit from a file (core/node/pipeline.ts): a rerun gives the same texts, the
 * fitted rows are the ones the analysis used after its held-out split, the data path is
 * relative to the output folder, and fitting errors name the file and the CSV's column.
 * Data: MASS::mcycle (Silverman 1985) and datasets::cars (Ezekiel 1930) from
 * test/e2e/fixtures (make-fixtures.R).
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { placed, portableRelative, readableWhole, runPipeline } from '../../../core/node/pipeline';
import { MAX_COLUMNS } from '../../../core/ingest/header';
import { DEFAULT_OUTPUT, type FitPlan } from '../../../core/outputs/plan';
import { copyFixture } from './runMain';

describe('runPipeline', () => {
  let dir = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-pipe-'));
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('runPipeline twice on the same file and plan gives the same output texts (a rerun is byte-identical)', async function () {
    this.timeout(60_000);
    const data = copyFixture('mcycle.csv', join(dir, 'mcycle.csv'));
    const plan: FitPlan = {
      columns: { x: 'times', y: 'accel' },
      tune: true,
      options: { kind: 'natural-spline', candidates: [4, 6, 8, 10, 12], resample: { kind: 'bootstrap', resamples: 30 }, rule: { kind: 'one-se' }, seed: 21 },
      output: { ...DEFAULT_OUTPUT, emit: ['c', 'ts', 'json'], report: true },
    };
    const a = await runPipeline(data, plan, join(dir, 'out'));
    const b = await runPipeline(data, plan, join(dir, 'out'));
    assert.deepEqual(
      b.deliverables.files.map((f) => [f.name, f.text]),
      a.deliverables.files.map((f) => [f.name, f.text]),
    );
    assert.equal(a.deliverables.files.length, 11);
  });

  it('with a held-out fraction the fitted rows are the analysis rows (per-row arrays line up)', async function () {
    this.timeout(60_000);
    const data = copyFixture('cars.csv', join(dir, 'cars.csv'));
    const plan: FitPlan = {
      columns: { x: 'speed', y: 'dist' },
      tune: true,
      options: { kind: 'natural-spline', candidates: [2, 3, 4], resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'least-error' }, seed: 2, holdout: 0.2 },
      output: { ...DEFAULT_OUTPUT, report: true },
    };
    const r = await runPipeline(data, plan, dir);
    assert.equal(r.selection.data.x.length, 50);
    assert.equal(r.fitted.x.length, r.analysis?.n);
    assert.equal(r.fitted.x.length, r.fit.n);
    assert.ok(r.fitted.x.length < 50);
    // Each fitted row's fitted value plus residual is its reading.
    for (let i = 0; i < r.fit.n; i++) assert.ok(Math.abs((r.fit.fitted[i] as number) + (r.fit.residuals[i] as number) - (r.fitted.y[i] as number)) <= 1e-9);
  });

  it('the data path is relative to the output folder with / separators', () => {
    assert.equal(portableRelative('/a/b/out', '/a/data/x.csv'), '../../data/x.csv');
    assert.equal(portableRelative('/a', '/a/x.csv'), 'x.csv');
  });

  it('placed gives a fitting error the file and the CSV column name', () => {
    const e = placed(new InputError('bad value', { line: 7, column: 'y' }), 'cars.csv', { x: 'speed', y: 'dist' }) as InputError;
    assert.equal(e.describe(), 'cars.csv, line 7, column "dist": bad value');
    const kept = new InputError('x', { file: 'other.csv' });
    assert.equal(placed(kept, 'cars.csv', { x: 'a', y: 'b' }), kept);
  });
});

describe('readableWhole (whether the command line starts its workers before reading)', () => {
  it('is true for a table within the column limit and the budget, false for a header wider than the limit, a budget too small or a missing file', () => {
    const dir = mkdtempSync(join(tmpdir(), 'knotwise-readable-'));
    try {
      const cars = copyFixture('cars.csv', join(dir, 'cars.csv'));
      assert.equal(readableWhole(cars, 320), true);
      // The memory estimate of any file is at least its fixed part (core/stream/budget.ts), above 1 MiB.
      assert.equal(readableWhole(cars, 1), false);
      const wide = join(dir, 'wide.csv');
      writeFileSync(wide, `${Array.from({ length: MAX_COLUMNS + 1 }, (_, k) => `c${k}`).join(',')}\n1,2\n`);
      assert.equal(readableWhole(wide, 320), false);
      assert.equal(readableWhole(join(dir, 'missing.csv'), 320), false);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
