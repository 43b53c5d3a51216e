/**
 * Crash-safe writing of one fit's set of outputs (docs/design.md, "Outputs"). A kill of the
 * writing process at any moment leaves the old set, the new set, or a state that the next
 * write of the folder repairs by itself (no --force, no question).
 *
 * The protocol, for a set of files whose last is the fit record `<record>`:
 *
 *  1. Recover. Every commit marker `.<record>.knotwise-commit` in the folder whose writer is
 *     gone is completed: each listed temporary file whose bytes have the listed SHA-256 is
 *     renamed over its target (the record last), then the marker is removed. A marker that
 *     cannot be completed (a temporary file missing or damaged, or a target changed since)
 *     is kept as a note of which bytes Knotwise wrote, and its temporary files go. Then
 *     every temporary file of Knotwise's own pattern whose writer is gone is removed.
 *  2. Ownership. A file in the way is Knotwise's when the record in place lists it with the
 *     SHA-256 of its bytes (core/outputs/ownership.ts), or a kept marker lists those bytes
 *     as the ones it wrote. Any other file is replaced only when the caller agrees.
 *  3. Every new file is written in full under a temporary name
 *     `.<name>.knotwise-tmp-<pid>-<random>` in the output folder.
 *  4. The commit marker is written (under a temporary name, then renamed into place): it
 *     lists each file with its temporary name, the SHA-256 of its new bytes and of the bytes
 *     it replaces. From this moment the new set is committed.
 *  5. Each temporary file is renamed over its target, the record last.
 *  6. The marker is removed.
 *
 * A kill before step 4 leaves the old set untouched (plus temporary files that step 1 of the
 * next run removes); from step 4 on, the marker and the temporary files let step 1 finish
 * the new set. A writer is gone when its process id is not alive on this machine (this
 * process counts when it is not writing that file now), or when the file is older than
 * STALE_AGE_MS (a reused process id, another machine).
 *
 * The protocol is written once, as generators that yield folder steps (`Step`); the command
 * line (core/node/outputs.ts, Node's file system) and the editor (extension/save.ts,
 * workspace.fs) carry the steps out with runSteps / runStepsAsync. Pure: no file system of
 * its own. Stopping a generator between two steps is exactly what a kill does, which the
 * tests use to try every moment.
 */
import { InputError } from '../errors';
import { writtenByKnotwise } from './ownership';

/** Files of a writer that is no longer seen alive, or of a reused process id, count as left over after this long. */
export const STALE_AGE_MS = 60 * 60 * 1000;

const TEMP_TAG = '.knotwise-tmp-';
const MARKER_SUFFIX = '.knotwise-commit';
export const COMMIT_FORMAT = 'knotwise-commit';
export const COMMIT_VERSION = 1;

/**
 * The tag of a machine in markers: the first 16 hex digits of the SHA-256 of its host name, so
 * the command line and the editor of one machine agree and the name itself is not written.
 */
export function hostTag(hostName: string, sha256: (text: string) => string): string {
  return sha256(hostName).slice(0, 16);
}

/** A file name with no folder in it: not empty, no slash or backslash, not `.` or `..`, no NUL. */
export function plainName(name: string): boolean {
  return name !== '' && name !== '.' && name !== '..' && !/[/\\\0]/.test(name);
}

/**
 * The temporary name of `name` written by process `pid`: `.<name>.knotwise-tmp-<pid>-<random>`.
 * Example: tempName('cal.curve.csv', 4242, '9f2c01ab33e0') === '.cal.curve.csv.knotwise-tmp-4242-9f2c01ab33e0'.
 */
export function tempName(name: string, pid: number, random: string): string {
  return `.${name}${TEMP_TAG}${pid}-${random}`;
}

/** The target name and writer's process id of a temporary name (tempName), or undefined for any other name. */
export function parseTempName(file: string): { readonly name: string; readonly pid: number } | undefined {
  const m = /^\.(.+)\.knotwise-tmp-(\d{1,10})-([0-9a-f]{6,64})$/.exec(file);
  if (!m) return undefined;
  const pid = Number(m[2]);
  return plainName(m[1] as string) && Number.isSafeInteger(pid) && pid > 0 ? { name: m[1] as string, pid } : undefined;
}

/** The commit marker's name for a set whose record is `record`: `.<record>.knotwise-commit`. */
export function markerName(record: string): string {
  return `.${record}${MARKER_SUFFIX}`;
}

/** The record name of a commit marker's name, or undefined for any other name. */
export function parseMarkerName(file: string): string | undefined {
  if (!file.startsWith('.') || !file.endsWith(MARKER_SUFFIX)) return undefined;
  const record = file.slice(1, -MARKER_SUFFIX.length);
  return plainName(record) ? record : undefined;
}

/**
 * Temporary files of earlier Knotwise versions, which carried no process id:
 * `.<name>.<12 hex>.tmp` (command line) and `.<name>.<12 hex>.knotwise-tmp` (editor). Only
 * names of the set being written are recognised, and only by age (STALE_AGE_MS).
 */
export function legacyTempTarget(file: string): string | undefined {
  const m = /^\.(.+)\.[0-9a-f]{12}\.(?:tmp|knotwise-tmp)$/.exec(file);
  return m && plainName(m[1] as string) ? (m[1] as string) : undefined;
}

/** One file of a commit. */
export interface CommitEntry {
  /** The target's name in the output folder. */
  readonly file: string;
  /** The temporary name the new bytes are written under first. */
  readonly temp: string;
  /** SHA-256 (hex) of the new bytes. */
  readonly sha256: string;
  /** SHA-256 of the bytes the new file replaces; null when there was no file. */
  readonly replaces: string | null;
}

/** The commit marker: written once every new file is complete, removed once all are in place. */
export interface CommitMarker {
  readonly format: typeof COMMIT_FORMAT;
  readonly version: typeof COMMIT_VERSION;
  /** The writing process: its id and a short hash of its machine's name. */
  readonly writer: { readonly pid: number; readonly host: string };
  /** The fit record's name; it is the last entry of `files`. */
  readonly record: string;
  readonly files: readonly CommitEntry[];
}

/** The marker as written: JSON, two-space indent, final newline. */
export function markerText(marker: CommitMarker): string {
  return JSON.stringify(marker, null, 2) + '\n';
}

const SHA = /^[0-9a-f]{64}$/;

/**
 * The marker in `text`, read from the file `file`; undefined unless it is a whole marker of
 * this format whose names are plain, whose temporary names belong to their files, whose last
 * file is the record and whose record gives the file's name (so a marker can never name a
 * file outside its folder or one it does not own).
 */
export function parseMarker(text: string, file: string): CommitMarker | undefined {
  let m: unknown;
  try {
    m = JSON.parse(text);
  } catch {
    return undefined;
  }
  const r = m as Partial<Record<keyof CommitMarker, unknown>> | null;
  if (r === null || typeof r !== 'object' || r.format !== COMMIT_FORMAT || r.version !== COMMIT_VERSION) return undefined;
  const w = r.writer as { pid?: unknown; host?: unknown } | null | undefined;
  if (typeof w !== 'object' || w === null || typeof w.pid !== 'number' || !Number.isSafeInteger(w.pid) || w.pid <= 0 || typeof w.host !== 'string') return undefined;
  if (typeof r.record !== 'string' || !plainName(r.record) || markerName(r.record) !== file) return undefined;
  if (!Array.isArray(r.files) || r.files.length === 0) return undefined;
  const files: CommitEntry[] = [];
  const seen = new Set<string>();
  for (const e of r.files as unknown[]) {
    const f = e as Partial<Record<keyof CommitEntry, unknown>> | null;
    if (f === null || typeof f !== 'object' || typeof f.file !== 'string' || !plainName(f.file) || seen.has(f.file)) return undefined;
    if (typeof f.temp !== 'string' || parseTempName(f.temp)?.name !== f.file) return undefined;
    if (typeof f.sha256 !== 'string' || !SHA.test(f.sha256)) return undefined;
    if (f.replaces !== null && (typeof f.replaces !== 'string' || !SHA.test(f.replaces))) return undefined;
    seen.add(f.file);
    files.push({ file: f.file, temp: f.temp, sha256: f.sha256, replaces: f.replaces });
  }
  if ((files[files.length - 1] as CommitEntry).file !== r.record) return undefined;
  return { format: COMMIT_FORMAT, version: COMMIT_VERSION, writer: { pid: w.pid, host: w.host }, record: r.record, files };
}

/** What the recovering process knows about itself. */
export interface Self {
  readonly pid: number;
  readonly host: string;
  /** True when process `pid` of this machine is alive. */
  alive(pid: number): boolean;
}

/**
 * True when the writer of a marker or temporary file is gone, so its file may be completed or
 * removed. `writing` is true when this process is writing that file right now (never gone);
 * `modified` is the file's modification time and `now` the time, in ms. Any file older than
 * STALE_AGE_MS is left over; otherwise a writer of another machine is not gone, this process
 * is gone for files it is not writing, and another process is gone when it is not alive.
 * Example: writerGone({ pid: 7, host: 'h' }, { pid: 8, host: 'h', alive: () => false }, false, 0, 1) === true.
 */
export function writerGone(writer: { readonly pid: number; readonly host?: string | undefined }, self: Self, writing: boolean, modified: number | undefined, now: number): boolean {
  if (writing) return false;
  if (modified !== undefined && now - modified > STALE_AGE_MS) return true;
  if (writer.host !== undefined && writer.host !== self.host) return false;
  if (writer.pid === self.pid) return true;
  return !self.alive(writer.pid);
}

/** The SHA-256 of a marker's target and of its temporary file as found (undefined: no such file). */
export interface EntryState {
  readonly target: string | undefined;
  readonly temp: string | undefined;
}

/** What recovering one marker does. */
export interface RecoveryPlan {
  /** 'complete': rename the listed temporary files, then remove the marker; 'blocked': remove the temporary files and keep the marker. */
  readonly outcome: 'complete' | 'blocked';
  /** Temporary files to rename over their targets, in the marker's order (the record last). */
  readonly renames: readonly CommitEntry[];
  /** Temporary files to remove. */
  readonly removals: readonly string[];
  /** Files that cannot be completed, with the reason. */
  readonly blocked: readonly string[];
}

/**
 * The recovery decision for a marker whose writer is gone, from the state of each of its
 * files (`states`, by file name). An entry is done when its target already has the new
 * bytes; it can be completed when its temporary file has the new bytes and the target is
 * missing or still holds the bytes it replaces. When every entry is done or can be
 * completed, the set is completed; otherwise nothing is renamed (the set cannot become whole,
 * and a target changed since is not Knotwise's to replace) and the marker stays as a note of
 * the bytes Knotwise wrote. A marker that names a file of `protect` (the data file) is never
 * carried out. Temporary files are removed in both cases.
 */
export function planRecovery(marker: CommitMarker, states: ReadonlyMap<string, EntryState>, protect: readonly string[] = []): RecoveryPlan {
  const renames: CommitEntry[] = [];
  const removals: string[] = [];
  const blocked: string[] = [];
  for (const e of marker.files) {
    const s = states.get(e.file) ?? { target: undefined, temp: undefined };
    if (protect.includes(e.file)) {
      blocked.push(`${e.file}: it is the data file`);
    } else if (s.target === e.sha256) {
      if (s.temp !== undefined) removals.push(e.temp);
    } else if (s.temp === e.sha256 && (s.target === undefined || s.target === e.replaces)) {
      renames.push(e);
    } else {
      blocked.push(`${e.file}: ${s.temp === undefined ? 'its new bytes are gone' : s.temp !== e.sha256 ? 'its new bytes are damaged' : 'it changed after the interrupted write'}`);
    }
  }
  if (blocked.length === 0) return { outcome: 'complete', renames, removals, blocked };
  return { outcome: 'blocked', renames: [], removals: marker.files.filter((e) => states.get(e.file)?.temp !== undefined).map((e) => e.temp), blocked };
}

/** One folder operation. Names are plain file names inside the output folder. */
export type Step =
  /** The names in the folder; none when it does not exist. Result: readonly string[]. */
  | { readonly op: 'list' }
  /** A file's bytes. Result: Uint8Array, or undefined when there is no such file. */
  | { readonly op: 'read'; readonly name: string }
  /** A file's modification time in ms. Result: number, or undefined when there is no such file. */
  | { readonly op: 'modified'; readonly name: string }
  /** Creates the folder (and its parents) when missing. */
  | { readonly op: 'makeFolder' }
  /** Writes a new file (fails when the name exists). */
  | { readonly op: 'create'; readonly name: string; readonly text: string }
  /** Renames `from` to `to`, replacing `to`. */
  | { readonly op: 'rename'; readonly from: string; readonly to: string }
  /** Removes a file; no error when it does not exist. */
  | { readonly op: 'remove'; readonly name: string }
  /** Asks whether files Knotwise did not write may be replaced. Result: boolean. */
  | { readonly op: 'accept'; readonly foreign: readonly string[] };

/** A protocol run: yields steps, receives each step's result, returns R. */
export type Steps<R> = Generator<Step, R, unknown>;

function* list(): Steps<readonly string[]> {
  return (yield { op: 'list' }) as readonly string[];
}
function* read(name: string): Steps<Uint8Array | undefined> {
  return (yield { op: 'read', name }) as Uint8Array | undefined;
}
function* modified(name: string): Steps<number | undefined> {
  return (yield { op: 'modified', name }) as number | undefined;
}
function* accept(foreign: readonly string[]): Steps<boolean> {
  return (yield { op: 'accept', foreign }) === true;
}
/** Removes a file, ignoring a failure (a left-over that cannot be removed now is removed by a later run). */
function* removeQuietly(name: string): Steps<void> {
  try {
    yield { op: 'remove', name };
  } catch {
    // Left for a later run.
  }
}

/** Carries out a protocol run synchronously: `exec` performs one step and returns its result, or throws. */
export function runSteps<R>(steps: Steps<R>, exec: (step: Step) => unknown): R {
  let next = steps.next();
  while (!next.done) {
    let result: unknown;
    let error: { e: unknown } | undefined;
    try {
      result = exec(next.value);
    } catch (e) {
      error = { e };
    }
    next = error ? steps.throw(error.e) : steps.next(result);
  }
  return next.value;
}

/** Carries out a protocol run, awaiting each step (the editor's workspace.fs). */
export async function runStepsAsync<R>(steps: Steps<R>, exec: (step: Step) => unknown): Promise<R> {
  let next = steps.next();
  while (!next.done) {
    let result: unknown;
    let error: { e: unknown } | undefined;
    try {
      result = await exec(next.value);
    } catch (e) {
      error = { e };
    }
    next = error ? steps.throw(error.e) : steps.next(result);
  }
  return next.value;
}

/** The writing process as the protocol sees it. */
export interface Writer extends Self {
  /** Names of the folder this process is writing now (shared by every write of the process into that folder). */
  readonly writing: Set<string>;
  /** The time in ms. */
  now(): number;
  /** A fresh random hex string for temporary names. */
  random(): string;
  /** SHA-256 (hex) of bytes or of a text's UTF-8 bytes. */
  sha256(data: string | Uint8Array): string;
}

/** What recovering a folder found and did. */
export interface Recovery {
  /** Records whose interrupted set was completed. */
  readonly completed: readonly string[];
  /** Markers that could not be completed and stay, with the reasons. */
  readonly kept: readonly { readonly marker: CommitMarker; readonly reasons: readonly string[] }[];
  /** Markers of writers still at work. */
  readonly busy: readonly { readonly record: string; readonly pid: number }[];
  /** Left-over temporary files removed. */
  readonly removed: readonly string[];
}

/**
 * Step 1 of the protocol: completes (or keeps, see planRecovery) every marker of the folder
 * whose writer is gone, then removes Knotwise's temporary files whose writer is gone, and
 * temporary files of earlier versions for `names` older than STALE_AGE_MS. Files of writers
 * at work are left alone, and files of `protect` (the data file) are never replaced.
 */
export function* recoverFolder(w: Writer, names: readonly string[] = [], protect: readonly string[] = []): Steps<Recovery> {
  const completed: string[] = [];
  const kept: { marker: CommitMarker; reasons: string[] }[] = [];
  const busy: { record: string; pid: number }[] = [];
  const removed: string[] = [];
  const decoder = new TextDecoder();
  const hash = function* (name: string): Steps<string | undefined> {
    const bytes = yield* read(name);
    return bytes === undefined ? undefined : w.sha256(bytes);
  };
  for (const file of [...(yield* list())].sort()) {
    if (parseMarkerName(file) === undefined || w.writing.has(file)) continue;
    const bytes = yield* read(file);
    const marker = bytes === undefined ? undefined : parseMarker(decoder.decode(bytes), file);
    // Not a marker this version can read: it gives no facts, and the next commit of that record replaces it.
    if (!marker) continue;
    if (!writerGone(marker.writer, w, false, yield* modified(file), w.now())) {
      busy.push({ record: marker.record, pid: marker.writer.pid });
      continue;
    }
    const states = new Map<string, EntryState>();
    for (const e of marker.files) states.set(e.file, { target: yield* hash(e.file), temp: yield* hash(e.temp) });
    const plan = planRecovery(marker, states, protect);
    for (const name of plan.removals) {
      yield* removeQuietly(name);
      removed.push(name);
    }
    if (plan.outcome === 'blocked') {
      kept.push({ marker, reasons: [...plan.blocked] });
      continue;
    }
    for (const e of plan.renames) {
      try {
        yield { op: 'rename', from: e.temp, to: e.file };
      } catch (err) {
        // Another process may have completed this file at the same moment.
        if ((yield* hash(e.file)) !== e.sha256) throw err;
      }
    }
    yield { op: 'remove', name: file };
    completed.push(marker.record);
  }
  const ours = new Set(names);
  for (const file of [...(yield* list())].sort()) {
    if (w.writing.has(file)) continue;
    const temp = parseTempName(file);
    const legacy = temp ? undefined : legacyTempTarget(file);
    if (!temp && !(legacy !== undefined && ours.has(legacy))) continue;
    const time = yield* modified(file);
    if (time === undefined) continue;
    const gone = temp ? writerGone({ pid: temp.pid }, w, false, time, w.now()) : w.now() - time > STALE_AGE_MS;
    if (!gone) continue;
    yield* removeQuietly(file);
    removed.push(file);
  }
  return { completed, kept, busy, removed };
}

/** One file to write: its name in the output folder and its text. */
export interface SetFile {
  readonly name: string;
  readonly text: string;
}

/** A target as found before writing: SHA-256 of its bytes (undefined: no file) and whether Knotwise wrote it. */
export interface TargetState {
  readonly name: string;
  readonly sha256: string | undefined;
  readonly ours: boolean;
}

/**
 * Step 2: each target's state. A file is Knotwise's by the record in place
 * (core/outputs/ownership.ts), or when `kept` (a marker that could not be completed) lists
 * its bytes as written by Knotwise.
 */
export function* inspectTargets(w: Writer, names: readonly string[], record: string, kept?: CommitMarker): Steps<TargetState[]> {
  const recordBytes = yield* read(record);
  const recordText = recordBytes === undefined ? undefined : new TextDecoder().decode(recordBytes);
  const vouched = new Map((kept?.files ?? []).map((e) => [e.file, e.sha256]));
  const out: TargetState[] = [];
  for (const name of names) {
    const bytes = name === record ? recordBytes : yield* read(name);
    const sha256 = bytes === undefined ? undefined : w.sha256(bytes);
    out.push({ name, sha256, ours: writtenByKnotwise({ name, sha256, isRecord: name === record }, recordText, vouched) });
  }
  return out;
}

/**
 * Steps 3 to 6: writes `files` (the record last) as one set. `replaced` gives, by name, the
 * SHA-256 of the file each one replaces. When a step fails before the marker is in place,
 * the temporary files are removed and the old set stays; after that, the marker and the
 * remaining temporary files stay for the next run to complete.
 */
export function* commitSet(w: Writer, files: readonly SetFile[], replaced: ReadonlyMap<string, string | undefined>): Steps<void> {
  const record = files[files.length - 1];
  if (!record) throw new Error('commitSet: no files');
  const entries: CommitEntry[] = files.map((f) => ({ file: f.name, temp: tempName(f.name, w.pid, w.random()), sha256: w.sha256(f.text), replaces: replaced.get(f.name) ?? null }));
  const marker: CommitMarker = { format: COMMIT_FORMAT, version: COMMIT_VERSION, writer: { pid: w.pid, host: w.host }, record: record.name, files: entries };
  const mark = markerName(record.name);
  const markTemp = tempName(mark, w.pid, w.random());
  const ours = [...entries.map((e) => e.temp), markTemp, mark];
  for (const n of ours) w.writing.add(n);
  let committed = false;
  try {
    yield { op: 'makeFolder' };
    for (const [i, e] of entries.entries()) yield { op: 'create', name: e.temp, text: (files[i] as SetFile).text };
    yield { op: 'create', name: markTemp, text: markerText(marker) };
    yield { op: 'rename', from: markTemp, to: mark };
    committed = true;
    for (const e of entries) yield { op: 'rename', from: e.temp, to: e.file };
    yield { op: 'remove', name: mark };
  } catch (err) {
    if (!committed) for (const n of [...entries.map((e) => e.temp), markTemp]) yield* removeQuietly(n);
    throw err;
  } finally {
    for (const n of ours) w.writing.delete(n);
  }
}

/** The outcome of writeSet. */
export interface SetWritten {
  /** False when files Knotwise did not write were in the way and the caller declined to replace them (nothing was written). */
  readonly written: boolean;
  /** What recovering the folder did first. */
  readonly recovery: Recovery;
  /** The files in the way that Knotwise did not write (replaced only when accepted). */
  readonly foreign: readonly string[];
}

/**
 * The whole protocol for one set: recover the folder, refuse when another process is writing
 * the same record, ask (step 'accept') about files in the way that Knotwise did not write,
 * then commit. `files` in any order; `record` names the fit record among them. `protect`
 * names files of the folder that recovery must never replace (the data file, when it is
 * there); the caller refuses outputs named like it before.
 */
export function* writeSet(w: Writer, files: readonly SetFile[], record: string, protect: readonly string[] = []): Steps<SetWritten> {
  const recordFile = files.find((f) => f.name === record);
  if (!recordFile) throw new Error(`writeSet: the record ${record} is not among the files`);
  const names = files.map((f) => f.name);
  const recovery = yield* recoverFolder(w, names, protect);
  const busy = recovery.busy.find((b) => b.record === record);
  if (busy) throw new InputError(`another Knotwise process (id ${busy.pid}) is writing ${record} in this folder right now; try again when it has finished`);
  const kept = recovery.kept.find((k) => k.marker.record === record)?.marker;
  const targets = yield* inspectTargets(w, names, record, kept);
  const foreign = targets.filter((t) => !t.ours).map((t) => t.name);
  if (foreign.length > 0 && !(yield* accept(foreign))) return { written: false, recovery, foreign };
  const ordered = [...files.filter((f) => f !== recordFile), recordFile];
  yield* commitSet(w, ordered, new Map(targets.map((t) => [t.name, t.sha256])));
  return { written: true, recovery, foreign };
}
