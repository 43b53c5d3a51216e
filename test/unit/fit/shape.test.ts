/**
 * Shape-constrained natural splines: the constraint rows (core/fit/shape.ts) and the fits
 * through fitCurve (core/fit/model.ts). The guarantee is checked on dense grids: a fit
 * constrained increasing never decreases, non-negative never goes below zero, convex never
 * bends down, for seeded noisy data whose unconstrained fit breaks the shape. The convexity
 * rows are checked against second derivatives of the B-splines evaluated by
 * core/basis/bspline.ts (Piegl & Tiller's algorithm A2.3, an independent route to de Boor's
 * derivative formula). External checks against R are in test/reference/physics.test.ts.
 * Data: seeded normal noise (test/unit/stats/seededNormal.ts) around stated curves.
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { BSplineEvaluator, clampedKnots } from '../../../core/basis/bspline';
import { InputError } from '../../../core/errors';
import { bandsAt } from '../../../core/fit/bands';
import { fitCurve } from '../../../core/fit/index';
import { checkShapes, parseShapeList, shapeRows } from '../../../core/fit/shape';
import type { FitResult, Shape } from '../../../core/types';
import { seededNormals } from '../stats/seededNormal';

/** n rows with x spread unevenly on [0, 10] and y = truth(x) + sd * noise (seeded). */
function noisy(seed: number, n: number, truth: (x: number) => number, sd: number): { x: Float64Array; y: Float64Array } {
  const u = seededNormals(seed, 2 * n);
  const x = Float64Array.from({ length: n }, (_, i) => 10 * (0.5 + 0.5 * Math.tanh(u[i] as number)));
  const y = Float64Array.from(x, (xi, i) => truth(xi) + sd * (u[n + i] as number));
  return { x, y };
}

/** The curve on `m` points from lower to upper (and `out` beyond each end by that fraction of the range). */
function dense(fit: FitResult, m = 4001, out = 0): Float64Array {
  const { lower, upper } = fit.curve;
  const a = lower - out * (upper - lower);
  const b = upper + out * (upper - lower);
  return Float64Array.from({ length: m }, (_, k) => fit.curve.value(a + ((b - a) * k) / (m - 1)));
}

/** Largest |value| of the curve on the grid: the scale of the rounding tolerance. */
function scaleOf(v: Float64Array): number {
  return v.reduce((s, x) => Math.max(s, Math.abs(x)), 1e-300);
}

/** Asserts the shape on the grid values with a rounding tolerance of 1e-10 times the curve's scale. */
function assertShape(v: Float64Array, shape: Shape, what: string): void {
  const tol = 1e-10 * scaleOf(v);
  for (let k = 0; k + 1 < v.length; k++) {
    const d = (v[k + 1] as number) - (v[k] as number);
    if (shape === 'increasing') assert.ok(d >= -tol, `${what}: decreases by ${-d} at grid point ${k}`);
    if (shape === 'decreasing') assert.ok(d <= tol, `${what}: increases by ${d} at grid point ${k}`);
    if (k + 2 < v.length && (shape === 'convex' || shape === 'concave')) {
      const d2 = (v[k + 2] as number) - 2 * (v[k + 1] as number) + (v[k] as number);
      if (shape === 'convex') assert.ok(d2 >= -tol, `${what}: bends down (${d2}) at grid point ${k}`);
      else assert.ok(d2 <= tol, `${what}: bends up (${d2}) at grid point ${k}`);
    }
  }
  if (shape === 'nonnegative') for (let k = 0; k < v.length; k++) assert.ok((v[k] as number) >= -tol, `${what}: ${v[k]} below zero at grid point ${k}`);
}

describe('checkShapes and parseShapeList', () => {
  it('parseShapeList normalises case, spaces, duplicates and order; "none" and "" mean no constraint', () => {
    assert.deepEqual(parseShapeList(' Convex, increasing,convex '), ['increasing', 'convex']);
    assert.deepEqual(parseShapeList('none'), []);
    assert.deepEqual(parseShapeList(''), []);
  });

  it('checkShapes refuses unknown names and contradictory pairs with a message that names them', () => {
    assert.throws(
      () => checkShapes(['monotone']),
      (e: unknown) => e instanceof InputError && /unknown shape "monotone"/.test(e.message),
    );
    assert.throws(() => checkShapes(['increasing', 'decreasing']), /only allow a constant/);
    assert.throws(() => checkShapes(['convex', 'concave']), /only allow a straight line/);
  });
});

describe('shapeRows (linear inequalities on B-spline coefficients)', () => {
  it('shapeRows counts rows as its doc comment says: p - 1 monotone, p non-negative, p - 2 (natural: p - 4) convex', () => {
    const t = clampedKnots(0, 1, [0.2, 0.5, 0.7]);
    assert.equal(shapeRows(clampedKnots(0, 1, []), ['increasing'], false).rows, 3);
    assert.equal(shapeRows(t, ['increasing'], false).rows, 6);
    assert.equal(shapeRows(t, ['nonnegative'], true).rows, 7);
    assert.equal(shapeRows(t, ['convex'], false).rows, 5);
    assert.equal(shapeRows(t, ['convex'], true).rows, 3);
  });

  it('each convexity row is parallel to the second derivatives of the B-splines at a knot (de Boor: f" is piecewise linear)', () => {
    // Tolerance: cosine within 1e-12 of 1 (rounding of the recurrences).
    const t = clampedKnots(-1, 3, [-0.4, 0.1, 0.15, 1.7, 2.2]);
    const p = t.length - 4;
    const rows = shapeRows(t, ['convex'], false);
    const ev = new BSplineEvaluator(t);
    const knots = [-1, -0.4, 0.1, 0.15, 1.7, 2.2, 3];
    assert.equal(rows.rows, knots.length);
    knots.forEach((kx, i) => {
      const v = new Float64Array(p);
      const first = ev.eval(kx, 2);
      for (let j = 0; j < 4; j++) v[first + j] = ev.d2[j] as number;
      let dot = 0;
      let nv = 0;
      for (let j = 0; j < p; j++) {
        dot += (rows.a[i * p + j] as number) * (v[j] as number);
        nv += (v[j] as number) ** 2;
      }
      assert.ok(Math.abs(dot / Math.sqrt(nv) - 1) <= 1e-12, `row ${i} (knot ${kx}): cosine ${dot / Math.sqrt(nv)}`);
    });
  });
});

describe('fitCurve with shape constraints (natural spline)', () => {
  it('an increasing fit to noisy data with a known increasing truth never decreases on a dense grid, also beyond the data', () => {
    // Truth: the logistic curve 1 / (1 + exp(-(x - 5))), increasing; noise SD 0.15 makes the
    // unconstrained fit wiggle (checked: some constraint is active).
    for (const seed of [1, 2, 3, 4, 5]) {
      const d = noisy(seed, 120, (x) => 1 / (1 + Math.exp(-(x - 5))), 0.15);
      const fit = fitCurve(d, { kind: 'natural-spline', df: 9, shape: ['increasing'] });
      assertShape(dense(fit, 4001, 0.2), 'increasing', `seed ${seed}`);
      assert.ok((fit.model?.constraints?.total ?? 0) > 0);
    }
    const d = noisy(3, 120, (x) => 1 / (1 + Math.exp(-(x - 5))), 0.15);
    const plain = fitCurve(d, { kind: 'natural-spline', df: 9 });
    const plainGrid = dense(plain);
    assert.ok(
      plainGrid.some((v, k) => k > 0 && v < (plainGrid[k - 1] as number) - 1e-6),
      'the unconstrained fit of seed 3 does decrease somewhere (so the test is not vacuous)',
    );
  });

  it('shape-constrained fits keep every asked shape on a dense grid for seeded data that breaks it (property)', () => {
    const combos: Shape[][] = [
      ['increasing'],
      ['decreasing'],
      ['nonnegative'],
      ['convex'],
      ['concave'],
      ['increasing', 'concave'],
      ['decreasing', 'convex'],
      ['increasing', 'nonnegative'],
      ['nonnegative', 'convex'],
    ];
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1e6 }), fc.integer({ min: 2, max: 10 }), fc.constantFrom(...combos), (seed, df, shapes) => {
        // A wavy truth around zero breaks every shape; noise SD 0.3.
        const d = noisy(seed, 80, (x) => Math.sin(x) + 0.1 * x - 0.4, 0.3);
        const fit = fitCurve(d, { kind: 'natural-spline', df, shape: shapes });
        const grid = dense(fit, 2001);
        for (const s of shapes) assertShape(grid, s, `seed ${seed}, df ${df}, ${shapes.join('+')}`);
        // Beyond the data the spline is linear with the boundary slope: monotone and convex shapes carry on.
        const wide = dense(fit, 2001, 0.5);
        for (const s of shapes) if (s !== 'nonnegative') assertShape(wide, s, `beyond the data: seed ${seed}, df ${df}, ${shapes.join('+')}`);
      }),
      { seed: 11, numRuns: 60 },
    );
  });

  it('a constrained fit equals the unconstrained one when the constraint is inactive', () => {
    // Truth 2x + sin(x) is strongly increasing; noise SD 0.01 keeps every coefficient difference positive.
    const d = noisy(8, 100, (x) => 2 * x + Math.sin(x), 0.01);
    const plain = fitCurve(d, { kind: 'natural-spline', df: 7 });
    const fit = fitCurve(d, { kind: 'natural-spline', df: 7, shape: ['increasing', 'nonnegative'] });
    assert.equal(fit.model?.constraints?.active, 0);
    // Tolerance 1e-10 relative: both are the same least-squares problem solved along two routes.
    for (let i = 0; i < plain.fitted.length; i++) assert.ok(Math.abs((fit.fitted[i] as number) - (plain.fitted[i] as number)) <= 1e-10 * 20, `row ${i}`);
    for (let i = 0; i < plain.leverage.length; i++) assert.ok(Math.abs((fit.leverage[i] as number) - (plain.leverage[i] as number)) <= 1e-10, `leverage ${i}`);
    assert.ok(Math.abs(fit.sigma - plain.sigma) <= 1e-10 * plain.sigma);
    assert.match(fit.notes.join(' '), /none is active, so the curve equals the unconstrained fit/);
  });

  it('with active constraints the effective df drops and the leverage sums to it (trace of the hat matrix at the active set)', () => {
    const d = noisy(21, 150, (x) => Math.cos(x), 0.2);
    const fit = fitCurve(d, { kind: 'natural-spline', df: 8, shape: ['increasing'] });
    const c = fit.model?.constraints;
    assert.ok(c && c.active > 0, 'some constraint active');
    const trace = fit.leverage.reduce((s, v) => s + v, 0);
    // Tolerance 1e-8: sum of 150 leverages of order 0.05.
    assert.ok(Math.abs(trace - c.effectiveDf) <= 1e-8, `trace ${trace}, effective df ${c.effectiveDf}`);
    assert.equal(fit.df, 8, 'df stays the candidate df');
  });

  it('bands of a non-negative fit keep their lower limits at or above zero within the data range', () => {
    // Truth exp(-x) is small at the right end, so the lower band limits would go negative.
    const d = noisy(5, 60, (x) => 3 * Math.exp(-x), 0.2);
    const fit = fitCurve(d, { kind: 'natural-spline', df: 5, shape: ['nonnegative'] });
    const xs = Float64Array.from({ length: 101 }, (_, k) => fit.curve.lower + ((fit.curve.upper - fit.curve.lower) * k) / 100);
    const b = bandsAt(fit, xs);
    for (let k = 0; k < 101; k++) {
      assert.ok((b.fit[k] as number) >= -1e-12, `fit ${b.fit[k]}`);
      assert.ok((b.ciLower[k] as number) >= 0 && (b.piLower[k] as number) >= 0, `lower limits at ${xs[k]}`);
      assert.ok((b.ciUpper[k] as number) >= (b.fit[k] as number) && (b.se[k] as number) >= 0);
    }
    assert.ok(
      b.piLower.some((v) => v === 0),
      'some prediction limit was raised to 0 (so the test is not vacuous)',
    );
  });

  it('shape constraints are refused for the polynomial with the reason (the smoothing spline: test/unit/fit/shapedSmoothing.test.ts)', () => {
    const d = noisy(1, 30, (x) => x, 0.1);
    assert.throws(
      () => fitCurve(d, { kind: 'polynomial', df: 3, shape: ['increasing'] }),
      /polynomial \(orthogonal basis\) takes no shape constraints; shapes need another curve \(natural-spline, smoothing-spline\)/,
    );
  });
});
