import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { createCsvReader, parseCsvText } from '../../../core/ingest/reader';
import type { ParsedTable } from '../../../core/ingest/types';
import { InputError } from '../../../core/errors';

const FIXTURES = join(__dirname, '..', '..', 'fixtures', 'csv');
const fixture = (name: string): string => readFileSync(join(FIXTURES, name), 'utf8');

interface RColumn {
  sum: number;
  na: number;
  first: number | null;
  last: number | null;
}
/** Counts and sums computed by R from its datasets (test/fixtures/csv/make-fixtures.R). */
const R = JSON.parse(fixture('r-reference.json')) as Record<'trees' | 'cars' | 'airquality', { rows: number; columns: Record<string, RColumn> }>;

/** Relative tolerance for sums: R and this test add in the same order, but R may use long doubles. */
const SUM_TOLERANCE = 1e-12;

function sum(a: Float64Array): number {
  let s = 0;
  for (const v of a) if (!Number.isNaN(v)) s += v;
  return s;
}

function pushAll(text: string, size: number): ParsedTable {
  const r = createCsvReader();
  for (let i = 0; i < text.length; i += size) r.push(text.slice(i, i + size));
  return r.finish();
}

/** Checks a parsed table against R's description of the same dataset. */
function assertMatchesR(t: ParsedTable, ref: { rows: number; columns: Record<string, RColumn> }, labels: string[]): void {
  assert.equal(t.rowCount, ref.rows);
  labels.forEach((label, k) => {
    const r = ref.columns[label] ?? (Object.values(ref.columns)[k] as RColumn);
    const v = t.values[k] as Float64Array;
    assert.equal(t.columns[k]?.label, label);
    assert.ok(Math.abs(sum(v) - r.sum) <= SUM_TOLERANCE * Math.abs(r.sum), `${label}: sum ${sum(v)} vs R ${r.sum}`);
    assert.equal(t.columns[k]?.missingCount, r.na, `${label}: NA count`);
    assert.equal(t.columns[k]?.invalidCount, 0);
    // first/last: R writes 15 significant digits and the fixture values have at most 3: exact.
    if (r.first !== null) assert.equal(v[0], r.first);
    if (r.last !== null) assert.equal(v[v.length - 1], r.last);
  });
}

describe('parseCsvText with R datasets', () => {
  it('trees.csv (write.csv): 31 rows, sums equal R', () => {
    const t = parseCsvText(fixture('trees.csv'));
    assertMatchesR(t, R.trees, ['Girth', 'Height', 'Volume']);
    assert.deepEqual(t.format, { delimiter: ',', decimalComma: false, header: true, bom: false, lineEnding: 'lf' });
    assert.deepEqual([t.lines[0], t.lines[30]], [2, 32]);
  });
  it('trees-semicolon.csv (write.csv2): decimal comma values equal R', () => {
    const t = parseCsvText(fixture('trees-semicolon.csv'));
    assertMatchesR(t, R.trees, ['Girth', 'Height', 'Volume']);
    assert.equal(t.format.delimiter, ';');
    assert.equal(t.format.decimalComma, true);
  });
  it('trees-noheader.tsv: tab, no header, labels "column k", lines from 1', () => {
    const t = parseCsvText(fixture('trees-noheader.tsv'));
    assertMatchesR(t, R.trees, ['column 1', 'column 2', 'column 3']);
    assert.deepEqual(t.format, { delimiter: '\t', decimalComma: false, header: false, bom: false, lineEnding: 'lf' });
    assert.deepEqual(t.columns.map((c) => c.header), ['', '', '']);
    assert.equal(t.lines[0], 1);
  });
  it('cars-bom-crlf.csv: BOM removed and reported, CRLF, 50 rows', () => {
    const t = parseCsvText(fixture('cars-bom-crlf.csv'));
    assertMatchesR(t, R.cars, ['speed', 'dist']);
    assert.equal(t.format.bom, true);
    assert.equal(t.format.lineEnding, 'crlf');
    assert.equal(t.columns[0]?.header, 'speed');
  });
  it('airquality.csv: NA counts (Ozone 37, Solar.R 7) and sums equal R', () => {
    const t = parseCsvText(fixture('airquality.csv'));
    assertMatchesR(t, R.airquality, ['Ozone', 'Solar.R', 'Wind', 'Temp', 'Month', 'Day']);
    assert.equal(t.problems.length, 0);
  });
});

describe('parseCsvText awkward files', () => {
  it('quoted-multiline.csv: lines stay right across multi-line fields; labels, units and duplicates', () => {
    const t = parseCsvText(fixture('quoted-multiline.csv'));
    // Lines counted by hand in the fixture file.
    assert.deepEqual([...t.lines], [2, 3, 4, 6, 7, 10]);
    assert.deepEqual(t.columns.map((c) => c.label), ['time', 'note', 'flow', 'flow (2)', 'column 5']);
    assert.deepEqual(t.columns.map((c) => c.unit), ['s', undefined, 'L/min', undefined, undefined]);
    assert.deepEqual([...(t.values[2] as Float64Array)], [1.5, 2.5, 3.5, 4.5, 5.5, 6.5]);
    assert.deepEqual(t.columns.map((c) => c.numeric), [true, false, true, true, false]);
    assert.deepEqual(t.problems, [
      { line: 2, column: 'note', reason: 'column is not numeric: 5 of 5 filled cells are not numbers, the first: "plain" is not a number' },
      { line: 6, column: 'column 5', reason: 'column is not numeric: 1 of 1 filled cells are not numbers, the first: "x" is not a number' },
    ]);
  });
  it('problems.csv: wrong field counts, invalid and non-finite cells are all reported by line', () => {
    const t = parseCsvText(fixture('problems.csv'));
    assert.deepEqual([...t.lines], [2, 3, 4, 6, 7, 9, 10, 11, 12, 13]);
    assert.deepEqual(t.problems, [
      { line: 4, column: 'y', reason: '"abc" is not a number' },
      { line: 5, reason: 'row has 2 fields, but the header has 3' },
      { line: 8, reason: 'row has 4 fields, but the header has 3' },
      { line: 9, column: 'y', reason: '"Inf" is not finite' },
      { line: 10, column: 'y', reason: '"1e999" is not finite' },
    ]);
    const y = t.values[1] as Float64Array;
    assert.equal(y[7], 1e308);
    assert.equal(y[8], 12.5);
    assert.deepEqual([t.columns[1]?.numericCount, t.columns[1]?.missingCount, t.columns[1]?.invalidCount], [5, 2, 3]);
  });
  it('1,5;2,25 is read with semicolon and decimal comma', () => {
    const t = parseCsvText('1,5;2,25\n3,5;-4,75\n');
    assert.deepEqual([...(t.values[0] as Float64Array)], [1.5, 3.5]);
    assert.deepEqual([...(t.values[1] as Float64Array)], [2.25, -4.75]);
  });
  it('CR-only line endings and blank lines keep the physical line numbers', () => {
    const t = parseCsvText('x,y\r\r1,2\r3,4\r\r');
    assert.equal(t.format.lineEnding, 'cr');
    assert.deepEqual([...t.lines], [3, 4]);
    assert.equal(t.blankLines, 2);
  });
  it('an unclosed quote is reported for its record', () => {
    const t = parseCsvText('x,y\n1,2\n3,"4\n5,6\n');
    assert.equal(t.rowCount, 1);
    assert.equal(t.problems[0]?.line, 3);
    assert.match(t.problems[0]?.reason ?? '', /not closed/);
  });
  it('every missing-value token is missing, not invalid', () => {
    const t = parseCsvText('x,y\n1,\n2,NA\n3,NaN\n4,null\n5,n/a\n6,-\n7, na \n8,N/A\n9,1\n');
    assert.equal(t.columns[1]?.missingCount, 8);
    assert.equal(t.columns[1]?.invalidCount, 0);
    assert.equal(t.problems.length, 0);
  });
});

describe('parseCsvText errors', () => {
  const cases: [string, string, RegExp][] = [
    ['empty.csv', fixture('empty.csv'), /^the file is empty$/],
    ['blank lines only', '\n \r\n\t\n', /^the file is empty$/],
    ['BOM only', '\uFEFF', /^the file is empty$/],
    ['header-only.csv', fixture('header-only.csv'), /^the file has a header row but no data rows$/],
    ['binary.bin', readFileSync(join(FIXTURES, 'binary.bin')).toString('utf8'), /looks like a binary file, not CSV text/],
    ['a single column', 'x\n1\n2\n', /single column/],
  ];
  for (const [what, text, message] of cases) {
    it(`${what} is an InputError naming the file`, () => {
      assert.throws(() => parseCsvText(text, { file: 'in.csv' }), (e: unknown) => e instanceof InputError && message.test(e.message) && e.place.file === 'in.csv');
    });
  }
});

describe('createCsvReader chunking', () => {
  const small = ['quoted-multiline.csv', 'problems.csv', 'cars-bom-crlf.csv', 'trees-semicolon.csv'];
  for (const name of small) {
    it(`${name}: one character per push gives the same table as the whole text`, () => {
      const text = fixture(name);
      assert.deepEqual(pushAll(text, 1), parseCsvText(text));
    });
  }
  it('quoted-multiline.csv with CRLF: a split at every position gives the same table', () => {
    const text = fixture('quoted-multiline.csv').replace(/\n/g, '\r\n');
    const whole = parseCsvText(text);
    for (let cut = 0; cut <= text.length; cut++) {
      const r = createCsvReader();
      r.push(text.slice(0, cut));
      r.push(text.slice(cut));
      assert.deepEqual(r.finish(), whole, `cut at ${cut}`);
    }
  });
  it('a text longer than the 64 K detection sample reads the same in chunks of 1000 and 7 characters', () => {
    // trees.csv's rows 200 times (~80 K characters): R's sums times 200.
    const [head, ...rows] = fixture('trees.csv').trimEnd().split('\n');
    const text = `\uFEFF${head}\r\n${Array.from({ length: 200 }, () => rows.join('\r\n')).join('\r\n')}\r\n`;
    assert.ok(text.length > 65536);
    const whole = parseCsvText(text);
    assert.equal(whole.rowCount, 200 * R.trees.rows);
    const expected = 200 * (R.trees.columns.Girth as RColumn).sum;
    assert.ok(Math.abs(sum(whole.values[0] as Float64Array) - expected) <= 1e-12 * expected);
    assert.deepEqual(pushAll(text, 1000), whole);
    assert.deepEqual(pushAll(text, 7), whole);
    assert.equal(whole.lines[whole.rowCount - 1], whole.rowCount + 1);
  });
  it('push after finish is a programming error', () => {
    const r = createCsvReader();
    r.push('x,y\n1,2\n');
    r.finish();
    assert.throws(() => r.push('3,4\n'), /push after finish/);
  });
});
