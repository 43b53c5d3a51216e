/**
 * Writing a fit's files: atomically, never over the data file, and never over a file
 * Knotwise did not write unless forced (ownership is read from the neighbouring fit record).
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync } from 'node:fs';
import { basename, join, resolve } from 'node:path';
import type { OutputFile } from '../outputs/deliver';
import { InputError } from '../errors';
import { writtenByKnotwise } from '../outputs/ownership';
import { readIfExists, writeFileAtomic } from './atomicWrite';

/** Kept here for callers of the command line's module; the rule itself is pure (core/outputs/ownership.ts). */
export { recordedFiles } from '../outputs/ownership';

/** SHA-256 (FIPS 180-4) of a text's UTF-8 bytes or of a buffer, as hex. */
export function sha256(text: string | Buffer): string {
  return createHash('sha256').update(text).digest('hex');
}

/**
 * True when `path` does not exist or was written by Knotwise: the fit record itself (its
 * `format` field), or a file the neighbouring record lists by name with the SHA-256 of its
 * current bytes (core/outputs/ownership.ts writtenByKnotwise). A listed file edited by hand is no
 * longer Knotwise's.
 */
export function isOurs(path: string, recordPath: string): boolean {
  if (!existsSync(path)) return true;
  return writtenByKnotwise({ name: basename(path), sha256: sha256(readFileSync(path)), isRecord: resolve(path) === resolve(recordPath) }, readIfExists(recordPath));
}

/**
 * Writes a fit's files (the record last) into `folder`, each atomically. Refuses
 * (InputError) before writing anything when a file would replace the data file, or would
 * replace a file Knotwise did not write unless `force`. Returns the written paths in order.
 */
export function writeOutputs(folder: string, files: readonly OutputFile[], dataFile: string, force: boolean): string[] {
  const record = files.find((f) => f.kind === 'record');
  if (!record) throw new Error('writeOutputs: no fit record among the files');
  const recordPath = join(folder, record.name);
  const data = resolve(dataFile);
  for (const f of files) {
    const p = join(folder, f.name);
    if (resolve(p) === data) throw new InputError(`${p} is the data file; refusing to overwrite it`);
    if (!force && !isOurs(p, recordPath)) {
      throw new InputError(`${p} exists and was not written by Knotwise; refusing to overwrite it (use --force to replace it)`);
    }
  }
  mkdirSync(folder, { recursive: true });
  const order = [...files.filter((f) => f !== record), record];
  return order.map((f) => {
    const p = join(folder, f.name);
    writeFileAtomic(p, f.text);
    return p;
  });
}
