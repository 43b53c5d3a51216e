/**
 * One pass over a CSV file for data larger than memory (docs/design.md, "Streaming"): the
 * bytes are decoded and tokenized by the same reader as a whole read (core/ingest), and the
 * rows are handed on chunk by chunk and forgotten. Every pass hashes the bytes again and
 * compares the file's size, modification time and SHA-256 with the first pass's, so a file
 * that changes between passes stops the run with a message.
 */
import { createHash } from 'node:crypto';
import { closeSync, createReadStream, openSync, readSync, statSync } from 'node:fs';
import { InputError } from '../errors';
import { ByteDecoder } from '../ingest/encoding';
import { createCsvReader } from '../ingest/reader';
import type { ParsedTable } from '../ingest/types';

/** Bytes per read: larger than a whole read's 64 KB, for fewer calls (the reader takes chunks split anywhere). */
const PASS_CHUNK_BYTES = 1 << 20;

/** What identifies the file's bytes: size, modification time and SHA-256 (hex). */
export interface FileIdentity {
  readonly size: number;
  readonly mtimeMs: number;
  readonly sha256: string;
}

/** The InputError of a file that changed between passes. */
function changed(file: string, pass: number, what: string): InputError {
  return new InputError(
    `the file changed while it was read in passes (pass ${pass}: ${what} differs from the first pass); the run stopped with nothing written: run it again once the file is no longer being written`,
    { file },
  );
}

function stat(file: string): { size: number; mtimeMs: number } {
  const s = statSync(file);
  return { size: s.size, mtimeMs: s.mtimeMs };
}

/**
 * Reads `file` once, handing every part of its rows to `onRows` (a table of that part's
 * rows and problems, core/ingest/types.ts CsvChunkReader; its columns are only valid during
 * the call). `first` is the identity the first pass found (undefined in the first pass);
 * `pass` numbers the pass for messages. Returns the file's identity. Throws InputError for
 * read failures, unusable content, and a file whose size, modification time or SHA-256
 * differs from the first pass. Cost O(file size); memory one chunk of rows.
 */
export async function filePass(file: string, pass: number, first: FileIdentity | undefined, onRows: (part: ParsedTable) => void): Promise<FileIdentity> {
  const before = stat(file);
  if (first && (before.size !== first.size || before.mtimeMs !== first.mtimeMs)) throw changed(file, pass, before.size !== first.size ? 'its size' : 'its modification time');
  const reader = createCsvReader({ file });
  const hash = createHash('sha256');
  const decoder = new ByteDecoder(file);
  const hand = (part: ParsedTable | undefined): void => {
    if (part && (part.rowCount > 0 || part.problems.length > 0)) onRows(part);
  };
  for await (const chunk of createReadStream(file, { highWaterMark: PASS_CHUNK_BYTES })) {
    const buf = chunk as Buffer;
    hash.update(buf);
    reader.push(decoder.write(buf));
    hand(reader.drain());
  }
  reader.push(decoder.end());
  hand(reader.finishRows());
  const after = stat(file);
  const sha256 = hash.digest('hex');
  const identity = { ...after, sha256 };
  if (after.size !== before.size || after.mtimeMs !== before.mtimeMs) throw changed(file, pass, after.size !== before.size ? 'its size' : 'its modification time');
  if (first && sha256 !== first.sha256) throw changed(file, pass, 'its SHA-256');
  return identity;
}

/**
 * The first bytes of `file` (up to `bytes`), the file's size, and the line breaks and the
 * most fields of a line in them: what the memory budget's estimate reads (core/stream/budget.ts).
 */
export function sampleFile(file: string, bytes = 1 << 20): { size: number; sampleBytes: number; lines: number; fields: number } {
  const st = statSync(file);
  // Opening a named pipe waits for a writer: only a regular file is examined (the whole read refuses the others).
  if (!st.isFile()) throw new Error(`${file} is not a regular file`);
  const size = st.size;
  const fd = openSync(file, 'r');
  try {
    const buf = Buffer.alloc(Math.min(bytes, size));
    const got = readSync(fd, buf, 0, buf.length, 0);
    // Bytes, not text: a line break and the three delimiters are single bytes in UTF-8 (and the estimate needs no more).
    let lines = 0;
    let fields = 1;
    let comma = 0;
    let semicolon = 0;
    let tab = 0;
    for (let i = 0; i < got; i++) {
      const c = buf[i] as number;
      if (c === 10) {
        lines++;
        fields = Math.max(fields, 1 + Math.max(comma, semicolon, tab));
        comma = semicolon = tab = 0;
      } else if (c === 44) comma++;
      else if (c === 59) semicolon++;
      else if (c === 9) tab++;
    }
    return { size, sampleBytes: got, lines, fields };
  } finally {
    closeSync(fd);
  }
}
