/**
 * Knotwise's VS Code entry point: registers the commands; everything is disposed through
 * one store when the extension deactivates.
 */
import * as vscode from 'vscode';
import type { KnotwiseApi, RunSummary, SaveCommandOptions, TuneCommandOptions } from './api';
import { CHECK_CHANNEL_NAME, CHECK_TABLES_COMMAND, checkCurveTables } from './checkTables';
import { COMPARE_RECORDS_COMMAND, compareFitRecords } from './compareRecords';
import { Controller } from './controller';
import { isTableFile } from './csvSource';
import { openDemoData } from './demo';
import { DisposableStore } from './disposables';
import { STALE_COMMAND } from './records';

/** Command identifiers (also in package.json). */
export const COMMANDS = {
  tune: 'knotwise.tuneCurve',
  surface: 'knotwise.tuneSurface',
  save: 'knotwise.saveCurveTable',
  stop: 'knotwise.stopTuning',
  forget: 'knotwise.forgetColumns',
  stale: STALE_COMMAND,
  check: CHECK_TABLES_COMMAND,
  demo: 'knotwise.openDemoData',
  compare: COMPARE_RECORDS_COMMAND,
} as const;

const store = new DisposableStore();

function noTarget(): RunSummary {
  void vscode.window.showWarningMessage('Knotwise: open or select a .csv or .tsv file first.');
  return { status: 'failed', file: '', message: 'no CSV file' };
}

/** Registers the commands; returns the API other extensions and the tests read (KnotwiseApi). */
export function activate(context: vscode.ExtensionContext): KnotwiseApi {
  const controller = store.add(new Controller(context));
  store.add(
    vscode.commands.registerCommand(COMMANDS.tune, async (arg?: unknown, options?: TuneCommandOptions) => {
      const uri = controller.targetUri(arg);
      if (!uri || !isTableFile(uri)) return noTarget();
      return controller.tune(uri, options ?? {});
    }),
  );
  store.add(
    vscode.commands.registerCommand(COMMANDS.surface, async (arg?: unknown) => {
      const uri = controller.targetUri(arg);
      if (!uri || !isTableFile(uri)) return noTarget();
      return controller.tuneSurface(uri);
    }),
  );
  store.add(
    vscode.commands.registerCommand(COMMANDS.save, async (arg?: unknown, options?: SaveCommandOptions) => {
      const uri = controller.targetUri(arg);
      if (!uri || !isTableFile(uri)) return noTarget();
      return controller.saveCommand(uri, options ?? {});
    }),
  );
  store.add(vscode.commands.registerCommand(COMMANDS.stop, () => controller.stopAll()));
  store.add(
    vscode.commands.registerCommand(COMMANDS.forget, async (arg?: unknown) => {
      const uri = controller.targetUri(arg);
      if (uri) await controller.forgetColumns(uri);
    }),
  );
  store.add(vscode.commands.registerCommand(COMMANDS.stale, () => controller.records.offer()));
  // The report's channel is made at the first check, so the output list shows it only after one.
  let checkOutput: vscode.OutputChannel | undefined;
  store.add(vscode.commands.registerCommand(COMMANDS.check, () => checkCurveTables(controller.records, (checkOutput ??= store.add(vscode.window.createOutputChannel(CHECK_CHANNEL_NAME))))));
  store.add(
    vscode.commands.registerCommand(COMMANDS.compare, (arg?: unknown, earlier?: unknown) =>
      compareFitRecords(
        (checkOutput ??= store.add(vscode.window.createOutputChannel(CHECK_CHANNEL_NAME))),
        arg instanceof vscode.Uri ? arg : undefined,
        earlier instanceof vscode.Uri ? earlier : undefined,
      ),
    ),
  );
  store.add(vscode.commands.registerCommand(COMMANDS.demo, () => openDemoData(context.extensionUri)));
  context.subscriptions.push(store);
  return controller.api();
}

export function deactivate(): void {
  store.dispose();
}
