/**
 * Byte order marks and decoding (core/ingest/encoding.ts). The marks are those of The
 * Unicode Standard, section 23.8, table 23-4 (EF BB BF UTF-8, FE FF UTF-16BE, FF FE
 * UTF-16LE, 00 00 FE FF UTF-32BE, FF FE 00 00 UTF-32LE); the reference encoder is Node's
 * Buffer ('utf16le', swapped with swap16 for big-endian).
 */
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { ByteDecoder, decodeCsvBytes, sniffEncoding } from '../../../core/ingest/encoding';
import { InputError } from '../../../core/errors';

const text = 'x [°C];y\n1,5;2\n\u{1F600};Δ\n';
const utf16le = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, 'utf16le')]);
const utf16be = Buffer.concat([Buffer.from([0xfe, 0xff]), Buffer.from(text, 'utf16le').swap16()]);
const utf8bom = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(text, 'utf8')]);

describe('sniffEncoding', () => {
  it('tells the byte order marks apart; no mark is UTF-8', () => {
    assert.equal(sniffEncoding(utf16le), 'utf-16le');
    assert.equal(sniffEncoding(utf16be), 'utf-16be');
    assert.equal(sniffEncoding(utf8bom), 'utf-8');
    assert.equal(sniffEncoding(Buffer.from('x,y')), 'utf-8');
    assert.equal(sniffEncoding(new Uint8Array(0)), 'utf-8');
  });
  it('refuses UTF-32 with the fix', () => {
    for (const head of [
      [0xff, 0xfe, 0, 0],
      [0, 0, 0xfe, 0xff],
    ]) {
      assert.throws(
        () => sniffEncoding(Uint8Array.from(head), 'u.csv'),
        (e: unknown) => e instanceof InputError && /^looks like UTF-32 text .*save it as UTF-8$/.test(e.message) && e.place.file === 'u.csv',
      );
    }
  });
});

describe('ByteDecoder', () => {
  it('decodes UTF-16LE, UTF-16BE and UTF-8 with the mark kept as U+FEFF', () => {
    for (const bytes of [utf16le, utf16be, utf8bom]) assert.equal(decodeCsvBytes(bytes), `\uFEFF${text}`);
    assert.equal(decodeCsvBytes(Buffer.from(text)), text);
  });
  it('gives the same text for any split of the bytes, inside a character or the mark too (property)', () => {
    fc.assert(
      fc.property(fc.constantFrom(utf16le, utf16be, utf8bom), fc.array(fc.integer({ min: 1, max: 7 }), { minLength: 1, maxLength: 8 }), (bytes, sizes) => {
        const d = new ByteDecoder();
        let out = '';
        for (let at = 0, k = 0; at < bytes.length; k++) {
          const size = sizes[k % sizes.length] as number;
          out += d.write(bytes.subarray(at, at + size));
          at += size;
        }
        out += d.end();
        assert.equal(out, `\uFEFF${text}`);
      }),
      { numRuns: 300 },
    );
  });
  it('inputs shorter than a mark are decoded as UTF-8 at the end', () => {
    const d = new ByteDecoder();
    assert.equal(d.write(Buffer.from('ab')), '');
    assert.equal(d.end(), 'ab');
    assert.equal(d.encoding, 'utf-8');
  });
  it('an odd byte at the end of UTF-16 becomes U+FFFD (WHATWG Encoding Standard, replacement)', () => {
    assert.equal(decodeCsvBytes(Buffer.concat([utf16le, Buffer.from([0x41])])), `\uFEFF${text}\uFFFD`);
  });
});
