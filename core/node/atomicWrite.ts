/**
 * The file operations of the crash-safe output protocol (core/outputs/commit.ts) on Node's
 * file system: the steps of a protocol run carried out in one folder, and this process as
 * the protocol's writer. Also a single-file atomic write and a tolerant read.
 */
import { createHash, randomBytes } from 'node:crypto';
import { mkdirSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { basename, dirname, join, resolve } from 'node:path';
import { hostTag, tempName, type Step, type Writer } from '../outputs/commit';

/** A short hash of this machine's name: tells markers of this machine from those of another one sharing the folder. */
const HOST = hostTag(hostname(), (t) => createHash('sha256').update(t).digest('hex'));

/** Names being written now by this process, per folder (resolved path). */
const WRITING = new Map<string, Set<string>>();

/** True when process `pid` is alive on this machine (a process of another user counts as alive). */
export function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** This process as the writer of the protocol in `folder`. */
export function nodeWriter(folder: string): Writer {
  const key = resolve(folder);
  let writing = WRITING.get(key);
  if (!writing) {
    writing = new Set();
    WRITING.set(key, writing);
  }
  return {
    pid: process.pid,
    host: HOST,
    writing,
    alive: processAlive,
    now: () => Date.now(),
    random: () => randomBytes(6).toString('hex'),
    sha256: (data) => createHash('sha256').update(data).digest('hex'),
  };
}

/** True for the errors of a name that does not exist (or whose folder does not). */
function missing(e: unknown): boolean {
  const code = (e as NodeJS.ErrnoException).code;
  return code === 'ENOENT' || code === 'ENOTDIR';
}

/**
 * Carries out one protocol step in `folder` with Node's file system; `accept` answers the
 * question about files Knotwise did not write (it may throw to refuse with a message).
 */
export function folderStep(folder: string, accept: (foreign: readonly string[]) => boolean): (step: Step) => unknown {
  const at = (name: string): string => join(folder, name);
  return (step) => {
    switch (step.op) {
      case 'list':
        try {
          return readdirSync(folder);
        } catch (e) {
          if (missing(e)) return [];
          throw e;
        }
      case 'read':
        try {
          return readFileSync(at(step.name));
        } catch (e) {
          if (missing(e)) return undefined;
          throw e;
        }
      case 'modified':
        try {
          return statSync(at(step.name)).mtimeMs;
        } catch (e) {
          if (missing(e)) return undefined;
          throw e;
        }
      case 'makeFolder':
        mkdirSync(folder, { recursive: true });
        return undefined;
      case 'create':
        writeFileSync(at(step.name), step.text, { flag: 'wx' });
        return undefined;
      case 'rename':
        renameSync(at(step.from), at(step.to));
        return undefined;
      case 'remove':
        rmSync(at(step.name), { force: true });
        return undefined;
      case 'accept':
        return accept(step.foreign);
    }
  };
}

/**
 * Writes one file atomically: the text goes to a temporary file of the protocol's pattern
 * in the same folder (core/outputs/commit.ts tempName), which is then renamed over the
 * target, so a reader never sees half a file and a kill leaves the old file intact and a
 * temporary file that the next write of the folder removes.
 */
export function writeFileAtomic(path: string, text: string): void {
  const tmp = join(dirname(path), tempName(basename(path), process.pid, randomBytes(6).toString('hex')));
  try {
    writeFileSync(tmp, text, { flag: 'wx' });
    renameSync(tmp, path);
  } catch (e) {
    rmSync(tmp, { force: true });
    throw e;
  }
}

/** Reads a file as text, or undefined when it does not exist. */
export function readIfExists(path: string): string | undefined {
  try {
    return readFileSync(path, 'utf8');
  } catch (e) {
    if (missing(e)) return undefined;
    throw e;
  }
}
