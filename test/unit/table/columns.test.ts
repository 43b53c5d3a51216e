/**
 * Tests of the table's column set (core/table/columns.ts) on the table of a spline fitted
 * to MASS::mcycle (Silverman 1985; test/e2e/fixtures/mcycle.csv), whose head acceleration
 * goes well below zero between about 15 and 30 ms: a quantity wrongly declared non-negative.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import { parseColumns, shapeTable } from '../../../core/table/columns';
import { curveTable, TABLE_COLUMNS } from '../../../core/table/curveTable';

const REPO = join(__dirname, '..', '..', '..');
const rows = readFileSync(join(REPO, 'test', 'e2e', 'fixtures', 'mcycle.csv'), 'utf8')
  .trim()
  .split('\n')
  .slice(1);
const x = Float64Array.from(rows, (r) => Number(r.split(',')[0]));
const y = Float64Array.from(rows, (r) => Number(r.split(',')[1]));
const fit = fitCurve({ x, y }, { kind: 'natural-spline', df: 8 });
/** 0, 5, ..., 60 ms (the data run from 2.4 to 57.6 ms, so 0 and 60 are extrapolated). */
const points = Float64Array.from({ length: 13 }, (_, i) => 5 * i);
const full = curveTable(fit, points);

function throwsInput(f: () => unknown, pattern: RegExp): void {
  assert.throws(f, (e: unknown) => e instanceof InputError && pattern.test(e.message));
}

describe('parseColumns', () => {
  it('parseColumns keeps the order given and trims spaces', () => {
    assert.deepEqual(parseColumns('x, fit,se'), ['x', 'fit', 'se']);
    assert.deepEqual(parseColumns('fit,x'), ['fit', 'x']);
  });

  it('parseColumns refuses unknown names, repeats, and a set without x', () => {
    throwsInput(() => parseColumns('x,fitted'), /table column "fitted" in "x,fitted" is not known; the columns are x, fit, se/);
    throwsInput(() => parseColumns('x,fit,x'), /listed twice/);
    throwsInput(() => parseColumns('fit,se'), /must include x/);
    throwsInput(() => parseColumns(''), /table column "" .* is not known/);
  });
});

describe('shapeTable', () => {
  it('shapeTable without a request keeps every column of curveTable, values unchanged', () => {
    const s = shapeTable(full, undefined, false);
    assert.deepEqual(s.table.columns, [...TABLE_COLUMNS]);
    assert.deepEqual(s.table.rows, full.rows);
    assert.deepEqual(s.added, []);
  });

  it('shapeTable reduces to the columns asked for, in their order', () => {
    const inside = curveTable(fit, Float64Array.of(10, 20, 30));
    const s = shapeTable(inside, ['x', 'se', 'fit'], false);
    assert.deepEqual(s.table.columns, ['x', 'se', 'fit']);
    inside.rows.forEach((r, i) => assert.deepEqual(s.table.rows[i], [r[0], r[2], r[1]]));
    assert.deepEqual(s.added, []);
  });

  it('shapeTable appends the extrapolated column when a reduced set left it out and a row is extrapolated', () => {
    const s = shapeTable(full, ['x', 'fit'], false);
    assert.deepEqual(s.table.columns, ['x', 'fit', 'extrapolated']);
    assert.deepEqual(s.added, ['extrapolated']);
    // 0 and 60 ms lie outside 2.4 .. 57.6 ms.
    assert.deepEqual(
      s.table.rows.filter((r) => r[2] === 1).map((r) => r[0]),
      [0, 60],
    );
  });

  it('shapeTable with nonnegative adds a negative column that is 1 exactly where fit < 0', () => {
    const s = shapeTable(full, undefined, true);
    assert.deepEqual(s.table.columns, [...TABLE_COLUMNS, 'negative']);
    const fitAt = full.columns.indexOf('fit');
    let flagged = 0;
    s.table.rows.forEach((r, i) => {
      const neg = ((full.rows[i] as number[])[fitAt] as number) < 0 ? 1 : 0;
      assert.equal(r[r.length - 1], neg, `row ${i}`);
      flagged += neg;
    });
    // mcycle's acceleration dips to about -130 g between 15 and 30 ms.
    assert.ok(flagged >= 3, `${flagged} negative rows`);
    const reduced = shapeTable(full, ['x', 'fit'], true);
    assert.deepEqual(reduced.table.columns, ['x', 'fit', 'extrapolated', 'negative']);
  });

  it('shapeTable refuses the negative column unless the quantity is declared non-negative', () => {
    throwsInput(() => shapeTable(full, ['x', 'negative'], false), /needs the quantity declared non-negative \(--flag-negative\)/);
  });
});
