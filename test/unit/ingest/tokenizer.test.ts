import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import Papa from 'papaparse';
import { CsvTokenizer } from '../../../core/ingest/tokenizer';
import type { RecordSink } from '../../../core/ingest/tokenizer';

const FIXTURES = join(__dirname, '..', '..', 'fixtures', 'csv');

interface Tokens {
  records: { line: number; fields: string[] }[];
  /** Last line of each record (differs from `line` when a quoted field holds line breaks). */
  lastLines: number[];
  blank: number[];
  unclosed: { quoteLine: number; lastLine: number; fieldsBefore: string[] }[];
}

/** Sink that copies every field, for comparison. */
class Collector implements RecordSink {
  readonly out: Tokens = { records: [], lastLines: [], blank: [], unclosed: [] };
  private fields: string[] = [];
  field(s: string, start: number, end: number): void {
    this.fields.push(s.slice(start, end));
  }
  endRecord(line: number, lastLine: number): void {
    this.out.records.push({ line, fields: this.fields });
    this.out.lastLines.push(lastLine);
    this.fields = [];
  }
  blankLine(line: number): void {
    this.out.blank.push(line);
  }
  unclosedQuote(quoteLine: number, lastLine: number): void {
    this.out.unclosed.push({ quoteLine, lastLine, fieldsBefore: this.fields });
    this.fields = [];
  }
}

function tokenize(chunks: readonly string[], delimiter = ',', firstLine = 1): Tokens {
  const sink = new Collector();
  const t = new CsvTokenizer(delimiter, sink, firstLine);
  for (const c of chunks) t.push(c);
  t.finish();
  return sink.out;
}

/** Reference split by papaparse (an independent RFC 4180 implementation). */
function papa(text: string, delimiter = ','): string[][] {
  return Papa.parse<string[]>(text, { delimiter, quoteChar: '"', skipEmptyLines: true }).data;
}

/** RFC 4180 quoting of one field (section 2, rules 5-7). */
function quote(field: string, delimiter: string): string {
  return /["\r\n]/.test(field) || field.includes(delimiter) || field === '' ? `"${field.replace(/"/g, '""')}"` : field;
}

describe('CsvTokenizer', () => {
  it('RFC 4180 section 2 examples give the same fields as papaparse', () => {
    const examples = [
      'aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n',
      'aaa,bbb,ccc\r\nzzz,yyy,xxx',
      '"aaa","bbb","ccc"\r\nzzz,yyy,xxx\r\n',
      '"aaa","b\r\nbb","ccc"\r\nzzz,yyy,xxx\r\n',
      '"aaa","b""bb","ccc"\r\n',
      'field_name,field_name,field_name\r\naaa,bbb,ccc\r\nzzz,yyy,xxx\r\n',
    ];
    for (const text of examples) {
      assert.deepEqual(
        tokenize([text]).records.map((r) => r.fields),
        papa(text),
        JSON.stringify(text),
      );
    }
  });
  it('records start on the right physical line after multi-line quoted fields (LF, CRLF, CR)', () => {
    for (const eol of ['\n', '\r\n', '\r']) {
      const text = ['h1,h2', '1,"a', 'b"', '2,"c', '', 'd"', '3,x', ''].join(eol);
      const out = tokenize([text]);
      assert.deepEqual(
        out.records.map((r) => r.line),
        [1, 2, 4, 7],
        JSON.stringify(eol),
      );
      assert.deepEqual(out.records[1]?.fields, ['1', `a${eol}b`]);
      assert.deepEqual(out.records[2]?.fields, ['2', `c${eol}${eol}d`]);
    }
  });
  it('quoted-multiline.csv: fields equal papaparse and lines count the breaks inside quotes', () => {
    const text = readFileSync(join(FIXTURES, 'quoted-multiline.csv'), 'utf8');
    const out = tokenize([text]);
    assert.deepEqual(
      out.records.map((r) => r.fields),
      papa(text),
    );
    // Lines counted by hand in the fixture: records start on 1, 2, 3, 4 (to 5), 6, 7 (to 9), 10.
    assert.deepEqual(
      out.records.map((r) => r.line),
      [1, 2, 3, 4, 6, 7, 10],
    );
  });
  it('empty lines are reported as blank lines, not records', () => {
    const out = tokenize(['a,b\n\n1,2\r\n\r\n\r3,4\n']);
    assert.deepEqual(
      out.records.map((r) => r.line),
      [1, 3, 6],
    );
    assert.deepEqual(out.blank, [2, 4, 5]);
  });
  it('a trailing delimiter gives an empty last field; a missing final line break is fine', () => {
    assert.deepEqual(
      tokenize(['1,2,\n3,4,']).records.map((r) => r.fields),
      [
        ['1', '2', ''],
        ['3', '4', ''],
      ],
    );
    assert.deepEqual(
      tokenize(['1,2']).records.map((r) => r.fields),
      [['1', '2']],
    );
    assert.deepEqual(
      tokenize(['"1","2"']).records.map((r) => r.fields),
      [['1', '2']],
    );
  });
  it('text after a closing quote keeps the quote, so "1"2 is the text 1"2, not the number 12', () => {
    assert.deepEqual(
      tokenize(['"1"2,3\n']).records.map((r) => r.fields),
      [['1"2', '3']],
    );
    assert.deepEqual(
      tokenize(['a"b,3\n']).records.map((r) => r.fields),
      [['a"b', '3']],
    );
  });
  it('an unclosed quote is reported with the line where it opened and the last line (RFC 4180, section 2, rule 5: a quoted field ends at a closing quote)', () => {
    const out = tokenize(['x,y\n1,2\n3,"4\n5,6\n']);
    assert.deepEqual(
      out.records.map((r) => r.line),
      [1, 2],
    );
    assert.deepEqual(out.unclosed, [{ quoteLine: 3, lastLine: 4, fieldsBefore: ['3'] }]);
    // Without a final line break the last line is the same; a quote opened on a later line
    // of a multi-line record is named by its own line.
    assert.deepEqual(tokenize(['x,y\n3,"4\n5,6']).unclosed, [{ quoteLine: 2, lastLine: 3, fieldsBefore: ['3'] }]);
    assert.deepEqual(tokenize(['a,"b\nc","d\ne\n']).unclosed, [{ quoteLine: 2, lastLine: 3, fieldsBefore: ['a', 'b\nc'] }]);
  });
  it('a record that spans lines reports its first and last line', () => {
    const out = tokenize(['h\n"a\r\nb",1\r\n2,3']);
    assert.deepEqual(
      out.records.map((r) => r.line),
      [1, 2, 4],
    );
    assert.deepEqual(out.lastLines, [1, 3, 4]);
  });
  it('starts counting at the first line it is given', () => {
    const out = tokenize(['x,y\n\n1,2\n'], ',', 5);
    assert.deepEqual(
      out.records.map((r) => r.line),
      [5, 7],
    );
    assert.deepEqual(out.blank, [6]);
  });
  it('works with semicolon and tab delimiters', () => {
    assert.deepEqual(
      tokenize(['a;"b;c"\n1,5;2\n'], ';').records.map((r) => r.fields),
      [
        ['a', 'b;c'],
        ['1,5', '2'],
      ],
    );
    assert.deepEqual(
      tokenize(['a\t"b\tc"\n'], '\t').records.map((r) => r.fields),
      [['a', 'b\tc']],
    );
  });
  it('refuses a quote or line break as delimiter', () => {
    assert.throws(() => new CsvTokenizer('"', new Collector()));
    assert.throws(() => new CsvTokenizer('\n', new Collector()));
  });

  describe('chunk boundaries', () => {
    const texts = [
      readFileSync(join(FIXTURES, 'quoted-multiline.csv'), 'utf8'),
      readFileSync(join(FIXTURES, 'quoted-multiline.csv'), 'utf8').replace(/\n/g, '\r\n'),
      readFileSync(join(FIXTURES, 'quoted-multiline.csv'), 'utf8').replace(/\n/g, '\r'),
      'a,b\r\n\r\n"x""\r\ny",2\r\n"",""\r\n"1"2,3\r\n3,"unclosed\r\n',
    ];
    texts.forEach((text, k) => {
      it(`text ${k}: one character per push gives the same tokens as the whole text`, () => {
        assert.deepEqual(tokenize(text.split('')), tokenize([text]));
      });
      it(`text ${k}: a split at every position gives the same tokens as the whole text`, () => {
        const whole = tokenize([text]);
        for (let cut = 0; cut <= text.length; cut++) {
          assert.deepEqual(tokenize([text.slice(0, cut), text.slice(cut)]), whole, `cut at ${cut}`);
        }
      });
    });
  });

  it('round trip: RFC 4180-quoted random tables come back field for field with right lines, in random chunks (property)', () => {
    const cell = fc.string({ unit: fc.constantFrom('a', '1', ' ', ',', ';', '"', '\n', '\r', '\t', 'é'), maxLength: 6 });
    fc.assert(
      fc.property(
        fc.constantFrom(',', ';', '\t'),
        fc.constantFrom('\n', '\r\n', '\r'),
        fc.array(fc.array(cell, { minLength: 2, maxLength: 4 }), { minLength: 1, maxLength: 8 }),
        fc.array(fc.integer({ min: 1, max: 7 }), { minLength: 1, maxLength: 10 }),
        (delimiter, eol, table, sizes) => {
          const lines = table.map((row) => row.map((f) => quote(f, delimiter)).join(delimiter));
          const text = lines.join(eol) + eol;
          const chunks: string[] = [];
          for (let at = 0, k = 0; at < text.length; k++) {
            const size = sizes[k % sizes.length] as number;
            chunks.push(text.slice(at, at + size));
            at += size;
          }
          const out = tokenize(chunks, delimiter);
          assert.deepEqual(
            out.records.map((r) => r.fields),
            table,
          );
          // Expected line of each record: 1 + line breaks written before it (any of CRLF, CR, LF).
          let line = 1;
          const expectedLast: number[] = [];
          const expected = lines.map((l) => {
            const at = line;
            const inside = (l.match(/\r\n|\r|\n/g) ?? []).length;
            expectedLast.push(at + inside);
            line += inside + 1;
            return at;
          });
          assert.deepEqual(
            out.records.map((r) => r.line),
            expected,
          );
          assert.deepEqual(out.lastLines, expectedLast);
          assert.deepEqual(
            out.records.map((r) => r.fields),
            papa(text, delimiter),
          );
        },
      ),
      { numRuns: 1000 },
    );
  });
});
