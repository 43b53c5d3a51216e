import assert from 'node:assert/strict';
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
    const t = build(COMMA_HEADER, [[1, ['x [m]', 'y']], [2, ['1', '2.5']], [4, ['3', '-4e2']]]).finish();
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
    const t = build(COMMA_NO_HEADER, [[1, ['1', 'NA']], [2, ['abc', '']], [3, ['Inf', '2']], [4, ['4', '5']]]).finish();
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
    const t = build(COMMA_NO_HEADER, [[1, ['1', 'a']], [2, ['b', '2']], [3, ['3', 'c']]]).finish();
    assert.deepEqual(t.columns.map((c) => c.numeric), [true, false]);
  });
  it('a record with the wrong number of fields is reported with its line and left out', () => {
    const t = build(COMMA_HEADER, [[1, ['x', 'y']], [2, ['1', '2']], [3, ['3']], [4, ['4', '5', '6']], [5, ['7', '8']]]).finish();
    assert.deepEqual([...t.lines], [2, 5]);
    assert.deepEqual(t.problems, [
      { line: 3, reason: 'row has 1 field, but the header has 2' },
      { line: 4, reason: 'row has 3 fields, but the header has 2' },
    ]);
  });
  it('a line of spaces only counts as blank, not as a short row', () => {
    const b = build(COMMA_NO_HEADER, [[1, ['1', '2']], [2, ['   ']], [3, ['3', '4']]]);
    b.blankLine();
    const t = b.finish();
    assert.equal(t.blankLines, 2);
    assert.equal(t.problems.length, 0);
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
    const t = build({ ...COMMA_HEADER }, [[1, ['x', 'name']], [2, ['1', 'a']], [3, ['oops', 'b']], [4, ['5']], [5, ['2', 'c']], [6, ['3', '4']]]).finish();
    assert.deepEqual(t.problems, [
      { line: 2, column: 'name', reason: 'column is not numeric: 3 of 4 filled cells are not numbers, the first: "a" is not a number' },
      { line: 3, column: 'x', reason: '"oops" is not a number' },
      { line: 4, reason: 'row has 1 field, but the header has 2' },
    ]);
  });
  it('a header without data rows is an InputError', () => {
    assert.throws(() => build(COMMA_HEADER, [[1, ['x', 'y']]]).finish(), (e: unknown) => e instanceof InputError && e.message === 'the file has a header row but no data rows' && e.place.file === 'data.csv');
  });
  it('rows that all have problems are an InputError quoting the first', () => {
    assert.throws(() => build(COMMA_HEADER, [[1, ['x', 'y']], [2, ['1']], [3, ['2']]]).finish(), (e: unknown) => e instanceof InputError && /no usable data rows: all 2 rows/.test(e.message) && e.place.line === 2);
  });
  it('an aborted record is a row problem', () => {
    const b = build(COMMA_NO_HEADER, [[1, ['1', '2']]]);
    b.field('3', 0, 1);
    b.abortRecord(2, 'a quoted field starting on this line is not closed');
    assert.deepEqual(b.finish().problems, [{ line: 2, reason: 'a quoted field starting on this line is not closed' }]);
  });
});
