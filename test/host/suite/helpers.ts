/** Small helpers the extension-host suites share: the workspace's files, settings, the extension's API, waiting on conditions. */
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as vscode from 'vscode';
import type { KnotwiseApi } from '../../../extension/api';
import { selectDf } from '../../../core/tune/rules';
import type { FitDetail } from '../../../core/view/model';

export const EXTENSION_ID = 'knotwise.knotwise';

export function folder(): vscode.Uri {
  const f = vscode.workspace.workspaceFolders?.[0];
  assert.ok(f, 'a workspace folder is open');
  return f.uri;
}

export function file(name: string): vscode.Uri {
  return vscode.Uri.joinPath(folder(), name);
}

export async function text(uri: vscode.Uri): Promise<string> {
  return new TextDecoder().decode(await vscode.workspace.fs.readFile(uri));
}

export async function writeText(uri: vscode.Uri, content: string): Promise<void> {
  await vscode.workspace.fs.writeFile(uri, new TextEncoder().encode(content));
}

export async function exists(uri: vscode.Uri): Promise<boolean> {
  try {
    await vscode.workspace.fs.stat(uri);
    return true;
  } catch {
    return false;
  }
}

export async function closeEverything(): Promise<void> {
  await vscode.commands.executeCommand('workbench.action.closeAllEditors');
}

export async function setSetting(key: string, value: unknown): Promise<void> {
  await vscode.workspace.getConfiguration('knotwise').update(key, value, vscode.ConfigurationTarget.Workspace);
}

/** The value the extension's activate returned. */
export function api(): KnotwiseApi {
  const ext = vscode.extensions.getExtension(EXTENSION_ID);
  assert.ok(ext?.isActive, 'Knotwise is active');
  return ext.exports as KnotwiseApi;
}

/** Polls `probe` every 50 ms until it returns a value (at most `ms`): a wait on a condition, not on time. */
export async function waitFor<T>(what: string, probe: () => T | undefined | Promise<T | undefined>, ms = 60000): Promise<T> {
  const deadline = Date.now() + ms;
  for (;;) {
    const v = await probe();
    if (v !== undefined) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/**
 * The residual details of the df a file's panel shows: they follow the result (the panel
 * asks for them once it has drawn the curve), so this waits for the host's `detail` message
 * of the shown run, or takes them from the payload when it already carried them.
 */
export async function shownDetail(uri: vscode.Uri): Promise<FitDetail> {
  return waitFor('the residual details of the shown df', () => {
    const state = api().panelState(uri);
    if (!state) return undefined;
    const { payload } = state;
    const df = payload.rule.kind === 'pick' ? payload.rule.df : selectDf(payload.candidates, payload.rule, payload.metric).df;
    const sent = api()
      .panelLog(uri)
      .find((m) => m.type === 'detail' && m.runId === payload.runId && m.detail.df === df);
    return sent?.type === 'detail' ? sent.detail : payload.details.find((d) => d.df === df);
  });
}

/**
 * What the command line writes for the same inputs: runs the extension's bundled
 * `knotwise fit <data> <args> --save --quiet` on a copy of the workspace file `data` in a
 * fresh folder (with copies of the workspace files `alongside`, e.g. the record a save
 * replaces, when they exist) and returns every file in that folder but the data, by name.
 */
export function cliOutputs(data: string, args: readonly string[], alongside: readonly string[] = []): Map<string, string> {
  const out = mkdtempSync(join(tmpdir(), 'knotwise-cli-'));
  try {
    copyFileSync(file(data).fsPath, join(out, data));
    for (const name of alongside) if (existsSync(file(name).fsPath)) copyFileSync(file(name).fsPath, join(out, name));
    const ext = vscode.extensions.getExtension(EXTENSION_ID);
    assert.ok(ext);
    execFileSync(process.execPath, [join(ext.extensionPath, 'dist', 'cli.js'), 'fit', join(out, data), ...args, '--save', '--quiet']);
    return new Map(
      readdirSync(out)
        .filter((f) => f !== data)
        .map((f) => [f, readFileSync(join(out, f), 'utf8')]),
    );
  } finally {
    rmSync(out, { recursive: true, force: true });
  }
}

/** Removes every file of the workspace folder named `<stem>.*` except the data file `keep`. */
export async function removeOutputs(stem: string, keep: string): Promise<void> {
  for (const [name] of await vscode.workspace.fs.readDirectory(folder())) {
    if (name.startsWith(`${stem}.`) && name !== keep) await vscode.workspace.fs.delete(file(name)).then(undefined, () => undefined);
  }
}
