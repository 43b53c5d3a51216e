/**
 * Saving from the editor: the curve table and the fit record are built by core's
 * buildDeliverables from the same plan the command line would carry out (so the bytes are
 * those of `knotwise fit ... --out <folder>` for the same inputs), then written through
 * workspace.fs, each atomically (a temporary file in the same folder, then a rename). A
 * file Knotwise did not write is replaced only after the person agrees (core/outputs/ownership.ts).
 */
import { createHash, randomBytes } from 'node:crypto';
import { posix } from 'node:path';
import * as vscode from 'vscode';
import { withRule } from '../core/analysis/analysis';
import type { Analysis, Diagnostics } from '../core/analysis/types';
import { buildDeliverables, type Deliverables } from '../core/outputs/deliver';
import { InputError } from '../core/errors';
import type { Selection } from '../core/ingest/select';
import { writtenByKnotwise } from '../core/outputs/ownership';
import { DEFAULT_OUTPUT, type FitPlan } from '../core/outputs/plan';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec } from '../core/tune/types';
import { outputName, type Settings } from './settings';

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
    output: { ...DEFAULT_OUTPUT, grid: settings.grid, extrapolate: settings.extrapolate, flagNegative: settings.flagNegative, digits: settings.digits },
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
function relativeDataPath(folder: vscode.Uri, dataUri: vscode.Uri): string {
  if (folder.scheme !== dataUri.scheme || folder.authority !== dataUri.authority) return dataUri.path;
  return posix.relative(folder.path, dataUri.path) || posix.basename(dataUri.path);
}

/**
 * Builds the table and record texts for the chosen rule into `folder` (throws InputError for
 * grid problems and a rule that cannot choose). The names follow the settings; with the
 * default names the bytes equal the command line's.
 */
export function deliverables(input: SaveInput, folder: vscode.Uri): Deliverables {
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
  });
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

async function readBytes(uri: vscode.Uri): Promise<Uint8Array | undefined> {
  try {
    return await vscode.workspace.fs.readFile(uri);
  } catch {
    return undefined;
  }
}

/** True when `target` does not exist or Knotwise wrote it (core/outputs/ownership.ts, with the bytes read through workspace.fs). */
export async function ownedByKnotwise(target: vscode.Uri, recordUri: vscode.Uri): Promise<boolean> {
  const bytes = await readBytes(target);
  const recordBytes = target.toString() === recordUri.toString() ? bytes : await readBytes(recordUri);
  return writtenByKnotwise(
    { name: posix.basename(target.path), sha256: bytes ? sha256(bytes) : undefined, isRecord: target.toString() === recordUri.toString() },
    recordBytes ? new TextDecoder().decode(recordBytes) : undefined,
  );
}

/** Writes `text` to `target` through a temporary file in the same folder and a rename. */
export async function writeAtomically(target: vscode.Uri, text: string): Promise<void> {
  const name = posix.basename(target.path);
  const tmp = vscode.Uri.joinPath(target, '..', `.${name}.${randomBytes(6).toString('hex')}.knotwise-tmp`);
  await vscode.workspace.fs.writeFile(tmp, new TextEncoder().encode(text));
  try {
    await vscode.workspace.fs.rename(tmp, target, { overwrite: true });
  } catch (err) {
    await vscode.workspace.fs.delete(tmp).then(undefined, () => undefined);
    throw err;
  }
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
  return `The table has ${s.points} rows${step ? `, ${step}` : ''}${interp}${s.extrapolated.length ? `; ${s.extrapolated.length} extrapolated` : ''}.`;
}

/**
 * Saves the deliverables. Resolves to what was written, or undefined when the person
 * declined to replace a file Knotwise did not write (then nothing is written).
 */
export async function saveDeliverables(input: SaveInput, answer: OverwriteAnswer): Promise<Saved | undefined> {
  const folder = outputFolder(input.dataUri, input.settings.outputFolder);
  const out = deliverables(input, folder);
  const record = out.files.find((f) => f.kind === 'record');
  if (!record) throw new Error('buildDeliverables returned no fit record');
  const recordUri = vscode.Uri.joinPath(folder, record.name);
  const targets = out.files.map((f) => ({ file: f, uri: vscode.Uri.joinPath(folder, f.name) }));
  for (const t of targets) {
    if (t.uri.toString() === input.dataUri.toString()) throw new InputError(`the output name ${t.file.name} would replace the data file; change knotwise.output.tableName or recordName`);
  }
  const foreign: string[] = [];
  for (const t of targets) if (!(await ownedByKnotwise(t.uri, recordUri))) foreign.push(vscode.workspace.asRelativePath(t.uri));
  if (foreign.length) {
    let yes = answer === 'yes';
    if (answer === 'ask') {
      const replace = 'Replace';
      const picked = await vscode.window.showWarningMessage(
        `${foreign.join(' and ')} ${foreign.length > 1 ? 'exist and were' : 'exists and was'} not written by Knotwise. Replace with the new curve table and fit record?`,
        { modal: true },
        replace,
      );
      yes = picked === replace;
    }
    if (!yes) return undefined;
  }
  await vscode.workspace.fs.createDirectory(folder);
  // The record last: it vouches for the files written before it.
  const order = [...targets.filter((t) => t.file !== record), ...targets.filter((t) => t.file === record)];
  for (const t of order) await writeAtomically(t.uri, t.file.text);
  return { uris: order.map((t) => t.uri), note: tableNote(out) };
}
