/**
 * `knotwise check [record | folder ...]`: rebuilds every output of each fit record from its
 * data and compares them with the files on disk. Exit code 0 when all are current, 1 when
 * data or outputs changed (saying which and how), 2 when a record could not be checked.
 * Without arguments it checks every `*.fit.json` under the current folder.
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { basename, dirname, join, relative, resolve } from 'node:path';
import { describeDifference, textDifference } from '../compare';
import { InputError } from '../errors';
import { shellWord } from '../plan';
import { RECORD_FORMAT } from '../record';
import { readRecord, type RecordedRun } from '../recordPlan';
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
      return { record: recordPath, status: 'changed', messages: [`data ${rec.dataPath} changed: SHA-256 was ${short(rec.dataSha256)}, now ${short(sha)}`, `the outputs cannot be rebuilt from it: ${errorText(e)}`], regenerate };
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

const CHECK_USAGE = 'usage: knotwise check [<record.fit.json> | <folder> ...]   (no argument: every *.fit.json under the current folder)';

/**
 * Runs `knotwise check`, printing one line per record (and what changed) to stdout and a
 * closing count; returns the exit code: 0 current, 1 changed, 2 error.
 */
export async function runCheck(argv: readonly string[], cwd = process.cwd()): Promise<number> {
  if (argv.some((a) => a === '--help' || a === '-h')) {
    process.stdout.write(CHECK_USAGE + '\n');
    return 0;
  }
  const unknown = argv.find((a) => a.startsWith('-'));
  if (unknown) throw new InputError(`unknown option "${unknown}" for check; ${CHECK_USAGE}`);
  const found = recordsFor(argv, cwd);
  const records = found.filter((r) => r.explicit || isRecordFile(r.path));
  if (records.length === 0) {
    process.stdout.write(`knotwise check: no fit records (*${RECORD_SUFFIX}) under ${argv.length ? argv.join(', ') : relative(process.cwd(), cwd) || '.'}\n`);
    return 0;
  }
  const counts = { current: 0, changed: 0, error: 0 };
  for (const r of records) {
    const res = await checkRecord(r.path);
    counts[res.status]++;
    const shown = relative(cwd, r.path) || r.path;
    const label = res.status === 'current' ? 'current' : res.status === 'changed' ? 'CHANGED' : 'ERROR';
    const lines = [`${label.padEnd(7)} ${shown}`, ...res.messages.map((m) => `  ${m}`)];
    const folder = relative(cwd, dirname(r.path));
    if (res.status !== 'current' && res.regenerate) lines.push(`  to update: ${folder ? `cd ${shellWord(folder)} && ` : ''}${res.regenerate}`);
    process.stdout.write(lines.join('\n') + '\n');
  }
  process.stdout.write(`knotwise check: ${records.length} record(s): ${counts.current} current, ${counts.changed} changed, ${counts.error} could not be checked\n`);
  return counts.error ? 2 : counts.changed ? 1 : 0;
}
