/**
 * Cubic smoothing spline (core/fit/smoothingSpline/): definition, limits, exact
 * leave-one-out, replicate weights, and a dense solve of the penalised problem with
 * ml-matrix on seeded random data.
 *
 * Data: open datasets shipped with R (datasets::cars, datasets::women, MASS::mcycle), read
 * from the fixture written by test/reference/r/smooth.R; the comparison with R's own
 * numbers lives in test/reference/smooth.test.ts.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { Matrix, inverse } from 'ml-matrix';
import { BSplineEvaluator } from '../../../core/basis/bspline';
import { FitError, InputError } from '../../../core/errors';
import { fitSmoothingSpline, lambdaForDf, smoothingSplineAtLambda } from '../../../core/fit/smoothingSpline';
import type { FitResult, XYData } from '../../../core/types';

interface Dataset {
  readonly source: string;
  readonly x: number[];
  readonly y: number[];
  readonly w: number[] | null;
}
const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'smooth.json'), 'utf8')) as {
  datasets: Record<string, Dataset>;
};

function dataset(name: string): XYData {
  const d = fixture.datasets[name] as Dataset;
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y), ...(d.w ? { w: Float64Array.from(d.w) } : {}) };
}
const cars = dataset('cars'); // datasets::cars (Ezekiel 1930): 50 rows, 19 distinct speeds
const carsW = dataset('cars_w'); // the same with prior weights 1 / speed
const women = dataset('women'); // datasets::women (McNeil 1977): 15 distinct heights
const mcycle = dataset('mcycle'); // MASS::mcycle (Silverman 1985): 133 rows, 94 distinct times

function maxAbs(v: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < v.length; i++) m = Math.max(m, Math.abs(v[i] as number));
  return m;
}
function sum(v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s += v[i] as number;
  return s;
}
function distinctCount(x: Float64Array): number {
  return new Set(Array.from(x)).size;
}
/** Weighted least-squares line by its closed form (normal equations). */
function wlsLine(d: XYData): { a: number; b: number; xbar: number; sw: number; sxx: number } {
  let sw = 0;
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < d.x.length; i++) {
    const wi = d.w ? (d.w[i] as number) : 1;
    sw += wi;
    sx += wi * (d.x[i] as number);
    sy += wi * (d.y[i] as number);
  }
  const xbar = sx / sw;
  const ybar = sy / sw;
  let sxx = 0;
  let sxy = 0;
  for (let i = 0; i < d.x.length; i++) {
    const wi = d.w ? (d.w[i] as number) : 1;
    const dx = (d.x[i] as number) - xbar;
    sxx += wi * dx * dx;
    sxy += wi * dx * ((d.y[i] as number) - ybar);
  }
  const b = sxy / sxx;
  return { a: ybar - b * xbar, b, xbar, sw, sxx };
}
function withoutRow(d: XYData, k: number): XYData {
  const keep = (_: number, i: number): boolean => i !== k;
  return { x: d.x.filter(keep), y: d.y.filter(keep), ...(d.w ? { w: d.w.filter(keep) } : {}) };
}

/**
 * The penalised problem solved densely with ml-matrix: B-spline design on the fit's knot
 * vector, penalty integral B_j'' B_l'' by 2-point Gauss-Legendre per knot interval (exact,
 * B'' being linear there), A = X'WX + lambda Omega, c = A^-1 X'Wy.
 */
function denseSolve(d: XYData, knots: Float64Array, lambda: number): { coef: number[]; ainv: Matrix; ev: BSplineEvaluator } {
  const ev = new BSplineEvaluator(knots);
  const nb = ev.size;
  const a = Matrix.zeros(nb, nb);
  const rhs = Matrix.zeros(nb, 1);
  for (let i = 0; i < d.x.length; i++) {
    const wi = d.w ? (d.w[i] as number) : 1;
    const f = ev.eval(d.x[i] as number);
    for (let r = 0; r < 4; r++) {
      rhs.set(f + r, 0, rhs.get(f + r, 0) + wi * (ev.value[r] as number) * (d.y[i] as number));
      for (let s = 0; s < 4; s++) a.set(f + r, f + s, a.get(f + r, f + s) + wi * (ev.value[r] as number) * (ev.value[s] as number));
    }
  }
  const g = 0.5 / Math.sqrt(3);
  for (let k = 3; k < knots.length - 4; k++) {
    const lo = knots[k] as number;
    const h = (knots[k + 1] as number) - lo;
    if (!(h > 0)) continue;
    for (const q of [0.5 - g, 0.5 + g]) {
      const f = ev.eval(lo + q * h, 2);
      for (let r = 0; r < 4; r++) {
        for (let s = 0; s < 4; s++) a.set(f + r, f + s, a.get(f + r, f + s) + lambda * 0.5 * h * (ev.d2[r] as number) * (ev.d2[s] as number));
      }
    }
  }
  const ainv = inverse(a);
  return { coef: ainv.mmul(rhs).getColumn(0), ainv, ev };
}
/** b(x) (continued linearly beyond the knots) as a dense vector. */
function basisRow(ev: BSplineEvaluator, x: number): number[] {
  const t = ev.knots;
  const lo = t[0] as number;
  const hi = t[t.length - 1] as number;
  const inside = Math.min(hi, Math.max(lo, x));
  const f = ev.eval(inside, 1);
  const row = new Array<number>(ev.size).fill(0);
  for (let r = 0; r < 4; r++) row[f + r] = (ev.value[r] as number) + (x - inside) * (ev.d1[r] as number);
  return row;
}

describe('fitSmoothingSpline', () => {
  it('fitSmoothingSpline reaches the asked df within 1e-6 and its row leverages sum to it', () => {
    // Source: docs/design.md, "Cubic smoothing spline" (df = trace of the hat matrix, matched within 1e-6); the
    // trace is the sum of the hat diagonal over rows.
    const cases: [string, XYData, number[]][] = [
      ['cars', cars, [2.2, 3, 5, 8, 12, 18.5]],
      ['cars_w', carsW, [4, 7]],
      ['mcycle', mcycle, [3, 10, 40, 90]],
      ['women', women, [2.5, 6, 14]],
    ];
    for (const [name, d, dfs] of cases) {
      for (const df of dfs) {
        const fit = fitSmoothingSpline(d, df);
        assert.ok(Math.abs(fit.df - df) <= 1e-6, `${name} df ${df}: achieved ${fit.df}`);
        assert.ok(Math.abs(sum(fit.leverage) - df) <= 1e-6, `${name} df ${df}: leverages sum to ${sum(fit.leverage)}`);
        assert.equal(fit.kind, 'smoothing-spline');
        assert.ok(Math.abs(fit.residualDf - (d.x.length - df)) <= 1e-6);
        assert.ok((fit.lambda as number) > 0 && Number.isFinite(fit.lambda), `${name} df ${df}: lambda ${fit.lambda}`);
        assert.equal(fit.coefficients.length, distinctCount(d.x) + 2);
        assert.equal(fit.knots.length, distinctCount(d.x) + 6);
        for (const h of fit.leverage) assert.ok(h > 0 && h < 1, `${name} df ${df}: leverage ${h}`);
      }
    }
  });

  it('fitSmoothingSpline(df = 2) returns the weighted least-squares line, with a note', () => {
    // Source: closed-form weighted least-squares line (normal equations), leverage
    // w_i (1 / sum w + (x_i - xbar)^2 / Sxx) and unscaled variance 1 / sum w + (x - xbar)^2 / Sxx.
    // Tolerance 1e-10 relative (rounding only).
    const fit = fitSmoothingSpline(carsW, 2);
    const { a, b, xbar, sw, sxx } = wlsLine(carsW);
    const sy = maxAbs(carsW.y);
    assert.equal(fit.df, 2);
    assert.equal(fit.lambda, Infinity);
    assert.ok(
      fit.notes.some((s) => /straight line/.test(s)),
      fit.notes.join(' | '),
    );
    for (let i = 0; i < carsW.x.length; i++) {
      const xi = carsW.x[i] as number;
      assert.ok(Math.abs((fit.fitted[i] as number) - (a + b * xi)) <= 1e-10 * sy, `fitted[${i}]`);
      const h = (carsW.w as Float64Array)[i]! * (1 / sw + ((xi - xbar) * (xi - xbar)) / sxx);
      assert.ok(Math.abs((fit.leverage[i] as number) - h) <= 1e-12, `leverage[${i}]`);
    }
    for (const x of [-10, 4, 13.3, 25, 40]) {
      assert.ok(Math.abs(fit.curve.value(x) - (a + b * x)) <= 1e-10 * sy, `value(${x})`);
      const v = 1 / sw + ((x - xbar) * (x - xbar)) / sxx;
      assert.ok(Math.abs(fit.curve.varianceFactor(x) - v) <= 1e-10 * v, `varianceFactor(${x})`);
    }
    assert.ok(Math.abs(sum(fit.leverage) - 2) <= 1e-12);
  });

  it('fitSmoothingSpline tends to the weighted straight line as df -> 2, linearly in df - 2', () => {
    // Source: as lambda -> infinity the penalty forces f'' = 0 and the minimiser tends to the
    // weighted least-squares line, with distance O(1 / lambda) = O(df - 2) (Green & Silverman
    // 1994, Nonparametric Regression and Generalized Linear Models, chapter 2).
    const line = fitSmoothingSpline(carsW, 2);
    const gap = (df: number): number => {
      const fit = fitSmoothingSpline(carsW, df);
      let e = 0;
      for (let i = 0; i < carsW.x.length; i++) e = Math.max(e, Math.abs((fit.fitted[i] as number) - (line.fitted[i] as number)));
      return e;
    };
    const g1 = gap(2.01);
    const g2 = gap(2.001);
    assert.ok(g2 <= 1e-4 * maxAbs(carsW.y), `df 2.001 is ${g2} away from the line`);
    assert.ok(g2 / g1 > 0.09 && g2 / g1 < 0.11, `gap ratio ${g2 / g1} for df - 2 ten times smaller`);
  });

  it('fitSmoothingSpline tends to the interpolating natural spline of the pooled data as df -> m', () => {
    // Source: as lambda -> 0 the minimiser tends to the natural cubic spline interpolating
    // the (pooled) data, with residuals O(lambda) (Green & Silverman 1994, chapter 2).
    // women: 15 distinct x; cars: ties, so the limit passes through the group means.
    const resid = (df: number): number => maxAbs(fitSmoothingSpline(women, df).residuals);
    const r3 = resid(15 - 1e-3);
    const r4 = resid(15 - 1e-4);
    assert.ok(r4 <= 1e-5 * (164 - 115), `max residual ${r4} at df 15 - 1e-4`);
    assert.ok(r4 / r3 > 0.09 && r4 / r3 < 0.11, `residual ratio ${r4 / r3}`);
    const fit = fitSmoothingSpline(cars, 19 - 1e-4);
    const groups = new Map<number, { s: number; k: number }>();
    cars.x.forEach((x, i) => {
      const g = groups.get(x) ?? { s: 0, k: 0 };
      g.s += cars.y[i] as number;
      g.k += 1;
      groups.set(x, g);
    });
    for (let i = 0; i < cars.x.length; i++) {
      const g = groups.get(cars.x[i] as number) as { s: number; k: number };
      assert.ok(Math.abs((fit.fitted[i] as number) - g.s / g.k) <= 1e-4 * maxAbs(cars.y), `row ${i}: ${fit.fitted[i]} vs group mean ${g.s / g.k}`);
    }
  });

  it('smoothingSplineAtLambda leave-one-out residuals r_i / (1 - h_i) equal brute-force refits without row i', () => {
    // Source: for a linear smoother with a fixed penalty the leave-one-out residual is
    // r_i / (1 - h_ii) (Green & Silverman 1994, chapter 3, cross-validation). The refit
    // without row i has its own knots (all remaining distinct x) and is linear beyond them,
    // which is the same minimiser over all smooth functions. Tolerance 1e-8 of max |e|.
    for (const [name, d] of [
      ['cars', cars],
      ['cars_w', carsW],
    ] as const) {
      const fit = fitSmoothingSpline(d, 6);
      const lambda = fit.lambda as number;
      const e = d.x.map((_, i) => (fit.residuals[i] as number) / (1 - (fit.leverage[i] as number)));
      const scale = maxAbs(e);
      for (let i = 0; i < d.x.length; i++) {
        const refit = smoothingSplineAtLambda(withoutRow(d, i), lambda);
        const brute = (d.y[i] as number) - refit.curve.value(d.x[i] as number);
        assert.ok(Math.abs(brute - (e[i] as number)) <= 1e-8 * scale, `${name} row ${i}: brute force ${brute}, formula ${e[i]}`);
      }
    }
  });

  it('fitSmoothingSpline with integer weights equals the fit to the rows repeated that many times', () => {
    // Source: sum_i w_i (y_i - f(x_i))^2 with integer w_i is the same sum over w_i copies of
    // row i, and the hat trace pools over tied x, so the same df gives the same lambda and
    // curve. Tolerance 1e-9 relative.
    const counts = women.x.map((_, i) => 1 + ((i * 7) % 4));
    const weighted: XYData = { x: women.x, y: women.y, w: counts };
    const xs: number[] = [];
    const ys: number[] = [];
    counts.forEach((c, i) => {
      for (let k = 0; k < c; k++) {
        xs.push(women.x[i] as number);
        ys.push(women.y[i] as number);
      }
    });
    const repeated: XYData = { x: Float64Array.from(xs), y: Float64Array.from(ys) };
    for (const df of [3, 6.5, 11]) {
      const a = fitSmoothingSpline(weighted, df);
      const b = fitSmoothingSpline(repeated, df);
      assert.ok(Math.abs((a.lambda as number) / (b.lambda as number) - 1) <= 1e-9, `df ${df}: lambda ${a.lambda} vs ${b.lambda}`);
      for (let x = 55; x <= 75; x += 0.5) {
        assert.ok(Math.abs(a.curve.value(x) - b.curve.value(x)) <= 1e-9 * 164, `df ${df}: value(${x})`);
        const va = a.curve.varianceFactor(x);
        assert.ok(Math.abs(va - b.curve.varianceFactor(x)) <= 1e-9 * va, `df ${df}: varianceFactor(${x})`);
      }
      // a row with weight c carries the leverage of its c copies
      let k = 0;
      counts.forEach((c, i) => {
        let copies = 0;
        for (let r = 0; r < c; r++) copies += b.leverage[k++] as number;
        assert.ok(Math.abs((a.leverage[i] as number) - copies) <= 1e-9, `df ${df}: leverage of row ${i}`);
      });
    }
  });

  it('smoothingSplineAtLambda equals a dense ml-matrix solve of the penalised problem on random data', () => {
    // Source: the definition solved directly: c = (X'WX + lambda Omega)^-1 X'Wy with the
    // exact penalty (see denseSolve), hat diagonal w_i b_i' A^-1 b_i, variance factor
    // b(x)' A^-1 b(x) (b continued linearly outside the data). Random x with ties, weights
    // and lambda from a seeded generator. Tolerance 1e-7 relative (dense inverse).
    fc.assert(
      fc.property(
        fc.uniqueArray(fc.integer({ min: -300, max: 300 }), { minLength: 4, maxLength: 30 }),
        fc.array(fc.nat({ max: 1000 }), { maxLength: 10 }),
        fc.array(fc.double({ min: -50, max: 50, noNaN: true }), { minLength: 40, maxLength: 40 }),
        fc.array(fc.double({ min: 0.2, max: 5, noNaN: true }), { minLength: 40, maxLength: 40 }),
        fc.double({ min: -3, max: 1, noNaN: true }),
        (unique, repeats, yPool, wPool, logLam) => {
          const base = unique.map((u) => u / 10);
          const xs = [...base, ...repeats.map((r) => base[r % base.length] as number)];
          const d: XYData = {
            x: Float64Array.from(xs),
            y: Float64Array.from(xs, (_, i) => yPool[i % yPool.length] as number),
            w: Float64Array.from(xs, (_, i) => wPool[i % wPool.length] as number),
          };
          const range = Math.max(...base) - Math.min(...base);
          const lambda = 10 ** logLam * range ** 3;
          const fit = smoothingSplineAtLambda(d, lambda);
          const dense = denseSolve(d, fit.knots, lambda);
          const cScale = maxAbs(dense.coef);
          dense.coef.forEach((c, i) => assert.ok(Math.abs((fit.coefficients[i] as number) - c) <= 1e-7 * cScale + 1e-12, `coefficient ${i}: ${fit.coefficients[i]} vs ${c}`));
          for (let i = 0; i < xs.length; i++) {
            const row = basisRow(dense.ev, xs[i] as number);
            const h = (d.w as Float64Array)[i]! * Matrix.rowVector(row).mmul(dense.ainv).mmul(Matrix.columnVector(row)).get(0, 0);
            assert.ok(Math.abs((fit.leverage[i] as number) - h) <= 1e-7 * h + 1e-12, `leverage ${i}: ${fit.leverage[i]} vs ${h}`);
          }
          const lo = Math.min(...base);
          for (const x of [lo - 0.3 * range, lo, lo + 0.37 * range, lo + range, lo + 1.5 * range]) {
            const row = basisRow(dense.ev, x);
            const v = Matrix.rowVector(row).mmul(dense.ainv).mmul(Matrix.columnVector(row)).get(0, 0);
            assert.ok(Math.abs(fit.curve.varianceFactor(x) - v) <= 1e-7 * v, `varianceFactor(${x}): ${fit.curve.varianceFactor(x)} vs ${v}`);
            const value = row.reduce((s, b, i) => s + b * (dense.coef[i] as number), 0);
            assert.ok(Math.abs(fit.curve.value(x) - value) <= 1e-7 * cScale + 1e-12, `value(${x})`);
          }
        },
      ),
      { seed: 4711, numRuns: 60 },
    );
  });

  it("fitSmoothingSpline is natural: f'' vanishes at both boundary knots, and the curve is linear beyond them", () => {
    // Source: the penalised minimiser over all smooth functions is a natural cubic spline,
    // f'' = 0 at the boundary knots and linear outside (Reinsch 1967, Smoothing by spline
    // functions, Numer. Math. 10; Green & Silverman 1994, chapter 2). Tolerance 1e-9 of the
    // largest |f''| at the knots; 1e-10 of max |y| for the linear continuation.
    for (const df of [3, 8, 25]) {
      const fit = fitSmoothingSpline(mcycle, df);
      const ev = new BSplineEvaluator(fit.knots);
      const second = (x: number): number => {
        const f = ev.eval(x, 2);
        let s = 0;
        for (let r = 0; r < 4; r++) s += (ev.d2[r] as number) * (fit.coefficients[f + r] as number);
        return s;
      };
      const xs = Array.from(new Set(Array.from(mcycle.x))).sort((a, b) => a - b);
      const big = Math.max(...xs.map((x) => Math.abs(second(x))));
      assert.ok(Math.abs(second(xs[0] as number)) <= 1e-9 * big, `df ${df}: f''(lower) = ${second(xs[0] as number)}`);
      assert.ok(Math.abs(second(xs[xs.length - 1] as number)) <= 1e-9 * big, `df ${df}: f''(upper)`);
      const c = fit.curve;
      const sy = maxAbs(mcycle.y);
      for (const edge of [c.lower, c.upper]) {
        const dir = edge === c.lower ? -1 : 1;
        const v0 = c.value(edge);
        const v1 = c.value(edge + dir * 5);
        const v2 = c.value(edge + dir * 10);
        assert.ok(Math.abs(v2 - 2 * v1 + v0) <= 1e-10 * sy, `df ${df}: not linear beyond ${edge}`);
        const slope = (c.value(edge - dir * 1e-5) - v0) / (-dir * 1e-5);
        assert.ok(Math.abs((v1 - v0) / (dir * 5) - slope) <= 1e-4 * Math.max(1, Math.abs(slope)), `df ${df}: slope continuity at ${edge}`);
      }
    }
  });

  it('fitSmoothingSpline varianceFactor at a distinct x times its pooled weight is its pooled leverage', () => {
    // Source: the posterior covariance of the fit at the data points is sigma^2 S W^-1
    // (Wahba 1983, Bayesian confidence intervals for the cross-validated smoothing spline,
    // JRSS B 45), so b_j' A^-1 b_j W_j = S_jj. cars has ties. Tolerance 1e-10 relative.
    const fit = fitSmoothingSpline(cars, 7);
    const pooled = new Map<number, { w: number; h: number }>();
    cars.x.forEach((x, i) => {
      const g = pooled.get(x) ?? { w: 0, h: 0 };
      g.w += 1;
      g.h += fit.leverage[i] as number;
      pooled.set(x, g);
    });
    for (const [x, g] of pooled) {
      assert.ok(Math.abs(fit.curve.varianceFactor(x) * g.w - g.h) <= 1e-10 * g.h, `x ${x}: ${fit.curve.varianceFactor(x) * g.w} vs ${g.h}`);
    }
  });

  it('smoothingSplineAtLambda and lambdaForDf reproduce fitSmoothingSpline at its lambda', () => {
    // Source: consistency of the three entry points (same definition, same lambda).
    const fit = fitSmoothingSpline(mcycle, 9);
    const lambda = lambdaForDf(mcycle, 9);
    assert.ok(Math.abs(lambda / (fit.lambda as number) - 1) <= 1e-12, `${lambda} vs ${fit.lambda}`);
    const again = smoothingSplineAtLambda(mcycle, lambda);
    assert.ok(Math.abs(again.df - fit.df) <= 1e-9);
    for (let i = 0; i < mcycle.x.length; i++) assert.ok(Math.abs((again.fitted[i] as number) - (fit.fitted[i] as number)) <= 1e-10 * maxAbs(mcycle.y));
    assert.equal(lambdaForDf(mcycle, 2), Infinity);
    const line = smoothingSplineAtLambda(mcycle, Infinity);
    assert.equal(line.df, 2);
    assert.ok(line.notes.some((s) => /straight line/.test(s)));
  });

  it('fitSmoothingSpline is unchanged by an affine change of x units, with lambda scaling by the cube of the factor', () => {
    // Source: change of variables, integral f''(x)^2 dx = s^-3 integral g''(u)^2 du for x = s u + c.
    // Tolerance 1e-9 relative.
    const s = 1000;
    const moved: XYData = { x: mcycle.x.map((x) => s * x - 3), y: mcycle.y };
    for (const df of [4, 15]) {
      const a = fitSmoothingSpline(mcycle, df);
      const b = fitSmoothingSpline(moved, df);
      assert.ok(Math.abs((b.lambda as number) / ((a.lambda as number) * s ** 3) - 1) <= 1e-9, `df ${df}`);
      for (let i = 0; i < mcycle.x.length; i++) assert.ok(Math.abs((a.fitted[i] as number) - (b.fitted[i] as number)) <= 1e-9 * maxAbs(mcycle.y));
    }
  });

  it('fitSmoothingSpline reproduces a straight line exactly with 200000 distinct, unevenly spaced x', () => {
    // Source: a line has zero penalty and zero residuals, so it is the minimiser at every
    // lambda (Green & Silverman 1994, chapter 2). Exercises the O(n) path at scale; rows are
    // given in a scrambled order. Tolerance 1e-9 of max |y|.
    const n = 200000;
    const x = new Float64Array(n);
    for (let i = 0; i < n; i++) x[(i * 7919) % n] = i + 0.5 * Math.sin(i); // 7919 is prime, so this permutes 0..n-1
    const y = x.map((v) => 3 - 0.5 * v);
    const fit = fitSmoothingSpline({ x, y }, 7);
    assert.ok(Math.abs(fit.df - 7) <= 1e-6);
    assert.ok(maxAbs(fit.residuals) <= 1e-9 * maxAbs(y), `max residual ${maxAbs(fit.residuals)}`);
    assert.ok(Math.abs(fit.curve.value(2 * n) - (3 - n)) <= 1e-9 * maxAbs(y), 'extrapolated value');
  });

  it('fitSmoothingSpline rejects bad input with precise messages', () => {
    // Source: the input rules of docs/design.md ("Input") / STYLE.md (what and where).
    const six: XYData = { x: Float64Array.of(1, 2, 3, 4, 5, 6), y: Float64Array.of(1, 3, 2, 5, 4, 6) };
    assert.throws(
      () => fitSmoothingSpline(six, 9),
      (e: unknown) => e instanceof FitError && e.message === 'smoothing spline with df 9 needs more than 9 distinct x values; the data has 6',
    );
    assert.throws(() => fitSmoothingSpline(six, 6), /df 6 needs more than 6 distinct x values; the data has 6/);
    assert.throws(
      () => fitSmoothingSpline(six, 1.5),
      (e: unknown) => e instanceof FitError && /at least 2/.test(e.message),
    );
    assert.throws(() => fitSmoothingSpline(six, NaN), FitError);
    const three: XYData = { x: Float64Array.of(1, 1, 2, 3, 3), y: Float64Array.of(1, 2, 3, 4, 5) };
    assert.throws(
      () => fitSmoothingSpline(three, 2.5),
      (e: unknown) => e instanceof FitError && e.message === 'smoothing spline needs at least 4 distinct x values; the data has 3',
    );
    const bad: XYData = { x: Float64Array.of(1, 2, NaN, 4, 5), y: Float64Array.of(1, 2, 3, 4, 5), lines: Int32Array.of(2, 3, 4, 5, 6) };
    assert.throws(
      () => fitSmoothingSpline(bad, 3),
      (e: unknown) => e instanceof InputError && e.place.line === 4 && /not a finite number/.test(e.message),
    );
    const badW: XYData = { x: Float64Array.of(1, 2, 3, 4, 5), y: Float64Array.of(1, 2, 3, 4, 5), w: Float64Array.of(1, 1, 0, 1, 1) };
    assert.throws(
      () => fitSmoothingSpline(badW, 3),
      (e: unknown) => e instanceof InputError && /positive/.test(e.message),
    );
    assert.throws(
      () => smoothingSplineAtLambda(six, 0),
      (e: unknown) => e instanceof FitError && /positive/.test(e.message),
    );
    assert.throws(() => smoothingSplineAtLambda(six, -1), FitError);
  });

  it('fitSmoothingSpline refuses a df so close to interpolation that double precision cannot deliver it', () => {
    // Source: MAX_VARIANCE_RATIO in core/fit/smoothingSpline/. With 2000 knots spaced
    // from 2.5e-7 to 1e-3 of the range, df = m - 1.5 needs a lambda where the filter's
    // variances span more than 1e10; a smaller df on the same data is fine.
    const m = 2000;
    const x = Float64Array.from({ length: m }, (_, i) => (i / (m - 1)) ** 2);
    const y = x.map((v, i) => Math.sin(6 * v) + Math.cos(i));
    assert.throws(
      () => fitSmoothingSpline({ x, y }, m - 1.5),
      (e: unknown) => e instanceof FitError && /too close to interpolating/.test(e.message),
    );
    const ok: FitResult = fitSmoothingSpline({ x, y }, 100);
    assert.ok(Math.abs(ok.df - 100) <= 1e-6);
  });
});
