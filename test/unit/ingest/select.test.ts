/**
 * selectColumns and findColumn (core/ingest/select.ts). Reference: R's complete.cases on
 * airquality (test/fixtures/csv/make-fixtures.R); lookup, message and duplicate-name rules
 * are the house rules of docs/design.md, "Input".
 */
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseCsvText } from '../../../core/ingest/reader';
import { findColumn, selectColumns } from '../../../core/ingest/select';
import { InputError } from '../../../core/errors';

const FIXTURES = join(__dirname, '..', '..', 'fixtures', 'csv');
const fixture = (name: string): string => readFileSync(join(FIXTURES, name), 'utf8');

/** Complete cases of airquality for Temp and Ozone, computed by R (make-fixtures.R). */
const R = (
  JSON.parse(fixture('r-reference.json')) as {
    airqualityTempOzone: { rows: number; sumX: number; sumY: number; firstRejectedLines: number[]; rowsWithWeights: number; sumW: number };
  }
).airqualityTempOzone;

const sum = (a: Float64Array): number => a.reduce((s, v) => s + v, 0);

describe('selectColumns with airquality (R complete.cases as reference)', () => {
  const table = parseCsvText(fixture('airquality.csv'));
  it("Temp against Ozone keeps R's 116 complete cases with the same sums and lines", () => {
    const s = selectColumns(table, { x: 'Temp', y: 'Ozone' });
    assert.equal(s.data.x.length, R.rows);
    // Integer data: sums are exact (tolerance 0).
    assert.equal(sum(s.data.x), R.sumX);
    assert.equal(sum(s.data.y), R.sumY);
    assert.equal(s.data.w, undefined);
    assert.deepEqual(
      s.rejected.slice(0, 3).map((r) => r.line),
      R.firstRejectedLines,
    );
    assert.deepEqual(s.rejected[0], { line: R.firstRejectedLines[0], column: 'Ozone', reason: 'missing value' });
    assert.equal(s.rejected.length + s.data.x.length, table.rowCount);
    assert.deepEqual(s.labels, { x: 'Temp', y: 'Ozone' });
  });
  it("with Solar.R as weights keeps R's 111 complete cases", () => {
    const s = selectColumns(table, { x: 'Temp', y: 'Ozone', weights: 'Solar.R' });
    assert.equal(s.data.x.length, R.rowsWithWeights);
    assert.equal(sum(s.data.w as Float64Array), R.sumW);
    assert.equal(s.data.lines?.length, R.rowsWithWeights);
  });
});

describe('selectColumns rejections (problems.csv, lines counted by hand)', () => {
  const table = parseCsvText(fixture('problems.csv'));
  it('rejects missing, invalid and non-finite cells, weights <= 0 and unreadable rows, by line with the first reason', () => {
    const s = selectColumns(table, { x: 'x', y: 'y', weights: 'w' }, 'problems.csv');
    assert.deepEqual([...(s.data.lines as Int32Array)], [2, 11, 12]);
    assert.deepEqual([...s.data.x], [1, 10, 11]);
    assert.deepEqual([...s.data.y], [2, 1e308, 12.5]);
    assert.deepEqual([...(s.data.w as Float64Array)], [1, 2, 1]);
    assert.deepEqual(s.rejected, [
      { line: 3, column: 'y', reason: 'missing value' },
      { line: 4, column: 'y', reason: '"abc" is not a number' },
      { line: 5, column: '', reason: 'row has 2 fields, but the header has 3' },
      { line: 6, column: 'w', reason: 'weight 0 is not positive' },
      { line: 7, column: 'w', reason: 'weight -1 is not positive' },
      { line: 8, column: '', reason: 'row has 4 fields, but the header has 3' },
      { line: 9, column: 'y', reason: '"Inf" is not finite' },
      { line: 10, column: 'y', reason: '"1e999" is beyond the largest double, about 1.8e308 (it would overflow to infinity, IEEE 754)' },
      { line: 13, column: 'y', reason: 'missing value' },
    ]);
  });
  it('the first failing column in the order x, y, weights gives the reason', () => {
    const t = parseCsvText('a,b,c\nNA,zz,-1\n1,2,3\n4,5,6\n');
    assert.deepEqual(selectColumns(t, { x: 'a', y: 'b', weights: 'c' }).rejected, [{ line: 2, column: 'a', reason: 'missing value' }]);
  });
});

describe('selectColumns lookup and errors', () => {
  const table = parseCsvText(fixture('quoted-multiline.csv'));
  it('finds columns by label, by header text, then ignoring case; keeps units', () => {
    assert.equal(findColumn(table, 'time').index, 0);
    assert.equal(findColumn(table, 'time [s]').index, 0);
    assert.equal(findColumn(table, 'TIME').index, 0);
    assert.equal(findColumn(table, 'Flow (L/min)').index, 2);
    assert.equal(findColumn(table, 'flow (2)').index, 3);
    const s = selectColumns(table, { x: 'time [s]', y: 'flow' });
    assert.deepEqual(s.units, { x: 's', y: 'L/min' });
    assert.deepEqual(s.labels, { x: 'time', y: 'flow' });
  });
  it('case-sensitive matches win over case-insensitive ones', () => {
    const t = parseCsvText('X,x\n1,2\n');
    assert.equal(findColumn(t, 'x').index, 1);
    assert.equal(findColumn(t, 'X').index, 0);
  });
  it('an unknown column is an InputError listing the available columns', () => {
    assert.throws(
      () => selectColumns(table, { x: 'time', y: 'pressure' }, 'q.csv'),
      (e: unknown) =>
        e instanceof InputError &&
        e.message === 'no column named "pressure"; the columns are "time" (header "time [s]"), "note", "flow" (header "flow (L/min)"), "flow (2)" (header "flow"), "column 5"' &&
        e.place.file === 'q.csv' &&
        e.place.column === 'pressure',
    );
  });
  it('a chosen non-numeric column is an InputError naming it and a bad cell with its line', () => {
    assert.throws(
      () => selectColumns(table, { x: 'time', y: 'note' }, 'q.csv'),
      (e: unknown) =>
        e instanceof InputError &&
        e.message === 'column "note" is not numeric: 5 of its 5 filled cells are not numbers, e.g. line 2: "plain" is not a number' &&
        e.place.line === 2 &&
        e.place.column === 'note',
    );
  });
  it('names in messages are shortened to 60 characters and the list of columns to 20', () => {
    const long = 'a'.repeat(1 << 20);
    const t = parseCsvText(`${long},y\n1,2\n3,4\n`);
    assert.throws(
      () => selectColumns(t, { x: 'x', y: 'y' }, 'l.csv'),
      (e: unknown) => e instanceof InputError && e.message === `no column named "x"; the columns are "${'a'.repeat(60)}\u2026", "y"` && e.place.column === 'x',
    );
    const wide = parseCsvText(`${Array.from({ length: 25 }, (_, k) => `c${k}`).join(',')}\n${'1,'.repeat(24)}1\n`);
    assert.throws(
      () => findColumn(wide, 'b'.repeat(500)),
      (e: unknown) => e instanceof InputError && e.message === `no column named "${'b'.repeat(60)}\u2026"; the columns are ${Array.from({ length: 20 }, (_, k) => `"c${k}"`).join(', ')} and 5 more`,
    );
  });
  it('a chosen column that is not numeric says when other columns have the same name', () => {
    const t = parseCsvText('x,y,y\n1,a,2\n2,b,3\n3,c,4\n');
    assert.throws(
      () => selectColumns(t, { x: 'x', y: 'y' }),
      (e: unknown) =>
        e instanceof InputError &&
        e.message ===
          'column "y" is not numeric: 3 of its 3 filled cells are not numbers, e.g. line 2: "a" is not a number; the header names 2 columns "y", and this is the first (the others are "y (2)")',
    );
    assert.deepEqual([...selectColumns(t, { x: 'x', y: 'y (2)' }).data.y], [2, 3, 4]);
  });
  it('all rows missing in a chosen column is an InputError', () => {
    const t = parseCsvText('x,y,z\n1,NA,3\n2,,4\n');
    assert.throws(
      () => selectColumns(t, { x: 'x', y: 'y' }, 'm.csv'),
      (e: unknown) =>
        e instanceof InputError &&
        /^no usable rows: every row has a missing or invalid value in "x", "y" \(the first: line 2, column "y": missing value\)$/.test(e.message) &&
        e.place.file === 'm.csv',
    );
  });
});
