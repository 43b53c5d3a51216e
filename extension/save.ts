/**
 * Saving from the editor: the curve table and the fit record are built by core's
 * buildDeliverables from the same plan the command line would carry out (so the bytes are
 * those of `knotwise fit ... --out <folder>` for the same inputs), then written through
 * workspace.fs as one set by the same crash-safe protocol as the command line
 * (core/outputs/commit.ts: temporary files, a commit marker, renames with the record last),
 * so a host that dies in the middle leaves the old files, the new ones, or a state the next
 * save or command-line run completes. A file Knotwise did not write is replaced only after
 * the person agrees (core/outputs/ownership.ts).
 */
import { createHash, randomBytes } from 'node:crypto';
import { hostname } from 'node:os';
import { posix } from 'node:path';
import * as vscode from 'vscode';
import { withRule } from '../core/analysis/analysis';
import type { Analysis, Diagnostics } from '../core/analysis/types';
import { buildDeliverables, type Deliverables } from '../core/outputs/deliver';
import { InputError } from '../core/errors';
import type { Selection } from '../core/ingest/select';
import { hostTag, runStepsAsync, writeSet, type Step, type Writer } from '../core/outputs/commit';
import { DEFAULT_OUTPUT, type FitPlan } from '../core/outputs/plan';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec } from '../core/tune/types';
import { outputName, type Settings } from './settings';
import { inverseWords } from '../core/calibrate/inverseOutput';

/** Everything a save needs from a finished run. */
export interface SaveInput {
  readonly dataUri: vscode.Uri;
  readonly fileName: string;
  readonly dataSha256: string;
  readonly rowsRead: number;
  /** The columns as asked for (the command line's --x, --y, --weights) and the trials column of a binomial outcome. */
  readonly columns: { readonly x: string; readonly y: string; readonly weights?: string | undefined; readonly trials?: string | undefined };
  /** All rows selected from the CSV (the table's grid and range come from these, as on the command line), rejected rows, labels. */
  readonly selection: Pick<Selection, 'data' | 'rejected' | 'labels'>;
  readonly analysis: Analysis;
  readonly rule: RuleSpec;
  readonly settings: Settings;
  /** Residual checks of a df already computed (the panel's cache), to avoid running them again. */
  readonly diagnostics?: ((df: number) => Diagnostics | undefined) | undefined;
}

/** How to answer "replace a file Knotwise did not write?": ask the person, or a fixed answer (automation). */
export type OverwriteAnswer = 'ask' | 'yes' | 'no';

/** SHA-256 (FIPS 180-4) of a text's UTF-8 bytes or of bytes, as hex. */
function sha256(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/**
 * The plan the command line would carry out for this save: the analysis's options with the
 * rule to save, the table settings, no emitted code or report (the editor writes the table
 * and the record).
 */
export function savePlan(input: SaveInput): FitPlan {
  const { settings } = input;
  const { x, y, weights, trials } = input.columns;
  return {
    columns: { x, y, weights: trials !== undefined ? undefined : weights },
    tune: true,
    options: { ...input.analysis.options, rule: input.rule },
    output: { ...DEFAULT_OUTPUT, grid: settings.grid, extrapolate: settings.extrapolate, flagNegative: settings.flagNegative, digits: settings.digits, inverse: settings.inverse },
    ...(trials !== undefined ? { trials } : {}),
  };
}

/** The folder the outputs go to: next to the data, or the configured folder (relative to the data file's folder). */
export function outputFolder(dataUri: vscode.Uri, folderSetting: string): vscode.Uri {
  const dataFolder = vscode.Uri.joinPath(dataUri, '..');
  let f = folderSetting.trim();
  if (f === '') return dataFolder;
  const ws = vscode.workspace.getWorkspaceFolder(dataUri);
  if (f.startsWith('${workspaceFolder}')) {
    if (!ws) throw new InputError('knotwise.output.folder uses ${workspaceFolder}, but the data file is not in a workspace folder');
    f = f.slice('${workspaceFolder}'.length).replace(/^[\\/]+/, '');
    return f ? vscode.Uri.joinPath(ws.uri, f) : ws.uri;
  }
  if (f.startsWith('/')) return dataUri.with({ path: f });
  return vscode.Uri.joinPath(dataFolder, f);
}

/** The data file's path relative to the output folder, `/`-separated (as the command line records it). */
export function relativeDataPath(folder: vscode.Uri, dataUri: vscode.Uri): string {
  if (folder.scheme !== dataUri.scheme || folder.authority !== dataUri.authority) return dataUri.path;
  return posix.relative(folder.path, dataUri.path) || posix.basename(dataUri.path);
}

/**
 * Builds the table and record texts for the chosen rule into `folder` (throws InputError for
 * grid problems and a rule that cannot choose). The names follow the settings; with the
 * default names the bytes equal the command line's.
 */
export function deliverables(input: SaveInput, folder: vscode.Uri, previous?: unknown): Deliverables {
  const { analysis, settings } = input;
  const plan = savePlan(input);
  const selected = withRule(analysis, input.rule, cachedDiagnostics(input));
  const dot = input.fileName.lastIndexOf('.');
  const stem = dot > 0 ? input.fileName.slice(0, dot) : input.fileName;
  const names = { table: outputName(settings.tableName, input.fileName), record: outputName(settings.recordName, input.fileName) };
  if (names.table === names.record) throw new InputError(`knotwise.output.tableName and recordName give the same file name ${names.table}`);
  return buildDeliverables({
    plan,
    stem,
    dataFile: input.fileName,
    dataPath: relativeDataPath(folder, input.dataUri),
    dataSha256: input.dataSha256,
    rowsRead: input.rowsRead,
    selection: input.selection,
    fitted: selected.data,
    analysis: selected,
    fit: selected.chosen,
    diagnostics: selected.diagnostics,
    sha256,
    names,
    previous,
  });
}

/** The fit record a save replaces, parsed, or undefined when there is none or it is not JSON (its curve becomes the baseline of the drift). */
export async function previousRecord(uri: vscode.Uri): Promise<unknown> {
  try {
    return JSON.parse(new TextDecoder().decode(await vscode.workspace.fs.readFile(uri))) as unknown;
  } catch {
    return undefined;
  }
}

/** The cached checks of the df `input.rule` chooses, if that df differs from the analysis's choice and is cached. */
function cachedDiagnostics(input: SaveInput): Diagnostics | undefined {
  if (!input.diagnostics) return undefined;
  try {
    return input.diagnostics(selectDf(input.analysis.tune.candidates, input.rule, input.analysis.tune.metric).df);
  } catch {
    return undefined;
  }
}

/** True when process `pid` is alive on this machine (a process of another user counts as alive). */
function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/** Names being written now by this extension host, per output folder (URI). */
const writing = new Map<string, Set<string>>();

/** The extension host as the protocol's writer in `folder` (the same machine tag as the command line's). */
function hostWriter(folder: vscode.Uri): Writer {
  const key = folder.toString();
  let names = writing.get(key);
  if (!names) {
    names = new Set();
    writing.set(key, names);
  }
  return { pid: process.pid, host: hostTag(hostname(), sha256), writing: names, alive: processAlive, now: () => Date.now(), random: () => randomBytes(6).toString('hex'), sha256 };
}

/** True for workspace.fs's error of a missing file or folder. */
function notFound(err: unknown): boolean {
  return err instanceof vscode.FileSystemError && err.code === 'FileNotFound';
}

/** Carries out one protocol step in `folder` through workspace.fs; `accept` answers the question about files Knotwise did not write. */
function folderStep(folder: vscode.Uri, accept: (foreign: readonly string[]) => Promise<boolean>): (step: Step) => Promise<unknown> {
  const fs = vscode.workspace.fs;
  const at = (name: string): vscode.Uri => vscode.Uri.joinPath(folder, name);
  const orMissing = async <T>(run: () => Thenable<T>): Promise<T | undefined> => {
    try {
      return await run();
    } catch (err) {
      if (notFound(err)) return undefined;
      throw err;
    }
  };
  return async (step) => {
    switch (step.op) {
      case 'list':
        return ((await orMissing(() => fs.readDirectory(folder))) ?? []).map(([name]) => name);
      case 'read':
        return orMissing(() => fs.readFile(at(step.name)));
      case 'modified':
        return (await orMissing(() => fs.stat(at(step.name))))?.mtime;
      case 'makeFolder':
        return fs.createDirectory(folder);
      case 'create':
        return fs.writeFile(at(step.name), new TextEncoder().encode(step.text));
      case 'rename':
        return fs.rename(at(step.from), at(step.to), { overwrite: true });
      case 'remove':
        return orMissing(() => fs.delete(at(step.name), { useTrash: false }));
      case 'accept':
        return accept(step.foreign);
    }
  };
}

/** What a save wrote. */
export interface Saved {
  /** The written files, the table first and the record last. */
  readonly uris: readonly vscode.Uri[];
  /** One line about the table (rows, grid, interpolation error). */
  readonly note: string;
}

/** One line about the written table. */
function tableNote(d: Deliverables): string {
  const s = d.summary;
  const ip = s.interpolation;
  const fmt = (v: number): string => String(Number(v.toPrecision(3)));
  const step = d.grid.auto ? `automatic step ${fmt(d.grid.auto.step)} (tolerance ${fmt(d.grid.auto.tolerance)})` : '';
  const interp = ip ? `; straight lines between rows stay within ${fmt(ip.maxError)} of the curve` : '';
  const inverse = d.inverse ? ` Inverse table: ${inverseWords(d.inverse.summary)}` : '';
  const drift = d.drift ? ` Against the curve the record replaced: ${d.drift.words}` : '';
  return `The table has ${s.points} rows${step ? `, ${step}` : ''}${interp}${s.extrapolated.length ? `; ${s.extrapolated.length} extrapolated` : ''}.${inverse}${drift}`;
}

/**
 * Saves the deliverables. Resolves to what was written, or undefined when the person
 * declined to replace a file Knotwise did not write (then nothing is written).
 */
export async function saveDeliverables(input: SaveInput, answer: OverwriteAnswer): Promise<Saved | undefined> {
  const folder = outputFolder(input.dataUri, input.settings.outputFolder);
  const out = deliverables(input, folder, await previousRecord(vscode.Uri.joinPath(folder, outputName(input.settings.recordName, input.fileName))));
  const record = out.files.find((f) => f.kind === 'record');
  if (!record) throw new Error('buildDeliverables returned no fit record');
  const uris = await writeOutputSet(folder, input.dataUri, out.files, record.name, answer, 'the new curve table and fit record');
  return uris ? { uris, note: tableNote(out) } : undefined;
}

/**
 * Writes `files` into `folder` as one set by the commit protocol, the record named `record`
 * last, asking (unless `answer` says) before replacing files Knotwise did not write
 * (`what`: what would replace them, in words). Resolves to the written files in the order
 * written, or undefined when the person declined (nothing is written). Throws InputError
 * when an output would replace the data file.
 */
export async function writeOutputSet(
  folder: vscode.Uri,
  dataUri: vscode.Uri,
  files: readonly { readonly name: string; readonly text: string }[],
  record: string,
  answer: OverwriteAnswer,
  what: string,
): Promise<vscode.Uri[] | undefined> {
  const targets = files.map((f) => ({ file: f, uri: vscode.Uri.joinPath(folder, f.name) }));
  for (const t of targets) {
    if (t.uri.toString() === dataUri.toString()) throw new InputError(`the output name ${t.file.name} would replace the data file; change knotwise.output.tableName or recordName`);
  }
  const ask = async (foreign: readonly string[]): Promise<boolean> => {
    if (answer !== 'ask') return answer === 'yes';
    const shown = foreign.map((name) => vscode.workspace.asRelativePath(vscode.Uri.joinPath(folder, name)));
    const listed = shown.length > 6 ? [...shown.slice(0, 5), `${shown.length - 5} more files`] : shown;
    const replace = 'Replace';
    const picked = await vscode.window.showWarningMessage(
      `${listed.join(' and ')} ${shown.length > 1 ? 'exist and were' : 'exists and was'} not written by Knotwise. Replace with ${what}?`,
      { modal: true },
      replace,
    );
    return picked === replace;
  };
  // Recovery never replaces the data file, even when a commit marker names it.
  const protect = vscode.Uri.joinPath(dataUri, '..').toString() === folder.toString() ? [posix.basename(dataUri.path)] : [];
  const result = await runStepsAsync(writeSet(hostWriter(folder), files, record, protect), folderStep(folder, ask));
  if (!result.written) return undefined;
  // The record last, as written: it vouches for the files before it.
  return [...targets.filter((t) => t.file.name !== record), ...targets.filter((t) => t.file.name === record)].map((t) => t.uri);
}
