/**
 * Tests of interpolationError (core/table/interpolation.ts) against closed forms. Source of
 * the closed forms: the remainder of linear interpolation, f(x) - p(x) = f''(xi)/2 (x - x0)(x - x1)
 * (e.g. Burden & Faires, Numerical Analysis, 9th ed., 2011, Theorem 3.3, from memory), which
 * is exact for quadratics, and elementary calculus for the cubic and the sine below.
 */
import { strict as assert } from 'node:assert';
import { interpolationError, SAMPLES_PER_INTERVAL } from '../../../core/table/interpolation';

/** Tolerance for a maximum found by golden-section refinement: far below any printed digit. */
const TOL = 1e-12;

describe('interpolationError', () => {
  it("interpolationError of x^2 on a uniform grid is h^2/4 at every interval midpoint (f'' = 2, so c h^2 / 8)", () => {
    const h = 0.25;
    const xs = Float64Array.from({ length: 5 }, (_, i) => i * h);
    const ys = Float64Array.from(xs, (x) => x * x);
    const e = interpolationError((x) => x * x, xs, ys);
    assert.ok(Math.abs(e.maxError - (h * h) / 4) <= TOL, `maxError ${e.maxError} vs ${(h * h) / 4} (tolerance ${TOL})`);
    // Every midpoint has the same error; the first one found is kept.
    assert.ok(Math.abs(e.at - h / 2) <= 1e-6, `at ${e.at} vs ${h / 2} (tolerance 1e-6)`);
  });

  it('interpolationError of x^3 between 0 and 1 peaks at 1/sqrt(3) with 2/(3 sqrt 3), between sample points (golden-section refinement)', () => {
    // e(x) = x - x^3 on [0, 1]; e'(x) = 1 - 3x^2 = 0 at x = 1/sqrt(3), e = 2 / (3 sqrt 3) = 0.3849...
    const e = interpolationError((x) => x ** 3, Float64Array.of(0, 1), Float64Array.of(0, 1));
    assert.ok(Math.abs(e.maxError - 2 / (3 * Math.sqrt(3))) <= TOL, `maxError ${e.maxError} (tolerance ${TOL})`);
    assert.ok(Math.abs(e.at - 1 / Math.sqrt(3)) <= 1e-6, `at ${e.at} (tolerance 1e-6)`);
    // 1/sqrt(3) is not one of the evenly spaced samples, so refinement did the work.
    const k = SAMPLES_PER_INTERVAL;
    const nearest = Math.round(k / Math.sqrt(3)) / k;
    assert.ok(Math.abs(nearest - 1 / Math.sqrt(3)) > 1e-3);
  });

  it('interpolationError of sin on [0, pi]: 1 at pi/2 with one interval; sin(x*) - 2x*/pi where cos x* = 2/pi with nodes 0, pi/2, pi', () => {
    const one = interpolationError(Math.sin, Float64Array.of(0, Math.PI), Float64Array.of(0, 0));
    assert.ok(Math.abs(one.maxError - 1) <= TOL, `maxError ${one.maxError} (tolerance ${TOL})`);
    // On [0, pi/2] the chord is y = 2x/pi; the gap sin x - 2x/pi peaks where cos x = 2/pi.
    const xs = Float64Array.of(0, Math.PI / 2, Math.PI);
    const two = interpolationError(Math.sin, xs, Float64Array.of(0, 1, 0));
    const xStar = Math.acos(2 / Math.PI);
    const want = Math.sin(xStar) - (2 * xStar) / Math.PI;
    assert.ok(Math.abs(two.maxError - want) <= TOL, `maxError ${two.maxError} vs ${want} (tolerance ${TOL})`);
  });

  it('interpolationError counts rounding of the nodes: a straight line with one node off by d has error d', () => {
    const xs = Float64Array.of(0, 1, 2);
    const e = interpolationError((x) => 3 * x + 1, xs, Float64Array.of(1, 4.001, 7));
    assert.ok(Math.abs(e.maxError - 0.001) <= TOL, `maxError ${e.maxError} (tolerance ${TOL})`);
    assert.equal(e.at, 1);
  });

  it('interpolationError is 0 for a straight line, skips repeated x, and handles fewer than two nodes', () => {
    const xs = Float64Array.of(0, 1, 1, 2);
    assert.ok(
      interpolationError(
        (x) => 2 * x - 5,
        xs,
        Float64Array.from(xs, (x) => 2 * x - 5),
      ).maxError <= 1e-15,
    );
    assert.equal(interpolationError(Math.sin, Float64Array.of(1), Float64Array.of(Math.sin(1))).maxError, 0);
    assert.equal(interpolationError(Math.sin, new Float64Array(0), new Float64Array(0)).maxError, 0);
  });

  it('interpolationError stops early once the gap exceeds stopAbove (the result is then a lower bound above it)', () => {
    let calls = 0;
    const f = (x: number): number => {
      calls++;
      return x * x;
    };
    const xs = Float64Array.from({ length: 101 }, (_, i) => i);
    const ys = Float64Array.from(xs, (x) => x * x);
    const e = interpolationError(f, xs, ys, 0.1);
    assert.ok(e.maxError > 0.1);
    assert.ok(calls < 5 * (SAMPLES_PER_INTERVAL + 60), `stopped after the first interval (${calls} evaluations)`);
  });
});
