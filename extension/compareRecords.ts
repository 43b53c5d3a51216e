/**
 * The command `knotwise.compareFitRecords`: how far one fit record's curve lies from
 * another's, against their bands (core/calibrate/drift.ts, the same comparison as
 * `knotwise compare`). The records come from the explorer's context menu (the later one)
 * and a quick pick (the earlier one), or both from quick picks; the answer is a message
 * and a paragraph in the output channel "Knotwise check".
 */
import * as vscode from 'vscode';
import { recordSample } from '../core/calibrate/baseline';
import { driftBetweenSamples } from '../core/calibrate/drift';
import { readRecordFile } from '../core/outputs/recordPlan';
import { errorText } from './result';

/** The command's id (also in package.json). */
export const COMPARE_RECORDS_COMMAND = 'knotwise.compareFitRecords';

/** What the command returns (tests read it). */
export interface RecordComparison {
  readonly earlier: string;
  readonly later: string;
  /** The comparison in words, or why there is none. */
  readonly words: string;
  /** Inside the earlier curve's band everywhere both cover (null: cannot be judged or no overlap). */
  readonly within: boolean | null;
}

/** A record's curve sample read through workspace.fs; InputError text when it has none. */
async function sampleOf(uri: vscode.Uri): Promise<NonNullable<ReturnType<typeof recordSample>>> {
  const bytes = await vscode.workspace.fs.readFile(uri);
  const read = readRecordFile(bytes, vscode.workspace.asRelativePath(uri));
  const sample = recordSample(read.json);
  if (!sample) throw new Error(`${vscode.workspace.asRelativePath(uri)} holds no usable curve sample`);
  return sample;
}

/** Asks for a fit record of the workspace, leaving out `except`. */
async function pickRecord(title: string, except?: vscode.Uri): Promise<vscode.Uri | undefined> {
  const found = (await vscode.workspace.findFiles('**/*.fit.json', '**/node_modules/**')).filter((u) => u.toString() !== except?.toString());
  if (found.length === 0) {
    void vscode.window.showWarningMessage('Knotwise: no other fit record (*.fit.json) in the workspace to compare with.');
    return undefined;
  }
  const items = found.map((uri) => ({ label: vscode.workspace.asRelativePath(uri), uri }));
  items.sort((a, b) => a.label.localeCompare(b.label));
  const picked = await vscode.window.showQuickPick(items, { title, placeHolder: 'a fit record (*.fit.json)' });
  return picked?.uri;
}

/**
 * Compares `later` with `earlier` (each asked for when not given). Resolves to the comparison,
 * or undefined when the person cancelled a pick. Never throws: a record that cannot be read
 * is said in the message.
 */
export async function compareFitRecords(output: vscode.OutputChannel, later?: vscode.Uri, earlier?: vscode.Uri): Promise<RecordComparison | undefined> {
  const b = later ?? (await pickRecord('Knotwise: the later fit record (the new calibration)'));
  if (!b) return undefined;
  const a = earlier ?? (await pickRecord(`Knotwise: compare ${vscode.workspace.asRelativePath(b)} with which earlier record?`, b));
  if (!a) return undefined;
  const names = { earlier: vscode.workspace.asRelativePath(a), later: vscode.workspace.asRelativePath(b) };
  let result: RecordComparison;
  try {
    const drift = driftBetweenSamples(await sampleOf(a), await sampleOf(b));
    result = drift ? { ...names, words: drift.words, within: drift.withinRecordedBand } : { ...names, words: 'The two curves share no x range: they cannot be compared.', within: null };
  } catch (err) {
    result = { ...names, words: `Cannot compare: ${errorText(err)}`, within: null };
  }
  output.appendLine(`${names.later} against ${names.earlier}: ${result.words}`);
  const text = `Knotwise: ${names.later} against ${names.earlier}: ${result.words}`;
  if (result.within === true) void vscode.window.showInformationMessage(text);
  else void vscode.window.showWarningMessage(text);
  return result;
}
