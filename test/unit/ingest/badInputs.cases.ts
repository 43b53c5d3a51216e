/**
 * Named bad inputs for the ingest layer (issue 10, "Trust under hostile input"): each is
 * the bytes of a data file and what must happen to it when columns `x` and `y` (or the
 * case's own `x`, `y`) are chosen:
 *
 * - 'error': the whole file is refused with an InputError (the command line exits 2)
 *   whose message matches `message`, at `line` and `column` when given;
 * - 'rejected': the file is read and the row at `line` is left out, with a reason matching
 *   `message` (and the column `column` when given); the other rows are used.
 *
 * Plain data: test/unit/ingest/badInputs.test.ts runs every case through readCsvBytes and
 * selectColumns, and the command-line catalogue runs them through `knotwise fit`. Messages
 * are matched without quotes or backslashes, because the command line shows rejected rows
 * as JSON. Every case has 20 good rows around the bad one (when there are rows), so a fit
 * of the rest can go on. `source` names the rule the case rests on.
 */

/** One bad input. */
export interface BadInput {
  readonly name: string;
  readonly bytes: string | Uint8Array;
  readonly expect: 'error' | 'rejected';
  readonly message: RegExp;
  /** 1-based line of the error or of the rejected row. */
  readonly line?: number;
  /** Column label of the error or of the rejected cell. */
  readonly column?: string;
  /** Column to choose as x (default `x`). */
  readonly x?: string;
  /** Column to choose as y (default `y`). */
  readonly y?: string;
  /** The published rule (or house rule) that says what must happen. */
  readonly source: string;
}

/** A good data row: y = x²/8 + x, exact in binary (eighths), written with `point` as decimal separator. */
const good = (i: number, sep = ',', point = '.', tail = ''): string => `${i}${sep}${String((i * i) / 8 + i).replace('.', point)}${tail}`;

/**
 * A file with the header, four good rows, the given rows (the first on line 6), then
 * sixteen good rows; every line ends with `eol`, fields are separated by `sep`, decimals
 * written with `point`, and `tail` (more fields) ends each good row.
 */
function around(bad: readonly string[], { header = 'x,y', eol = '\n', sep = ',', point = '.', tail = '' } = {}): string {
  const before = [1, 2, 3, 4].map((i) => good(i, sep, point, tail));
  const after = Array.from({ length: 16 }, (_, k) => good(k + 5, sep, point, tail));
  return [header, ...before, ...bad, ...after].join(eol) + eol;
}

/** UTF-16 bytes of a text, little- or big-endian, with or without the byte order mark. */
function utf16(text: string, order: 'le' | 'be', bom: boolean): Uint8Array {
  const units = (bom ? '\uFEFF' : '') + text;
  const out = new Uint8Array(2 * units.length);
  for (let i = 0; i < units.length; i++) {
    const u = units.charCodeAt(i);
    out[2 * i + (order === 'le' ? 0 : 1)] = u & 0xff;
    out[2 * i + (order === 'le' ? 1 : 0)] = u >> 8;
  }
  return out;
}

const RFC4180 = 'RFC 4180, section 2';
const UNICODE_CC = 'The Unicode Standard, chapter 23 (control codes, general category Cc)';
const IEEE754 = 'IEEE 754-2019, sections 7.4 (overflow) and 7.5 (underflow)';
const DESIGN = 'docs/design.md, "Input" (house rule)';

/** 50 rows with a quote opened on line 11 and never closed. */
const unclosed = ['x,y', ...Array.from({ length: 50 }, (_, i) => (i === 9 ? `${i},"${i}` : `${i},${i * 2}`))].join('\n') + '\n';

/** Rows enough that a NUL lies beyond the 1024 characters the binary check reads. */
const longRows = Array.from({ length: 200 }, (_, i) => good(i + 1));

export const BAD_INPUTS: readonly BadInput[] = [
  // Whole-file refusals.
  { name: 'an empty file', bytes: '', expect: 'error', message: /the file is empty/, source: DESIGN },
  { name: 'a byte order mark only', bytes: '\uFEFF', expect: 'error', message: /the file is empty/, source: 'The Unicode Standard, section 23.8 (byte order mark)' },
  { name: 'blank lines only (spaces, tabs, CRLF)', bytes: ' \n\t\n  \r\n', expect: 'error', message: /the file is empty: it holds only blank lines/, source: DESIGN },
  { name: 'a header without data rows', bytes: 'x,y\n', expect: 'error', message: /header row but no data rows/, source: DESIGN },
  {
    name: 'binary data (PNG signature and bytes 0 to 255)',
    bytes: Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, ...Array.from({ length: 256 }, (_, i) => i)]),
    expect: 'error',
    message: /looks like a binary file, not CSV text/,
    source: 'PNG signature, ISO/IEC 15948:2004, section 5.2',
  },
  { name: 'a NUL byte near the start', bytes: 'x,y\n1,2\u0000\n3,4\n', expect: 'error', message: /binary file, not CSV text \(it contains NUL bytes\)/, source: UNICODE_CC },
  { name: 'a single column', bytes: 'x\n1\n2\n3\n', expect: 'error', message: /found a single column/, line: 1, source: RFC4180 },
  {
    name: 'an unterminated quote drops no rows silently: the file is refused at the line where the quote opened',
    bytes: unclosed,
    expect: 'error',
    message: /unterminated quote: the quoted field that opens on line 11 is not closed before the end of the file \(lines 11 to 51 would be one field\)/,
    line: 11,
    column: 'y',
    source: `${RFC4180}, rule 5 (a quoted field ends at its closing quote)`,
  },
  { name: 'an unterminated quote in the header', bytes: 'x,"y\n1,2\n3,4\n', expect: 'error', message: /unterminated quote.*opens on line 1/, line: 1, source: `${RFC4180}, rule 5` },
  {
    name: 'a quote opened at the very start and never closed (not called a single column)',
    bytes: '"x,y\n1,2\n3,4\n',
    expect: 'error',
    message: /unterminated quote: the quoted field that opens on line 1 is not closed before the end of the file \(lines 1 to 3 would be one field\)/,
    line: 1,
    source: `${RFC4180}, rule 5`,
  },
  {
    name: 'UTF-16 little-endian without a byte order mark',
    bytes: utf16(around([]), 'le', false),
    expect: 'error',
    message: /looks like UTF-16 \(little-endian\) text without a byte order mark.*save it as UTF-8/,
    source: 'The Unicode Standard, section 3.10 (UTF-16LE)',
  },
  {
    name: 'UTF-16 big-endian without a byte order mark',
    bytes: utf16(around([]), 'be', false),
    expect: 'error',
    message: /looks like UTF-16 \(big-endian\) text without a byte order mark.*save it as UTF-8/,
    source: 'The Unicode Standard, section 3.10 (UTF-16BE)',
  },
  {
    name: 'UTF-32 with its byte order mark',
    bytes: Uint8Array.from([0xff, 0xfe, 0, 0, 0x78, 0, 0, 0, 0x2c, 0, 0, 0, 0x79, 0, 0, 0]),
    expect: 'error',
    message: /looks like UTF-32 text.*save it as UTF-8/,
    source: 'The Unicode Standard, section 23.8, table 23-4',
  },
  {
    name: 'a header wider than the column limit (10,001 columns)',
    bytes: `${Array.from({ length: 10001 }, (_, k) => `c${k}`).join(',')}\n${'1,'.repeat(10000)}1\n`,
    expect: 'error',
    message: /the table is too wide: the header row has more than 10,000 fields, and Knotwise reads at most 10,000 columns/,
    line: 1,
    source: 'MAX_COLUMNS, core/ingest/header.ts (house rule)',
  },
  {
    name: 'a control character (BEL) in a column name',
    bytes: around([], { header: 'x,y\u0007' }),
    expect: 'error',
    message: /the name of column 2 in the header holds the control character U\+0007 at character 2/,
    line: 1,
    source: UNICODE_CC,
  },
  {
    name: 'a terminal escape sequence in a column name',
    bytes: around([], { header: 'x\u001b[2J,y' }),
    expect: 'error',
    message: /the name of column 1 in the header holds the control character U\+001B at character 2/,
    line: 1,
    source: `${UNICODE_CC}; ECMA-48, section 5.4 (control sequences)`,
  },
  {
    name: 'a one-megabyte column name is shortened in messages',
    bytes: around([], { header: `${'a'.repeat(1 << 20)},y` }),
    expect: 'error',
    message: /no column named "x"; the columns are "a{60}\u2026", "y"/,
    column: 'x',
    source: 'MESSAGE_NAME_CHARS, core/ingest/text.ts (house rule)',
  },
  {
    name: 'an empty column name gets the label "column k"',
    bytes: around([], { header: 'x,' }),
    expect: 'error',
    message: /no column named "y"; the columns are "x", "column 2"/,
    column: 'y',
    source: DESIGN,
  },
  {
    name: 'duplicate column names: the first is chosen, and the message says there are others',
    bytes: ['x,y,y', ...Array.from({ length: 20 }, (_, i) => `${i},t${i},${i}`)].join('\n') + '\n',
    expect: 'error',
    message: /column "y" is not numeric.*the header names 2 columns "y", and this is the first \(the others are "y \(2\)"\)/,
    column: 'y',
    source: DESIGN,
  },
  {
    name: 'every row missing in y',
    bytes: ['x,y', ...Array.from({ length: 20 }, (_, i) => `${i},NA`)].join('\n') + '\n',
    expect: 'error',
    message: /no usable rows: every row has a missing or invalid value in "x", "y"/,
    source: DESIGN,
  },

  // Rows left out, each with its line, column and reason.
  {
    name: 'a control character (BEL) in a number',
    bytes: around(['5,4\u0007']),
    expect: 'rejected',
    message: /holds the control character U\+0007 at character 2/,
    line: 6,
    column: 'y',
    source: UNICODE_CC,
  },
  { name: 'DEL in a number', bytes: around(['5,4.5\u007f']), expect: 'rejected', message: /holds the control character U\+007F at character 4/, line: 6, column: 'y', source: UNICODE_CC },
  {
    name: 'a C1 control (NEL, U+0085) in a number',
    bytes: around(['\u00855,4']),
    expect: 'rejected',
    message: /holds the control character U\+0085 at character 1/,
    line: 6,
    column: 'x',
    source: UNICODE_CC,
  },
  {
    name: 'a NUL byte in a number after the first 1024 characters',
    bytes: ['x,y', ...longRows.slice(0, 150), '151,\u00007', ...longRows.slice(150)].join('\n') + '\n',
    expect: 'rejected',
    message: /holds the control character U\+0000 at character 1/,
    line: 152,
    column: 'y',
    source: UNICODE_CC,
  },
  {
    name: 'underflow to zero (1e-400)',
    bytes: around(['5,1e-400']),
    expect: 'rejected',
    message: /below the smallest double, about 4\.9e-324 \(it would underflow to 0, IEEE 754\)/,
    line: 6,
    column: 'y',
    source: IEEE754,
  },
  {
    name: 'overflow to infinity (1e309)',
    bytes: around(['5,1e309']),
    expect: 'rejected',
    message: /beyond the largest double, about 1\.8e308 \(it would overflow to infinity, IEEE 754\)/,
    line: 6,
    column: 'y',
    source: IEEE754,
  },
  { name: 'a huge exponent (1e99999999999999999999)', bytes: around(['1e99999999999999999999,5']), expect: 'rejected', message: /beyond the largest double/, line: 6, column: 'x', source: IEEE754 },
  { name: 'Inf', bytes: around(['5,Inf']), expect: 'rejected', message: /is not finite/, line: 6, column: 'y', source: DESIGN },
  { name: 'NaN is a missing value', bytes: around(['5,NaN']), expect: 'rejected', message: /missing value/, line: 6, column: 'y', source: DESIGN },
  { name: '"-" is a missing value', bytes: around(['5,-']), expect: 'rejected', message: /missing value/, line: 6, column: 'y', source: DESIGN },
  { name: '"n/a" is a missing value', bytes: around(['5,n/a']), expect: 'rejected', message: /missing value/, line: 6, column: 'y', source: DESIGN },
  { name: 'an empty cell is a missing value', bytes: around(['5,']), expect: 'rejected', message: /missing value/, line: 6, column: 'y', source: DESIGN },
  { name: 'hexadecimal (0x10)', bytes: around(['5,0x10']), expect: 'rejected', message: /is not a number \(only decimal numbers are read\)/, line: 6, column: 'y', source: DESIGN },
  {
    name: 'an underscore digit separator (1_000)',
    bytes: around(['5,1_000']),
    expect: 'rejected',
    message: /is not a number \(digit group separators are not supported\)/,
    line: 6,
    column: 'y',
    source: DESIGN,
  },
  {
    name: 'a no-break space as digit separator',
    bytes: around(['5,1\u00a0000']),
    expect: 'rejected',
    message: /is not a number \(digit group separators are not supported\)/,
    line: 6,
    column: 'y',
    source: 'The Unicode Standard, chapter 6 (U+00A0 NO-BREAK SPACE)',
  },
  { name: 'a leading + apart from its digits', bytes: around(['5,+ 7']), expect: 'rejected', message: /is not a number/, line: 6, column: 'y', source: DESIGN },
  { name: 'a double sign (+-1)', bytes: around(['5,+-1']), expect: 'rejected', message: /is not a number/, line: 6, column: 'y', source: DESIGN },
  {
    name: 'Arabic-Indic digits',
    bytes: around(['5,\u0661\u0662\u0663']),
    expect: 'rejected',
    message: /is not a number \(only the digits 0-9 are read\)/,
    line: 6,
    column: 'y',
    source: 'The Unicode Standard, chapter 9 (Arabic-Indic digits U+0660-U+0669)',
  },
  {
    name: 'full-width digits',
    bytes: around(['5,\uff11\uff12']),
    expect: 'rejected',
    message: /is not a number \(only the digits 0-9 are read\)/,
    line: 6,
    column: 'y',
    source: 'The Unicode Standard, chapter 18 (fullwidth forms U+FF10-U+FF19)',
  },
  {
    name: 'a Unicode minus sign (U+2212)',
    bytes: around(['5,\u22123']),
    expect: 'rejected',
    message: /is not a number \(a minus sign must be the ASCII hyphen-minus/,
    line: 6,
    column: 'y',
    source: 'The Unicode Standard, chapter 22 (U+2212 MINUS SIGN)',
  },
  {
    name: 'a zero-width space inside a number',
    bytes: around(['5,1\u200b2']),
    expect: 'rejected',
    message: /is not a number/,
    line: 6,
    column: 'y',
    source: 'The Unicode Standard, chapter 23 (U+200B ZERO WIDTH SPACE)',
  },
  {
    name: 'thousands separators in a quoted cell of a comma file (1,234.5)',
    bytes: around(['5,"1,234.5"']),
    expect: 'rejected',
    message: /is not a number \(thousands separators are not supported\)/,
    line: 6,
    column: 'y',
    source: `${RFC4180}, rule 6; ${DESIGN}`,
  },
  {
    name: 'thousands separators unquoted in a comma file split the row (1,234.5)',
    bytes: around(['5,1,234.5']),
    expect: 'rejected',
    message: /row has 3 fields, but the header has 2/,
    line: 6,
    source: RFC4180,
  },
  {
    name: '"1,234" in a semicolon file whose column uses decimal points',
    bytes: around(['5;1,234'], { header: 'x;y', sep: ';' }),
    expect: 'rejected',
    message: /is not a number \(this column uses a decimal point; thousands separators are not supported\)/,
    line: 6,
    column: 'y',
    source: DESIGN,
  },
  {
    name: 'a decimal point in a column of decimal commas',
    bytes: around(['5;2.5'], { header: 'x;y', sep: ';', point: ',' }),
    expect: 'rejected',
    message: /is not a number \(this column uses a decimal comma\)/,
    line: 6,
    column: 'y',
    source: DESIGN,
  },
  {
    name: 'lone CR line endings keep line numbers right',
    bytes: around(['5,abc'], { eol: '\r' }),
    expect: 'rejected',
    message: /is not a number/,
    line: 6,
    column: 'y',
    source: `${RFC4180}, rule 1 (line breaks); CR alone as common practice`,
  },
  {
    name: 'mixed line endings (CRLF, LF, CR) keep line numbers right',
    bytes: `x,y\r\n${good(1)}\n${good(2)}\r${good(3)}\r\n${good(4)}\n5,abc\r${Array.from({ length: 16 }, (_, k) => good(k + 5)).join('\n')}\n`,
    expect: 'rejected',
    message: /is not a number/,
    line: 6,
    column: 'y',
    source: `${RFC4180}, rule 1`,
  },
  {
    name: 'a quoted field with line breaks, closed later, keeps later line numbers right',
    bytes: around(['5,6.5,"first line', 'second line"', '7,abc,ok'], { header: 'x,y,note', tail: ',ok' }),
    expect: 'rejected',
    message: /is not a number/,
    line: 8,
    column: 'y',
    source: `${RFC4180}, rule 6 (line breaks in quoted fields)`,
  },
  {
    name: 'a line break inside a quoted number',
    bytes: around(['5,"4', '2"']),
    expect: 'rejected',
    message: /holds a line break U\+000A at character 2/,
    line: 6,
    column: 'y',
    source: `${RFC4180}, rule 6; ${UNICODE_CC}`,
  },
  {
    name: 'a stray quote that closes lines later swallows them into one rejected row, which says so',
    bytes: around(['5,"6', '7,8', '9,10', '11",12']),
    expect: 'rejected',
    message: /row has 3 fields, but the header has 2 \(a quoted field holds line breaks: the row runs from line 6 to line 9\)/,
    line: 6,
    source: `${RFC4180}, rule 5`,
  },
  {
    name: 'doubled quotes inside a quoted number ("1""5")',
    bytes: around(['5,"1""5"']),
    expect: 'rejected',
    message: /is not a number/,
    line: 6,
    column: 'y',
    source: `${RFC4180}, rule 7 (a doubled quote is one quote)`,
  },
  {
    name: 'a stray quote inside an unquoted number (1"5)',
    bytes: around(['5,1"5']),
    expect: 'rejected',
    message: /is not a number/,
    line: 6,
    column: 'y',
    source: `${RFC4180}, rule 5 (quotes only around whole fields)`,
  },
  { name: 'text after a closing quote ("1"2)', bytes: around(['5,"1"2']), expect: 'rejected', message: /is not a number/, line: 6, column: 'y', source: `${RFC4180}, rule 5` },
  {
    name: 'more fields than the header',
    bytes: around(['5,6,7']),
    expect: 'rejected',
    message: /row has 3 fields, but the header has 2/,
    line: 6,
    source: `${RFC4180}, rule 4 (the same number of fields throughout)`,
  },
  { name: 'fewer fields than the header', bytes: around(['5']), expect: 'rejected', message: /row has 1 field, but the header has 2/, line: 6, source: `${RFC4180}, rule 4` },
  { name: 'a first line of spaces is blank, so line numbers count it', bytes: `   \n${around(['5,abc'])}`, expect: 'rejected', message: /is not a number/, line: 7, column: 'y', source: DESIGN },
  {
    name: 'UTF-16LE with a byte order mark is read, and a bad cell keeps its line',
    bytes: utf16(around(['5,abc']), 'le', true),
    expect: 'rejected',
    message: /is not a number/,
    line: 6,
    column: 'y',
    source: 'The Unicode Standard, section 23.8 (byte order mark)',
  },
  {
    name: 'UTF-16BE with a byte order mark is read, and a bad cell keeps its line',
    bytes: utf16(around(['5,abc']), 'be', true),
    expect: 'rejected',
    message: /is not a number/,
    line: 6,
    column: 'y',
    source: 'The Unicode Standard, section 23.8 (byte order mark)',
  },
];
