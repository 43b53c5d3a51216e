/**
 * Reads a CSV for Knotwise: the open document's text (unsaved edits included) when the
 * file is open in an editor with unsaved edits, otherwise the file's bytes through
 * workspace.fs. Every read keeps the SHA-256 of the bytes it read, so a session knows
 * exactly which bytes it analysed.
 */
import { decodeCsvBytes } from '../core/ingest/encoding';
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import { parseCsvText } from '../core/ingest/reader';
import { InputError } from '../core/errors';
import { estimatedMiB } from '../core/stream/budget';
import type { ParsedTable } from '../core/ingest/types';

/**
 * Files this large or larger are not handed to extensions by the editor (VS Code keeps
 * their text to itself): Knotwise reads and follows them on disk only.
 */
export const LARGE_FILE_BYTES = 50 * 1024 * 1024;

/** The current bytes of a data file as text, and where they came from. */
export interface DataText {
  readonly text: string;
  /** SHA-256 of the bytes read (the file's bytes, or the UTF-8 of unsaved text). */
  readonly sha256: string;
  /** True when the text has edits not saved to disk. */
  readonly unsaved: boolean;
  /** Number of bytes read. */
  readonly size: number;
}

/** A parsed CSV and where it came from. */
export interface CsvSource extends DataText {
  readonly uri: vscode.Uri;
  readonly fileName: string;
  readonly table: ParsedTable;
}

/** Throws InputError when the whole read of `text` (`bytes` long) needs more than `budget` MiB by the estimate of core/stream/budget.ts. */
function refuseAboveBudget(text: string, bytes: number, budget: number, file: string): void {
  let lines = 0;
  for (let at = text.indexOf('\n'); at >= 0; at = text.indexOf('\n', at + 1)) lines++;
  const first = text.slice(0, Math.max(0, text.indexOf('\n')));
  const fields = 1 + Math.max(...[',', ';', '\t'].map((d) => first.split(d).length - 1));
  const need = estimatedMiB(bytes, bytes, lines, fields);
  if (need <= budget) return;
  throw new InputError(
    `this file needs about ${Math.round(need).toLocaleString('en-US')} MiB held whole, above knotwise.memoryBudget (${budget.toLocaleString('en-US')} MiB), and the editor holds its data whole: run knotwise fit on it in a terminal, which streams such a file from disk in passes, or raise knotwise.memoryBudget`,
    { file },
  );
}

/** Base name of a URI's path. */
export function baseName(uri: vscode.Uri): string {
  const p = uri.path;
  return p.slice(p.lastIndexOf('/') + 1);
}

/** True for the file types Knotwise offers to read. */
export function isTableFile(uri: vscode.Uri): boolean {
  return /\.(csv|tsv)$/i.test(uri.path);
}

/** SHA-256 (FIPS 180-4) of bytes, as hex. */
export function sha256(bytes: Uint8Array): string {
  return createHash('sha256').update(bytes).digest('hex');
}

/** The open document of `uri`, if the editor has handed it to extensions. */
export function openDocument(uri: vscode.Uri): vscode.TextDocument | undefined {
  const key = uri.toString();
  return vscode.workspace.textDocuments.find((d) => d.uri.toString() === key);
}

/** True for workspace.fs's error of a missing file or folder. */
export function isNotFound(err: unknown): boolean {
  return err instanceof vscode.FileSystemError && err.code === 'FileNotFound';
}

/**
 * The data as it is now: an open document's unsaved text, else the bytes on disk (throws
 * FileSystemError when missing). With `known` (data read before), bytes on disk with its
 * SHA-256 are not decoded again: the same bytes give the same text, and a large file's
 * second text would cost the time to decode it and as much memory again.
 */
export async function readData(uri: vscode.Uri, known?: Pick<DataText, 'text' | 'sha256'>): Promise<DataText> {
  const doc = openDocument(uri);
  if (doc?.isDirty) {
    const text = doc.getText();
    const bytes = new TextEncoder().encode(text);
    return { text, sha256: sha256(bytes), unsaved: true, size: bytes.length };
  }
  const bytes = await vscode.workspace.fs.readFile(uri);
  const hash = sha256(bytes);
  if (known && known.sha256 === hash) return { text: known.text, sha256: hash, unsaved: false, size: bytes.length };
  // Decoded as the command line decodes files (UTF-8, or UTF-16 by its byte order mark); a
  // UTF-8 mark stays in the text, the reader removes it itself.
  const text = decodeCsvBytes(bytes, uri.path.split('/').pop());
  return { text, sha256: hash, unsaved: false, size: bytes.length };
}

/** SHA-256 of the file's bytes on disk, or undefined when there is no file. */
export async function diskSha256(uri: vscode.Uri): Promise<string | undefined> {
  try {
    return sha256(await vscode.workspace.fs.readFile(uri));
  } catch (err) {
    if (isNotFound(err)) return undefined;
    throw err;
  }
}

/**
 * Reads and parses a CSV (throws InputError for unusable input). With `memoryBudget` (MiB,
 * knotwise.memoryBudget), a text whose whole read would need more (core/stream/budget.ts) is
 * refused before it is parsed, naming the command line, which streams such a file from disk.
 */
export async function readCsv(uri: vscode.Uri, memoryBudget?: number): Promise<CsvSource> {
  const data = await readData(uri);
  const fileName = baseName(uri);
  if (memoryBudget !== undefined) refuseAboveBudget(data.text, data.size, memoryBudget, fileName);
  const table = parseCsvText(data.text, { file: fileName });
  return { ...data, uri, fileName, table };
}
