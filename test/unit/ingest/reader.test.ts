/**
 * createCsvReader and parseCsvText (core/ingest/reader.ts). Sources: R's datasets and
 * write.csv / write.csv2 for the fixtures (test/fixtures/csv/make-fixtures.R); RFC 4180,
 * section 2, for quoting and line breaks; the blank-line, column-limit, header-name and
 * quote rules are the house rules of docs/design.md, "Input".
 */
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { DETECT_CHARS, MAX_DETECT_CHARS } from '../../../core/ingest/detect';
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
    assert.deepEqual(
      t.columns.map((c) => c.decimalComma),
      [false, false, false],
    );
  });
  it('trees-semicolon.csv (write.csv2): decimal comma values equal R', () => {
    const t = parseCsvText(fixture('trees-semicolon.csv'));
    assertMatchesR(t, R.trees, ['Girth', 'Height', 'Volume']);
    assert.equal(t.format.delimiter, ';');
    assert.equal(t.format.decimalComma, true);
    assert.deepEqual(
      t.columns.map((c) => c.decimalComma),
      [true, true, true],
    );
  });
  it('examples/fan-temperature-rise.csv: decimal points in x and decimal commas in y are both read', () => {
    const text = readFileSync(join(__dirname, '..', '..', '..', 'examples', 'fan-temperature-rise.csv'), 'utf8');
    const t = parseCsvText(text);
    assert.deepEqual(
      t.columns.map((c) => [c.label, c.unit, c.decimalComma]),
      [
        ['airflow', 'm3/h', false],
        ['temperature_rise', 'K', true],
      ],
    );
    assert.equal(t.problems.length, 0);
    // The second line of the file, read by hand: 4.992;38,711.
    assert.deepEqual([t.values[0]?.[0], t.values[1]?.[0]], [4.992, 38.711]);
    assert.equal(t.rowCount, text.trimEnd().split('\n').length - 1);
  });
  it('trees-noheader.tsv: tab, no header, labels "column k", lines from 1', () => {
    const t = parseCsvText(fixture('trees-noheader.tsv'));
    assertMatchesR(t, R.trees, ['column 1', 'column 2', 'column 3']);
    assert.deepEqual(t.format, { delimiter: '\t', decimalComma: false, header: false, bom: false, lineEnding: 'lf' });
    assert.deepEqual(
      t.columns.map((c) => c.header),
      ['', '', ''],
    );
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
    assert.deepEqual(
      t.columns.map((c) => c.label),
      ['time', 'note', 'flow', 'flow (2)', 'column 5'],
    );
    assert.deepEqual(
      t.columns.map((c) => c.unit),
      ['s', undefined, 'L/min', undefined, undefined],
    );
    assert.deepEqual([...(t.values[2] as Float64Array)], [1.5, 2.5, 3.5, 4.5, 5.5, 6.5]);
    assert.deepEqual(
      t.columns.map((c) => c.numeric),
      [true, false, true, true, false],
    );
    assert.deepEqual(t.problems, [
      { line: 2, column: 'note', reason: 'column is not numeric: 5 of 5 filled cells are not numbers, the first: "plain" is not a number' },
      { line: 6, column: 'column 5', reason: 'column is not numeric: 1 of 1 filled cells are not numbers, the first: "x" is not a number' },
    ]);
  });
  it('problems.csv: wrong field counts, invalid, non-finite and overflowing cells are all reported by line', () => {
    const t = parseCsvText(fixture('problems.csv'));
    assert.deepEqual([...t.lines], [2, 3, 4, 6, 7, 9, 10, 11, 12, 13]);
    assert.deepEqual(t.problems, [
      { line: 4, column: 'y', reason: '"abc" is not a number' },
      { line: 5, reason: 'row has 2 fields, but the header has 3' },
      { line: 8, reason: 'row has 4 fields, but the header has 3' },
      { line: 9, column: 'y', reason: '"Inf" is not finite' },
      { line: 10, column: 'y', reason: '"1e999" is beyond the largest double, about 1.8e308 (it would overflow to infinity, IEEE 754)' },
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
  it('an unterminated quote refuses the whole file, naming the line where it opened (not one dropped row)', () => {
    // 50 rows with a quote opened on line 11 and never closed: lines 11 to 51 would be one field.
    const rows = Array.from({ length: 50 }, (_, i) => (i === 9 ? `${i},"${i}` : `${i},${i * 2}`));
    assert.throws(
      () => parseCsvText(`x,y\n${rows.join('\n')}\n`, { file: 'q.csv' }),
      (e: unknown) =>
        e instanceof InputError &&
        e.message.startsWith('unterminated quote: the quoted field that opens on line 11 is not closed before the end of the file (lines 11 to 51 would be one field)') &&
        e.place.line === 11 &&
        e.place.column === 'y' &&
        e.place.file === 'q.csv',
    );
  });
  it('a quote in the header that is never closed is refused too', () => {
    assert.throws(
      () => parseCsvText('x,"y\n1,2\n3,4\n'),
      (e: unknown) => e instanceof InputError && e.place.line === 1 && /unterminated quote/.test(e.message),
    );
  });
  it('a line of spaces before the header is blank, as an empty one is (before: the spaces became the header)', () => {
    for (const first of ['', '   ', ' \t ', '\t']) {
      const t = parseCsvText(`${first}\nx,y\n1,2\n3,4\n`);
      assert.deepEqual(
        t.columns.map((c) => c.label),
        ['x', 'y'],
        JSON.stringify(first),
      );
      assert.deepEqual([...t.lines], [3, 4]);
      assert.equal(t.blankLines, 1);
    }
  });
  it('blank lines of spaces and tabs anywhere are skipped and counted, with lines kept right (CR, CRLF, LF)', () => {
    const t = parseCsvText('  \r\n\t\rx\ty\n \n1\t2\r\n\t\t\n3\t4\n');
    assert.deepEqual([...t.lines], [5, 7]);
    assert.equal(t.blankLines, 4);
    assert.equal(t.format.delimiter, '\t');
  });
  it('more than 64 K of blank lines before the header are counted, not held, and detection sees the content', () => {
    const blank = ' \n'.repeat(40000);
    const text = `${blank}x;y\n1,5;2\n3,5;4\n`;
    const whole = parseCsvText(text);
    assert.deepEqual([...whole.lines], [40002, 40003]);
    assert.deepEqual([whole.format.delimiter, whole.format.header, whole.blankLines], [';', true, 40000]);
    assert.deepEqual(pushAll(text, 4096), whole);
    assert.deepEqual(pushAll(text, 3), whole);
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
    ['blank lines only', '\n \r\n\t\n', /^the file is empty: it holds only blank lines$/],
    ['BOM only', '\uFEFF', /^the file is empty$/],
    ['header-only.csv', fixture('header-only.csv'), /^the file has a header row but no data rows$/],
    ['binary.bin', readFileSync(join(FIXTURES, 'binary.bin')).toString('utf8'), /looks like a binary file, not CSV text/],
    ['a single column', 'x\n1\n2\n', /single column/],
  ];
  for (const [what, text, message] of cases) {
    it(`${what} is an InputError naming the file`, () => {
      assert.throws(
        () => parseCsvText(text, { file: 'in.csv' }),
        (e: unknown) => e instanceof InputError && message.test(e.message) && e.place.file === 'in.csv',
      );
    });
  }
});

describe('parseCsvText column limit and names', () => {
  it('a header of a million columns is refused within the first 2 M characters (the largest detection sample): later chunks are never pushed (counted, not timed)', () => {
    const r = createCsvReader({ file: 'wide.csv' });
    const chunk = Array.from({ length: 1000 }, (_, k) => `c${k}`).join(',') + ',';
    let pushed = 0;
    assert.throws(
      () => {
        // 1000 columns per chunk, 1000 chunks: the header alone would be about 4.9 M characters.
        for (let i = 0; i < 1000; i++) {
          r.push(chunk);
          pushed++;
        }
        r.push('\n1,2\n');
      },
      (e: unknown) => e instanceof InputError && /^the table is too wide: the header row has more than 10,000 fields/.test(e.message) && e.place.line === 1 && e.place.file === 'wide.csv',
    );
    // The reader buffers the detection sample, then the tokenizer stops at field 10,001.
    assert.ok(pushed * chunk.length < MAX_DETECT_CHARS + chunk.length, `${pushed} chunks pushed`);
    assert.ok(pushed < 1000);
  });
  it('10,000 columns are read', () => {
    const n = 10000;
    const t = parseCsvText(`${Array.from({ length: n }, (_, k) => `c${k}`).join(',')}\n${Array.from({ length: n }, (_, k) => k).join(',')}\n${'1,'.repeat(n - 1)}1\n`);
    assert.equal(t.columns.length, n);
  });
  it('a control character in a column name is refused; one in a number cell is rejected with the cell line and column', () => {
    const rows = Array.from({ length: 30 }, (_, i) => `${i},${i}`).join('\n');
    assert.throws(
      () => parseCsvText(`x,y\u0007\n${rows}\n`, { file: 'c.csv' }),
      (e: unknown) => e instanceof InputError && /^the name of column 2 in the header holds the control character U\+0007/.test(e.message) && e.place.line === 1,
    );
    const t = parseCsvText(`x,y\n${rows}\n5,\u00016\n`);
    assert.deepEqual(t.problems, [{ line: 32, column: 'y', reason: '"\\u00016" holds the control character U+0001 at character 1, which no number holds' }]);
  });
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
  it('a header line longer than 64 K is read: the detection sample reaches the third line break', () => {
    const names = Array.from({ length: 9000 }, (_, k) => `column_${k}`);
    const text = `${names.join(',')}\n${names.map((_, k) => k).join(',')}\n${names.map((_, k) => 2 * k).join(',')}\n`;
    assert.ok(text.indexOf('\n') > 65536);
    const t = parseCsvText(text);
    assert.equal(t.columns.length, 9000);
    assert.deepEqual([t.rowCount, t.values[8999]?.[1]], [2, 2 * 8999]);
    assert.deepEqual(pushAll(text, 5000), t);
  });
  it('blank lines before the header (CR, CRLF, spaces, tabs) and a BOM: a split at every position gives the same table', () => {
    const text = `\uFEFF \r\n\t\r\r\n  \n${fixture('problems.csv').replace(/\n/g, '\r\n')}`;
    const whole = parseCsvText(text);
    assert.equal(whole.format.bom, true);
    assert.equal(whole.blankLines, 4);
    for (let cut = 0; cut <= 40; cut++) {
      const r = createCsvReader();
      r.push(text.slice(0, cut));
      r.push(text.slice(cut));
      assert.deepEqual(r.finish(), whole, `cut at ${cut}`);
    }
  });
  it('push after finish is a programming error', () => {
    const r = createCsvReader();
    r.push('x,y\n1,2\n');
    r.finish();
    assert.throws(() => r.push('3,4\n'), /push after finish/);
  });
});

describe('createCsvReader in parts (drain, finishRows)', () => {
  /** The parts of `text` pushed in chunks of `size`, drained after every push. */
  function parts(text: string, size: number): ParsedTable[] {
    const r = createCsvReader();
    const out: ParsedTable[] = [];
    for (let at = 0; at < text.length; at += size) {
      r.push(text.slice(at, at + size));
      const part = r.drain();
      if (part) out.push(structuredClone(part));
    }
    out.push(structuredClone(r.finishRows()));
    return out;
  }

  it('the parts hold the rows, lines, cell problems and counts of a whole read, whatever the chunk size', () => {
    // 1,200 bad cells in a numeric column: more than the 1,000 whose reasons quote the text (QUOTED_REASONS_PER_COLUMN).
    const many = Array.from({ length: 3000 }, (_, i) => `${i},${i % 5 < 2 ? `bad${i}` : i},${i % 3 === 0 ? 'NA' : i}`).join('\n');
    for (const text of [fixture('problems.csv'), `a,b,c\n${many}\n1,2\n3,4,5\n`]) {
      const whole = parseCsvText(text);
      for (const size of [7, 100, 4096, text.length]) {
        const got = parts(text, size);
        const k = whole.columns.length;
        for (let c = 0; c < k; c++) {
          const joined = got.flatMap((p) => Array.from(p.values[c] ?? []));
          assert.deepEqual(joined, Array.from(whole.values[c] ?? []), `column ${c}, chunks of ${size}`);
          const sum = (f: (p: ParsedTable) => number): number => got.reduce((s, p) => s + f(p), 0);
          assert.equal(
            sum((p) => p.columns[c]?.numericCount ?? 0),
            whole.columns[c]?.numericCount,
          );
          assert.equal(
            sum((p) => p.columns[c]?.invalidCount ?? 0),
            whole.columns[c]?.invalidCount,
          );
        }
        assert.deepEqual(
          got.flatMap((p) => Array.from(p.lines)),
          Array.from(whole.lines),
        );
        // Cell problems by line, column and reason (quoted reasons stop after the same count as in a whole read).
        const cells = (ps: readonly ParsedTable['problems'][number][]): string[] =>
          ps.filter((p) => p.column !== undefined && !p.reason.startsWith('column is not numeric')).map((p) => `${p.line} ${p.column} ${p.reason}`);
        const rowProblems = (ps: readonly ParsedTable['problems'][number][]): string[] => ps.filter((p) => p.column === undefined).map((p) => `${p.line} ${p.reason}`);
        assert.deepEqual(
          got.flatMap((p) => cells(p.problems)),
          cells(whole.problems),
        );
        assert.deepEqual(
          got.flatMap((p) => rowProblems(p.problems)),
          rowProblems(whole.problems),
        );
        assert.equal(got[got.length - 1]?.blankLines, whole.blankLines);
      }
    }
  });

  it('finishRows refuses an empty file and an unclosed quote as finish does', () => {
    assert.throws(() => createCsvReader({ file: 'e.csv' }).finishRows(), /the file is empty/);
    const r = createCsvReader();
    r.push('x,y\n1,"2\n');
    assert.throws(() => r.finishRows(), /unterminated quote/);
  });
});

describe('createCsvReader sizeHint (columns sized once from the detection sample)', () => {
  /** A text many times the detection sample: rows of varying width, blank and short rows, invalid and missing cells, a quoted field over two lines. */
  function longText(): string {
    const rows = ['time_s,reading,label'];
    for (let i = 0; i < 40_000; i++) {
      if (i % 997 === 5) rows.push('');
      else if (i % 1231 === 7) rows.push(`${i},NA,x`);
      else if (i % 1499 === 9) rows.push(`${i},abc,"two\nlines"`);
      else if (i % 1777 === 11) rows.push(`${i}`);
      else rows.push(`${i * 0.5},${(Math.sin(i / 50) * 10 ** (i % 7)).toFixed(i % 5)},p${i % 3}`);
    }
    return rows.join('\n') + '\n';
  }

  it('gives the same table, problems and kept texts with an exact, a short, a long and an absurd hint as without one, pushed in 64 K chunks', () => {
    const text = longText();
    assert.ok(text.length > 10 * DETECT_CHARS, 'precondition: many times the detection sample');
    const read = (sizeHint: number | undefined): ParsedTable => {
      const r = createCsvReader({ sizeHint, keepText: 'label' });
      for (let i = 0; i < text.length; i += 65536) r.push(text.slice(i, i + 65536));
      return r.finish();
    };
    const plain = read(undefined);
    for (const hint of [text.length, Math.floor(text.length / 10), text.length * 3, 1e300]) {
      const got = read(hint);
      assert.deepEqual(
        got.values.map((v) => Array.from(v)),
        plain.values.map((v) => Array.from(v)),
        `values, hint ${hint}`,
      );
      assert.deepEqual(Array.from(got.lines), Array.from(plain.lines), `lines, hint ${hint}`);
      assert.deepEqual(got.problems, plain.problems, `problems, hint ${hint}`);
      assert.deepEqual(got.columns, plain.columns, `columns, hint ${hint}`);
      assert.deepEqual(got.text && { ...got.text, codes: Array.from(got.text.codes) }, plain.text && { ...plain.text, codes: Array.from(plain.text.codes) }, `kept texts, hint ${hint}`);
      assert.equal(got.rowCount, plain.rowCount);
      assert.equal(got.blankLines, plain.blankLines);
    }
    assert.ok(plain.rowCount > 38_000 && plain.problems.length > 20, `precondition: ${plain.rowCount} rows, ${plain.problems.length} problems`);
  });
});
