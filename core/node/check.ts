/**
 * `knotwise check [record | folder ...]`: rebuilds every output of each fit record, the
 * record itself included, from its data and its recorded spec, and compares them byte for
 * byte with the files on disk. Exit code 0 when all are current, 1 when data, outputs or
 * the record changed (saying which and how), 2 when a record could not be checked (not a
 * whole, valid record; data missing; no records found). Without arguments it checks every
 * `*.fit.json` under the current folder. `--json` prints one object with every record's
 * state instead; `--quiet` prints nothing but errors.
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { basename, dirname, isAbsolute, join, relative, resolve, sep } from 'node:path';
import { compareFile, jsonDifferences, printable } from '../outputs/compare';
import { InputError } from '../errors';
import { defineCommand, formatHelp, parseCommand } from './args';
import { fitCommand } from '../outputs/plan';
import { shellWord } from '../outputs/shellWord';
import { readRecordFile, type RecordFile } from '../outputs/recordPlan';
import { RESAMPLING_CHANGES, RESAMPLING_VERSION, VERSION } from '../version';
import { driftFromRecord } from '../calibrate/drift';
import { recordSample } from '../calibrate/baseline';
import { isGroupRecord, readGroupRecord, type GroupRecordRun } from '../outputs/groupRecordPlan';
import { isSurfaceRecord, readSurfaceRecord, type SurfaceRecordRun } from '../outputs/surfaceRecordPlan';
import { surfaceCommand } from '../surface/spec';
import { runGroupPipeline } from './groupPipeline';
import { runSurfacePipeline } from './surfacePipeline';
import { sha256 } from './outputs';
import { portableRelative, runPipeline } from './pipeline';

/** The outcome for one record. */
export interface CheckResult {
  readonly record: string;
  readonly status: 'current' | 'changed' | 'error';
  /** What changed, or the error. */
  readonly messages: readonly string[];
  /** Remarks that leave the status as it is: a record written by another version whose outputs this one rebuilds the same. */
  readonly notes: readonly string[];
  /**
   * The command that brings the outputs up to date, when the record could be read: built
   * from the record's spec with Knotwise's own quoting (never the record's `regenerate` text).
   */
  readonly regenerate?: string | undefined;
  /** The Knotwise version named in the record (tool.version), when the record could be read. */
  readonly writtenBy?: string | undefined;
}

/** Suffix of fit records. */
export const RECORD_SUFFIX = '.fit.json';

/** A version as Knotwise's releases spell it: 1.2.3, optionally with a pre-release tag (1.2.3-rc.1). */
const RELEASE_VERSION = /^\d+\.\d+\.\d+(?:-[0-9A-Za-z.-]+)?$/;

/**
 * Every `*.fit.json` under `root`, skipping `node_modules` and folders whose name starts
 * with a dot; sorted, so the order is the same on every run. Symbolic links are not followed.
 */
export function findRecords(root: string): string[] {
  const out: string[] = [];
  const walk = (dir: string): void => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      if (e.name.startsWith('.')) continue;
      const p = join(dir, e.name);
      if (e.isDirectory()) {
        if (e.name !== 'node_modules') walk(p);
      } else if (e.isFile() && e.name.endsWith(RECORD_SUFFIX)) out.push(p);
    }
  };
  walk(root);
  return out.sort();
}

/** The parsed JSON of a record of another kind than a fit record (`is` tells the kind), or undefined for anything else (a fit record, or not JSON). */
function otherRecordJson(bytes: Uint8Array, is: (json: unknown) => boolean): unknown {
  try {
    const json = JSON.parse(Buffer.from(bytes).toString('utf8')) as unknown;
    return is(json) ? json : undefined;
  } catch {
    return undefined;
  }
}

/** Short form of a SHA-256 for messages. */
function short(sha: string): string {
  return `${sha.slice(0, 16)}...`;
}

function errorText(e: unknown): string {
  return e instanceof InputError ? e.describe() : e instanceof Error ? e.message : String(e);
}

/** A name or path from a record for a message: as is, JSON-quoted when empty, edged with white space or holding control or format characters. */
function named(text: string): string {
  return text === '' || /[\p{Cc}\p{Cf}]|^\s|\s$/u.test(text) ? JSON.stringify(text) : text;
}

/** Differences of the record listed in its message before "and N more". */
const RECORD_DIFFERENCES_SHOWN = 3;

/**
 * The record's text against the rebuilt one, in one sentence: the values that differ (up to
 * three, then how many more), or where the text differs when every value is the same (a
 * change of white space or number spelling). The record's own regenerate command is never
 * quoted: only that it is not the one the spec gives. `tool.version` is left to the caller.
 */
function recordDifference(name: string, bytes: Uint8Array, found: unknown, rebuiltText: string): string {
  // The regenerate command first, so a tampered one is always named.
  const diffs = jsonDifferences(found, JSON.parse(rebuiltText))
    .filter((d) => d.path !== 'tool.version')
    .sort((a, b) => Number(b.path === 'regenerate') - Number(a.path === 'regenerate'));
  if (diffs.length === 0) {
    const text = compareFile(name, bytes, rebuiltText) ?? `${name} differs from the rebuilt record.`;
    return `${text.replace(/\.$/, '')} (every value is as rebuilt; only the text differs, and records are compared byte for byte).`;
  }
  const listed = diffs
    .slice(0, RECORD_DIFFERENCES_SHOWN)
    .map((d) =>
      d.path === 'regenerate'
        ? "regenerate is not the command the record's spec gives (the file's command is not shown; the command to update is built from the spec)"
        : `${d.path || '(the record)'}: ${d.found} in the file, ${d.rebuilt} rebuilt`,
    );
  const more = diffs.length > RECORD_DIFFERENCES_SHOWN ? `; and ${diffs.length - RECORD_DIFFERENCES_SHOWN} more` : '';
  return `${name} differs from the rebuilt record in ${diffs.length} value${diffs.length === 1 ? '' : 's'}: ${listed.join('; ')}${more}.`;
}

/** The rebuilt record's text with `tool.version` set to `version` (same layout as deliver.ts writes). */
function withToolVersion(rebuiltText: string, version: string): string {
  const rec = JSON.parse(rebuiltText) as { tool: { version: string } };
  rec.tool.version = version;
  return JSON.stringify(rec, null, 2) + '\n';
}

/** True when the bytes are the UTF-8 of `text`. */
function sameBytes(bytes: Uint8Array, text: string): boolean {
  return Buffer.compare(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), Buffer.from(text, 'utf8')) === 0;
}

/** A result with its messages made safe to print (no control or format characters from a file reach the terminal). */
function result(r: CheckResult): CheckResult {
  return { ...r, messages: r.messages.map(printable), notes: r.notes.map(printable) };
}

/**
 * Checks one record by rebuilding everything from the data and the recorded spec, the
 * record included, and comparing byte for byte: the record must be a whole fit record (or
 * group record, core/groups/deliver.ts, rebuilt by the grouped pipeline; or surface record,
 * core/surface/deliver.ts, rebuilt by the surface pipeline) of this version that follows
 * its schema (else 'error'); the data's SHA-256 is compared with the recorded one; every
 * output (table, emitted code, report and figures, and the record itself) is rebuilt and
 * compared with its file. The only difference allowed is the
 * version of Knotwise in the record (tool.version): when the rebuilt bytes equal the file
 * but for it, the record is current and a note says which version wrote it. Never throws:
 * problems come back as status 'error'.
 * Example: (await checkRecord('out/cal.fit.json')).status === 'current'.
 */
export async function checkRecord(recordPath: string): Promise<CheckResult> {
  const failed = (messages: string[], more: Partial<CheckResult> = {}): CheckResult => result({ record: recordPath, status: 'error', messages, notes: [], ...more });
  let bytes: Buffer;
  try {
    bytes = readFileSync(recordPath);
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    return failed([`${recordPath}: ${code === 'ENOENT' ? 'no such file' : code === 'EISDIR' ? 'is a folder' : errorText(e)}`]);
  }
  // A fit record, a group record (core/groups/deliver.ts) or a surface record (core/surface/deliver.ts): each says how to rebuild its outputs.
  let read: Rebuildable;
  try {
    const group = otherRecordJson(bytes, isGroupRecord);
    const surface = group === undefined ? otherRecordJson(bytes, isSurfaceRecord) : undefined;
    read =
      group !== undefined
        ? groupRebuild(readGroupRecord(group, recordPath), group)
        : surface !== undefined
          ? surfaceRebuild(readSurfaceRecord(surface, recordPath), surface)
          : fitRebuild(readRecordFile(bytes, recordPath), basename(recordPath));
  } catch (e) {
    return failed([errorText(e)]);
  }
  const { writtenBy } = read;
  const folder = dirname(recordPath);
  const dataFile = resolve(folder, read.dataPath);
  // Built from the spec with our own quoting; the record's regenerate text is only compared.
  const regenerate = read.command(portableRelative(folder, dataFile));
  const outside = read.files.find((f) => relative(resolve(folder), resolve(folder, f)).split(sep)[0] === '..' || isAbsolute(f));
  if (outside) return failed([`the record names an output outside its folder: ${named(outside)}`], { writtenBy, regenerate });
  if (!existsSync(dataFile)) return failed([`the data file ${named(read.dataPath)} (data.path in the record) was not found`], { writtenBy, regenerate });
  const messages: string[] = [];
  const notes: string[] = [];
  let run: Rebuilt;
  try {
    run = await read.rebuild(dataFile, folder);
  } catch (e) {
    // The data may have changed so that it no longer fits: say both.
    const sha = sha256(readFileSync(dataFile));
    if (sha !== read.dataSha256) {
      return result({
        record: recordPath,
        status: 'changed',
        messages: [`data ${named(read.dataPath)} changed: SHA-256 was ${short(read.dataSha256)}, now ${short(sha)}`, `the outputs cannot be rebuilt from it: ${errorText(e)}`],
        notes,
        regenerate,
        writtenBy,
      });
    }
    return failed([`the outputs cannot be rebuilt: ${errorText(e)}`], { writtenBy, regenerate });
  }
  if (run.dataSha256 !== read.dataSha256) messages.push(`data ${named(read.dataPath)} changed: SHA-256 was ${short(read.dataSha256)}, now ${short(run.dataSha256)}${run.dataChanged}`, ...run.changes);
  let versionOnly = false;
  for (const f of run.files) {
    const name = named(f.name);
    if (f.kind === 'record') {
      if (sameBytes(bytes, f.text)) continue;
      if (writtenBy !== VERSION && sameBytes(bytes, withToolVersion(f.text, writtenBy))) {
        if (RELEASE_VERSION.test(writtenBy)) versionOnly = true;
        else messages.push(`${name}: tool.version ${JSON.stringify(writtenBy)} is not a version of Knotwise (every other byte is as rebuilt)`);
      } else messages.push(recordDifference(name, bytes, read.json, f.text));
      continue;
    }
    const path = join(folder, f.name);
    if (!existsSync(path)) {
      messages.push(`${name} is missing`);
      continue;
    }
    const d = compareFile(name, readFileSync(path), f.text, f.kind === 'table' ? (f.text.split('\n')[0] as string).split(',') : undefined);
    if (d) messages.push(d);
  }
  // Differences while the data is unchanged, from a record of another resampling version: the tool's doing.
  const drawnBy = resamplingVersionOf(read.json);
  if (messages.length && run.dataSha256 === read.dataSha256 && drawnBy !== RESAMPLING_VERSION) {
    messages.unshift(
      `the data is unchanged, but Knotwise's resampling changed since this record was written (resampling version ${drawnBy}, now ${RESAMPLING_VERSION}: ${RESAMPLING_CHANGES[RESAMPLING_VERSION] ?? 'see CHANGELOG.md'}), so its resampled errors differ: rerun the regenerate command to renew the outputs`,
    );
  }
  if (writtenBy !== VERSION) {
    if (messages.length) messages.push(`(the record was written by Knotwise ${JSON.stringify(writtenBy)}; this is ${VERSION})`);
    else if (versionOnly)
      notes.push(
        `the record was written by Knotwise ${writtenBy}; this is ${VERSION}, and rebuilt with it every output is the same byte for byte but for tool.version in the record, so the outputs are current`,
      );
  }
  const status = messages.length ? 'changed' : 'current';
  return result({ record: recordPath, status, messages, notes, regenerate, writtenBy });
}

/** The resampling version a record names (tool.resampling); records written before it was recorded are version 1. */
function resamplingVersionOf(json: unknown): number {
  const tool = json !== null && typeof json === 'object' ? (json as { tool?: unknown }).tool : undefined;
  const v = tool !== null && typeof tool === 'object' ? (tool as { resampling?: unknown }).resampling : undefined;
  return typeof v === 'number' && Number.isInteger(v) && v >= 1 ? v : 1;
}

/** A record read for checking: its plan and provenance, and how to rebuild its outputs from the data. */
interface Rebuildable {
  readonly json: unknown;
  /** The `knotwise fit` command that redoes the record's run on the data at `dataPath` (built from its spec). */
  command(dataPath: string): string;
  readonly dataPath: string;
  readonly dataSha256: string;
  readonly writtenBy: string;
  /** Every output the record names (the record itself not included). */
  readonly files: readonly string[];
  rebuild(dataFile: string, folder: string): Promise<Rebuilt>;
}

/** The outputs rebuilt from the data, the data's SHA-256, and what a change of the data changes. */
interface Rebuilt {
  readonly dataSha256: string;
  readonly files: readonly { readonly kind: string; readonly name: string; readonly text: string }[];
  /** Added to "data ... changed" when it did: the rows used before and now. */
  readonly dataChanged: string;
  /** Said after it: the chosen df and how far the curve would move. */
  readonly changes: readonly string[];
}

/** What every kind of record gives a Rebuildable in the same way: its JSON, data, tool version and output files. */
function recorded(
  rec: { readonly dataPath: string; readonly dataSha256: string; readonly toolVersion: string; readonly files: readonly { readonly file: string }[] },
  json: unknown,
): Pick<Rebuildable, 'json' | 'dataPath' | 'dataSha256' | 'writtenBy' | 'files'> {
  return { json, dataPath: rec.dataPath, dataSha256: rec.dataSha256, writtenBy: rec.toolVersion, files: rec.files.map((f) => f.file) };
}

/** A fit record: rebuilt by the single-file pipeline, under the names it was written with. */
function fitRebuild(read: RecordFile, recordName: string): Rebuildable {
  const rec = read.run;
  return {
    ...recorded(rec, read.json),
    command: (p) => fitCommand(rec.plan, p),
    async rebuild(dataFile, folder) {
      // The table and record under the names they were written with (the editor lets them be renamed).
      const run = await runPipeline(dataFile, rec.plan, folder, { table: (rec.files[0] as { file: string }).file, record: recordName }, { previous: read.json });
      const rows = run.selection.data.x.length;
      const changes: string[] = [];
      if (run.fit.df !== rec.df) changes.push(`the chosen df would change from ${rec.df} to ${run.fit.df}`);
      // How far the curve of the changed data lies from the recorded one (core/calibrate/drift.ts).
      const recorded = recordSample(read.json);
      const drift = recorded ? driftFromRecord(recorded, run.fit) : null;
      if (drift) changes.push(`the curve would move: ${drift.words}`);
      else if (recorded) changes.push('the curve of the changed data shares no x range with the recorded one');
      return { dataSha256: run.table.sha256, files: run.deliverables.files, dataChanged: rows !== rec.rowsUsed ? `; rows used ${rec.rowsUsed}, now ${rows}` : '', changes };
    },
  };
}

/** A group record: rebuilt by the grouped pipeline (core/node/groupPipeline.ts). */
function groupRebuild(rec: GroupRecordRun, json: unknown): Rebuildable {
  return {
    ...recorded(rec, json),
    command: (p) => fitCommand(rec.plan, p),
    async rebuild(dataFile, folder) {
      const run = await runGroupPipeline(dataFile, rec.plan, folder);
      return { dataSha256: run.table.sha256, files: run.deliverables.files, dataChanged: '', changes: [] };
    },
  };
}

/** A surface record: rebuilt by the surface pipeline (core/node/surfacePipeline.ts). */
function surfaceRebuild(rec: SurfaceRecordRun, json: unknown): Rebuildable {
  return {
    ...recorded(rec, json),
    command: (p) => surfaceCommand(rec.plan, p),
    async rebuild(dataFile, folder) {
      const run = await runSurfacePipeline(dataFile, rec.plan, folder);
      const changes: string[] = [];
      const was = (json as { choice?: { df?: { x?: unknown; x2?: unknown } } | null }).choice?.df;
      if (was && (was.x !== run.fit.dfU || was.x2 !== run.fit.dfV)) changes.push(`the chosen df pair would change from ${String(was.x)} × ${String(was.x2)} to ${run.fit.dfU} × ${run.fit.dfV}`);
      const rows = (json as { data?: { rowsUsed?: unknown } }).data?.rowsUsed;
      return { dataSha256: run.table.sha256, files: run.deliverables.files, dataChanged: typeof rows === 'number' && rows !== run.fit.n ? `; rows used ${rows}, now ${run.fit.n}` : '', changes };
    },
  };
}

/** What the arguments name: record files (as given, or found in folders) and the folders in which none was found. */
function recordsFor(args: readonly string[], cwd: string): { files: string[]; empty: string[] } {
  const files: string[] = [];
  const empty: string[] = [];
  const search = (folder: string): void => {
    const found = findRecords(folder);
    if (found.length === 0) empty.push(folder);
    files.push(...found);
  };
  if (args.length === 0) search(cwd);
  for (const a of args) {
    const p = resolve(cwd, a);
    if (existsSync(p) && statSync(p).isDirectory()) search(p);
    else files.push(p);
  }
  return { files, empty };
}

/** The table of `knotwise check`. */
export const CHECK_COMMAND = defineCommand({
  name: 'check',
  summary: 'rebuild recorded curve tables and their fit records from the data and compare them with the files on disk',
  usage: ['check [<record.fit.json> | <folder> ...]'],
  operands: { min: 0, max: Infinity, name: 'record or folder' },
  options: [
    { name: 'json', help: 'print one JSON object with the state of every record instead of the lines' },
    { name: 'quiet', help: 'print nothing on standard output, the exit code tells; records that could not be checked are still named on standard error, and --json still prints its object' },
  ],
  notes: [
    `Without arguments every *${RECORD_SUFFIX} under the current folder is checked, skipping node_modules and folders whose name starts with a dot; a folder argument is searched the same way. Every file found is checked: one that is not a whole fit record (empty, cut short, not JSON, another format, or breaking the record's schema) could not be checked, and a folder with no *${RECORD_SUFFIX} at all is an error too (exit code 2), so a CI step run in the wrong folder fails instead of passing.`,
    'Everything is rebuilt from the data and the spec in the record, the record itself included, and compared byte for byte. Only the Knotwise version in the record (tool.version) may differ: when the rebuilt files equal those on disk but for it, the record is current, and a note names the version that wrote it.',
    'The command shown after "to update:" is built from the spec in the record, never copied from the record.',
    'Exit codes: 0 every record is current; 1 data, an output or the record changed; 2 a record could not be checked, or no records were found.',
  ],
});

/** One record's state as `check --json` prints it. */
export interface CheckRecordJson {
  /** The record's path, relative to the folder check ran in (a folder searched in vain: that folder). */
  readonly file: string;
  readonly status: CheckResult['status'];
  /** What changed, or why the record could not be checked; empty when current. */
  readonly reasons: readonly string[];
  /** Remarks that leave the status as it is (a record written by another Knotwise version whose outputs this one rebuilds the same). */
  readonly notes: readonly string[];
  /** The Knotwise version named in the record; null when it could not be read. */
  readonly writtenBy: string | null;
  /** The command that brings the outputs up to date (run in the folder check ran in), built from the record's spec; null unless changed. */
  readonly advice: string | null;
}

/** The exit code for a set of results: 2 when any could not be checked, else 1 when any changed, else 0. */
function exitCode(counts: { readonly current: number; readonly changed: number; readonly error: number }): number {
  return counts.error ? 2 : counts.changed ? 1 : 0;
}

/**
 * Runs `knotwise check`, printing one line per record (and what changed) to stdout and a
 * closing count, or with --json one object `{knotwise, records[], counts, exitCode}`;
 * returns the exit code: 0 current, 1 changed, 2 error (a folder searched without finding
 * any record counts as an error). Throws InputError for bad options.
 */
export async function runCheck(argv: readonly string[], cwd = process.cwd()): Promise<number> {
  const a = parseCommand(CHECK_COMMAND, argv);
  if (a.help) {
    process.stdout.write(formatHelp(CHECK_COMMAND) + '\n');
    return 0;
  }
  const json = a.flag('json');
  const quiet = a.flag('quiet');
  const say = (text: string): void => {
    if (!json && !quiet) process.stdout.write(text + '\n');
  };
  const counts = { current: 0, changed: 0, error: 0 };
  const states: CheckRecordJson[] = [];
  const report = (shown: string, res: Pick<CheckResult, 'status' | 'messages' | 'notes' | 'writtenBy'>, advice: string | null): void => {
    counts[res.status]++;
    states.push({ file: shown, status: res.status, reasons: res.messages, notes: res.notes, writtenBy: res.writtenBy ?? null, advice });
    const label = res.status === 'current' ? 'current' : res.status === 'changed' ? 'CHANGED' : 'ERROR';
    say([`${label.padEnd(7)} ${shown}`, ...res.messages.map((m) => `  ${m}`), ...res.notes.map((m) => `  ${m}`), ...(advice !== null ? [`  to update: ${advice}`] : [])].join('\n'));
    if (quiet && !json && res.status === 'error') process.stderr.write(`knotwise check: ${shown}: ${res.messages.join('; ')}\n`);
  };
  const { files, empty } = recordsFor(a.operands, cwd);
  for (const folder of empty) {
    const shown = printable(relative(cwd, folder) || '.');
    report(shown, { status: 'error', messages: [`no fit records (*${RECORD_SUFFIX}) under ${shown}`], notes: [] }, null);
  }
  for (const path of files) {
    const res = await checkRecord(path);
    const folder = relative(cwd, dirname(path));
    const advice = res.status === 'changed' && res.regenerate !== undefined ? `${folder ? `cd ${shellWord(folder)} && ` : ''}${res.regenerate}` : null;
    report(printable(relative(cwd, path) || path), res, advice);
  }
  if (files.length > 0)
    say(
      `knotwise check: ${files.length} record(s): ${counts.current} current, ${counts.changed} changed, ${counts.error - empty.length} could not be checked${empty.length ? `; ${empty.length} folder(s) without records` : ''}`,
    );
  const code = exitCode(counts);
  if (json) process.stdout.write(JSON.stringify({ knotwise: VERSION, records: states, counts, exitCode: code }) + '\n');
  return code;
}
