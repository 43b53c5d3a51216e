import { createHash } from 'node:crypto';
import { mkdirSync } from 'node:fs';
import { basename, extname, join } from 'node:path';
import { InputError } from '../errors';
import { RECORD_FORMAT } from '../record';
import { readIfExists, writeFileAtomic } from './atomicWrite';

/** File names of the deliverables for a data file: `<stem>.curve.csv` and `<stem>.fit.json`. */
export function outputNames(dataFile: string): { table: string; record: string } {
  const stem = basename(dataFile, extname(dataFile));
  return { table: `${stem}.curve.csv`, record: `${stem}.fit.json` };
}

export function sha256(text: string | Buffer): string {
  return createHash('sha256').update(text).digest('hex');
}

/**
 * True when `path` does not exist or was written by Knotwise: a fit record (its `format`
 * field), or a table whose SHA-256 the neighbouring record lists.
 */
export function isOurs(path: string, recordPath: string): boolean {
  const text = readIfExists(path);
  if (text === undefined) return true;
  const recordText = readIfExists(recordPath);
  if (recordText === undefined) return false;
  try {
    const rec = JSON.parse(recordText) as { format?: string; table?: { sha256?: string } };
    if (rec.format !== RECORD_FORMAT) return false;
    return path === recordPath || rec.table?.sha256 === sha256(text);
  } catch {
    return false;
  }
}

/**
 * Writes the table and the record into `folder` atomically. Refuses (InputError) to replace
 * a file Knotwise did not write unless `force`. Returns the written paths.
 */
export function writeDeliverables(folder: string, dataFile: string, files: { table: string; record: (tableSha: string) => string }, force: boolean): { table: string; record: string } {
  mkdirSync(folder, { recursive: true });
  const names = outputNames(dataFile);
  const tablePath = join(folder, names.table);
  const recordPath = join(folder, names.record);
  for (const p of [tablePath, recordPath]) {
    if (!force && !isOurs(p, recordPath)) {
      throw new InputError(`${p} exists and was not written by Knotwise; refusing to overwrite it (use --force to replace it)`);
    }
  }
  writeFileAtomic(tablePath, files.table);
  writeFileAtomic(recordPath, files.record(sha256(files.table)));
  return { table: tablePath, record: recordPath };
}
