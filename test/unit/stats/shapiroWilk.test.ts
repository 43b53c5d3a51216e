import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { InputError } from '../../../core/errors';
import { shapiroWilk } from '../../../core/stats/shapiroWilk';
import { seededNormals } from './seededNormal';

describe('shapiroWilk', () => {
  it("shapiroWilk reproduces Shapiro & Wilk's (1965) worked example: weights of 11 men, W = 0.79, p < 0.01", () => {
    // Shapiro & Wilk (1965), Biometrika 52, section 4 example (W = 0.79, significant at
    // the 1 % level); values from memory. Royston's coefficients differ from the 1965
    // table in the third decimal, hence the tolerance.
    const weights = Float64Array.of(148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236);
    const r = shapiroWilk(weights);
    assert.ok(Math.abs(r.statistic - 0.79) <= 0.005, `W = ${r.statistic}`);
    assert.ok(r.pValue < 0.01, `p = ${r.pValue}`);
    assert.equal(r.n, 11);
    assert.equal(r.note, undefined);
  });

  it('shapiroWilk with n = 3 is exact: W = 1, p = 1 for equal spacing; W = 3/4, p = 0 at the minimum', () => {
    // For n = 3, W >= 3/4 and P(W <= w) = (6/pi)(asin(sqrt w) - asin(sqrt(3/4))) (Shapiro & Wilk 1965).
    const even = shapiroWilk(Float64Array.of(1, 2, 3));
    assert.ok(Math.abs(even.statistic - 1) <= 1e-15 && Math.abs(even.pValue - 1) <= 1e-12, JSON.stringify(even));
    const extreme = shapiroWilk(Float64Array.of(0, 0, 1));
    assert.ok(Math.abs(extreme.statistic - 0.75) <= 1e-15 && extreme.pValue <= 1e-7, JSON.stringify(extreme));
  });

  it('shapiroWilk is invariant to order, location and positive scale (property, seeded)', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 3, max: 60 }),
        fc.integer({ min: 1, max: 1e6 }),
        fc.double({ min: -1e3, max: 1e3, noNaN: true }),
        fc.double({ min: 1e-2, max: 1e2, noNaN: true }),
        (n, seed, shift, scale) => {
          const x = seededNormals(seed, n);
          const base = shapiroWilk(x);
          const moved = shapiroWilk(x.map((v) => shift + scale * v).reverse());
          return Math.abs(base.statistic - moved.statistic) <= 1e-9 && Math.abs(base.pValue - moved.pValue) <= 1e-8;
        },
      ),
      { seed: 11, numRuns: 100 },
    );
  });

  it('shapiroWilk p-values are calibrated: about 5 % of normal samples (n = 30) fall below 0.05 (seeded)', () => {
    // Royston (1995) reports the approximation holds the nominal level; 400 samples give a
    // binomial standard error of 0.011 around 0.05.
    let rejected = 0;
    const runs = 400;
    for (let s = 1; s <= runs; s++) if (shapiroWilk(seededNormals(1000 + s, 30)).pValue < 0.05) rejected++;
    const rate = rejected / runs;
    assert.ok(rate > 0.018 && rate < 0.085, `rejection rate ${rate}`);
  });

  it('shapiroWilk rejects clearly skewed data (exponential sample, n = 100)', () => {
    const z = seededNormals(5, 200);
    // Exponential variates as -log of a uniform built from two normals (chi-square with 2 df / 2).
    const x = new Float64Array(100);
    for (let i = 0; i < 100; i++) x[i] = 0.5 * ((z[2 * i] as number) ** 2 + (z[2 * i + 1] as number) ** 2);
    assert.ok(shapiroWilk(x).pValue < 1e-4);
  });

  it('shapiroWilk tests an evenly spaced subsample of 5000 rows beyond n = 5000 and says so', () => {
    const n = 12001;
    const x = seededNormals(99, n);
    const r = shapiroWilk(x);
    assert.equal(r.n, 5000);
    assert.match(r.note ?? '', /tested 5000 of 12001 rows, evenly spaced by row position/);
    const sub = new Float64Array(5000);
    for (let k = 0; k < 5000; k++) sub[k] = x[Math.round((k * (n - 1)) / 4999)] as number;
    const direct = shapiroWilk(sub);
    assert.equal(r.statistic, direct.statistic);
    assert.equal(r.pValue, direct.pValue);
  });

  it('shapiroWilk refuses fewer than 3 values, equal values and non-finite values', () => {
    assert.throws(
      () => shapiroWilk(Float64Array.of(1, 2)),
      (e: unknown) => e instanceof InputError && /at least 3 values; got 2/.test(e.message),
    );
    assert.throws(() => shapiroWilk(Float64Array.of(4, 4, 4, 4)), /all 4 values are equal/);
    assert.throws(() => shapiroWilk(Float64Array.of(1, NaN, 3)), /value 2 is not a finite number/);
  });
});
