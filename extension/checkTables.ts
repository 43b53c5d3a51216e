/**
 * The full check of fit records inside the editor: every output rebuilt from the data and
 * the recorded spec and compared byte for byte with the files on disk (core/node/check.ts,
 * the same check as `knotwise check`). One record from "Show what changed" of the status bar
 * item, or every record of the workspace with the command `knotwise.checkCurveTables`,
 * whose report goes to the output channel "Knotwise check". The check reads files with
 * Node's file system, so it takes records on disk (file: URIs) only.
 */
import * as vscode from 'vscode';
import { checkRecord, type CheckResult } from '../core/node/check';
import { shellWord } from '../core/outputs/shellWord';
import type { RecordWatch } from './records';

/** The command that checks every curve table of the workspace (also in package.json). */
export const CHECK_TABLES_COMMAND = 'knotwise.checkCurveTables';

/** The name of the output channel the report goes to. */
export const CHECK_CHANNEL_NAME = 'Knotwise check';

/** One record's full check as the command returns it. */
export interface RecordCheckView {
  /** The record's URI as text. */
  readonly record: string;
  readonly status: CheckResult['status'];
  /** What changed, or why the record could not be checked; empty when current. */
  readonly messages: readonly string[];
  /** Remarks that leave the status as it is. */
  readonly notes: readonly string[];
  /** When out of date: the command that brings the outputs up to date, run from the record's workspace folder. */
  readonly update?: string;
}

/** The counts of a set of checks. */
export interface CheckCounts {
  readonly current: number;
  readonly changed: number;
  readonly error: number;
}

/** The words of each status in the report and the summary. */
const STATUS_WORDS: Record<CheckResult['status'], string> = { current: 'current', changed: 'out of date', error: 'could not be checked' };

/** Why a record off the disk is not checked in full. */
export function needsDisk(recordUri: vscode.Uri): string {
  return `the full check, which rebuilds every output from the data and compares them byte for byte, needs the files on disk; this record is on "${recordUri.scheme}:"`;
}

/** `regenerate` (a command run in the record's folder) as run from the record's workspace folder, or with the absolute folder outside any. */
function updateCommand(recordUri: vscode.Uri, regenerate: string): string {
  const folder = vscode.Uri.joinPath(recordUri, '..');
  const root = vscode.workspace.getWorkspaceFolder(recordUri)?.uri;
  const rel = root === undefined ? folder.fsPath : folder.path === root.path ? '' : folder.path.startsWith(`${root.path}/`) ? folder.path.slice(root.path.length + 1) : folder.fsPath;
  return rel === '' ? regenerate : `cd ${shellWord(rel)} && ${regenerate}`;
}

/** The full check of one record; never throws (a problem is status 'error'). */
export async function fullCheck(recordUri: vscode.Uri): Promise<RecordCheckView> {
  const record = recordUri.toString();
  if (recordUri.scheme !== 'file') return { record, status: 'error', messages: [needsDisk(recordUri)], notes: [] };
  const r = await checkRecord(recordUri.fsPath);
  const update = r.status === 'changed' && r.regenerate !== undefined ? { update: updateCommand(recordUri, r.regenerate) } : {};
  return { record, status: r.status, messages: r.messages, notes: r.notes, ...update };
}

/** Counts results by status. */
export function countChecks(results: readonly RecordCheckView[]): CheckCounts {
  const counts = { current: 0, changed: 0, error: 0 };
  for (const r of results) counts[r.status]++;
  return counts;
}

/** The summary of a run: "3 current, 1 out of date, 0 could not be checked", and how far it got when stopped. */
export function checkSummary(counts: CheckCounts, total: number): string {
  const done = counts.current + counts.changed + counts.error;
  const text = `${counts.current} ${STATUS_WORDS.current}, ${counts.changed} ${STATUS_WORDS.changed}, ${counts.error} ${STATUS_WORDS.error}`;
  return done < total ? `${text} (stopped after ${done} of ${total} records)` : text;
}

/** One record's lines in the report. */
function reportLines(r: RecordCheckView): string[] {
  return [
    `${vscode.workspace.asRelativePath(vscode.Uri.parse(r.record))}: ${STATUS_WORDS[r.status]}`,
    ...r.messages.map((m) => `  ${m}`),
    ...r.notes.map((m) => `  ${m}`),
    ...(r.update !== undefined ? [`  to update, from the workspace folder: ${r.update}`] : []),
  ];
}

/** One record's full check in a modal, with a button that copies the update command when there is one. */
export async function showCheck(r: RecordCheckView): Promise<void> {
  const shown = vscode.workspace.asRelativePath(vscode.Uri.parse(r.record));
  const lines = [...r.messages, ...r.notes].map((m) => `• ${m}`);
  if (r.status === 'current') {
    const detail = ['Every output rebuilt from the data and the recorded spec is the same byte for byte.', ...lines].join('\n');
    void vscode.window.showInformationMessage(`Knotwise: ${shown} is current.`, { modal: true, detail });
    return;
  }
  if (r.status === 'error') {
    void vscode.window.showWarningMessage(`Knotwise: ${shown} could not be checked.`, { modal: true, detail: lines.join('\n') });
    return;
  }
  const copy = 'Copy the update command';
  const detail = [...lines, ...(r.update !== undefined ? ['', `To update, run from the workspace folder: ${r.update}`] : [])].join('\n');
  const choice = await vscode.window.showInformationMessage(`Knotwise: ${shown} is out of date.`, { modal: true, detail }, ...(r.update !== undefined ? [copy] : []));
  if (choice === copy && r.update !== undefined) await vscode.env.clipboard.writeText(r.update);
}

/**
 * The command `knotwise.checkCurveTables`: the full check of every fit record the watch's
 * glob finds, one after the other under a cancellable progress notification (a stop takes
 * effect after the record being checked), the report in `output`, the watch's entries
 * checked again, and a summary message. Resolves to the results in the order checked.
 */
export async function checkCurveTables(watch: RecordWatch, output: vscode.OutputChannel): Promise<RecordCheckView[]> {
  const found = await watch.findRecords();
  output.clear();
  if (found.length === 0) {
    output.appendLine('No fit records in the workspace.');
    void vscode.window.showInformationMessage('Knotwise: there are no fit records in the workspace to check.');
    return [];
  }
  output.appendLine(`${found.length} fit record${found.length === 1 ? '' : 's'}: every output rebuilt from the data and the recorded spec, and compared byte for byte with the file.`);
  const results: RecordCheckView[] = [];
  await vscode.window.withProgress({ location: vscode.ProgressLocation.Notification, title: 'Knotwise: checking curve tables', cancellable: true }, async (progress, token) => {
    for (const [i, uri] of found.entries()) {
      if (token.isCancellationRequested) return;
      progress.report({ message: `record ${i + 1} of ${found.length}: ${vscode.workspace.asRelativePath(uri)}` });
      const r = await fullCheck(uri);
      results.push(r);
      for (const line of reportLines(r)) output.appendLine(line);
      progress.report({ increment: 100 / found.length });
    }
  });
  const counts = countChecks(results);
  const summary = checkSummary(counts, found.length);
  output.appendLine(summary);
  await watch.refresh(found);
  const show = 'Show the report';
  const message = `Knotwise: ${summary}.`;
  const shown = counts.changed + counts.error > 0 ? vscode.window.showWarningMessage(message, show) : vscode.window.showInformationMessage(message, show);
  void Promise.resolve(shown).then((choice) => {
    if (choice === show) output.show(true);
  });
  return results;
}
