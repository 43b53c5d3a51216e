import { strict as assert } from 'node:assert';
import { FitError, InputError } from '../../../core/errors';
import { ScaledCholesky } from '../../../core/stats/crossProducts';
import { denseDesign } from '../../../core/stats/design';
import { designCrossProducts } from '../../../core/stats/designCrossProducts';
import { pnorm } from '../../../core/stats/distributions';
import { durbinWatson } from '../../../core/stats/durbinWatson';
import { quadraticFormLowerTail } from '../../../core/stats/imhof';
import { polynomialDesigns } from './polynomialDesigns';
import { seededNormals } from './seededNormal';

/** Intercept-only design with n rows. */
function interceptOnly(n: number): ReturnType<typeof denseDesign> {
  return denseDesign(new Float64Array(n).fill(1), 1);
}

/** Least-squares residuals of y on [1, x] (closed form of simple regression). */
function lineResiduals(x: Float64Array, y: Float64Array): Float64Array {
  const n = x.length;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i] as number;
    my += y[i] as number;
  }
  mx /= n;
  my /= n;
  let sxy = 0;
  let sxx = 0;
  for (let i = 0; i < n; i++) {
    sxy += ((x[i] as number) - mx) * ((y[i] as number) - my);
    sxx += ((x[i] as number) - mx) ** 2;
  }
  const b = sxy / sxx;
  return y.map((v, i) => v - my - b * ((x[i] as number) - mx));
}

describe('durbinWatson', () => {
  it('durbinWatson statistic is sum of squared differences over sum of squares (Durbin & Watson 1950, definition of d)', () => {
    // Differences 0, -2, 0, 2, 0, -2, 0: 12 over 8 squares of 1.
    const r = durbinWatson(Float64Array.of(1, 1, -1, -1, 1, 1, -1, -1));
    assert.ok(Math.abs(r.statistic - 1.5) <= 1e-15);
    assert.equal(r.method, 'asymptotic');
  });

  it('durbinWatson without a design uses mean 2 and variance 4 / n', () => {
    const e = seededNormals(4, 40);
    const r = durbinWatson(e);
    assert.ok(Math.abs(r.pValue - pnorm((r.statistic - 2) / Math.sqrt(4 / 40))) <= 1e-15);
  });

  it('durbinWatson exact p-value with an intercept-only design uses the eigenvalues 2(1 - cos(pi j / n)) of A (Durbin & Watson 1950)', () => {
    // With only an intercept, M A M has eigenvalues 2(1 - cos(pi j / n)), j = 1..n-1
    // (the eigenvector of j = 0 is the constant, removed by M); the eigenvalues of the
    // first-difference matrix A as given by Durbin & Watson (1950), from memory.
    const n = 25;
    const e = seededNormals(8, n);
    let mean = 0;
    for (const v of e) mean += v;
    mean /= n;
    const res = e.map((v) => v - mean);
    const r = durbinWatson(res, interceptOnly(n));
    assert.equal(r.method, 'exact');
    const lambda = new Float64Array(n - 1);
    for (let j = 1; j < n; j++) lambda[j - 1] = 2 * (1 - Math.cos((Math.PI * j) / n)) - r.statistic;
    assert.ok(Math.abs(r.pValue - quadraticFormLowerTail(lambda)) <= 1e-9, `${r.pValue}`);
  });

  it('durbinWatson normal approximation with an intercept-only design has mean 2 and variance 4(n - 2)/(n^2 - 1)', () => {
    // From the eigenvalues above: sum nu_j = 2(n - 1) and sum nu_j^2 = 6n - 8, so
    // E d = 2 and Var d = 2 (6n - 8 - 4(n - 1)) / ((n - 1)(n + 1)) (Durbin & Watson 1971).
    const n = 150;
    const e = seededNormals(21, n);
    let mean = 0;
    for (const v of e) mean += v;
    mean /= n;
    const r = durbinWatson(
      e.map((v) => v - mean),
      interceptOnly(n),
    );
    assert.equal(r.method, 'normal');
    const sd = Math.sqrt((4 * (n - 2)) / (n * n - 1));
    assert.ok(Math.abs(r.pValue - pnorm((r.statistic - 2) / sd)) <= 1e-13, `${r.pValue}`);
  });

  it('durbinWatson exact p-values are uniform under independent normal errors (seeded simulation, n = 20, line design)', () => {
    const n = 20;
    const x = Float64Array.from({ length: n }, (_, i) => Math.sqrt(i + 1));
    const rows = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) {
      rows[2 * i] = 1;
      rows[2 * i + 1] = x[i] as number;
    }
    const design = denseDesign(rows, 2);
    const runs = 500;
    let below10 = 0;
    let below50 = 0;
    for (let s = 0; s < runs; s++) {
      const p = durbinWatson(lineResiduals(x, seededNormals(500 + s, n)), design).pValue;
      if (p < 0.1) below10++;
      if (p < 0.5) below50++;
    }
    // Binomial standard errors 0.013 and 0.022 around 0.1 and 0.5.
    assert.ok(Math.abs(below10 / runs - 0.1) <= 0.045, `P(p < 0.1) = ${below10 / runs}`);
    assert.ok(Math.abs(below50 / runs - 0.5) <= 0.07, `P(p < 0.5) = ${below50 / runs}`);
  });

  it('durbinWatson detects positive autocorrelation (AR(1), rho = 0.8) with all three methods', () => {
    const n = 120;
    const z = seededNormals(31, n);
    const e = new Float64Array(n);
    e[0] = z[0] as number;
    for (let i = 1; i < n; i++) e[i] = 0.8 * (e[i - 1] as number) + (z[i] as number);
    assert.ok(durbinWatson(e).pValue < 1e-6);
    assert.ok(durbinWatson(e, interceptOnly(n)).pValue < 1e-6);
    assert.ok(durbinWatson(e.subarray(0, 60), interceptOnly(60)).pValue < 1e-4);
  });

  it('durbinWatson(normal) depends on the design only through its column space: monomials (too ill-conditioned for cross products, Givens route) give the Chebyshev result', () => {
    // Durbin & Watson (1971): the moments are traces of M A and (M A)^2, and M = I - H is
    // the same for any basis of the column space. Degree-7 monomials on [0, 1] and the
    // Chebyshev polynomials T_0..T_7(2x - 1) span the same space.
    const n = 150;
    const p = 8;
    const { monomials, chebyshev } = polynomialDesigns(n, p);
    assert.equal(ScaledCholesky.of(designCrossProducts(monomials, n, {}).gram, p), undefined, 'premise: the monomial Gram matrix is refused');
    assert.ok(ScaledCholesky.of(designCrossProducts(chebyshev, n, {}).gram, p), 'premise: the Chebyshev Gram matrix is accepted');
    const z = seededNormals(41, n);
    const e = new Float64Array(n);
    e[0] = z[0] as number;
    for (let i = 1; i < n; i++) e[i] = 0.3 * (e[i - 1] as number) + (z[i] as number);
    const viaGivens = durbinWatson(e, monomials);
    const viaCrossProducts = durbinWatson(e, chebyshev);
    assert.equal(viaGivens.method, 'normal');
    assert.ok(Math.abs(viaGivens.pValue - viaCrossProducts.pValue) <= 1e-9 * viaCrossProducts.pValue, `${viaGivens.pValue} vs ${viaCrossProducts.pValue}`);
  });

  it('durbinWatson rejects short, non-finite or all-zero residuals and unusable designs', () => {
    assert.throws(
      () => durbinWatson(Float64Array.of(1, 2)),
      (e: unknown) => e instanceof InputError && /at least 3 residuals; got 2/.test(e.message),
    );
    assert.throws(() => durbinWatson(Float64Array.of(1, Infinity, 2)), /residual 2 is not a finite number/);
    assert.throws(() => durbinWatson(new Float64Array(5)), /all residuals are zero/);
    assert.throws(() => durbinWatson(Float64Array.of(1, -1, 1), denseDesign(new Float64Array(9).fill(1), 3)), /more rows \(3\) than design columns \(3\)/);
    const collinear = denseDesign(Float64Array.of(1, 2, 1, 2, 1, 2, 1, 2), 2);
    assert.throws(() => durbinWatson(Float64Array.of(1, -1, 1, -1), collinear), FitError);
  });
});
