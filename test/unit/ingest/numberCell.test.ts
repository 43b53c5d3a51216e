import assert from 'node:assert/strict';
import fc from 'fast-check';
import {
  CELL_EMPTY,
  CELL_MISSING,
  CELL_NOT_FINITE,
  CELL_NOT_NUMBER,
  CELL_NUMBER,
  CELL_WRONG_DECIMAL,
  CellParser,
  cellReason,
  isMissingToken,
  quoteCell,
  scanNumber,
  shortCellReason,
} from '../../../core/ingest/numberCell';

function read(text: string, decimalComma = false): { value: number; kind: number } {
  const p = new CellParser(decimalComma);
  const value = p.parse(text, 0, text.length);
  return { value, kind: p.kind };
}

/**
 * Reference for every number: ECMAScript's Number() (ECMA-262, StringToNumber), which is
 * correctly rounded to IEEE 754 binary64. Tolerance: exact (0 ulp), since both sides are
 * the correctly rounded double of the same decimal; -0 is told apart with Object.is.
 */
function assertSameDouble(actual: number, expected: number, text: string): void {
  assert.ok(Object.is(actual, expected), `${JSON.stringify(text)}: got ${actual}, Number() gives ${expected}`);
}

describe('CellParser missing values', () => {
  // The tokens are those of docs/design.md, "Input": empty, NA, NaN, null, n/a, - (case-insensitive, trimmed).
  for (const text of ['NA', 'na', 'Na', 'NaN', 'nan', 'NAN', 'null', 'NULL', 'Null', 'n/a', 'N/A', 'N/a', '-', ' - ', '\tNA ', '  null']) {
    it(`parse(${JSON.stringify(text)}) is a missing-value token`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_MISSING);
      assert.ok(Number.isNaN(r.value));
    });
  }
  for (const text of ['', ' ', '\t\t']) {
    it(`parse(${JSON.stringify(text)}) is empty`, () => {
      assert.equal(read(text).kind, CELL_EMPTY);
    });
  }
  it('isMissingToken refuses near misses (nana, n/aa, --, nul, na/, +)', () => {
    for (const text of ['nana', 'n/aa', '--', 'nul', 'na/', '+', 'n-a', 'NONE']) {
      assert.equal(isMissingToken(text, 0, text.length), false, text);
      assert.equal(read(text).kind, CELL_NOT_NUMBER, text);
    }
  });
  it('missing tokens are recognised with either decimal convention', () => {
    for (const text of ['NA', 'NaN', 'null', 'n/a', '-', '']) assert.ok(read(text, true).kind === CELL_MISSING || read(text, true).kind === CELL_EMPTY);
  });
});

describe('CellParser numbers', () => {
  const samples = [
    '42', '-3.25', '+7', '  12.5  ', '\t8\t', '1e3', '1E-3', '-2.5e+10', '.5', '5.', '0', '-0', '+0.0', '007',
    '0.1', '0.2', '0.30000000000000004', '3.141592653589793', '123456789012345678901234567890',
    '9007199254740993', '1.00000000000000011102230246251565', '2.2250738585072014e-308', '5e-324', '4.9e-324',
    '1e-400', '1e308', '1.7976931348623157e308', '1e22', '1e23', '123.456e-5', '0.000001234',
  ];
  for (const text of samples) {
    it(`parse(${JSON.stringify(text)}) equals Number() exactly`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_NUMBER);
      assertSameDouble(r.value, Number(text.trim()), text);
    });
  }
  it('1e308 is a valid finite number, 1e309 is not (largest double: Number.MAX_VALUE, ECMA-262)', () => {
    const r = read('1e308');
    assert.equal(r.kind, CELL_NUMBER);
    assert.ok(r.value < Number.MAX_VALUE && Number('1e309') > Number.MAX_VALUE);
    assert.equal(read(String(Number.MAX_VALUE)).value, Number.MAX_VALUE);
    assert.equal(read('1e309').kind, CELL_NOT_FINITE);
  });
  it('parse agrees with Number() on the shortest text of random doubles (property)', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (d) => {
        const text = String(d);
        assertSameDouble(read(text).value, Number(text), text);
      }),
      { numRuns: 2000 },
    );
  });
  it('parse agrees with Number() on random exponent and fixed notations (property)', () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e300, max: 1e300 }), fc.integer({ min: 0, max: 20 }), (d, k) => {
        for (const text of [d.toExponential(k), d.toPrecision(k + 1)]) assertSameDouble(read(text).value, Number(text), text);
        if (Math.abs(d) < 1e21) assertSameDouble(read(d.toFixed(k)).value, Number(d.toFixed(k)), d.toFixed(k));
      }),
      { numRuns: 2000 },
    );
  });
  it('parse agrees with Number() on random digit strings with sign, fraction and exponent (property)', () => {
    const digits = fc.string({ unit: fc.constantFrom('0', '1', '2', '5', '9'), minLength: 1, maxLength: 25 });
    fc.assert(
      fc.property(fc.constantFrom('', '+', '-'), digits, fc.option(digits), fc.option(fc.integer({ min: -340, max: 340 })), (sign, int, frac, exp) => {
        const text = `${sign}${int}${frac !== null ? `.${frac}` : ''}${exp !== null ? `e${exp}` : ''}`;
        const expected = Number(text);
        const r = read(text);
        if (Number.isFinite(expected)) assertSameDouble(r.value, expected, text);
        else assert.equal(r.kind, CELL_NOT_FINITE, text);
      }),
      { numRuns: 3000 },
    );
  });
  it('scanNumber reads the range only, not the text around it', () => {
    assert.equal(scanNumber('ab12.5cd', 2, 6, 46), 12.5);
  });
});

describe('CellParser not finite and not numbers', () => {
  for (const text of ['Inf', '-Inf', '+inf', 'INF', 'Infinity', '-infinity', '1e999', '-1e999', '1.8e308']) {
    it(`parse(${JSON.stringify(text)}) is not finite`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_NOT_FINITE);
      assert.ok(Number.isNaN(r.value));
      assert.equal(cellReason(CELL_NOT_FINITE, text, false), `"${text}" is not finite`);
    });
  }
  // Number() accepts '0x10', '0b1' and a leading no-break space; cells must be plain decimals.
  for (const text of ['abc', '0x10', '0b1', '1_000', '1e', 'e5', '.', '+', '+-1', '1.2.3', '12abc', '1 2', 'Infinit', '1,5e', '\u00a012']) {
    it(`parse(${JSON.stringify(text)}) is not a number`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_NOT_NUMBER);
      assert.ok(Number.isNaN(r.value));
    });
  }
  it('reasons quote the cell text as a JSON string and shorten long text', () => {
    assert.equal(cellReason(CELL_NOT_NUMBER, 'abc', false), '"abc" is not a number');
    assert.equal(cellReason(CELL_NOT_NUMBER, 'say "hi"', false), '"say \\"hi\\"" is not a number');
    assert.equal(quoteCell('x'.repeat(100)).length, 42);
    assert.equal(shortCellReason(CELL_NOT_FINITE), 'not finite');
  });
});

describe('CellParser decimal comma', () => {
  it('parse("1,5") with a decimal comma is 1.5, and equals Number() of the dotted text', () => {
    for (const [text, dotted] of [['1,5', '1.5'], ['-2,25e1', '-2.25e1'], [',5', '.5'], ['2,', '2.'], ['1234567,891011121314', '1234567.891011121314']] as const) {
      const r = read(text, true);
      assert.equal(r.kind, CELL_NUMBER, text);
      assertSameDouble(r.value, Number(dotted), text);
    }
  });
  it('a decimal point in a decimal-comma file is reported, not read (1.234 may be a thousands separator)', () => {
    const r = read('1.234', true);
    assert.equal(r.kind, CELL_WRONG_DECIMAL);
    assert.equal(cellReason(CELL_WRONG_DECIMAL, '1.234', true), '"1.234" is not a number (this file uses a decimal comma)');
  });
  it('a decimal comma in a decimal-point file is reported', () => {
    assert.equal(read('1,5', false).kind, CELL_WRONG_DECIMAL);
    assert.equal(cellReason(CELL_WRONG_DECIMAL, '1,5', false), '"1,5" is not a number (this file uses a decimal point)');
    assert.equal(read('1,234.5', false).kind, CELL_NOT_NUMBER);
  });
});
