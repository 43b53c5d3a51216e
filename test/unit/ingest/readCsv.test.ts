/**
 * readCsvFile (core/node/readCsv.ts). SHA-256 reference: node:crypto over the whole file
 * (FIPS 180-4); byte order marks: The Unicode Standard, section 23.8; file kinds: POSIX
 * stat (S_ISREG, S_ISFIFO, S_ISCHR); the regular-file rule is the house rule of
 * docs/design.md, "Input".
 */
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readCsvFile } from '../../../core/node/readCsv';
import { parseCsvText } from '../../../core/ingest/reader';
import { InputError } from '../../../core/errors';

const FIXTURES = join(__dirname, '..', '..', 'fixtures', 'csv');
const fs = (name: string): string => readFileSync(join(FIXTURES, name), 'utf8');

/** SHA-256 of the whole file in one call: the reference for the streamed hash. */
function sha256Whole(path: string): string {
  return createHash('sha256').update(readFileSync(path)).digest('hex');
}

describe('readCsvFile', () => {
  let dir = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-readcsv-'));
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  for (const name of ['trees.csv', 'cars-bom-crlf.csv', 'airquality.csv', 'quoted-multiline.csv']) {
    it(`${name}: same table as parseCsvText of the file, with its size and SHA-256`, async () => {
      const path = join(FIXTURES, name);
      const { sha256, bytes, ...table } = await readCsvFile(path);
      assert.deepEqual(table, parseCsvText(readFileSync(path, 'utf8')));
      assert.equal(bytes, statSync(path).size);
      assert.equal(sha256, sha256Whole(path));
    });
  }

  it('the streamed SHA-256 of a multi-chunk file equals one-shot hashing; lines run on', async () => {
    const path = join(dir, 'many.csv');
    const rows = Array.from({ length: 40000 }, (_, i) => `${i},${i % 7}`);
    writeFileSync(path, `x,y\n${rows.join('\n')}\n`);
    const t = await readCsvFile(path);
    assert.ok(t.bytes > 3 * 65536);
    assert.equal(t.sha256, sha256Whole(path));
    assert.equal(t.rowCount, 40000);
    assert.equal(t.lines[39999], 40001);
  });

  it('decodes multi-byte UTF-8 characters split between two 64 KB chunks', async () => {
    const path = join(dir, 'utf8.csv');
    let head = 'x [°C],y [Ω],note\n';
    // The rows are ASCII: one byte per character.
    for (let i = 0, size = Buffer.byteLength(head); size < 65536 - 40; i++) {
      const row = `${i},${2 * i},${i % 10}\n`;
      head += row;
      size += row.length;
    }
    // Pad until byte 65536 (the first byte of the second chunk) falls inside a character of €°€.
    let bytes: Buffer | undefined;
    for (let pad = 1; pad <= 40 && bytes === undefined; pad++) {
      const candidate = Buffer.from(`${head}0,0,${'0'.repeat(pad)}\n1,2,€°€\n3,4,5\n`, 'utf8');
      const b = candidate[65536] as number;
      if (b >= 0x80 && b <= 0xbf) bytes = candidate;
    }
    assert.ok(bytes !== undefined);
    writeFileSync(path, bytes);
    const t = await readCsvFile(path);
    assert.deepEqual(
      t.columns.map((c) => c.unit),
      ['°C', 'Ω', undefined],
    );
    assert.deepEqual(t.columns[2]?.problems.reasons, ['"€°€" is not a number']);
    assert.equal(t.values[1]?.[t.rowCount - 1], 4);
  });

  it('a missing file is an InputError naming the file', async () => {
    const path = join(dir, 'nope.csv');
    await assert.rejects(readCsvFile(path), (e: unknown) => e instanceof InputError && e.message === 'file not found' && e.place.file === path);
  });

  it('a folder is an InputError naming it', async () => {
    await assert.rejects(readCsvFile(dir), (e: unknown) => e instanceof InputError && e.message === 'this is a folder, not a file' && e.place.file === dir);
  });

  it('a named pipe (FIFO) is refused without being opened: with no writer, opening it would wait for ever', async function () {
    if (process.platform === 'win32') this.skip();
    const fifo = join(dir, 'pipe.csv');
    execFileSync('mkfifo', [fifo]);
    // Opening the FIFO for reading blocks until a writer comes; readCsvFile must settle with no writer at all.
    await assert.rejects(readCsvFile(fifo), (e: unknown) => e instanceof InputError && /^this is a named pipe \(FIFO\), not a regular file; .*standard input/.test(e.message) && e.place.file === fifo);
  });

  it('a character device is refused before it is opened (/dev/zero would never end)', async function () {
    if (!existsSync('/dev/zero')) this.skip();
    await assert.rejects(readCsvFile('/dev/zero'), (e: unknown) => e instanceof InputError && /^this is a device, not a regular file/.test(e.message));
  });

  it('UTF-16 files with a byte order mark (LE and BE) give the table of the same text in UTF-8', async () => {
    const text = fs('trees.csv');
    const utf8 = parseCsvText(text);
    const le = join(dir, 'le.csv');
    const be = join(dir, 'be.csv');
    writeFileSync(le, Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')]));
    writeFileSync(be, Buffer.concat([Buffer.from([0xfe, 0xff]), Buffer.from(text, 'utf16le').swap16()]));
    for (const path of [le, be]) {
      const { sha256, bytes, ...table } = await readCsvFile(path);
      assert.deepEqual(table, { ...utf8, format: { ...utf8.format, bom: true } });
      assert.equal(sha256, sha256Whole(path));
      assert.equal(bytes, statSync(path).size);
    }
  });

  it('UTF-16 without a byte order mark is named as UTF-16 with the fix, not called binary', async () => {
    const path = join(dir, 'nobom.csv');
    writeFileSync(path, Buffer.from(fs('trees.csv'), 'utf16le'));
    await assert.rejects(readCsvFile(path), (e: unknown) => e instanceof InputError && /^looks like UTF-16 \(little-endian\) text without a byte order mark.*save it as UTF-8/.test(e.message));
  });

  it('binary.bin and empty.csv are InputErrors naming the file', async () => {
    const bin = join(FIXTURES, 'binary.bin');
    await assert.rejects(readCsvFile(bin), (e: unknown) => e instanceof InputError && /looks like a binary file, not CSV text/.test(e.message) && e.place.file === bin);
    const empty = join(FIXTURES, 'empty.csv');
    await assert.rejects(readCsvFile(empty), (e: unknown) => e instanceof InputError && e.message === 'the file is empty' && e.place.file === empty);
  });
});
