/**
 * The inverse of a monotone fitted curve (core/calibrate/inverseCurve.ts): x^ with
 * f(x^) = y0, the reading range, and the refusals of curves that turn or are constant.
 * References: the defining identity f(x^) = y0 (checked with the curve itself, to the
 * rounding of x); the range of a turning curve against a brute-force evaluation on 100,001
 * points; the turning points named in the refusal against `monotonicity`, which
 * test/unit/calibrate/pieces.test.ts checks by brute force. Straight-line values against R
 * are in test/reference/inverse.test.ts. Data: MASS::mcycle, datasets::cars, datasets::DNase
 * (test/unit/calibrate/fixtures.ts).
 */
import { strict as assert } from 'node:assert';
import { InverseCurve, inverseOf, inverseValue, readingRange } from '../../../core/calibrate/inverseCurve';
import { monotonicity } from '../../../core/calibrate/pieces';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import { sig } from '../../../core/words/numbers';
import { cars, dnase, handFit, mcycle } from './fixtures';

describe('InverseCurve.quantity', () => {
  it('returns x^ with f(x^) = y0 to the rounding of x, for increasing and decreasing splines of every kind', () => {
    for (const [kind, df] of [
      ['natural-spline', 4],
      ['smoothing-spline', 5],
      ['polynomial', 2],
    ] as const) {
      for (const sign of [1, -1]) {
        const fit = fitCurve({ x: dnase.x, y: dnase.y.map((v) => sign * v) }, { kind, df });
        const inv = new InverseCurve(fit);
        assert.equal(inv.direction, sign > 0 ? 'increasing' : 'decreasing');
        const [lo, hi] = inv.readingRange;
        for (let k = 0; k <= 20; k++) {
          const y0 = k === 20 ? hi : lo + ((hi - lo) * k) / 20;
          const x = inv.quantity(y0);
          assert.ok(x >= fit.curve.lower && x <= fit.curve.upper, `${kind} ${sign}: ${x}`);
          // One rounding unit of x either side brackets y0.
          const ulp = 4 * Number.EPSILON * fit.curve.upper;
          const a = sign * fit.curve.value(Math.max(fit.curve.lower, x - ulp)) - sign * y0;
          const b = sign * fit.curve.value(Math.min(fit.curve.upper, x + ulp)) - sign * y0;
          assert.ok(a <= 1e-12 && b >= -1e-12, `${kind} ${sign} at y0 = ${y0}: ${a}, ${b}`);
        }
      }
    }
  });

  it('returns the ends for readings at the ends and NaN outside the reading range or for NaN', () => {
    const fit = fitCurve(cars, { kind: 'natural-spline', df: 3 });
    const inv = new InverseCurve(fit);
    const [lo, hi] = inv.readingRange;
    assert.equal(inv.quantity(lo), fit.curve.lower);
    assert.ok(Math.abs(inv.quantity(hi) - fit.curve.upper) <= 1e-12 * fit.curve.upper);
    for (const y0 of [lo - 1e-9 * Math.abs(lo) - 1e-12, hi + 1e-9 * hi, NaN, Infinity]) assert.ok(Number.isNaN(inv.quantity(y0)), `${y0}`);
  });

  it('inverseValue is InverseCurve.quantity, with the InverseCurve kept per fit (inverseOf)', () => {
    const fit = fitCurve(cars, { kind: 'polynomial', df: 2 });
    assert.equal(inverseValue(fit, 40), new InverseCurve(fit).quantity(40));
    assert.equal(inverseOf(fit), inverseOf(fit));
  });
});

describe('InverseCurve refusals', () => {
  it('a natural spline of mcycle turns: the message names the turning points and suggests the increasing or decreasing shape', () => {
    const fit = fitCurve(mcycle, { kind: 'natural-spline', df: 6 });
    const turns = monotonicity(fit).turns;
    assert.ok(turns.length >= 2);
    assert.throws(
      () => new InverseCurve(fit),
      (e: unknown) => {
        if (!(e instanceof InputError)) return false;
        for (const x of turns) assert.ok(e.message.includes(sig(x)), `${e.message} lacks ${sig(x)}`);
        assert.match(e.message, /the fitted curve turns at x = /);
        assert.match(e.message, /--shape increasing or --shape decreasing/);
        assert.match(e.describe('editor'), /the setting knotwise\.shape increasing/);
        return true;
      },
    );
  });

  it('a polynomial that turns: the message suggests a shape-constrained spline, as the polynomial takes no shape', () => {
    const fit = fitCurve(mcycle, { kind: 'polynomial', df: 5 });
    assert.throws(
      () => new InverseCurve(fit),
      (e: unknown) => e instanceof InputError && /--curve natural-spline with --shape increasing or decreasing/.test(e.message),
    );
  });

  it('many turning points: five are named and the rest counted', () => {
    const fit = fitCurve(mcycle, { kind: 'smoothing-spline', df: 20 });
    const turns = monotonicity(fit).turns;
    assert.ok(turns.length > 5);
    assert.throws(
      () => new InverseCurve(fit),
      (e: unknown) => e instanceof InputError && e.message.includes(`and ${turns.length - 5} more`),
    );
  });

  it('a constant curve is refused as telling nothing about the quantity', () => {
    const fit = fitCurve(cars, { kind: 'polynomial', df: 1 });
    assert.throws(
      () => new InverseCurve(fit),
      (e: unknown) => e instanceof InputError && /constant over the data range/.test(e.message),
    );
  });

  it('a curve level from x = 1 to 2 is accepted as monotone, and a reading at that level gives x = 1, the lowest', () => {
    const inv = new InverseCurve(handFit([0, 1, 2, 3], (x) => (x < 1 ? -((x - 1) ** 2) : x < 2 ? 0 : (x - 2) ** 2)));
    assert.equal(inv.direction, 'increasing');
    assert.ok(Math.abs(inv.quantity(0) - 1) <= 4 * Number.EPSILON * 3, `${inv.quantity(0)}`);
  });

  it('mcycle fitted increasing (level stretches at both ends) is accepted', () => {
    const inv = new InverseCurve(fitCurve(mcycle, { kind: 'natural-spline', df: 8, shape: ['increasing'] }));
    assert.equal(inv.direction, 'increasing');
    assert.ok(inv.shape.plateaus.length > 0);
  });
});

describe('readingRange', () => {
  it('of a monotone curve is its values at the ends', () => {
    const fit = fitCurve(cars, { kind: 'natural-spline', df: 3 });
    assert.deepEqual(readingRange(fit), [fit.curve.value(fit.curve.lower), fit.curve.value(fit.curve.upper)]);
  });

  it('of a turning curve (mcycle) matches the extremes of a brute-force evaluation', () => {
    const fit = fitCurve(mcycle, { kind: 'natural-spline', df: 8 });
    const { lower, upper } = fit.curve;
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i <= 100_000; i++) {
      const v = fit.curve.value(lower + ((upper - lower) * i) / 100_000);
      lo = Math.min(lo, v);
      hi = Math.max(hi, v);
    }
    const [a, b] = readingRange(fit);
    // Grid extremes lie within f'' h^2 / 8 of the true ones (|f''| < 50 g/ms^2 here, h = 5.5e-4 ms).
    assert.ok(a <= lo && lo - a <= 1e-5, `${a} vs ${lo}`);
    assert.ok(b >= hi && b - hi <= 1e-5, `${b} vs ${hi}`);
  });
});
