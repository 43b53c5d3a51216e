/**
 * Bytes to text for the CSV reader: UTF-8, or UTF-16 (little- or big-endian) when the
 * bytes start with its byte order mark. The mark is kept as U+FEFF at the start of the
 * text, where the reader removes it and reports it; everything after decoding goes
 * through the same reader whatever the encoding was.
 */
import { InputError } from '../errors';

/** Encodings Knotwise reads. */
export type TextEncodingName = 'utf-8' | 'utf-16le' | 'utf-16be';

/** A WHATWG TextDecoder (a global of Node and of browsers). */
type Decoder = InstanceType<typeof TextDecoder>;

/** Bytes looked at to recognise a byte order mark (the longest, UTF-32's, has 4). */
const SNIFF_BYTES = 4;

/**
 * The encoding named by the byte order mark at the start of the bytes (The Unicode
 * Standard, section 23.8, table 23-4: EF BB BF UTF-8, FE FF UTF-16BE, FF FE UTF-16LE,
 * 00 00 FE FF UTF-32BE, FF FE 00 00 UTF-32LE), UTF-8 without one. UTF-32 is refused with
 * an InputError naming `file`. Example: sniffEncoding(Uint8Array.of(0xff, 0xfe, 0x78, 0)) -> 'utf-16le'.
 */
export function sniffEncoding(head: Uint8Array, file?: string): TextEncodingName {
  const [b0, b1, b2, b3] = head;
  const utf32 = (b0 === 0xff && b1 === 0xfe && b2 === 0 && b3 === 0) || (b0 === 0 && b1 === 0 && b2 === 0xfe && b3 === 0xff);
  if (utf32) throw new InputError('looks like UTF-32 text (it starts with a UTF-32 byte order mark), which Knotwise does not read; save it as UTF-8', { file });
  if (b0 === 0xff && b1 === 0xfe) return 'utf-16le';
  if (b0 === 0xfe && b1 === 0xff) return 'utf-16be';
  return 'utf-8';
}

/**
 * A streaming decoder: `write` takes the bytes in pieces split anywhere (inside a
 * character too) and returns the text decoded so far; `end` returns the rest. The
 * encoding is chosen from the first 4 bytes (`sniffEncoding`); bytes that are not valid
 * in it become U+FFFD (WHATWG Encoding Standard, "replacement" error mode), which the
 * reader's binary check counts. Cost O(bytes).
 * Example: const d = new ByteDecoder(); d.write(Uint8Array.of(0xfe, 0xff, 0, 0x78)) + d.end() -> '\uFEFFx'.
 */
export class ByteDecoder {
  private decoder: Decoder | undefined;
  private head: Uint8Array[] = [];
  private headLength = 0;
  /** The encoding, once the first bytes have been seen. */
  encoding: TextEncodingName | undefined;

  constructor(private readonly file?: string) {}

  /** Chooses the decoder from the bytes held so far and returns them as one array. */
  private open(): { decoder: Decoder; head: Uint8Array } {
    const head = new Uint8Array(this.headLength);
    let at = 0;
    for (const piece of this.head) {
      head.set(piece, at);
      at += piece.length;
    }
    this.head = [];
    this.encoding = sniffEncoding(head, this.file);
    this.decoder = new TextDecoder(this.encoding, { ignoreBOM: true });
    return { decoder: this.decoder, head };
  }

  /** Decodes the next bytes. */
  write(bytes: Uint8Array): string {
    if (this.decoder !== undefined) return this.decoder.decode(bytes, { stream: true });
    this.head.push(bytes);
    this.headLength += bytes.length;
    if (this.headLength < SNIFF_BYTES) return '';
    const { decoder, head } = this.open();
    return decoder.decode(head, { stream: true });
  }

  /** Ends the bytes: the text of a short input, or U+FFFD for an incomplete character at the end. */
  end(): string {
    if (this.decoder !== undefined) return this.decoder.decode();
    const { decoder, head } = this.open();
    return decoder.decode(head);
  }
}

/**
 * All the bytes as text, as the streaming reader decodes them (e.g. for a file opened in
 * the editor). Example: decodeCsvBytes(Uint8Array.of(0xff, 0xfe, 0x78, 0)) -> '\uFEFFx'.
 */
export function decodeCsvBytes(bytes: Uint8Array, file?: string): string {
  const d = new ByteDecoder(file);
  return d.write(bytes) + d.end();
}
