/**
 * Unit tests of core/stats/effects.ts on hand-worked series. Agreement with R (acf, rle,
 * the moment formulas) on open datasets is in test/reference/influence.test.ts.
 */
import { strict as assert } from 'node:assert';
import { InputError } from '../../../core/errors';
import { lag1Correlation, moments, runsTest, spreadRatio } from '../../../core/stats/effects';

describe('effect sizes', () => {
  it('lag1Correlation is sum e_t e_(t-1) / sum e_t^2 (Box & Jenkins 1976), NaN without spread', () => {
    assert.equal(lag1Correlation(Float64Array.of(1, 1, -1, -1)), 0.25);
    assert.equal(lag1Correlation(Float64Array.of(1, -1, 1, -1)), -0.75);
    assert.ok(Number.isNaN(lag1Correlation(Float64Array.of(0, 0))));
    assert.ok(Number.isNaN(lag1Correlation(Float64Array.of(1))));
  });

  it('moments: skewness 0 and excess kurtosis -1.5 for 1, 2, 3; skewness of 0, 0, 3 is 1/sqrt(2) (hand-worked)', () => {
    const m = moments(Float64Array.of(1, 2, 3));
    assert.equal(m.skewness, 0);
    assert.ok(Math.abs(m.excessKurtosis + 1.5) < 1e-12);
    // Mean 1, deviations (-1, -1, 2): m2 = 2, m3 = 2, g1 = 2 / 2^1.5.
    assert.ok(Math.abs(moments(Float64Array.of(0, 0, 3)).skewness - 2 / Math.pow(2, 1.5)) < 1e-12);
    assert.ok(Number.isNaN(moments(Float64Array.of(5, 5)).skewness));
  });

  it('spreadRatio compares the root mean square of thirds of the series', () => {
    assert.equal(spreadRatio(Float64Array.of(1, -1, 2, -2, 3, -3)), 3);
    assert.equal(spreadRatio(Float64Array.of(1, -1, 1, -1, 1, -1)), 1);
    assert.ok(Number.isNaN(spreadRatio(Float64Array.of(1, 2))));
    assert.throws(() => spreadRatio(Float64Array.of(1, 2, 3), 1), InputError);
  });

  it('runsTest counts runs of signs and gives the Wald-Wolfowitz normal approximation (hand-worked)', () => {
    // + + + - - -: 2 runs; n1 = n2 = 3: E = 4, Var = 18 * 12 / (36 * 5) = 1.2.
    const r = runsTest(Float64Array.of(1, 2, 3, -1, -2, -3));
    assert.equal(r.runs, 2);
    assert.equal(r.expected, 4);
    assert.ok(Math.abs(r.z - -2 / Math.sqrt(1.2)) < 1e-12);
    assert.ok(r.pValue > 0 && r.pValue < 0.05);
    assert.equal(runsTest(Float64Array.of(1, 0, 2)).runs, 1);
    assert.ok(Number.isNaN(runsTest(Float64Array.of(1, 2, 3)).z));
  });
});
