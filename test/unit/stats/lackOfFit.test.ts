import { strict as assert } from 'node:assert';
import { InputError } from '../../../core/errors';
import { pf } from '../../../core/stats/distributions';
import { lackOfFit } from '../../../core/stats/lackOfFit';
import { orderByX } from '../../../core/tune/plan';

describe('lackOfFit', () => {
  it('lackOfFit splits a straight-line RSS into pure error and lack of fit (worked by hand from Draper & Smith 1998, section 2.1)', () => {
    // x = 1,1,2,2,3,3; y = 1,3,2,4,6,8. Group means 2, 3, 7: pure error 2 + 2 + 2 = 6 on 3 df.
    // Least-squares line 4 + 2.5 (x - 2): residuals -0.5, 1.5, -2, 0, -0.5, 1.5, RSS 9.
    // Lack of fit 9 - 6 = 3 on 3 - 2 = 1 df; F = (3 / 1) / (6 / 3) = 1.5.
    const x = Float64Array.of(1, 1, 2, 2, 3, 3);
    const y = Float64Array.of(1, 3, 2, 4, 6, 8);
    const r = lackOfFit(x, y, undefined, 9, 2);
    assert.ok(r);
    assert.ok(Math.abs(r.pureErrorSS - 6) <= 1e-13);
    assert.ok(Math.abs(r.lackOfFitSS - 3) <= 1e-13);
    assert.equal(r.df1, 1);
    assert.equal(r.df2, 3);
    assert.ok(Math.abs(r.F - 1.5) <= 1e-13);
    assert.ok(Math.abs(r.pValue - pf(1.5, 1, 3, false)) <= 1e-15);
    assert.equal(r.replicatedLevels, 3);
  });

  it('lackOfFit does not depend on row order and groups x by exact equality', () => {
    const x = Float64Array.of(3, 1, 2, 3, 1, 2, 5);
    const y = Float64Array.of(8, 1, 2, 6, 3, 4, 10);
    const shuffled = [6, 2, 0, 5, 3, 1, 4];
    const r1 = lackOfFit(x, y, undefined, 12, 2);
    const r2 = lackOfFit(
      Float64Array.from(shuffled, (i) => x[i] as number),
      Float64Array.from(shuffled, (i) => y[i] as number),
      undefined,
      12,
      2,
    );
    assert.ok(r1 && r2);
    assert.ok(Math.abs(r1.pureErrorSS - r2.pureErrorSS) <= 1e-13);
    assert.equal(r1.replicatedLevels, 3);
    assert.equal(r1.df2, 3);
  });

  it('lackOfFit with the shared order of x (orderByX) gives the same numbers as a checked copy of it', () => {
    // The shared order is taken as it is (sorted by argsortStable); a copy of it goes through the check.
    const x = Float64Array.from({ length: 2000 }, (_, i) => Math.round(Math.sin(i) * 40) / 8);
    const y = Float64Array.from({ length: 2000 }, (_, i) => Math.cos(i) + (x[i] as number) ** 2);
    const shared = lackOfFit(x, y, undefined, 1500, 4, orderByX(x));
    const checked = lackOfFit(x, y, undefined, 1500, 4, Int32Array.from(orderByX(x)));
    assert.ok(shared && checked);
    assert.deepEqual(shared, checked);
    const bad = Int32Array.from(orderByX(x));
    [bad[0], bad[1999]] = [bad[1999] as number, bad[0] as number];
    assert.throws(() => lackOfFit(x, y, undefined, 1500, 4, bad), /does not list every row once by ascending x/);
  });

  it('lackOfFit with weights uses weighted group means: pure error = sum w (y - weighted mean)^2', () => {
    const x = Float64Array.of(1, 1, 2, 2, 2);
    const y = Float64Array.of(0.5, 1.5, 3, 4, 6);
    const w = Float64Array.of(1, 2, 1, 1, 0.5);
    const weighted = lackOfFit(x, y, w, 20, 1);
    const g1 = (1 * 0.5 + 2 * 1.5) / 3;
    const g2 = (3 + 4 + 0.5 * 6) / 2.5;
    const pe = (0.5 - g1) ** 2 + 2 * (1.5 - g1) ** 2 + (3 - g2) ** 2 + (4 - g2) ** 2 + 0.5 * (6 - g2) ** 2;
    assert.ok(weighted);
    assert.ok(Math.abs(weighted.pureErrorSS - pe) <= 1e-13, `${weighted.pureErrorSS} vs ${pe}`);
  });

  it('lackOfFit is undefined without replicated x or when the model is as flexible as the group means', () => {
    assert.equal(lackOfFit(Float64Array.of(1, 2, 3, 4), Float64Array.of(1, 2, 2, 5), undefined, 1, 2), undefined);
    assert.equal(lackOfFit(Float64Array.of(1, 1, 2, 2), Float64Array.of(1, 2, 2, 5), undefined, 1, 2), undefined);
  });

  it('lackOfFit with exactly agreeing replicates reports an infinite F when the curve misses them', () => {
    const r = lackOfFit(Float64Array.of(1, 1, 2, 2, 3, 3), Float64Array.of(1, 1, 2, 2, 5, 5), undefined, 2, 2);
    assert.ok(r);
    assert.equal(r.F, Infinity);
    assert.equal(r.pValue, 0);
  });

  it('lackOfFit with the row order given (orderByX) gives the same split as sorting itself, and rejects an order that is not one', () => {
    // The Draper & Smith example above, rows shuffled.
    const x = Float64Array.of(3, 1, 2, 1, 3, 2);
    const y = Float64Array.of(6, 1, 2, 3, 8, 4);
    const own = lackOfFit(x, y, undefined, 9, 2);
    const given = lackOfFit(x, y, undefined, 9, 2, orderByX(x));
    assert.ok(own && given);
    assert.deepEqual(given, own);
    assert.ok(Math.abs(given.pureErrorSS - 6) <= 1e-13);
    const bad = (order: number[]): void => {
      assert.throws(
        () => lackOfFit(x, y, undefined, 9, 2, Int32Array.from(order)),
        (e: unknown) => e instanceof InputError && /does not list every row once by ascending x/.test(e.message),
      );
    };
    bad([1, 3, 2, 5, 4]); // a row missing
    bad([1, 1, 2, 5, 0, 4]); // a row twice
    bad([1, 2, 3, 5, 0, 4]); // not ascending
    bad([1, 3, 2, 5, 0, 6]); // out of range
  });

  it('lackOfFit rejects mismatched lengths, non-finite values, non-positive weights and a negative RSS', () => {
    const x = Float64Array.of(1, 1, 2);
    assert.throws(
      () => lackOfFit(x, Float64Array.of(1, 2), undefined, 1, 1),
      (e: unknown) => e instanceof InputError && /x has 3 values but y has 2/.test(e.message),
    );
    assert.throws(() => lackOfFit(x, Float64Array.of(1, NaN, 2), undefined, 1, 1), /row 2 has a non-finite x or y/);
    assert.throws(() => lackOfFit(x, Float64Array.of(1, 2, 3), Float64Array.of(1, 0, 1), 1, 1), /weight 2 must be > 0, got 0/);
    assert.throws(() => lackOfFit(x, Float64Array.of(1, 2, 3), undefined, -1, 1), /must be >= 0, got -1/);
  });
});
