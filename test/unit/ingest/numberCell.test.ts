import assert from 'node:assert/strict';
import fc from 'fast-check';
import {
  CELL_CONTROL,
  CELL_EMPTY,
  CELL_MISSING,
  CELL_NOT_FINITE,
  CELL_NOT_NUMBER,
  CELL_NUMBER,
  CELL_OVERFLOW,
  CELL_UNDERFLOW,
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
    '42',
    '-3.25',
    '+7',
    '  12.5  ',
    '\t8\t',
    '1e3',
    '1E-3',
    '-2.5e+10',
    '.5',
    '5.',
    '0',
    '-0',
    '+0.0',
    '007',
    '0.1',
    '0.2',
    '0.30000000000000004',
    '3.141592653589793',
    '123456789012345678901234567890',
    '9007199254740993',
    '1.00000000000000011102230246251565',
    '2.2250738585072014e-308',
    '5e-324',
    '4.9e-324',
    '0e-400',
    '-0.000e999',
    '1e308',
    '1.7976931348623157e308',
    '1e22',
    '1e23',
    '123.456e-5',
    '0.000001234',
  ];
  for (const text of samples) {
    it(`parse(${JSON.stringify(text)}) equals Number() exactly`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_NUMBER);
      assertSameDouble(r.value, Number(text.trim()), text);
    });
  }
  it('1e308 is a valid finite number, 1e309 overflows (largest double: Number.MAX_VALUE, ECMA-262; overflow: IEEE 754-2019, 7.4)', () => {
    const r = read('1e308');
    assert.equal(r.kind, CELL_NUMBER);
    assert.ok(r.value < Number.MAX_VALUE && Number('1e309') > Number.MAX_VALUE);
    assert.equal(read(String(Number.MAX_VALUE)).value, Number.MAX_VALUE);
    assert.equal(read('1e309').kind, CELL_OVERFLOW);
    assert.equal(read('-1e309').kind, CELL_OVERFLOW);
  });
  it('a non-zero number that rounds to 0 underflows; the smallest subnormal is still a number (IEEE 754-2019, 7.5; Number.MIN_VALUE, ECMA-262)', () => {
    // 2.4e-324 is below half of 5e-324, so it rounds to 0; 2.5e-324 rounds up to it.
    for (const text of ['1e-400', '-1e-400', '2.4e-324', '0.0001e-320', '1,5e-400']) {
      const r = read(text, text.includes(','));
      assert.equal(r.kind, CELL_UNDERFLOW, text);
      assert.ok(Number.isNaN(r.value));
    }
    assert.equal(read('2.5e-324').value, Number.MIN_VALUE);
    assert.equal(read('5e-324').value, Number.MIN_VALUE);
    // Zero written with any exponent is zero, not an underflow.
    for (const text of ['0', '0.000', '-0e-400', '0e99999']) assert.equal(read(text).kind, CELL_NUMBER, text);
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
        const nonZero = /[1-9]/.test(`${int}${frac ?? ''}`);
        if (!Number.isFinite(expected)) assert.equal(r.kind, CELL_OVERFLOW, text);
        else if (expected === 0 && nonZero) assert.equal(r.kind, CELL_UNDERFLOW, text);
        else assertSameDouble(r.value, expected, text);
      }),
      { numRuns: 3000 },
    );
  });
  it('scanNumber reads the range only, not the text around it', () => {
    assert.equal(scanNumber('ab12.5cd', 2, 6, 46), 12.5);
  });
});

describe('CellParser not finite and not numbers', () => {
  for (const text of ['Inf', '-Inf', '+inf', 'INF', 'Infinity', '-infinity']) {
    it(`parse(${JSON.stringify(text)}) is not finite`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_NOT_FINITE);
      assert.ok(Number.isNaN(r.value));
      assert.equal(cellReason(CELL_NOT_FINITE, text, false), `"${text}" is not finite`);
    });
  }
  for (const text of ['1e999', '-1e999', '1.8e308', '1e99999999999999999999']) {
    it(`parse(${JSON.stringify(text)}) overflows, and the reason says so`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_OVERFLOW);
      assert.ok(Number.isNaN(r.value));
      assert.equal(cellReason(CELL_OVERFLOW, text, false), `"${text}" is beyond the largest double, about 1.8e308 (it would overflow to infinity, IEEE 754)`);
    });
  }
  it('the underflow reason names it', () => {
    assert.equal(cellReason(CELL_UNDERFLOW, '1e-400', false), '"1e-400" is below the smallest double, about 4.9e-324 (it would underflow to 0, IEEE 754)');
    assert.equal(shortCellReason(CELL_UNDERFLOW), 'below the smallest double (underflow to 0)');
  });
  // Number() accepts '0x10', '0b1' and a leading no-break space; cells must be plain decimals.
  for (const text of ['abc', '0x10', '0b1', '1_000', '1e', 'e5', '.', '+', '+-1', '1.2.3', '12abc', '1 2', 'Infinit', '1,5e', '\u00a012']) {
    it(`parse(${JSON.stringify(text)}) is not a number`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_NOT_NUMBER);
      assert.ok(Number.isNaN(r.value));
    });
  }
  // Control characters: Unicode general category Cc (The Unicode Standard, chapter 23): C0, DEL, C1.
  for (const [text, code, at] of [
    ['1\u00072', 'U+0007', 2],
    ['\u0000', 'U+0000', 1],
    ['12\u001b[31m', 'U+001B', 3],
    ['3.5\u007f', 'U+007F', 4],
    ['\u00855', 'U+0085', 1],
    ['\u009b1', 'U+009B', 1],
    [' 4\u000b ', 'U+000B', 2],
  ] as const) {
    it(`a cell with the control character ${code} at character ${at} is refused with it named`, () => {
      const r = read(text);
      assert.equal(r.kind, CELL_CONTROL);
      assert.ok(Number.isNaN(r.value));
      const reason = cellReason(CELL_CONTROL, text, false);
      assert.ok(reason.endsWith(`holds the control character ${code} at character ${at}, which no number holds`), reason);
      // The reason carries the character escaped, never raw.
      // eslint-disable-next-line no-control-regex -- what must not appear
      assert.equal(/[\u0000-\u001f\u007f-\u009f]/.test(reason), false, reason);
    });
  }
  it('a line break inside a quoted number cell is refused as a line break', () => {
    assert.equal(read('1\n').kind, CELL_CONTROL);
    assert.equal(cellReason(CELL_CONTROL, '1\r\n', false), '"1\\r\\n" holds a line break U+000D at character 2, which no number holds');
  });
  it('only spaces and tabs around a cell are ignored (the old rule stripped every character up to U+0020)', () => {
    assert.equal(read(' \t7\t ').value, 7);
    assert.equal(read('\u00017').kind, CELL_CONTROL);
    assert.equal(read('\u0001').kind, CELL_CONTROL);
  });
  it('hints say why a text close to a number is not read', () => {
    const reason = (t: string, comma = false): string => cellReason(read(t, comma).kind as 3, t, comma);
    assert.equal(reason('\u0661\u0662\u0663'), '"\u0661\u0662\u0663" is not a number (only the digits 0-9 are read)');
    assert.equal(reason('\uff11\uff12'), '"\uff11\uff12" is not a number (only the digits 0-9 are read)');
    assert.equal(reason('\u22125'), '"\u22125" is not a number (a minus sign must be the ASCII hyphen-minus "-")');
    assert.equal(reason('0x10'), '"0x10" is not a number (only decimal numbers are read)');
    assert.equal(reason('1,234.5'), '"1,234.5" is not a number (thousands separators are not supported)');
    assert.equal(reason('1.234,5', true), '"1.234,5" is not a number (thousands separators are not supported)');
    assert.equal(reason('1_000'), '"1_000" is not a number (digit group separators are not supported)');
    assert.equal(reason('1\u00a0000'), '"1\\u00a0000" is not a number (digit group separators are not supported)');
    assert.equal(reason('+ 5'), '"+ 5" is not a number');
    assert.equal(reason('1,234'), '"1,234" is not a number (this column uses a decimal point; thousands separators are not supported)');
    assert.equal(reason('1.234', true), '"1.234" is not a number (this column uses a decimal comma; thousands separators are not supported)');
  });
  it('reasons quote the cell text as a JSON string and shorten long text', () => {
    assert.equal(cellReason(CELL_NOT_NUMBER, 'abc', false), '"abc" is not a number');
    assert.equal(cellReason(CELL_NOT_NUMBER, 'say "hi"', false), '"say \\"hi\\"" is not a number');
    assert.equal(quoteCell('x'.repeat(100)).length, 42);
    assert.equal(shortCellReason(CELL_NOT_FINITE), 'not finite');
  });
});

describe('CellParser decimal comma', () => {
  it('parse("1,5") with a decimal comma is 1.5, and equals Number() of the dotted text', () => {
    for (const [text, dotted] of [
      ['1,5', '1.5'],
      ['-2,25e1', '-2.25e1'],
      [',5', '.5'],
      ['2,', '2.'],
      ['1234567,891011121314', '1234567.891011121314'],
    ] as const) {
      const r = read(text, true);
      assert.equal(r.kind, CELL_NUMBER, text);
      assertSameDouble(r.value, Number(dotted), text);
    }
  });
  it('a decimal point in a decimal-comma column is reported, not read (1.234 may be a thousands separator)', () => {
    const r = read('1.234', true);
    assert.equal(r.kind, CELL_WRONG_DECIMAL);
    assert.equal(cellReason(CELL_WRONG_DECIMAL, '1.234', true), '"1.234" is not a number (this column uses a decimal comma; thousands separators are not supported)');
    assert.equal(cellReason(CELL_WRONG_DECIMAL, '1.5', true), '"1.5" is not a number (this column uses a decimal comma)');
  });
  it('a decimal comma in a decimal-point column is reported', () => {
    assert.equal(read('1,5', false).kind, CELL_WRONG_DECIMAL);
    assert.equal(cellReason(CELL_WRONG_DECIMAL, '1,5', false), '"1,5" is not a number (this column uses a decimal point)');
    assert.equal(read('1,234.5', false).kind, CELL_NOT_NUMBER);
  });
});
