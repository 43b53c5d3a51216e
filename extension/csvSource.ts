/**
 * Reads a CSV for Knotwise: the open document's text (unsaved edits included) when the
 * file is open in an editor, otherwise the file's bytes through workspace.fs.
 */
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import { parseCsvText } from '../core/ingest/reader';
import type { ParsedTable } from '../core/ingest/types';

/** A parsed CSV and where it came from. */
export interface CsvSource {
  readonly uri: vscode.Uri;
  readonly fileName: string;
  readonly text: string;
  /** SHA-256 of the bytes read (the file's bytes, or the UTF-8 of unsaved text). */
  readonly sha256: string;
  /** True when the text has edits not saved to disk. */
  readonly unsaved: boolean;
  readonly table: ParsedTable;
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

/** Reads and parses a CSV (throws InputError for unusable input). */
export async function readCsv(uri: vscode.Uri): Promise<CsvSource> {
  const doc = vscode.workspace.textDocuments.find((d) => d.uri.toString() === uri.toString());
  const fileName = baseName(uri);
  let text: string;
  let bytes: Uint8Array;
  const unsaved = doc?.isDirty === true;
  if (doc && unsaved) {
    text = doc.getText();
    bytes = new TextEncoder().encode(text);
  } else {
    bytes = await vscode.workspace.fs.readFile(uri);
    // Keep a byte order mark in the text: the reader detects and removes it itself.
    text = new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes);
  }
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  const table = parseCsvText(text, { file: fileName });
  return { uri, fileName, text, sha256, unsaved, table };
}
