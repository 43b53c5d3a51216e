/**
 * Tests of the curve table's CSV text (core/table/formatCsv.ts). Expected digits follow
 * Number.prototype.toPrecision as ECMA-262 specifies it (section 21.1.3.5: the shortest
 * correctly rounded decimal with that many significant digits, exponent form for exponents
 * below -6 or at least the precision), worked out by hand for each value below.
 */
import { strict as assert } from 'node:assert';
import { FLAG_COLUMNS, type CurveTable } from '../../../core/table/curveTable';
import { curveTableCsv, formatNumber } from '../../../core/table/formatCsv';

describe('formatNumber', () => {
  it('formatNumber rounds to the significant digits and drops trailing zeros', () => {
    assert.equal(formatNumber(0.1 + 0.2, 8), '0.3');
    assert.equal(formatNumber(1234567.891, 8), '1234567.9');
    assert.equal(formatNumber(2.5, 8), '2.5');
    assert.equal(formatNumber(-0.000123456789, 4), '-0.0001235');
    assert.equal(formatNumber(100, 3), '100');
  });

  it('formatNumber uses exponents as toPrecision does, without trailing zeros in the mantissa', () => {
    assert.equal(formatNumber(1e-7, 8), '1e-7');
    assert.equal(formatNumber(1.5e-7, 8), '1.5e-7');
    assert.equal(formatNumber(123456789012, 8), '1.2345679e+11');
    assert.equal(formatNumber(1000, 3), '1e+3');
  });

  it('formatNumber writes 0 for both zeros and NaN, Inf, -Inf for non-finite values', () => {
    assert.equal(formatNumber(0, 8), '0');
    assert.equal(formatNumber(-0, 8), '0');
    assert.equal(formatNumber(NaN, 8), 'NaN');
    assert.equal(formatNumber(Infinity, 8), 'Inf');
    assert.equal(formatNumber(-Infinity, 8), '-Inf');
  });
});

describe('curveTableCsv', () => {
  const table: CurveTable = {
    columns: ['x', 'fit', 'extrapolated', 'negative'],
    rows: [
      [1, -0.25, 0, 1],
      [2.5, 1 / 3, 1, 0],
    ],
  };

  it('curveTableCsv writes a header, one line per row, LF line ends and a final newline', () => {
    const text = curveTableCsv(table, 5);
    assert.equal(text, 'x,fit,extrapolated,negative\n1,-0.25,0,1\n2.5,0.33333,1,0\n');
    assert.ok(!text.includes('\r'));
    assert.ok(text.endsWith('\n') && !text.endsWith('\n\n'));
  });

  it('curveTableCsv prints every flag column as an integer', () => {
    assert.deepEqual([...FLAG_COLUMNS], ['extrapolated', 'negative']);
    const text = curveTableCsv({ columns: ['x', 'extrapolated'], rows: [[1e-9, 1]] }, 3);
    assert.equal(text, 'x,extrapolated\n1e-9,1\n');
  });

  it('curveTableCsv gives the same bytes for the same table (no locale, no clock)', () => {
    const rows = Array.from({ length: 500 }, (_, i) => [i / 7, Math.sin(i) * 1e5, Math.exp(-i / 50), 0, 0]);
    const t: CurveTable = { columns: ['x', 'fit', 'se', 'extrapolated', 'negative'], rows };
    assert.equal(curveTableCsv(t, 8), curveTableCsv({ columns: [...t.columns], rows: rows.map((r) => [...r]) }, 8));
  });
});
