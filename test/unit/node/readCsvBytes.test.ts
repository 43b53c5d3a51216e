/**
 * readCsvBytes (core/node/readCsv.ts), the ingest of standard input: the same table, size
 * and SHA-256 as readCsvFile gives for a file holding the same bytes, also when a two-byte
 * UTF-8 character straddles the 64 KB chunk boundary, and the same refusals. Data: the CSV
 * fixtures of test/fixtures/csv (R's datasets, written by test/fixtures/csv/make-fixtures.R)
 * and a table built here whose only purpose is where its bytes fall. The SHA-256 reference is
 * node:crypto over the whole buffer in one call.
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { readCsvBytes, readCsvFile } from '../../../core/node/readCsv';

const FIXTURES = join(__dirname, '..', '..', 'fixtures', 'csv');

describe('readCsvBytes', () => {
  let dir = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-readbytes-'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  for (const name of ['trees.csv', 'cars-bom-crlf.csv', 'airquality.csv', 'quoted-multiline.csv']) {
    it(`${name}: the same table, size and SHA-256 as readCsvFile`, async () => {
      const path = join(FIXTURES, name);
      const bytes = readFileSync(path);
      const fromBytes = readCsvBytes(bytes, path);
      assert.deepEqual(fromBytes, await readCsvFile(path));
      assert.equal(fromBytes.sha256, createHash('sha256').update(bytes).digest('hex'));
      assert.equal(fromBytes.bytes, bytes.length);
    });
  }

  it('a character split by the 64 KB chunk boundary is decoded whole, as from a file', async () => {
    const header = 'temp \u00b0C,value\n';
    const rows: string[] = [];
    let size = Buffer.byteLength(header);
    // Rows until the next row's "°" (2 bytes in UTF-8) starts at byte 65535.
    while (size < 65_000) {
      const row = `${rows.length},${rows.length % 7}\n`;
      rows.push(row);
      size += Buffer.byteLength(row);
    }
    const pad = 65_535 - size;
    assert.ok(pad >= 0);
    const text = header + rows.join('') + `${'1'.repeat(pad)}\u00b0,1\n1,2\n`;
    const bytes = Buffer.from(text, 'utf8');
    assert.equal(bytes[65_535], 0xc2, 'the first byte of "°" is the last byte of the first chunk');
    const path = join(dir, 'split.csv');
    writeFileSync(path, bytes);
    assert.deepEqual(readCsvBytes(bytes, path), await readCsvFile(path));
    // A sub-array of a larger buffer reads only its own bytes.
    const inner = Buffer.concat([Buffer.from('junk'), bytes, Buffer.from('junk')]).subarray(4, 4 + bytes.length);
    assert.deepEqual(readCsvBytes(inner, path), await readCsvFile(path));
  });

  it('UTF-16 with a byte order mark (LE and BE) reads as from a file, also with a surrogate pair split by the 64 KB chunk boundary', async () => {
    // After the 2-byte mark, code unit k sits at bytes 2 + 2k: U+1F600 (a surrogate pair,
    // The Unicode Standard, section 3.9) as code units 32766 and 32767 spans bytes 65534 to 65537.
    let head = 'x,y,z\n';
    for (let i = 0; head.length < 32766 - 40; i++) head += `${i},${i % 7},${i}\n`;
    head += `0,0,${'7'.repeat(32766 - head.length - 5)}\n`;
    const text = `${head}\u{1F600}x,1,2\n1,2,3\n3,4,5\n`;
    assert.equal(text.indexOf('\u{1F600}'), 32766);
    for (const [mark, body] of [
      [[0xff, 0xfe], Buffer.from(text, 'utf16le')],
      [[0xfe, 0xff], Buffer.from(text, 'utf16le').swap16()],
    ] as const) {
      const bytes = Buffer.concat([Buffer.from(mark), body]);
      const path = join(dir, 'utf16.csv');
      writeFileSync(path, bytes);
      const fromBytes = readCsvBytes(bytes, path);
      assert.deepEqual(fromBytes, await readCsvFile(path));
      assert.equal(fromBytes.format.bom, true);
      assert.deepEqual(fromBytes.columns[0]?.problems.reasons, ['"\u{1F600}x" is not a number'], 'the pair is decoded whole');
      assert.equal(fromBytes.values[1]?.[fromBytes.rowCount - 1], 4);
    }
  });

  it('refuses empty and binary input with the name it is given', () => {
    assert.throws(
      () => readCsvBytes(new Uint8Array(0), 'standard input'),
      (e: unknown) => e instanceof InputError && e.message === 'the file is empty' && e.place.file === 'standard input',
    );
    const binary = Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, ...Array.from({ length: 256 }, (_, i) => i)]);
    assert.throws(
      () => readCsvBytes(binary, 'standard input'),
      (e: unknown) => e instanceof InputError && /binary file, not CSV text/.test(e.message),
    );
  });
});
