/**
 * Checks of where a run's files would go, made before anything is written, so a bad output
 * path is a clear message (exit 2) instead of a crash: the output folder must be a folder
 * (or not exist yet, with no file in its way), no output name may be taken by a folder, and
 * one folder must not hold the outputs of two data files of the same name.
 */
import { readFileSync, statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { InputError } from '../errors';

/** The file-system entry at a path: a file, a folder, something else, or nothing. */
function entry(path: string): 'file' | 'folder' | 'other' | 'none' {
  try {
    const s = statSync(path);
    return s.isFile() ? 'file' : s.isDirectory() ? 'folder' : 'other';
  } catch {
    return 'none';
  }
}

/**
 * Refuses an output folder that is a file, lies below a file, or is not a folder.
 * Example: checkOutputFolder('table.csv') throws when table.csv is a file.
 */
export function checkOutputFolder(folder: string): void {
  const kind = entry(folder);
  if (kind === 'folder') return;
  if (kind === 'file') throw new InputError(`the output folder ${folder} is a file; give a folder with --out`);
  if (kind === 'other') throw new InputError(`the output folder ${folder} is not a folder`);
  // Walk up to the first existing ancestor: it must be a folder.
  let p = resolve(folder);
  for (;;) {
    const up = dirname(p);
    if (up === p) return;
    p = up;
    const k = entry(p);
    if (k === 'folder') return;
    if (k !== 'none') throw new InputError(`the output folder ${folder} lies below ${p}, which is not a folder`);
  }
}

/**
 * Refuses output names taken by something other than a file (a folder where the table goes),
 * and a fit record in the folder that belongs to another data file of the same name, so two
 * runs never overwrite each other's outputs. `recordName` is the record's file name,
 * `dataFile` the data file of this run.
 */
export function checkOutputNames(folder: string, names: readonly string[], recordName: string, dataFile: string): void {
  for (const name of names) {
    const k = entry(join(folder, name));
    if (k === 'folder' || k === 'other') throw new InputError(`${join(folder, name)} is ${k === 'folder' ? 'a folder' : 'not a file'}; it cannot take the output ${name}`);
  }
  const recordPath = join(folder, recordName);
  if (entry(recordPath) !== 'file') return;
  let recorded: unknown;
  try {
    recorded = JSON.parse(readFileSync(recordPath, 'utf8'));
  } catch {
    return; // Not a record Knotwise can read: the ownership check decides about it.
  }
  const path = (recorded as { data?: { path?: unknown } } | null)?.data?.path;
  if (typeof path !== 'string') return;
  const theirs = resolve(folder, path);
  if (theirs !== resolve(dataFile)) {
    throw new InputError(
      `${recordPath} holds the outputs of another data file of the same name (${path}); writing here would replace them. Give this run its own folder with --out, or remove those outputs first`,
    );
  }
}

/** Characters a terminal would act on: C0 controls but tab and line feed, DEL, C1 controls, and bidirectional overrides. */
// eslint-disable-next-line no-control-regex -- control characters are what this matches
const UNSAFE = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/g;

/** Longest line written to a terminal; longer lines are shortened with a count of what was left out. */
export const MAX_TERMINAL_LINE = 2000;

/**
 * Text safe to print on a terminal: control characters and bidirectional overrides are
 * shown as escapes (\u001b), and lines longer than MAX_TERMINAL_LINE are shortened.
 * Example: terminalText('a\u001b[31mb') -> 'a\\u001b[31mb'.
 */
export function terminalText(text: string): string {
  return text
    .replace(UNSAFE, (c) => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`)
    .split('\n')
    .map((line) => (line.length > MAX_TERMINAL_LINE ? `${line.slice(0, MAX_TERMINAL_LINE)}… (${line.length - MAX_TERMINAL_LINE} more characters)` : line))
    .join('\n');
}
