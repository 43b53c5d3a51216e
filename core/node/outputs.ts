/**
 * Writing a fit's files: as one set that a kill of the process cannot leave half written
 * (the protocol of core/outputs/commit.ts, carried out with Node's file system), never over
 * the data file, and never over a file Knotwise did not write unless forced (ownership is
 * read from the neighbouring fit record).
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import type { OutputFile } from '../outputs/deliver';
import { InputError } from '../errors';
import { writtenByKnotwise } from '../outputs/ownership';
import { runSteps, writeSet } from '../outputs/commit';
import { folderStep, nodeWriter, readIfExists } from './atomicWrite';

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
 * Writes a fit's files into `folder` as one set (core/outputs/commit.ts): first an
 * interrupted earlier write of the folder is completed and left-over temporary files are
 * removed; then every file is written under a temporary name, a commit marker lists them,
 * they are renamed into place with the record last, and the marker is removed. Refuses
 * (InputError) before writing anything of this set when a file would replace the data file,
 * would replace a file Knotwise did not write unless `force`, or another Knotwise process is
 * writing the same record. Returns the written paths, the record last.
 */
export function writeOutputs(folder: string, files: readonly OutputFile[], dataFile: string, force: boolean): string[] {
  const record = files.find((f) => f.kind === 'record');
  if (!record) throw new Error('writeOutputs: no fit record among the files');
  const data = resolve(dataFile);
  for (const f of files) {
    const p = join(folder, f.name);
    if (resolve(p) === data) throw new InputError(`${p} is the data file; refusing to overwrite it`);
  }
  const refuse = (foreign: readonly string[]): boolean => {
    if (force) return true;
    throw new InputError(`${join(folder, foreign[0] as string)} exists and was not written by Knotwise; refusing to overwrite it (use --force to replace it)`);
  };
  // Recovery never replaces the data file, even when a commit marker names it.
  const protect = resolve(folder) === dirname(data) ? [basename(data)] : [];
  runSteps(writeSet(nodeWriter(folder), files, record.name, protect), folderStep(folder, refuse));
  return [...files.filter((f) => f !== record), record].map((f) => join(folder, f.name));
}
