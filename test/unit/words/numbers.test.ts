/**
 * The house style for numbers and test statistics (core/words/numbers.ts). The expected
 * strings are the style the word table in DEVELOPERS.md settles; the F distribution value
 * that the example statistic pairs with is not computed here (pText only formats).
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { percent, pText, sig, testText } from '../../../core/words/numbers';

describe('numbers house style', () => {
  it('sig keeps significant digits without trailing zeros, plain from 1e-4 to 1e6', () => {
    assert.equal(sig(0.30149), '0.301');
    assert.equal(sig(12.5), '12.5');
    assert.equal(sig(2.0), '2');
    assert.equal(sig(1.23e-7), '1.23e-7');
    assert.equal(sig(0.0001), '0.0001');
    assert.equal(sig(999999.4, 7), '999999.4');
    assert.equal(sig(1234567, 4), '1.235e+6');
    assert.equal(sig(-0.000123456), '-0.000123');
    assert.equal(sig(0), '0');
    assert.equal(sig(NaN), 'n/a');
    assert.equal(sig(Infinity), '∞');
    assert.equal(sig(-Infinity), '−∞');
  });

  it('sig(v, d) reads back within half a unit in the d-th digit', () => {
    fc.assert(
      fc.property(fc.double({ min: -1e12, max: 1e12, noNaN: true }), fc.integer({ min: 1, max: 15 }), (v, d) => {
        const back = Number(sig(v, d));
        assert.ok(Math.abs(back - v) <= 0.5 * 10 ** (Math.floor(Math.log10(Math.abs(v) || 1)) - d + 1) * (1 + 1e-12), `${v} -> ${sig(v, d)}`);
      }),
      { numRuns: 500, seed: 9 },
    );
  });

  it('pText gives two significant digits or a bound below 0.0001', () => {
    assert.equal(pText(0.0342), 'p = 0.034');
    assert.equal(pText(0.12034), 'p = 0.12');
    assert.equal(pText(0.0001), 'p = 0.0001');
    assert.equal(pText(1.7e-20), 'p < 0.0001');
  });

  it('testText writes NAME(df) = value, p = ... in one form for every test', () => {
    assert.equal(testText('F', [7, 45], 1.7724, 0.1203), 'F(7, 45) = 1.77, p = 0.12');
    assert.equal(testText('BP χ²', [3], 4.2137, 0.2394), 'BP χ²(3) = 4.21, p = 0.24');
    assert.equal(testText('DW', [], 0.94873, 1.7e-20), 'DW = 0.949, p < 0.0001');
    assert.equal(testText('W', [], 0.98123, 0.3412), 'W = 0.981, p = 0.34');
  });

  it('percent reads a share as a percentage', () => {
    assert.equal(percent(0.93141), '93.1 %');
    assert.equal(percent(NaN), 'n/a');
  });
});
