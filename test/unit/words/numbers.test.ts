/**
 * The house style for numbers and test statistics (core/words/numbers.ts). The expected
 * strings are the style the word table in DEVELOPERS.md settles; the F distribution value
 * that the example statistic pairs with is not computed here (pText only formats).
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { atPlace, digitsToTell, MAX_SIG_DIGITS, percent, placeForSe, placeToTell, pText, sig, sizeText, testText } from '../../../core/words/numbers';

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

  it('placeForSe prints an estimate to the second significant digit of its SE (JCGM 100:2008, GUM, 7.2.6), with at least 3 digits', () => {
    // GUM 7.2.6: the uncertainty with at most two significant digits, the estimate rounded to the same place.
    assert.equal(placeForSe(0.300123, 4.1e-5), -6); // SE 0.000041: its second digit is at 1e-6
    assert.equal(atPlace(0.300123, placeForSe(0.300123, 4.1e-5)), '0.300123');
    assert.equal(placeForSe(12.3, 0.8), -2); // 12.30 (SE 0.80)
    assert.equal(placeForSe(1234.5, 0.012), -3); // 1234.500
    assert.equal(placeForSe(0.3, 0), -3); // no SE: 3 significant digits
    assert.equal(placeForSe(0.3, NaN), -3);
    assert.equal(placeForSe(250, 40), 0); // 3 digits of 250 are finer than SE 40's second digit (1)
    assert.equal(placeForSe(1, 1e-30), -14); // at most 15 significant digits
  });

  it('atPlace prints down to a decimal place: numbers compared with one another end at the same place', () => {
    assert.equal(atPlace(0.978, -3), '0.978');
    assert.equal(atPlace(1.0011, -3), '1.001');
    assert.equal(atPlace(1.15, -3), '1.15');
    assert.equal(atPlace(12.5, -3), '12.5');
    assert.equal(atPlace(0.0004, -3), '0.0004'); // never rounds a number away: at least one digit
    assert.equal(atPlace(0, -3), '0');
    assert.equal(atPlace(NaN, -3), 'n/a');
  });

  it('placeToTell moves to a finer place until different values print as different numbers', () => {
    assert.equal(placeToTell([0.30012, 0.30016], -3), -4); // 0.3001 and 0.3002
    assert.equal(placeToTell([0.978, 1.001, 1.15], -3), -3);
    assert.equal(placeToTell([0.30012, 0.30012, 0.5], -3), -3); // equal values need no digits
    assert.equal(placeToTell([1, 1 + 2 ** -52], -2), -14); // beyond a double's 15 digits: stops there
  });

  it('placeToTell: at its place, values that differ within 15 digits of the largest print as different numbers in their true order', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e9, max: 1e9, noNaN: true }), { minLength: 2, maxLength: 8 }), fc.integer({ min: -3, max: 3 }), (values, start) => {
        const place = placeToTell(values, start);
        const big = Math.max(...values.map(Math.abs));
        for (const a of values) for (const b of values) if (a < b && b - a > 1e-13 * big) assert.ok(Number(atPlace(a, place)) < Number(atPlace(b, place)), `${a} < ${b} at 10^${place}`);
      }),
      { numRuns: 500, seed: 14 },
    );
  });

  it('sizeText prints an effect size with 2 digits, more when it would read as its threshold', () => {
    assert.equal(sizeText(0.0162, 0.1), '0.016');
    assert.equal(sizeText(0.0996, 0.1), '0.0996');
    assert.equal(sizeText(-0.45, 0.1), '-0.45');
  });

  it('digitsToTell finds the fewest digits at which different values print as different numbers', () => {
    assert.equal(digitsToTell([0.301, 0.52, 0.307]), 3);
    assert.equal(digitsToTell([0.30012, 0.30016]), 4); // 0.3001 and 0.3002
    assert.equal(digitsToTell([0.300121, 0.300124]), 6);
    assert.equal(digitsToTell([0.30012, 0.30012, 0.5]), 3); // equal values need no digits
    assert.equal(digitsToTell([1, 1 + 2 ** -52]), MAX_SIG_DIGITS); // beyond a double's 15 digits: capped
    assert.equal(digitsToTell([], 4), 4);
    assert.equal(digitsToTell([999999.5, 1000000.4]), 7); // across the switch to exponent notation
  });
});
