/**
 * Which files Knotwise wrote, read from the neighbouring fit record (and from a commit
 * marker that an interrupted write left, core/outputs/commit.ts): pure, so the command line
 * (core/node/outputs.ts, Node's file system) and the editor (extension/save.ts,
 * workspace.fs) apply the same rule to the bytes they read.
 */
import { RECORD_FORMAT } from './record';
import { GROUP_RECORD_FORMAT } from '../groups/spec';
import { SURFACE_RECORD_FORMAT } from '../surface/format';

/** The files a fit record lists with their SHA-256: the table and every other output, by file name. */
export function recordedFiles(record: unknown): Map<string, string> {
  const out = new Map<string, string>();
  const rec = record as { table?: { file?: unknown; sha256?: unknown }; outputs?: unknown } | null;
  if (typeof rec?.table?.file === 'string' && typeof rec.table.sha256 === 'string') out.set(rec.table.file, rec.table.sha256);
  if (Array.isArray(rec?.outputs)) {
    for (const o of rec.outputs as { file?: unknown; sha256?: unknown }[]) if (typeof o?.file === 'string' && typeof o.sha256 === 'string') out.set(o.file, o.sha256);
  }
  return out;
}

/** What is known about one file that is about to be written. */
export interface TargetFile {
  /** File name without folder. */
  readonly name: string;
  /** SHA-256 (hex) of its current bytes; undefined when it does not exist. */
  readonly sha256: string | undefined;
  /** True when the target is the fit record itself. */
  readonly isRecord: boolean;
}

/**
 * True when `target` does not exist or Knotwise wrote it: the fit record itself counts as
 * Knotwise's when it parses with the record `format`; any other file when that record
 * (`recordText`, the current text of the record beside it, undefined when there is none)
 * lists its name with the SHA-256 of its current bytes. A listed file edited by hand is
 * therefore no longer Knotwise's. `vouched` maps file names to the SHA-256 of bytes a commit
 * marker says Knotwise wrote (an interrupted write that could not be completed): such a file
 * is Knotwise's too. O(record size).
 * Example: writtenByKnotwise({ name: 'a.curve.csv', sha256: 'ab12...', isRecord: false }, recordText).
 */
export function writtenByKnotwise(target: TargetFile, recordText: string | undefined, vouched?: ReadonlyMap<string, string>): boolean {
  if (target.sha256 === undefined) return true;
  if (vouched?.get(target.name) === target.sha256) return true;
  if (recordText === undefined) return false;
  let rec: unknown;
  try {
    rec = JSON.parse(recordText);
  } catch {
    return false;
  }
  const format = (rec as { format?: unknown } | null)?.format;
  if (format !== RECORD_FORMAT && format !== GROUP_RECORD_FORMAT && format !== SURFACE_RECORD_FORMAT) return false;
  return target.isRecord || recordedFiles(rec).get(target.name) === target.sha256;
}
