/**
 * `knotwise check [record | folder ...]`: rebuilds every output of each fit record from its
 * data and compares them with the files on disk. Exit code 0 when all are current, 1 when
 * data or outputs changed (saying which and how), 2 when a record could not be checked.
 * Without arguments it checks every `*.fit.json` under the current folder. `--json` prints
 * one object with every record's state instead; `--quiet` prints nothing but errors.
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { basename, dirname, join, relative, resolve } from 'node:path';
import { describeDifference, textDifference } from '../outputs/compare';
import { InputError } from '../errors';
import { defineCommand, formatHelp, parseCommand } from './args';
import { shellWord } from '../outputs/shellWord';
import { RECORD_FORMAT } from '../outputs/record';
import { readRecord, type RecordedRun } from '../outputs/recordPlan';
import { VERSION } from '../version';
import { sha256 } from './outputs';
import { runPipeline, type PipelineRun } from './pipeline';

/** The outcome for one record. */
export interface CheckResult {
  readonly record: string;
  readonly status: 'current' | 'changed' | 'error';
  /** What changed, or the error. */
  readonly messages: readonly string[];
  /** The command that brings the outputs up to date, when known. */
  readonly regenerate?: string | undefined;
}

/** Suffix of fit records. */
export const RECORD_SUFFIX = '.fit.json';

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

/** Short form of a SHA-256 for messages. */
function short(sha: string): string {
  return `${sha.slice(0, 16)}...`;
}

function errorText(e: unknown): string {
  return e instanceof InputError ? e.describe() : e instanceof Error ? e.message : String(e);
}

/**
 * Checks one record: the data's SHA-256 against the recorded one, then every output rebuilt
 * from the data (table, emitted code, report and figures) against its file, byte for byte.
 * Never throws: problems come back as status 'error'.
 * Example: (await checkRecord('out/cal.fit.json')).status === 'current'.
 */
export async function checkRecord(recordPath: string): Promise<CheckResult> {
  let rec: RecordedRun;
  let regenerate: string | undefined;
  try {
    const text = readFileSync(recordPath, 'utf8');
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch (e) {
      throw new InputError(`not valid JSON (${(e as Error).message})`, { file: recordPath });
    }
    rec = readRecord(json, recordPath);
    const r = (json as { regenerate?: unknown }).regenerate;
    regenerate = typeof r === 'string' ? r : undefined;
  } catch (e) {
    return { record: recordPath, status: 'error', messages: [errorText(e)] };
  }
  const folder = dirname(recordPath);
  const dataFile = resolve(folder, rec.dataPath);
  if (!existsSync(dataFile)) return { record: recordPath, status: 'error', messages: [`the data file ${rec.dataPath} (data.path in the record) was not found`], regenerate };
  const messages: string[] = [];
  let run: PipelineRun;
  try {
    // The table and record under the names they were written with (the editor lets them be renamed).
    run = await runPipeline(dataFile, rec.plan, folder, { table: (rec.files[0] as { file: string }).file, record: basename(recordPath) });
  } catch (e) {
    // The data may have changed so that it no longer fits: say both.
    const sha = sha256(readFileSync(dataFile));
    if (sha !== rec.dataSha256) {
      return {
        record: recordPath,
        status: 'changed',
        messages: [`data ${rec.dataPath} changed: SHA-256 was ${short(rec.dataSha256)}, now ${short(sha)}`, `the outputs cannot be rebuilt from it: ${errorText(e)}`],
        regenerate,
      };
    }
    return { record: recordPath, status: 'error', messages: [`the outputs cannot be rebuilt: ${errorText(e)}`], regenerate };
  }
  if (run.table.sha256 !== rec.dataSha256) {
    const rows = run.selection.data.x.length;
    messages.push(`data ${rec.dataPath} changed: SHA-256 was ${short(rec.dataSha256)}, now ${short(run.table.sha256)}${rows !== rec.rowsUsed ? `; rows used ${rec.rowsUsed}, now ${rows}` : ''}`);
    if (run.fit.df !== rec.df) messages.push(`the chosen df would change from ${rec.df} to ${run.fit.df}`);
  }
  for (const f of run.deliverables.files) {
    if (f.kind === 'record') continue;
    const path = join(folder, f.name);
    if (!existsSync(path)) {
      messages.push(`${f.name} is missing`);
      continue;
    }
    const d = textDifference(readFileSync(path, 'utf8'), f.text);
    if (d) messages.push(describeDifference(f.name, d, f.kind === 'table' ? (f.text.split('\n')[0] as string).split(',') : undefined));
  }
  if (messages.length && rec.toolVersion !== VERSION) messages.push(`(the record was written by Knotwise ${rec.toolVersion}; this is ${VERSION})`);
  return { record: recordPath, status: messages.length ? 'changed' : 'current', messages, regenerate };
}

/** The records named by the arguments: files as given, folders searched; none: the current folder searched. */
function recordsFor(args: readonly string[], cwd: string): { path: string; explicit: boolean }[] {
  if (args.length === 0) return findRecords(cwd).map((path) => ({ path, explicit: false }));
  const out: { path: string; explicit: boolean }[] = [];
  for (const a of args) {
    const p = resolve(cwd, a);
    if (existsSync(p) && statSync(p).isDirectory()) out.push(...findRecords(p).map((path) => ({ path, explicit: false })));
    else out.push({ path: p, explicit: true });
  }
  return out;
}

/** True when a found file is a Knotwise record (others named *.fit.json are left alone). */
function isRecordFile(path: string): boolean {
  try {
    return (JSON.parse(readFileSync(path, 'utf8')) as { format?: unknown }).format === RECORD_FORMAT;
  } catch {
    return false;
  }
}

/** The table of `knotwise check`. */
export const CHECK_COMMAND = defineCommand({
  name: 'check',
  summary: 'rebuild recorded curve tables from their data and compare them with the files on disk',
  usage: ['check [<record.fit.json> | <folder> ...]'],
  operands: { min: 0, max: Infinity, name: 'record or folder' },
  options: [
    { name: 'json', help: 'print one JSON object with the state of every record instead of the lines' },
    { name: 'quiet', help: 'print nothing on standard output, the exit code tells; records that could not be checked are still named on standard error, and --json still prints its object' },
  ],
  notes: [
    `Without arguments every *${RECORD_SUFFIX} under the current folder is checked, skipping node_modules and folders whose name starts with a dot; a folder argument is searched the same way.`,
    'Exit codes: 0 every record is current; 1 data or an output changed; 2 a record could not be checked.',
  ],
});

/** One record's state as `check --json` prints it. */
export interface CheckRecordJson {
  /** The record's path, relative to the folder check ran in. */
  readonly file: string;
  readonly status: CheckResult['status'];
  /** What changed, or why the record could not be checked; empty when current. */
  readonly reasons: readonly string[];
  /** The command that brings the outputs up to date (run in the folder check ran in); null when current or unknown. */
  readonly advice: string | null;
}

/** The exit code for a set of results: 2 when any could not be checked, else 1 when any changed, else 0. */
function exitCode(counts: { readonly current: number; readonly changed: number; readonly error: number }): number {
  return counts.error ? 2 : counts.changed ? 1 : 0;
}

/**
 * Runs `knotwise check`, printing one line per record (and what changed) to stdout and a
 * closing count, or with --json one object `{knotwise, records[], counts, exitCode}`;
 * returns the exit code: 0 current, 1 changed, 2 error. Throws InputError for bad options.
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
  const found = recordsFor(a.operands, cwd);
  const records = found.filter((r) => r.explicit || isRecordFile(r.path));
  if (records.length === 0) say(`knotwise check: no fit records (*${RECORD_SUFFIX}) under ${a.operands.length ? a.operands.join(', ') : relative(process.cwd(), cwd) || '.'}`);
  const counts = { current: 0, changed: 0, error: 0 };
  const states: CheckRecordJson[] = [];
  for (const r of records) {
    const res = await checkRecord(r.path);
    counts[res.status]++;
    const shown = relative(cwd, r.path) || r.path;
    const folder = relative(cwd, dirname(r.path));
    const advice = res.status !== 'current' && res.regenerate ? `${folder ? `cd ${shellWord(folder)} && ` : ''}${res.regenerate}` : null;
    states.push({ file: shown, status: res.status, reasons: res.messages, advice });
    const label = res.status === 'current' ? 'current' : res.status === 'changed' ? 'CHANGED' : 'ERROR';
    say([`${label.padEnd(7)} ${shown}`, ...res.messages.map((m) => `  ${m}`), ...(advice !== null ? [`  to update: ${advice}`] : [])].join('\n'));
    if (quiet && !json && res.status === 'error') process.stderr.write(`knotwise check: ${shown}: ${res.messages.join('; ')}\n`);
  }
  if (records.length > 0) say(`knotwise check: ${records.length} record(s): ${counts.current} current, ${counts.changed} changed, ${counts.error} could not be checked`);
  const code = exitCode(counts);
  if (json) process.stdout.write(JSON.stringify({ knotwise: VERSION, records: states, counts, exitCode: code }) + '\n');
  return code;
}
