import { strict as assert } from 'node:assert';
import { FitError, InputError } from '../../../core/errors';
import { breuschPagan } from '../../../core/stats/breuschPagan';
import { ScaledCholesky } from '../../../core/stats/crossProducts';
import { denseDesign } from '../../../core/stats/design';
import { designCrossProducts } from '../../../core/stats/designCrossProducts';
import { pchisq } from '../../../core/stats/distributions';
import { polynomialDesigns } from './polynomialDesigns';
import { seededNormals } from './seededNormal';

function lineDesign(x: Float64Array): ReturnType<typeof denseDesign> {
  const rows = new Float64Array(2 * x.length);
  x.forEach((v, i) => {
    rows[2 * i] = 1;
    rows[2 * i + 1] = v;
  });
  return denseDesign(rows, 2);
}

function correlation(a: Float64Array, b: Float64Array): number {
  const n = a.length;
  let ma = 0;
  let mb = 0;
  for (let i = 0; i < n; i++) {
    ma += a[i] as number;
    mb += b[i] as number;
  }
  ma /= n;
  mb /= n;
  let sab = 0;
  let saa = 0;
  let sbb = 0;
  for (let i = 0; i < n; i++) {
    const da = (a[i] as number) - ma;
    const db = (b[i] as number) - mb;
    sab += da * db;
    saa += da * da;
    sbb += db * db;
  }
  return sab / Math.sqrt(saa * sbb);
}

describe('breuschPagan', () => {
  it('breuschPagan with one regressor is n times the squared correlation of e^2 with x (Koenker 1981: n R^2)', () => {
    const n = 60;
    const x = Float64Array.from({ length: n }, (_, i) => i / 7);
    const e = seededNormals(3, n).map((v, i) => v * (1 + 0.05 * i));
    const r = breuschPagan(e, lineDesign(x));
    const rho = correlation(
      e.map((v) => v * v),
      x,
    );
    assert.ok(Math.abs(r.statistic - n * rho * rho) <= 1e-12 * r.statistic, `${r.statistic} vs ${n * rho * rho}`);
    assert.equal(r.df, 1);
    assert.ok(Math.abs(r.pValue - pchisq(r.statistic, 1, false)) <= 1e-15);
  });

  it('breuschPagan is invariant to the scale of the residuals and to reparametrising the design', () => {
    const n = 40;
    const x = Float64Array.from({ length: n }, (_, i) => Math.log(i + 2));
    const e = seededNormals(12, n);
    const base = breuschPagan(e, lineDesign(x));
    const scaled = breuschPagan(
      e.map((v) => 1e3 * v),
      lineDesign(x.map((v) => 5 - 3 * v)),
    );
    assert.ok(Math.abs(base.statistic - scaled.statistic) <= 1e-10 * base.statistic);
  });

  it('breuschPagan p-values hold their level under constant spread (seeded simulation, n = 50)', () => {
    const n = 50;
    const x = Float64Array.from({ length: n }, (_, i) => i);
    const design = lineDesign(x);
    let below = 0;
    const runs = 400;
    for (let s = 0; s < runs; s++) if (breuschPagan(seededNormals(900 + s, n), design).pValue < 0.05) below++;
    // Koenker's statistic is asymptotically chi-square; binomial standard error 0.011.
    assert.ok(Math.abs(below / runs - 0.05) <= 0.035, `rate ${below / runs}`);
  });

  it('breuschPagan detects spread growing with x', () => {
    const n = 200;
    const x = Float64Array.from({ length: n }, (_, i) => i / n);
    const e = seededNormals(77, n).map((v, i) => v * (0.2 + 3 * (x[i] as number)));
    assert.ok(breuschPagan(e, lineDesign(x)).pValue < 1e-6);
  });

  it('breuschPagan depends on the design only through its column space: monomials (too ill-conditioned for cross products, Givens route) give the Chebyshev result', () => {
    // n R^2 of the auxiliary regression (Koenker 1981) depends on the fitted values only.
    const n = 150;
    const p = 8;
    const { monomials, chebyshev } = polynomialDesigns(n, p);
    assert.equal(ScaledCholesky.of(designCrossProducts(monomials, n, {}).gram, p), undefined, 'premise: the monomial Gram matrix is refused');
    const e = seededNormals(43, n).map((v, i) => v * (1 + (2 * i) / n));
    const viaGivens = breuschPagan(e, monomials);
    const viaCrossProducts = breuschPagan(e, chebyshev);
    assert.ok(Math.abs(viaGivens.statistic - viaCrossProducts.statistic) <= 1e-9 * viaCrossProducts.statistic, `${viaGivens.statistic} vs ${viaCrossProducts.statistic}`);
  });

  it('breuschPagan rejects intercept-only designs, too few rows, non-finite or equal-magnitude residuals and collinear designs', () => {
    const ones = denseDesign(new Float64Array(5).fill(1), 1);
    assert.throws(
      () => breuschPagan(Float64Array.of(1, 2, 3, 4, 5), ones),
      (e: unknown) => e instanceof InputError && /at least one regressor; the design has 1 column/.test(e.message),
    );
    const x = Float64Array.of(1, 2, 3, 4);
    assert.throws(() => breuschPagan(Float64Array.of(1, -1), lineDesign(x.subarray(0, 2))), /more residuals \(2\) than design columns \(2\)/);
    assert.throws(() => breuschPagan(Float64Array.of(1, NaN, 1, 2), lineDesign(x)), /residual 2 is not a finite number/);
    assert.throws(() => breuschPagan(Float64Array.of(1, -1, 1, -1), lineDesign(x)), /squared residuals are all equal/);
    const collinear = denseDesign(Float64Array.of(1, 1, 1, 1, 1, 1, 1, 1), 2);
    assert.throws(() => breuschPagan(Float64Array.of(1, -2, 3, 0.5), collinear), FitError);
  });
});
