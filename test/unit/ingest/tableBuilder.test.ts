/**
 * TableBuilder (core/ingest/tableBuilder.ts). Numbers are compared with Number()
 * (ECMA-262); the blank-line, column-limit, header-name and unterminated-quote rules are
 * the house rules of docs/design.md, "Input"; control characters are Unicode's general
 * category Cc (The Unicode Standard, chapter 23).
 */
import assert from 'node:assert/strict';
import { MAX_COLUMNS, MAX_NAME_CHARS } from '../../../core/ingest/header';
import { QUOTED_REASONS_PER_COLUMN, TableBuilder } from '../../../core/ingest/tableBuilder';
import type { BuilderFormat } from '../../../core/ingest/tableBuilder';
import { InputError } from '../../../core/errors';

const COMMA_NO_HEADER: BuilderFormat = { delimiter: ',', decimalComma: false, header: false, bom: false, lineEnding: 'lf', fieldCount: 2 };
const COMMA_HEADER: BuilderFormat = { ...COMMA_NO_HEADER, header: true };

/** Feeds records (arrays of cell texts, with their lines) straight into a builder. */
function build(format: BuilderFormat, records: [number, string[]][]): TableBuilder {
  const b = new TableBuilder(format, 'data.csv');
  for (const [line, fields] of records) {
    for (const f of fields) b.field(`<${f}>`, 1, f.length + 1);
    b.endRecord(line);
  }
  return b;
}

// Expected values here are the cell texts themselves read by Number() (ECMA-262), exact.
describe('TableBuilder', () => {
  it('stores cells column-wise in Float64Arrays with each record line in an Int32Array', () => {
    const t = build(COMMA_HEADER, [
      [1, ['x [m]', 'y']],
      [2, ['1', '2.5']],
      [4, ['3', '-4e2']],
    ]).finish();
    assert.equal(t.rowCount, 2);
    assert.ok(t.values[0] instanceof Float64Array && t.lines instanceof Int32Array);
    assert.deepEqual([...(t.values[0] as Float64Array)], [1, 3]);
    assert.deepEqual([...(t.values[1] as Float64Array)], [2.5, -400]);
    assert.deepEqual([...t.lines], [2, 4]);
    assert.equal(t.columns[0]?.label, 'x');
    assert.equal(t.columns[0]?.unit, 'm');
    assert.equal(t.columns[0]?.header, 'x [m]');
  });
  it('grows its buffers by doubling and keeps every row (5000 rows)', () => {
    const records: [number, string[]][] = [];
    for (let i = 0; i < 5000; i++) records.push([i + 1, [String(i), String(i / 8)]]);
    const t = build(COMMA_NO_HEADER, records).finish();
    assert.equal(t.rowCount, 5000);
    assert.equal(t.values[0]?.length, 5000);
    assert.equal(t.values[1]?.[4999], 4999 / 8);
    assert.equal(t.lines[4999], 5000);
  });
  it('counts numeric, missing and invalid cells and keeps invalid ones in a sparse list', () => {
    const t = build(COMMA_NO_HEADER, [
      [1, ['1', 'NA']],
      [2, ['abc', '']],
      [3, ['Inf', '2']],
      [4, ['4', '5']],
    ]).finish();
    const c0 = t.columns[0];
    assert.ok(c0 !== undefined);
    assert.deepEqual([c0.numericCount, c0.missingCount, c0.invalidCount, c0.numeric], [2, 0, 2, false]);
    assert.deepEqual([...c0.problems.rows], [1, 2]);
    assert.deepEqual(c0.problems.reasons, ['"abc" is not a number', '"Inf" is not finite']);
    const c1 = t.columns[1];
    assert.deepEqual([c1?.numericCount, c1?.missingCount, c1?.invalidCount, c1?.numeric], [2, 2, 0, true]);
    assert.ok(Number.isNaN(t.values[0]?.[1] as number) && Number.isNaN(t.values[1]?.[0] as number));
  });
  it('numeric means more numbers than invalid cells (a tie is not numeric)', () => {
    const t = build(COMMA_NO_HEADER, [
      [1, ['1', 'a']],
      [2, ['b', '2']],
      [3, ['3', 'c']],
    ]).finish();
    assert.deepEqual(
      t.columns.map((c) => c.numeric),
      [true, false],
    );
  });
  it('a record with the wrong number of fields is reported with its line and left out', () => {
    const t = build(COMMA_HEADER, [
      [1, ['x', 'y']],
      [2, ['1', '2']],
      [3, ['3']],
      [4, ['4', '5', '6']],
      [5, ['7', '8']],
    ]).finish();
    assert.deepEqual([...t.lines], [2, 5]);
    assert.deepEqual(t.problems, [
      { line: 3, reason: 'row has 1 field, but the header has 2' },
      { line: 4, reason: 'row has 3 fields, but the header has 2' },
    ]);
  });
  it('a line of spaces only counts as blank, not as a short row', () => {
    const b = build(COMMA_NO_HEADER, [
      [1, ['1', '2']],
      [2, ['   ']],
      [3, ['3', '4']],
    ]);
    b.blankLine(4);
    const t = b.finish();
    assert.equal(t.blankLines, 2);
    assert.equal(t.problems.length, 0);
  });
  it('a line of spaces before the header is blank too: the next line names the columns', () => {
    const t = build(COMMA_HEADER, [
      [1, [' \t ']],
      [2, ['x', 'y']],
      [3, ['1', '2']],
    ]).finish();
    assert.deepEqual(
      t.columns.map((c) => c.label),
      ['x', 'y'],
    );
    assert.equal(t.blankLines, 1);
    assert.deepEqual([...t.lines], [3]);
  });
  it('in a tab-separated file a line of tabs and spaces is blank; in a comma file "," is a row of missing cells', () => {
    const tab = build({ ...COMMA_NO_HEADER, delimiter: '\t' }, [
      [1, ['1', '2']],
      [2, ['', ' ']],
      [3, [' ', '', '']],
      [4, ['3', '4']],
    ]).finish();
    assert.deepEqual([tab.blankLines, tab.rowCount, tab.problems.length], [2, 2, 0]);
    const comma = build(COMMA_NO_HEADER, [
      [1, ['1', '2']],
      [2, ['', ' ']],
      [3, ['3', '4']],
    ]).finish();
    assert.deepEqual([comma.blankLines, comma.rowCount, comma.columns[0]?.missingCount], [0, 3, 1]);
  });
  it(`a header with more than MAX_COLUMNS (${MAX_COLUMNS}) fields is refused at field ${MAX_COLUMNS + 1}, before the row ends`, () => {
    const b = new TableBuilder(COMMA_HEADER, 'wide.csv');
    let taken = 0;
    assert.throws(
      () => {
        // Counting, not timing: the builder must throw on the first field past the limit.
        for (let k = 0; k < 3 * MAX_COLUMNS; k++) {
          b.field('c', 0, 1);
          taken++;
        }
      },
      (e: unknown) => e instanceof InputError && e.message === 'the table is too wide: the header row has more than 10,000 fields, and Knotwise reads at most 10,000 columns' && e.place.line === 1,
    );
    assert.equal(taken, MAX_COLUMNS);
  });
  it('a first row wider than MAX_COLUMNS without a header is refused when the builder is made', () => {
    assert.throws(
      () => new TableBuilder({ ...COMMA_NO_HEADER, fieldCount: MAX_COLUMNS + 1 }, 'wide.csv', 2),
      (e: unknown) => e instanceof InputError && e.message === 'the table is too wide: its first row has more than 10,000 fields, and Knotwise reads at most 10,000 columns' && e.place.line === 3,
    );
    assert.doesNotThrow(() => new TableBuilder({ ...COMMA_NO_HEADER, fieldCount: MAX_COLUMNS }));
  });
  it('a wide table starts with fewer rows per column: about 2^20 cells in all (memory only, not timed)', () => {
    const b = build({ ...COMMA_NO_HEADER, fieldCount: MAX_COLUMNS }, []);
    const columns = (b as unknown as { columns: Float64Array[] }).columns;
    assert.equal(columns.length, MAX_COLUMNS);
    assert.equal(columns[0]?.length, Math.floor(2 ** 20 / MAX_COLUMNS));
  });
  it('a control character in a column name is refused with the column and the line; tabs and line breaks in a name become one space', () => {
    assert.throws(
      () => build(COMMA_HEADER, [[2, ['x', 'y\u001b[2J']]]),
      (e: unknown) =>
        e instanceof InputError &&
        e.message === 'the name of column 2 in the header holds the control character U+001B at character 2 ("y\\u001b[2J"); column names must be printable text: remove it from the file' &&
        e.place.line === 2,
    );
    for (const name of ['y\u007f', 'y\u0085', '\u0000']) assert.throws(() => build(COMMA_HEADER, [[1, ['x', name]]]), /holds the control character/);
    const t = build(COMMA_HEADER, [
      [1, ['flow\r\n\t[L/min]', 'y']],
      [3, ['1', '2']],
    ]).finish();
    assert.deepEqual([t.columns[0]?.label, t.columns[0]?.header, t.columns[0]?.unit], ['flow', 'flow [L/min]', 'L/min']);
  });
  it(`names longer than ${MAX_NAME_CHARS} characters are cut and end in an ellipsis`, () => {
    const long = 'n'.repeat(5000);
    const t = build(COMMA_HEADER, [
      [1, [long, 'y']],
      [2, ['1', '2']],
    ]).finish();
    assert.equal(t.columns[0]?.label, `${'n'.repeat(MAX_NAME_CHARS)}\u2026`);
    assert.equal(t.columns[0]?.header, t.columns[0]?.label);
  });
  it('each column reads numbers with its own decimal convention', () => {
    const t = build({ ...COMMA_HEADER, delimiter: ';', columnDecimalComma: [false, true] }, [
      [1, ['x', 'y']],
      [2, ['1.5', '2,5']],
      [3, ['2.5', '3,5']],
      [4, ['3,5', '4.5']],
    ]).finish();
    assert.deepEqual([t.values[0]?.[0], t.values[1]?.[0], t.values[0]?.[1], t.values[1]?.[1]], [1.5, 2.5, 2.5, 3.5]);
    assert.deepEqual(
      t.columns.map((c) => c.decimalComma),
      [false, true],
    );
    assert.deepEqual(t.problems, [
      { line: 4, column: 'x', reason: '"3,5" is not a number (this column uses a decimal point)' },
      { line: 4, column: 'y', reason: '"4.5" is not a number (this column uses a decimal comma)' },
    ]);
  });
  it('quotes the cell text in the first 1000 reasons per column, then gives short reasons', () => {
    const records: [number, string[]][] = [];
    for (let i = 0; i < QUOTED_REASONS_PER_COLUMN + 5; i++) records.push([i + 1, ['1', `t${i}`]]);
    records.push([QUOTED_REASONS_PER_COLUMN + 6, ['1', '1']]);
    const t = build(COMMA_NO_HEADER, records).finish();
    const p = t.columns[1]?.problems;
    assert.equal(p?.rows.length, QUOTED_REASONS_PER_COLUMN + 5);
    assert.equal(p?.reasons[0], '"t0" is not a number');
    assert.equal(p?.reasons[QUOTED_REASONS_PER_COLUMN], 'not a number');
  });
  it('problems list row problems and numeric-column cells by line, and one summary per text column', () => {
    const t = build({ ...COMMA_HEADER }, [
      [1, ['x', 'name']],
      [2, ['1', 'a']],
      [3, ['oops', 'b']],
      [4, ['5']],
      [5, ['2', 'c']],
      [6, ['3', '4']],
    ]).finish();
    assert.deepEqual(t.problems, [
      { line: 2, column: 'name', reason: 'column is not numeric: 3 of 4 filled cells are not numbers, the first: "a" is not a number' },
      { line: 3, column: 'x', reason: '"oops" is not a number' },
      { line: 4, reason: 'row has 1 field, but the header has 2' },
    ]);
  });
  it('a header without data rows is an InputError', () => {
    assert.throws(
      () => build(COMMA_HEADER, [[1, ['x', 'y']]]).finish(),
      (e: unknown) => e instanceof InputError && e.message === 'the file has a header row but no data rows' && e.place.file === 'data.csv',
    );
  });
  it('rows that all have problems are an InputError quoting the first', () => {
    assert.throws(
      () =>
        build(COMMA_HEADER, [
          [1, ['x', 'y']],
          [2, ['1']],
          [3, ['2']],
        ]).finish(),
      (e: unknown) => e instanceof InputError && /no usable data rows: all 2 rows/.test(e.message) && e.place.line === 2,
    );
  });
  it('a quoted field open at the end of the file refuses the whole file, naming the line and column where it opened', () => {
    const b = build(COMMA_HEADER, [
      [1, ['x', 'y']],
      [2, ['1', '2']],
    ]);
    b.field('3', 0, 1);
    assert.throws(
      () => b.unclosedQuote(3, 50),
      (e: unknown) =>
        e instanceof InputError &&
        e.message ===
          'unterminated quote: the quoted field that opens on line 3 is not closed before the end of the file (lines 3 to 50 would be one field); add the closing double quote, or remove the opening one' &&
        e.place.line === 3 &&
        e.place.column === 'y' &&
        e.place.file === 'data.csv',
    );
  });
  it('a row spanning lines with the wrong field count says so', () => {
    const b = build(COMMA_HEADER, [
      [1, ['x', 'y']],
      [2, ['1', '2']],
    ]);
    for (const f of ['3', 'a\nb\nc', '4']) b.field(f, 0, f.length);
    b.endRecord(3, 5);
    assert.deepEqual(b.finish().problems, [{ line: 3, reason: 'row has 3 fields, but the header has 2 (a quoted field holds line breaks: the row runs from line 3 to line 5)' }]);
  });
});
