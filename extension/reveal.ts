/** Shows a line of a data file in a text editor beside its panel, never over it. */
import * as vscode from 'vscode';

/**
 * The editor group to show the data file in, given the panel's group: a group other than
 * the panel's that already has the file open, else any other group, else a new group
 * right of the panel's.
 */
export function besideColumn(uri: vscode.Uri, panelColumn: vscode.ViewColumn | undefined): vscode.ViewColumn {
  if (panelColumn === undefined) return vscode.ViewColumn.Active;
  const key = uri.toString();
  const others = vscode.window.tabGroups.all.filter((g) => g.viewColumn !== panelColumn);
  const holding = others.find((g) => g.tabs.some((t) => t.input instanceof vscode.TabInputText && t.input.uri.toString() === key));
  const group = holding ?? others.find((g) => g.isActive) ?? others[0];
  // A column past the last group opens a new group there.
  return group ? group.viewColumn : ((panelColumn + 1) as vscode.ViewColumn);
}

/** Opens `uri` at 1-based `line` (clamped to the file) with the line selected, in a group other than the panel's. */
export async function revealLine(uri: vscode.Uri, line: number, panelColumn: vscode.ViewColumn | undefined): Promise<void> {
  const doc = await vscode.workspace.openTextDocument(uri);
  const l = Math.min(Math.max(0, line - 1), doc.lineCount - 1);
  const range = doc.lineAt(l).range;
  await vscode.window.showTextDocument(doc, { viewColumn: besideColumn(uri, panelColumn), selection: range, preserveFocus: false });
}
