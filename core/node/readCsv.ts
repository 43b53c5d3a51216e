/**
 * Reads a CSV file from disk in 64 KB chunks into a ParsedTable, with the SHA-256 of its
 * bytes for the fit record. The only file-system code of the ingest.
 */
import { createHash } from 'node:crypto';
import { createReadStream, statSync, type Stats } from 'node:fs';
import { InputError } from '../errors';
import { ByteDecoder } from '../ingest/encoding';
import { createCsvReader } from '../ingest/reader';
import type { CsvReaderOptions, ParsedTable } from '../ingest/types';

/** Bytes per read. */
const CHUNK_BYTES = 65536;

/** A table read from a file, with the file's SHA-256 (hex) and size in bytes. */
export type FileTable = ParsedTable & { readonly sha256: string; readonly bytes: number };

/** InputError for a failed read, in words for the usual system error codes. */
function readError(err: unknown, file: string): InputError {
  const code = (err as { code?: unknown } | null)?.code;
  const what =
    code === 'ENOENT'
      ? 'file not found'
      : code === 'EACCES' || code === 'EPERM'
        ? 'no permission to read the file'
        : code === 'EISDIR'
          ? 'this is a folder, not a file'
          : `cannot read the file: ${err instanceof Error ? err.message : String(err)}`;
  return new InputError(what, { file });
}

/** What a path that is not a regular file is, in words, with what to do instead. */
function notRegular(stats: Stats): string {
  if (stats.isDirectory()) return 'this is a folder, not a file';
  if (stats.isFIFO()) return 'this is a named pipe (FIFO), not a regular file; Knotwise reads only regular files, or standard input: give - as the data file and redirect the pipe to it';
  if (stats.isCharacterDevice() || stats.isBlockDevice()) return 'this is a device, not a regular file; Knotwise reads only regular files, or standard input (-)';
  if (stats.isSocket()) return 'this is a socket, not a regular file; Knotwise reads only regular files, or standard input (-)';
  return 'this is not a regular file; Knotwise reads only regular files, or standard input (-)';
}

/**
 * Refuses a path that is not a regular file (after following symbolic links) before it is
 * opened: opening a named pipe for reading waits for a writer, and a device may never
 * end. Throws InputError naming the path.
 */
function requireRegularFile(path: string): Stats {
  let stats: Stats;
  try {
    stats = statSync(path);
  } catch (err) {
    throw readError(err, path);
  }
  if (!stats.isFile()) throw new InputError(notRegular(stats), { file: path });
  return stats;
}

/**
 * Streams the file through `createCsvReader`: decoding by ByteDecoder (UTF-8, or UTF-16
 * after its byte order mark; a character split between two chunks is decoded whole) and
 * SHA-256 (FIPS 180-4) of the raw bytes on the fly; the text is never held whole. Only a
 * regular file is opened (checked with stat first). Cost O(file size).
 * Throws InputError with the file for read failures and unusable content.
 * Example: const t = await readCsvFile('data.csv'); t.values[0], t.sha256, t.bytes.
 */
export async function readCsvFile(path: string, options: Omit<CsvReaderOptions, 'file'> = {}): Promise<FileTable> {
  const { size } = requireRegularFile(path);
  // The file's size sizes the columns once (CsvReaderOptions.sizeHint).
  const reader = createCsvReader({ ...options, file: path, sizeHint: size });
  const hash = createHash('sha256');
  const decoder = new ByteDecoder(path);
  let bytes = 0;
  try {
    for await (const chunk of createReadStream(path, { highWaterMark: CHUNK_BYTES })) {
      const buf = chunk as Buffer;
      hash.update(buf);
      bytes += buf.length;
      reader.push(decoder.write(buf));
    }
    reader.push(decoder.end());
  } catch (err) {
    throw err instanceof InputError ? err : readError(err, path);
  }
  const table = reader.finish();
  return { ...table, sha256: hash.digest('hex'), bytes };
}

/**
 * The same ingest for bytes already in memory (standard input): decoded and parsed in the
 * same 64 KB chunks as readCsvFile, so the table and its SHA-256 are those of a file with
 * these bytes. `file` names the source in messages. Throws InputError for unusable content.
 * Example: readCsvBytes(Buffer.from('x,y\n1,2\n'), 'standard input').rowCount === 1.
 */
export function readCsvBytes(data: Uint8Array, file: string, options: Omit<CsvReaderOptions, 'file'> = {}): FileTable {
  const reader = createCsvReader({ ...options, file, sizeHint: data.byteLength });
  const decoder = new ByteDecoder(file);
  const buf = Buffer.from(data.buffer, data.byteOffset, data.byteLength);
  for (let at = 0; at < buf.length; at += CHUNK_BYTES) reader.push(decoder.write(buf.subarray(at, at + CHUNK_BYTES)));
  reader.push(decoder.end());
  const table = reader.finish();
  return { ...table, sha256: createHash('sha256').update(buf).digest('hex'), bytes: buf.length };
}
