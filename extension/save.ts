/**
 * Writes the curve table and the fit record through workspace.fs, each atomically (a
 * temporary file in the same folder, then a rename). A file Knotwise did not write is
 * replaced only after the person agrees. The bytes are those the command line writes for
 * the same inputs (core/table, core/record).
 */
import { createHash, randomBytes } from 'node:crypto';
import * as vscode from 'vscode';
import type { Analysis, Diagnostics } from '../core/analysisTypes';
import { diagnose } from '../core/diagnose';
import { InputError } from '../core/errors';
import { prepareData } from '../core/fit/prepared';
import type { RejectedRow } from '../core/ingest/select';
import { recordedFiles } from '../core/node/outputs';
import { fitRecord, RECORD_FORMAT } from '../core/record';
import { curveTable } from '../core/table/curveTable';
import { curveTableCsv } from '../core/table/formatCsv';
import { checkInRange, defaultGrid, gridPoints } from '../core/table/grid';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec } from '../core/tune/types';
import type { FitResult, XYData } from '../core/types';
import { outputName, type Settings } from './settings';

/** Everything a save needs from a finished run. */
export interface SaveInput {
  readonly dataUri: vscode.Uri;
  readonly fileName: string;
  readonly dataSha256: string;
  readonly rowsRead: number;
  readonly labels: { readonly x: string; readonly y: string; readonly weights?: string };
  /** All rows selected from the CSV (the table's grid and range come from these, as on the command line). */
  readonly data: XYData;
  /** The rows the analysis fitted (after the held-out split). */
  readonly tuning: XYData;
  readonly rejected: readonly RejectedRow[];
  readonly analysis: Analysis;
  readonly rule: RuleSpec;
  readonly settings: Settings;
}

/** How to answer "replace a file Knotwise did not write?": ask the person, or a fixed answer (automation). */
export type OverwriteAnswer = 'ask' | 'yes' | 'no';

/** The two files to write, with their text. */
export interface Deliverables {
  readonly table: { readonly name: string; readonly text: string };
  readonly record: { readonly name: string; readonly text: string };
  /** Table points outside the data range (only when extrapolation is allowed). */
  readonly extrapolated: number;
}

function sha256(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

/** Builds the table and record texts for the chosen rule (throws InputError for grid problems). */
export function deliverables(input: SaveInput): Deliverables {
  const { analysis, settings } = input;
  const selection = selectDf(analysis.tune.candidates, input.rule, analysis.tune.metric);
  const fit = analysis.fits.get(selection.df) as FitResult | undefined;
  if (!fit) throw new InputError(`df ${selection.df} has no fitted curve`);
  const sorted = prepareData(input.data).sortedX;
  const grid = settings.grid ?? defaultGrid(sorted);
  const points = gridPoints(grid, sorted);
  const extrapolated = checkInRange(points, fit.curve.lower, fit.curve.upper, settings.extrapolate);
  const tableText = curveTableCsv(curveTable(fit, points), settings.digits);
  const same = fit === analysis.chosen && JSON.stringify(selection.rule) === JSON.stringify(analysis.tune.selected.rule);
  const diagnostics: Diagnostics = fit === analysis.chosen ? analysis.diagnostics : diagnose(input.tuning, fit);
  const recorded: Analysis = same ? analysis : { ...analysis, tune: { ...analysis.tune, selected: selection }, chosen: fit, diagnostics };
  const tableName = outputName(settings.tableName, input.fileName);
  const recordName = outputName(settings.recordName, input.fileName);
  const record =
    JSON.stringify(
      fitRecord({
        dataFile: input.fileName,
        dataSha256: input.dataSha256,
        columns: input.labels,
        rowsRead: input.rowsRead,
        rowsUsed: input.data.x.length,
        rejected: input.rejected,
        family: analysis.options.family,
        analysis: recorded,
        fit,
        diagnostics,
        grid,
        digits: settings.digits,
        extrapolate: settings.extrapolate,
        tableFile: tableName,
        tableSha256: sha256(tableText),
      }),
      null,
      2,
    ) + '\n';
  return { table: { name: tableName, text: tableText }, record: { name: recordName, text: record }, extrapolated };
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

async function readText(uri: vscode.Uri): Promise<string | undefined> {
  try {
    return new TextDecoder().decode(await vscode.workspace.fs.readFile(uri));
  } catch {
    return undefined;
  }
}

/**
 * True when `target` does not exist or Knotwise wrote it: a fit record (its format field),
 * or a file the neighbouring record lists by name with the SHA-256 of its current bytes
 * (the command line's rule, core/node/outputs.ts).
 */
export async function writtenByKnotwise(target: vscode.Uri, recordUri: vscode.Uri): Promise<boolean> {
  const text = await readText(target);
  if (text === undefined) return true;
  const recordText = target.toString() === recordUri.toString() ? text : await readText(recordUri);
  if (recordText === undefined) return false;
  try {
    const rec = JSON.parse(recordText) as { format?: unknown };
    if (rec.format !== RECORD_FORMAT) return false;
    const name = target.path.slice(target.path.lastIndexOf('/') + 1);
    return target.toString() === recordUri.toString() || recordedFiles(rec).get(name) === sha256(text);
  } catch {
    return false;
  }
}

/** Writes `text` to `target` through a temporary file in the same folder and a rename. */
export async function writeAtomically(target: vscode.Uri, text: string): Promise<void> {
  const name = target.path.slice(target.path.lastIndexOf('/') + 1);
  const tmp = vscode.Uri.joinPath(target, '..', `.${name}.${randomBytes(6).toString('hex')}.knotwise-tmp`);
  await vscode.workspace.fs.writeFile(tmp, new TextEncoder().encode(text));
  try {
    await vscode.workspace.fs.rename(tmp, target, { overwrite: true });
  } catch (err) {
    await vscode.workspace.fs.delete(tmp).then(undefined, () => undefined);
    throw err;
  }
}

/**
 * Saves the deliverables. Resolves to the written URIs, or undefined when the person
 * declined to replace a file Knotwise did not write.
 */
export async function saveDeliverables(input: SaveInput, answer: OverwriteAnswer): Promise<vscode.Uri[] | undefined> {
  const out = deliverables(input);
  const folder = outputFolder(input.dataUri, input.settings.outputFolder);
  const tableUri = vscode.Uri.joinPath(folder, out.table.name);
  const recordUri = vscode.Uri.joinPath(folder, out.record.name);
  for (const u of [tableUri, recordUri]) {
    if (u.toString() === input.dataUri.toString()) throw new InputError(`the output name ${out.table.name === out.record.name ? out.table.name : u.path.slice(u.path.lastIndexOf('/') + 1)} would replace the data file; change knotwise.output.tableName or recordName`);
  }
  const foreign: string[] = [];
  for (const u of [tableUri, recordUri]) if (!(await writtenByKnotwise(u, recordUri))) foreign.push(vscode.workspace.asRelativePath(u));
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
  await writeAtomically(tableUri, out.table.text);
  await writeAtomically(recordUri, out.record.text);
  return [tableUri, recordUri];
}
