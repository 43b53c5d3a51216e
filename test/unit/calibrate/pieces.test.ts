/**
 * Pieces and exact monotonicity of fitted curves (core/calibrate/pieces.ts).
 *
 * References: turning points against a brute-force evaluation of the curve on 100,001
 * equally spaced points (the sign of each difference of neighbours), which must agree in
 * number and lie within two grid steps; pieces against the definitions of docs/design.md
 * (natural spline knots, "knots at all distinct x" of the smoothing spline, polynomial
 * degree df - 1); stalls, turns and plateaus at knots against curves built by hand from
 * quadratics whose slopes follow from calculus. Data: MASS::mcycle and datasets::cars
 * (test/unit/calibrate/fixtures.ts).
 */
import { strict as assert } from 'node:assert';
import { curvePieces, monotonicity } from '../../../core/calibrate/pieces';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import type { FitResult } from '../../../core/types';
import { bruteTurns, cars, handFit, mcycle, Normals } from './fixtures';

function assertTurnsLikeBruteForce(fit: FitResult, what: string): void {
  const brute = bruteTurns(fit);
  const m = monotonicity(fit);
  assert.equal(m.turns.length, brute.turns.length, `${what}: turns ${m.turns.join(', ')}; brute force ${brute.turns.join(', ')}`);
  m.turns.forEach((x, i) => assert.ok(Math.abs(x - (brute.turns[i] as number)) <= 2 * brute.step, `${what}: turn ${i} at ${x}, brute force ${brute.turns[i]}`));
  if (brute.turns.length === 0) assert.equal(m.direction, brute.rises ? 'increasing' : 'decreasing', what);
  else assert.equal(m.direction, null, what);
}

describe('curvePieces', () => {
  it('natural spline: boundary and interior knots, cubic (docs/design.md)', () => {
    const fit = fitCurve(mcycle, { kind: 'natural-spline', df: 6 });
    const p = curvePieces(fit);
    assert.equal(p.degree, 3);
    assert.deepEqual(Array.from(p.breaks), Array.from(fit.knots));
    assert.equal(p.breaks[0], Math.min(...mcycle.x));
    assert.equal(p.breaks[p.breaks.length - 1], Math.max(...mcycle.x));
  });

  it('smoothing spline: one piece between each two neighbouring distinct x, repeated end knots counted once', () => {
    const fit = fitCurve(mcycle, { kind: 'smoothing-spline', df: 8 });
    const distinct = Array.from(new Set(mcycle.x)).sort((a, b) => a - b);
    const p = curvePieces(fit);
    assert.equal(p.degree, 3);
    assert.deepEqual(Array.from(p.breaks), distinct);
  });

  it('polynomial with df k: one piece of degree k - 1', () => {
    for (const df of [1, 2, 5, 7]) {
      const p = curvePieces(fitCurve(mcycle, { kind: 'polynomial', df }));
      assert.equal(p.degree, df - 1);
      assert.deepEqual(Array.from(p.breaks), [Math.min(...mcycle.x), Math.max(...mcycle.x)]);
    }
  });

  it('refuses a curve on a link scale: inverse tables need a continuous outcome', () => {
    const counts = { x: cars.x, y: cars.y.map((v) => Math.round(v)) };
    const fit = fitCurve(counts, { kind: 'natural-spline', df: 3, outcome: 'counts' });
    assert.throws(
      () => curvePieces(fit),
      (e: unknown) => e instanceof InputError && /inverse tables need a continuous outcome/.test(e.message) && /--outcome continuous/.test(e.message),
    );
    assert.throws(() => monotonicity(fit), InputError);
  });

  it('refuses a curve kind whose pieces are unknown', () => {
    assert.throws(
      () => curvePieces(handFit([0, 1], (x) => x, 'wavelet')),
      (e: unknown) => e instanceof InputError && /not available for the curve "wavelet"/.test(e.message),
    );
  });
});

describe('monotonicity against brute force', () => {
  it('natural splines of mcycle, df 4 to 9, turn where a dense evaluation says', () => {
    for (let df = 4; df <= 9; df++) assertTurnsLikeBruteForce(fitCurve(mcycle, { kind: 'natural-spline', df }), `natural spline df ${df}`);
  });

  it('polynomials of degree 4 to 6 on mcycle turn where a dense evaluation says', () => {
    for (let df = 5; df <= 7; df++) assertTurnsLikeBruteForce(fitCurve(mcycle, { kind: 'polynomial', df }), `polynomial df ${df}`);
  });

  it('smoothing splines of mcycle (93 pieces) turn where a dense evaluation says', () => {
    for (const df of [6, 12, 20]) assertTurnsLikeBruteForce(fitCurve(mcycle, { kind: 'smoothing-spline', df }), `smoothing spline df ${df}`);
  });

  it('cars: natural spline df 3 and polynomials df 2 and 3 are increasing, as a dense evaluation says', () => {
    for (const [kind, df] of [
      ['natural-spline', 3],
      ['polynomial', 2],
      ['polynomial', 3],
    ] as const) {
      const fit = fitCurve(cars, { kind, df });
      assertTurnsLikeBruteForce(fit, `${kind} df ${df}`);
      assert.equal(monotonicity(fit).direction, 'increasing');
    }
  });

  it('a smoothing spline with 20,000 knots on seeded rising data is increasing, as a dense evaluation says', () => {
    const g = new Normals(20260301);
    const n = 20_000;
    const x = Float64Array.from({ length: n }, (_, i) => (10 * (i + 0.5)) / n);
    const y = Float64Array.from(x, (v) => 50 + 3 * v + 0.2 * v * v + 0.5 * g.next());
    assertTurnsLikeBruteForce(fitCurve({ x, y }, { kind: 'smoothing-spline', df: 8 }), 'smoothing spline, 20,000 knots');
  });
});

describe('monotonicity with shape constraints', () => {
  it('mcycle fitted increasing or decreasing (natural and smoothing spline) is never refused for rounding-sized dips', () => {
    for (const kind of ['natural-spline', 'smoothing-spline'] as const) {
      for (const shape of ['increasing', 'decreasing'] as const) {
        const m = monotonicity(fitCurve(mcycle, { kind, df: 8, shape: [shape] }));
        assert.equal(m.direction, shape, `${kind} ${shape}: turns ${m.turns.join(', ')}`);
        assert.deepEqual(m.turns, []);
      }
    }
  });
});

describe('monotonicity: stalls, plateaus, turns at knots and flat curves', () => {
  it('polynomial df 4 through y = (x - 5)^3: increasing with a stall at x = 5 (slope 3 (x - 5)^2)', () => {
    const x = Float64Array.from({ length: 11 }, (_, i) => i);
    const m = monotonicity(fitCurve({ x, y: x.map((v) => (v - 5) ** 3) }, { kind: 'polynomial', df: 4 }));
    assert.equal(m.direction, 'increasing');
    assert.deepEqual(m.turns, []);
    assert.equal(m.stalls.length, 1);
    assert.ok(Math.abs((m.stalls[0] as number) - 5) <= 1e-6, `stall at ${m.stalls[0]}`);
  });

  it('a slope that changes sign exactly at a knot is a turn there: (x - 1)^2 then 2 (x - 1)^2', () => {
    const m = monotonicity(handFit([0, 1, 2], (x) => (x < 1 ? (x - 1) ** 2 : 2 * (x - 1) ** 2)));
    assert.equal(m.direction, null);
    assert.equal(m.turns.length, 1);
    assert.ok(Math.abs((m.turns[0] as number) - 1) <= 1e-9, `turn at ${m.turns[0]}`);
  });

  it('a slope that touches zero exactly at a knot is a stall: -(x - 1)^2 then (x - 1)^2', () => {
    const m = monotonicity(handFit([0, 1, 2], (x) => (x < 1 ? -((x - 1) ** 2) : (x - 1) ** 2)));
    assert.equal(m.direction, 'increasing');
    assert.deepEqual(m.turns, []);
    assert.equal(m.stalls.length, 1);
    assert.ok(Math.abs((m.stalls[0] as number) - 1) <= 1e-9, `stall at ${m.stalls[0]}`);
  });

  it('a level piece between rising pieces is a plateau of a monotone curve', () => {
    const m = monotonicity(handFit([0, 1, 2, 3], (x) => (x < 1 ? -((x - 1) ** 2) : x < 2 ? 0 : (x - 2) ** 2)));
    assert.equal(m.direction, 'increasing');
    assert.equal(m.plateaus.length, 1);
    const [from, to] = m.plateaus[0] as readonly [number, number];
    assert.ok(Math.abs(from - 1) <= 1e-9 && Math.abs(to - 2) <= 1e-9, `plateau ${from} to ${to}`);
  });

  it('a level piece between a rise and a fall is one turn, at its middle', () => {
    const m = monotonicity(handFit([0, 1, 2, 3], (x) => (x < 1 ? -((x - 1) ** 2) : x < 2 ? 0 : -((x - 2) ** 2))));
    assert.equal(m.direction, null);
    assert.deepEqual(m.turns, [1.5]);
  });

  it('constant data: natural spline, smoothing spline and polynomial are flat, with no direction', () => {
    const x = Float64Array.from({ length: 30 }, (_, i) => i * 0.7);
    const y = new Float64Array(30).fill(1e6 + 0.25);
    for (const [kind, df] of [
      ['natural-spline', 5],
      ['smoothing-spline', 6],
      ['polynomial', 1],
      ['polynomial', 6],
    ] as const) {
      const m = monotonicity(fitCurve({ x, y }, { kind, df }));
      assert.equal(m.flat, true, `${kind} df ${df}`);
      assert.equal(m.direction, null);
      assert.deepEqual(m.turns, []);
    }
  });

  it('the result is kept per fit object and frozen, so a second call does no work and cannot be altered', () => {
    const fit = fitCurve(mcycle, { kind: 'natural-spline', df: 7 });
    const m = monotonicity(fit);
    assert.equal(monotonicity(fit), m);
    assert.ok(Object.isFrozen(m) && Object.isFrozen(m.turns));
    assert.notEqual(monotonicity(fitCurve(mcycle, { kind: 'natural-spline', df: 7 })), m);
  });

  it('a decreasing curve: natural spline of cars with y negated', () => {
    const m = monotonicity(fitCurve({ x: cars.x, y: cars.y.map((v) => -v) }, { kind: 'natural-spline', df: 3 }));
    assert.equal(m.direction, 'decreasing');
  });
});
