/**
 * The walkthrough's first step: copies the demo data bundled with the extension
 * (examples/humidity-sensor.csv, invented readings of a humidity sensor) into the first
 * workspace folder and opens it. A copy already there is opened as it is, never overwritten.
 * Reads and writes through workspace.fs, like the rest of the host.
 */
import * as vscode from 'vscode';

/** The bundled demo file, relative to the extension's folder. */
export const DEMO_FILE = ['examples', 'humidity-sensor.csv'] as const;

/** Copies the demo data into the workspace (when not there yet) and opens it; returns its URI, or undefined without a folder. */
export async function openDemoData(extensionUri: vscode.Uri): Promise<vscode.Uri | undefined> {
  const folder = vscode.workspace.workspaceFolders?.[0];
  if (!folder) {
    void vscode.window.showInformationMessage('Knotwise: open a folder first; the demo data is copied into it.');
    return undefined;
  }
  const target = vscode.Uri.joinPath(folder.uri, DEMO_FILE[1]);
  if (!(await exists(target))) {
    const bytes = await vscode.workspace.fs.readFile(vscode.Uri.joinPath(extensionUri, ...DEMO_FILE));
    await vscode.workspace.fs.writeFile(target, bytes);
  }
  await vscode.window.showTextDocument(target, { preview: false });
  return target;
}

async function exists(uri: vscode.Uri): Promise<boolean> {
  try {
    await vscode.workspace.fs.stat(uri);
    return true;
  } catch {
    return false;
  }
}
