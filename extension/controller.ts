/**
 * The Knotwise host: one session per data file (extension/session.ts), the settings
 * snapshot and what a change of it does to open panels, the commands' targets, the editor
 * events that concern a session's file, and panels restored after a window reload.
 */
import * as vscode from 'vscode';
import { workerRunner } from '../core/node/pool';
import { isPanelMessage, isPanelState } from '../core/protocol';
import type { KnotwiseApi, RunSummary, SaveCommandOptions, SaveSummary, TuneCommandOptions } from './api';
import { ColumnMemory } from './columns';
import { isTableFile } from './csvSource';
import { DisposableStore } from './disposables';
import type { Touch } from './follow';
import { PANEL_VIEW_TYPE } from './panel';
import { routePanelMessage } from './panelMessages';
import { RejectedRowsView } from './problems';
import { RecordWatch } from './records';
import { DataSession, type SessionContext } from './session';
import { readSettings, sameAnalysis, type Settings } from './settings';

/** How long after activation the workspace's fit records are first looked at (ms): off the activation path. */
const RECORD_SCAN_DELAY_MS = 1000;

/** The glob of fit records: the command line's `*.fit.json` and the name the settings give records. */
function recordGlob(recordName: string): string {
  const pattern = recordName
    .split('${name}')
    .join('*')
    .replace(/[[\]{}?!,]/g, (c) => `[${c}]`);
  return pattern === '*.fit.json' ? '**/*.fit.json' : `**/{*.fit.json,${pattern}}`;
}

/** How long an edited file with Problems entries rests before its rows are checked again (ms). */
const REVALIDATE_DELAY_MS = 400;

/** The Knotwise host controller. */
export class Controller implements vscode.Disposable {
  private readonly sessions = new Map<string, DataSession>();
  private readonly problems = new RejectedRowsView();
  private readonly ctx: SessionContext;
  private nextRunId = 1;
  /** The window's settings (no resource): the fit records' name pattern. */
  private settings: Settings;
  /** Settings per data file, read with the file as resource so folder settings apply; cleared when settings change. */
  private readonly fileSettings = new Map<string, Settings>();
  /** The last settings warning shown, so one problem is not reported again for every file. */
  private lastSettingsWarning = '';
  /** The value last given to the `knotwise.tuning` context key. */
  private tuningContext = false;
  private readonly subscriptions = new DisposableStore();
  private readonly revalidateTimers = new Map<string, ReturnType<typeof setTimeout>>();
  /** Every fit record of the workspace, watched (started after activation). */
  readonly records: RecordWatch;
  private readonly recordScan: ReturnType<typeof setTimeout>;

  constructor(context: vscode.ExtensionContext) {
    this.settings = this.readSettings();
    this.ctx = {
      extensionUri: context.extensionUri,
      memory: new ColumnMemory(context.workspaceState),
      problems: this.problems,
      runner: workerRunner(),
      settings: (uri) => this.settingsFor(uri),
      runningChanged: () => this.updateTuningContext(),
      newRunId: () => this.nextRunId++,
    };
    const s = this.subscriptions;
    s.add(this.problems);
    this.records = s.add(new RecordWatch(() => recordGlob(this.settings.recordName)));
    this.recordScan = setTimeout(() => this.records.start(), RECORD_SCAN_DELAY_MS);
    s.add(
      vscode.workspace.onDidChangeConfiguration((e) => {
        if (e.affectsConfiguration('knotwise')) this.settingsChanged();
      }),
    );
    s.add(
      vscode.workspace.onDidChangeTextDocument((e) => {
        // An event without content changes only reports the dirty flag (a save follows).
        if (e.contentChanges.length === 0) return;
        this.touch(e.document.uri, 'edit');
        this.scheduleRevalidate(e.document.uri);
      }),
    );
    s.add(vscode.workspace.onDidSaveTextDocument((doc) => this.touch(doc.uri, 'save')));
    // Context keys of the command palette (package.json): the palette's own context has no
    // resource keys, so the host says whether the active editor holds a CSV or TSV.
    s.add(
      vscode.workspace.onDidCloseTextDocument((doc) => {
        // Unsaved edits may have been dropped: the data is the file on disk again. The
        // Problems entries stay while the panel that lists them is open.
        this.touch(doc.uri, 'close');
        this.scheduleRevalidate(doc.uri);
      }),
    );
    s.add(
      vscode.window.registerWebviewPanelSerializer(PANEL_VIEW_TYPE, {
        deserializeWebviewPanel: (panel, state) => {
          this.restorePanel(panel, state);
          return Promise.resolve();
        },
      }),
    );
  }

  /** The API returned by `activate`. */
  api(): KnotwiseApi {
    const find = (uri: vscode.Uri): DataSession | undefined => this.sessions.get(uri.toString());
    return {
      panelState: (uri) => {
        const s = find(uri);
        if (!s?.payload) return undefined;
        const groups = s.groupsShown;
        return { payload: s.payload, posted: s.posted, analysed: s.analysed, ready: s.panelReady, ...(groups ? { groups } : {}) };
      },
      surfaceState: (uri) => {
        const s = find(uri);
        return s?.hasPanel && s.surface ? { view: s.surface.view, analysed: s.analysed } : undefined;
      },
      dataState: (uri) => {
        const s = find(uri);
        return s?.hasPanel ? s.dataState() : undefined;
      },
      panelLog: (uri) => {
        const s = find(uri);
        return s?.hasPanel && s.panel ? [...s.panel.log] : [];
      },
      panelMessage: (uri, message) => {
        const s = find(uri);
        if (!s?.hasPanel || !isPanelMessage(message)) return false;
        routePanelMessage(s, message);
        return true;
      },
      staleRecords: async () => {
        this.records.start();
        await this.records.settled();
        return { statusText: this.records.statusText, records: this.records.stale() };
      },
    };
  }

  /** Reads the settings for a resource (its workspace folder's and the file's language settings apply), or the window's. */
  private readSettings(uri?: vscode.Uri): Settings {
    const cfg = vscode.workspace.getConfiguration('knotwise', uri);
    const s = readSettings((k) => cfg.get(k));
    const warning = s.problems.join('; ');
    if (warning && warning !== this.lastSettingsWarning) void vscode.window.showWarningMessage(`Knotwise ignored some settings: ${warning}`);
    this.lastSettingsWarning = warning;
    return s;
  }

  /** The settings snapshot of one data file. */
  private settingsFor(uri: vscode.Uri): Settings {
    const key = uri.toString();
    let s = this.fileSettings.get(key);
    if (!s) {
      s = this.readSettings(uri);
      this.fileSettings.set(key, s);
    }
    return s;
  }

  /** Sets the `knotwise.tuning` context key (package.json shows Stop Tuning only while it is true). */
  private updateTuningContext(): void {
    let tuning = false;
    for (const s of this.sessions.values()) if (s.isRunning) tuning = true;
    if (tuning === this.tuningContext) return;
    this.tuningContext = tuning;
    void vscode.commands.executeCommand('setContext', 'knotwise.tuning', tuning);
  }

  /** The session of a file, made when needed. */
  private session(uri: vscode.Uri): DataSession {
    const key = uri.toString();
    let s = this.sessions.get(key);
    if (!s) {
      s = new DataSession(uri, this.ctx);
      this.sessions.set(key, s);
    }
    return s;
  }

  /** Hands an editor event about a file to its session, if it has one. */
  private touch(uri: vscode.Uri, t: Touch): void {
    this.sessions.get(uri.toString())?.touch(t);
  }

  /**
   * A panel the window restored after a reload: its saved state names its data file, and
   * that file's session takes it over and runs the analysis again. A state that does not
   * pass the protocol's guard, or a file that already has a panel, closes the panel.
   */
  private restorePanel(panel: vscode.WebviewPanel, state: unknown): void {
    if (!isPanelState(state)) {
      panel.dispose();
      return;
    }
    let uri: vscode.Uri;
    try {
      uri = vscode.Uri.parse(state.file, true);
    } catch {
      panel.dispose();
      return;
    }
    const session = this.session(uri);
    if (!isTableFile(uri) || session.hasPanel) {
      panel.dispose();
      return;
    }
    session.restore(panel, state);
  }

  /** The CSV a command is about: its argument, else the active editor's file. */
  targetUri(arg: unknown): vscode.Uri | undefined {
    if (arg instanceof vscode.Uri) return arg;
    const active = vscode.window.activeTextEditor?.document.uri;
    if (active && isTableFile(active)) return active;
    // A Knotwise panel in front: its file.
    for (const s of this.sessions.values()) if (s.hasPanel) return s.uri;
    return active;
  }

  /** The tune command: asks for the columns, tunes with progress and shows the panel. */
  tune(uri: vscode.Uri, options: TuneCommandOptions = {}): Promise<RunSummary> {
    return this.session(uri).tune({ options, ask: true });
  }

  /** The surface command: asks for two inputs and the reading (the remembered ones offered first), tunes the surface and shows it. */
  tuneSurface(uri: vscode.Uri): Promise<RunSummary> {
    return this.session(uri).tune({ ask: true, surface: true });
  }

  /** The save command: saves the latest run of `uri`, tuning it first when there is none or it is out of date. */
  saveCommand(uri: vscode.Uri, options: SaveCommandOptions = {}): Promise<SaveSummary> {
    return this.session(uri).saveCommand(options);
  }

  /** Stops every running tuning; returns how many were running. */
  stopAll(): number {
    let n = 0;
    for (const s of this.sessions.values()) if (s.stop()) n++;
    return n;
  }

  async forgetColumns(uri: vscode.Uri): Promise<void> {
    await this.ctx.memory.forget(uri);
  }

  /**
   * Applies changed settings to open panels where it matters: options that change the
   * analysis rerun it; a new rule or tolerance re-renders the same run; table and output
   * settings only affect the next save; refit settings change what the banner says.
   * Changed model settings replace the panel's own, and a changed candidates setting the panel's candidates.
   */
  private settingsChanged(): void {
    const windowBefore = this.settings;
    const before = new Map(this.fileSettings);
    this.fileSettings.clear();
    this.lastSettingsWarning = '';
    this.settings = this.readSettings();
    for (const s of this.sessions.values()) {
      const old = before.get(s.uri.toString()) ?? windowBefore;
      const now = this.settingsFor(s.uri);
      const modelChanged = JSON.stringify(old.model) !== JSON.stringify(now.model) || old.huberK !== now.huberK;
      const ruleChanged = JSON.stringify(old.rule) !== JSON.stringify(now.rule) || old.tolerancePercent !== now.tolerancePercent;
      const refitChanged = old.refitOnSave !== now.refitOnSave;
      if (modelChanged) s.model = undefined;
      // A changed candidates setting replaces the candidates the panel set.
      if (JSON.stringify(old.candidates) !== JSON.stringify(now.candidates)) s.candidates = undefined;
      if (!s.result || !s.hasPanel) continue;
      // A grouped run chose each group's df (or the shared one) by the rule: a new rule or a shared df chooses again.
      const groupsChanged = s.result.groups !== undefined && (ruleChanged || old.groups.sharedDf !== now.groups.sharedDf);
      if (!sameAnalysis(s.result.options, s.analysisOptionsFor(now)) || groupsChanged) void s.tune({ background: true });
      else if (ruleChanged) s.showResult(now.rule);
      else if (JSON.stringify([old.inverse, old.inverseOptions]) !== JSON.stringify([now.inverse, now.inverseOptions])) s.showResult();
      else if (refitChanged) s.postDataState();
    }
  }

  /** Re-checks the rows of an edited CSV that has Problems entries (debounced). */
  private scheduleRevalidate(uri: vscode.Uri): void {
    if (!this.problems.has(uri)) return;
    const key = uri.toString();
    clearTimeout(this.revalidateTimers.get(key));
    this.revalidateTimers.set(
      key,
      setTimeout(() => {
        this.revalidateTimers.delete(key);
        void this.sessions.get(key)?.revalidate();
      }, REVALIDATE_DELAY_MS),
    );
  }

  dispose(): void {
    clearTimeout(this.recordScan);
    this.stopAll();
    for (const t of this.revalidateTimers.values()) clearTimeout(t);
    for (const s of this.sessions.values()) s.dispose();
    this.subscriptions.dispose();
  }
}
