/**
 * Tests of the automatic table step (core/table/autoStep.ts): on a closed form (x^2, whose
 * linear-interpolation error on a step h is exactly h^2/4) and on a curve fitted to
 * MASS::mcycle (Silverman 1985; test/e2e/fixtures/mcycle.csv written by make-fixtures.R),
 * re-evaluated densely by a plain loop that shares no code with the implementation.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import { autoStep, resolveGrid } from '../../../core/table/autoStep';
import { formatNumber } from '../../../core/table/formatCsv';
import type { Curve } from '../../../core/types';

const REPO = join(__dirname, '..', '..', '..');

/** MASS::mcycle as columns. */
function mcycle(): { x: Float64Array; y: Float64Array } {
  const rows = readFileSync(join(REPO, 'test', 'e2e', 'fixtures', 'mcycle.csv'), 'utf8')
    .trim()
    .split('\n')
    .slice(1);
  return { x: Float64Array.from(rows, (r) => Number(r.split(',')[0])), y: Float64Array.from(rows, (r) => Number(r.split(',')[1])) };
}

/** Dense check: largest |f - broken line through the printed rows| with `per` evenly spaced samples per interval. */
function denseError(f: (x: number) => number, start: number, stop: number, m: number, round: (v: number) => number, per: number): number {
  let worst = 0;
  for (let i = 0; i < m; i++) {
    const xa = i === 0 ? start : start + ((stop - start) * i) / m;
    const xb = i + 1 === m ? stop : start + ((stop - start) * (i + 1)) / m;
    const [x0, x1, y0, y1] = [round(xa), round(xb), round(f(xa)), round(f(xb))];
    for (let j = 0; j <= per; j++) {
      const x = x0 + ((x1 - x0) * j) / per;
      worst = Math.max(worst, Math.abs(f(x) - (y0 + ((y1 - y0) * (x - x0)) / (x1 - x0))));
    }
  }
  return worst;
}

describe('autoStep', () => {
  it('autoStep(x^2, [0, 1], tolerance 0.011) takes 5 intervals with error h^2/4 = 0.01 (4 intervals would give 0.015625)', () => {
    const a = autoStep(
      (x) => x * x,
      0,
      1,
      0.011,
      (v) => v,
    );
    assert.equal(a.intervals, 5);
    assert.ok(Math.abs(a.step - 0.2) <= 1e-15, `step ${a.step} (tolerance 1e-15)`);
    assert.ok(Math.abs(a.maxError - 0.01) <= 1e-12, `maxError ${a.maxError} (tolerance 1e-12)`);
  });

  it('autoStep meets its tolerance on a dense re-evaluation (4000 samples per interval) of a spline fitted to MASS::mcycle, and one interval fewer does not', () => {
    const { x, y } = mcycle();
    const fit = fitCurve({ x, y }, { kind: 'natural-spline', df: 10 });
    const f = (v: number): number => fit.curve.value(v);
    const round = (v: number): number => Number(formatNumber(v, 8));
    const [start, stop] = [fit.curve.lower, fit.curve.upper];
    for (const tolerance of [2, 0.5, 0.05]) {
      const a = autoStep(f, start, stop, tolerance, round);
      const dense = denseError(f, start, stop, a.intervals, round, 4000);
      assert.ok(dense <= tolerance, `tolerance ${tolerance}: ${a.intervals} intervals, dense error ${dense}`);
      // The reported maximum is the dense one (refined maxima agree with 4000 samples to 1e-6 relative).
      assert.ok(Math.abs(dense - a.maxError) <= 1e-6 * tolerance + 1e-9, `reported ${a.maxError} vs dense ${dense}`);
      // Coarsest: one interval fewer breaks the tolerance for this curve.
      assert.ok(denseError(f, start, stop, a.intervals - 1, round, 4000) > tolerance, `tolerance ${tolerance}: ${a.intervals - 1} intervals should fail`);
    }
  });

  it('autoStep refuses a tolerance at or below the rounding of the printed values, saying so', () => {
    assert.throws(
      () =>
        autoStep(
          (x) => 1000 + x,
          0,
          1,
          1e-6,
          (v) => Number(formatNumber(v, 4)),
        ),
      (e: unknown) => e instanceof InputError && /not above the rounding of the printed table values/.test(e.message) && /--digits/.test(e.message),
    );
  });

  it('autoStep refuses a tolerance that would need more than a million rows', function () {
    this.timeout(120_000);
    // e^(40x) on [0, 1]: f'' up to 1600 e^40 needs h below about 1e-9 for tolerance 1e-3.
    assert.throws(
      () =>
        autoStep(
          (x) => Math.exp(40 * x),
          0,
          1,
          1e-3,
          (v) => v,
        ),
      (e: unknown) => e instanceof InputError && /needs more than 1000000 table rows/.test(e.message),
    );
  });
});

describe('resolveGrid', () => {
  const curve: Curve = { kind: 'natural-spline', df: 3, lower: 0, upper: 2, value: (x) => x * x, varianceFactor: () => 0 };
  const sorted = Float64Array.of(0, 0.5, 2);

  it('resolveGrid turns auto:<tolerance> into a count grid over the data range with the outcome attached', () => {
    const r = resolveGrid({ kind: 'auto', tolerance: 0.011 }, sorted, curve, (v) => v);
    // On [0, 2] with f'' = 2 the step must be at most 0.2: 10 intervals, 11 points.
    assert.deepEqual(r.spec, { kind: 'count', start: 0, stop: 2, count: 11 });
    assert.equal(r.points.length, 11);
    assert.equal(r.auto?.intervals, 10);
    assert.equal(r.auto?.tolerance, 0.011);
  });

  it('resolveGrid uses the given start and stop of <start>:<stop>:auto=<tolerance>, and passes other grids through', () => {
    const r = resolveGrid({ kind: 'auto', tolerance: 0.011, start: 1, stop: 2 }, sorted, curve, (v) => v);
    assert.deepEqual(r.spec, { kind: 'count', start: 1, stop: 2, count: 6 });
    const d = resolveGrid({ kind: 'data' }, sorted, curve, (v) => v);
    assert.deepEqual(Array.from(d.points), [0, 0.5, 2]);
    assert.equal(d.auto, undefined);
    const def = resolveGrid(undefined, sorted, curve, (v) => v);
    assert.equal(def.points.length, 101);
  });
});
