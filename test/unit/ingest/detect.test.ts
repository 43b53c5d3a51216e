import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { capFields, checkNotBinary, DETECT_CHARS, detectFormat, detectLineEnding, MAX_DETECT_CHARS, sampleLength } from '../../../core/ingest/detect';
import { MAX_COLUMNS } from '../../../core/ingest/header';
import { InputError } from '../../../core/errors';

const FIXTURES = join(__dirname, '..', '..', 'fixtures', 'csv');
const fixture = (name: string): string => readFileSync(join(FIXTURES, name), 'utf8');

describe('checkNotBinary', () => {
  it('refuses binary.bin (PNG signature and bytes 0..255, written by make-fixtures.R)', () => {
    const text = readFileSync(join(FIXTURES, 'binary.bin')).toString('utf8');
    assert.throws(
      () => checkNotBinary(text, 'binary.bin'),
      (e: unknown) => e instanceof InputError && /looks like a binary file, not CSV text/.test(e.message) && e.place.file === 'binary.bin',
    );
  });
  it('refuses a NUL anywhere in the first 1024 characters', () => {
    assert.throws(() => checkNotBinary('x,y\n1,2\u0000\n'), /looks like a binary file/);
  });
  it('refuses mostly undecodable UTF-8 (U+FFFD) without NULs', () => {
    const latin = Buffer.from(Array.from({ length: 200 }, (_, i) => 0x80 + (i % 100))).toString('utf8');
    assert.throws(() => checkNotBinary(latin), /looks like a binary file/);
  });
  it('accepts text with tabs, CR, LF and a few stray control characters (<= 10 %)', () => {
    checkNotBinary('a\tb\r\n1\t2\n');
    checkNotBinary(`${'x,y\n1,2\n'.repeat(10)}\u0007`);
    checkNotBinary('');
  });
  it('looks only at the first 1024 characters', () => {
    checkNotBinary(`${'1,2\n'.repeat(300)}\u0000`);
  });
  it('names UTF-16 without a byte order mark, little- and big-endian, instead of calling it binary (The Unicode Standard, section 3.10)', () => {
    const le = Buffer.from('x,y\n1,2\n3,4\n', 'utf16le');
    const be = Buffer.from(le).swap16();
    for (const [bytes, order] of [
      [le, 'little-endian'],
      [be, 'big-endian'],
    ] as const) {
      assert.throws(
        () => checkNotBinary(bytes.toString('utf8'), 'u.csv'),
        (e: unknown) =>
          e instanceof InputError && e.message.startsWith(`looks like UTF-16 (${order}) text without a byte order mark`) && /save it as UTF-8/.test(e.message) && e.place.file === 'u.csv',
      );
    }
  });
  it('UTF-16 with its byte order mark read as UTF-8 says the mark was not honoured', () => {
    const bytes = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('x,y\n1,2\n3,4\n', 'utf16le')]);
    assert.throws(() => checkNotBinary(bytes.toString('utf8')), /: looks like UTF-16 \(little-endian\) text whose byte order mark was not honoured/);
  });
  it('NULs in no pattern are binary, not UTF-16', () => {
    assert.throws(() => checkNotBinary('\u0000\u0000ab\u0000c\u0000\u0000d'), /looks like a binary file/);
  });
});

describe('detectLineEnding', () => {
  it('tells LF, CRLF, CR and a single line apart', () => {
    assert.equal(detectLineEnding('a,b\n1,2\n'), 'lf');
    assert.equal(detectLineEnding('a,b\r\n1,2\r\n'), 'crlf');
    assert.equal(detectLineEnding('a,b\r1,2\r'), 'cr');
    assert.equal(detectLineEnding('a,b'), 'none');
  });
  it('skips line breaks inside quoted fields', () => {
    assert.equal(detectLineEnding('"a\nb",c\r\n1,2\r\n'), 'crlf');
  });
});

describe('detectFormat', () => {
  it('trees.csv (R write.csv): comma, header, decimal point, 3 fields', () => {
    assert.deepEqual(detectFormat(fixture('trees.csv'), true), { delimiter: ',', decimalComma: false, columnDecimalComma: [false, false, false], header: true, lineEnding: 'lf', fieldCount: 3 });
  });
  it('trees-semicolon.csv (R write.csv2: ";" separator, "," decimal mark, per ?write.table): semicolon and decimal comma', () => {
    assert.deepEqual(detectFormat(fixture('trees-semicolon.csv'), true), { delimiter: ';', decimalComma: true, columnDecimalComma: [true, true, true], header: true, lineEnding: 'lf', fieldCount: 3 });
  });
  it('trees-noheader.tsv (R write.table, sep = "\\t", no column names): tab, no header', () => {
    assert.deepEqual(detectFormat(fixture('trees-noheader.tsv'), true), {
      delimiter: '\t',
      decimalComma: false,
      columnDecimalComma: [false, false, false],
      header: false,
      lineEnding: 'lf',
      fieldCount: 3,
    });
  });
  it('cars-bom-crlf.csv (BOM removed by the reader): CRLF', () => {
    const text = fixture('cars-bom-crlf.csv').replace(/^\uFEFF/, '');
    assert.deepEqual(detectFormat(text, true), { delimiter: ',', decimalComma: false, columnDecimalComma: [false, false], header: true, lineEnding: 'crlf', fieldCount: 2 });
  });
  it('1,5;2,25 without a header: semicolon with decimal comma beats comma (which would give "5;2")', () => {
    assert.deepEqual(detectFormat('1,5;2,25\n3,5;4,75\n', true), { delimiter: ';', decimalComma: true, columnDecimalComma: [true, true], header: false, lineEnding: 'lf', fieldCount: 2 });
  });
  it('semicolon with integers only keeps the decimal point; tab with decimal comma is found', () => {
    assert.equal(detectFormat('a;b\n1;2\n3;4\n', true).decimalComma, false);
    const tab = detectFormat('a\tb\n1,5\t2\n3,25\t4\n', true);
    assert.equal(tab.delimiter, '\t');
    assert.equal(tab.decimalComma, true);
  });
  it('a first row of numbers is data; a first row of text over numbers is a header', () => {
    assert.equal(detectFormat('1,2\n3,4\n', true).header, false);
    assert.equal(detectFormat('x,y\n3,4\n', true).header, true);
    assert.equal(detectFormat('NA,2\n3,4\n', true).header, false);
  });
  it('a text column does not make a header by itself', () => {
    assert.equal(detectFormat('a1,1,2\nb2,3,4\nc3,5,6\n', true).header, false);
    assert.equal(detectFormat('id,x,y\nb2,3,4\nc3,5,6\n', true).header, true);
  });
  it('a single record of text is a header (the reader then reports "no data rows")', () => {
    assert.equal(detectFormat('time [s];flow [L/min]\n', true).header, true);
  });
  it('quoted fields with delimiters and line breaks do not confuse the field count', () => {
    const d = detectFormat(fixture('quoted-multiline.csv'), true);
    assert.equal(d.delimiter, ',');
    assert.equal(d.fieldCount, 5);
    assert.equal(d.header, true);
  });
  it('a cut-off sample ignores its partial last record', () => {
    const d = detectFormat('x;y\n1;2\n3;4\n5', false);
    assert.equal(d.fieldCount, 2);
    assert.equal(d.delimiter, ';');
  });
  it('the decimal convention is found per column: points in x, commas in y (examples/fan-temperature-rise.csv)', () => {
    const d = detectFormat(readFileSync(join(__dirname, '..', '..', '..', 'examples', 'fan-temperature-rise.csv'), 'utf8'), true);
    assert.equal(d.delimiter, ';');
    assert.deepEqual(d.columnDecimalComma, [false, true]);
    assert.equal(d.header, true);
  });
  it('a column of integers (or a tie) takes the sample majority; a column with more points keeps the point', () => {
    const d = detectFormat('a;b;c\n1;2,5;3.5\n4;5,5;6.5\n7;8,5;9\n', true);
    assert.deepEqual(d.columnDecimalComma, [true, true, false]);
    assert.equal(d.decimalComma, true);
    assert.deepEqual(detectFormat('a;b\n1;2.5\n3;4.5\n', true).columnDecimalComma, [false, false]);
  });
  it('a comma delimiter excludes the decimal comma in every column', () => {
    assert.deepEqual(detectFormat('a,b\n"1,5","2,5"\n"3,5","4,5"\n', true).columnDecimalComma, [false, false]);
  });
  it('the sample reaches past 64 K to the third line break when the first lines are long, up to 2 M', () => {
    const header = `${'h'.repeat(DETECT_CHARS)},y\n`;
    const text = `${header}1,2\n3,4\n${'5,6\n'.repeat(10)}`;
    assert.equal(sampleLength(text), header.length + 8);
    assert.equal(sampleLength('x'.repeat(MAX_DETECT_CHARS + 10)), MAX_DETECT_CHARS);
    assert.equal(sampleLength('x,y\r\n1,2\r\n'), 10);
    const d = detectFormat(text.slice(0, sampleLength(text)), false);
    assert.deepEqual([d.delimiter, d.fieldCount, d.header], [',', 2, true]);
  });
  it('a first line longer than the largest sample is refused with what is wrong', () => {
    assert.throws(
      () => detectFormat('x'.repeat(MAX_DETECT_CHARS), false, { file: 'long.csv' }),
      (e: unknown) => e instanceof InputError && /^the first line has more than 2,097,152 characters without a line break/.test(e.message) && e.place.line === 1,
    );
  });
  it('options win over detection', () => {
    const d = detectFormat('1,5;2,25\n3,5;4,75\n', true, { delimiter: ',', header: true, decimalComma: false });
    assert.deepEqual(d, { delimiter: ',', decimalComma: false, columnDecimalComma: [false, false, false], header: true, lineEnding: 'lf', fieldCount: 3 });
  });
  it('a single column is an InputError at line 1 naming the file', () => {
    assert.throws(
      () => detectFormat('x\n1\n2\n', true, { file: 'one.csv' }),
      (e: unknown) => e instanceof InputError && /single column/.test(e.message) && e.place.line === 1 && e.place.file === 'one.csv',
    );
  });
});

describe('capFields (detection splits no more fields than a readable table has, plus one)', () => {
  const row = (count: number, name = 'c'): string => Array.from({ length: count }, (_, k) => `${name}${k}`).join(',');

  it('leaves a sample whose records are all at most MAX_COLUMNS + 1 fields wide as it is (the same string)', () => {
    const sample = `${row(MAX_COLUMNS + 1)}\n${row(3)}\r\n${row(MAX_COLUMNS)}\n`;
    assert.equal(capFields(sample, ','), sample);
  });

  it('cuts each wider record after its field MAX_COLUMNS + 1 and keeps the line breaks and the records after it', () => {
    const wide = row(MAX_COLUMNS + 500);
    const got = capFields(`${wide}\r\n1,2\n${wide}`, ',');
    assert.equal(got, `${row(MAX_COLUMNS + 1)}\r\n1,2\n${row(MAX_COLUMNS + 1)}`);
    // Detection then sees a first record of MAX_COLUMNS + 1 fields, so the reader refuses the table as too wide.
    assert.equal(detectFormat(`${wide}\n${wide}\n`, true).fieldCount, MAX_COLUMNS + 1);
  });

  it('does not count delimiters inside double quotes, nor other delimiters', () => {
    const quoted = `"${','.repeat(MAX_COLUMNS + 5)}",b\n`;
    assert.equal(capFields(quoted, ','), quoted);
    const semicolons = `${row(MAX_COLUMNS + 5).replace(/,/g, ';')}\n`;
    assert.equal(capFields(semicolons, ','), semicolons);
    assert.equal(capFields(semicolons, ';').split(';').length, MAX_COLUMNS + 1);
  });
});
