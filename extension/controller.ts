/**
 * The host side of Knotwise: one session per CSV file (columns, latest run, panel),
 * tuning with a cancellable progress notification off the main thread (core's worker
 * pool), Problems entries for rejected rows, and saving.
 */
import * as vscode from 'vscode';
import { analyse } from '../core/analysis';
import type { Analysis, AnalysisOptions } from '../core/analysisTypes';
import { CancelledError, InputError } from '../core/errors';
import { selectColumns, type Selection as ColumnSelection } from '../core/ingest/select';
import { workerRunner } from '../core/node/pool';
import type { PanelMessage } from '../core/protocol';
import { unreachable } from '../core/protocol';
import { holdoutMask, orderByX } from '../core/tune/plan';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec } from '../core/tune/types';
import type { XYData } from '../core/types';
import { buildPanelPayload, detailFor } from '../core/view/payload';
import { choiceFits, ColumnMemory, pickColumns, type ColumnChoice } from './columns';
import { baseName, isTableFile, readCsv, type CsvSource } from './csvSource';
import { PanelView } from './panel';
import { RejectedRowsView } from './problems';
import { saveDeliverables, type OverwriteAnswer } from './save';
import { analysisOptions, readSettings, sameAnalysis, type Settings } from './settings';

/** Options of the tune command (for keybindings, other extensions and tests). */
export interface TuneCommandOptions {
  /** Columns to use without asking. */
  readonly columns?: ColumnChoice;
}

/** Options of the save command. */
export interface SaveCommandOptions extends TuneCommandOptions {
  /** Answer to "replace a file Knotwise did not write?" without asking (default: ask). */
  readonly replaceForeignFiles?: OverwriteAnswer;
  /** Rule to save with (default: the panel's current choice, else the settings' rule). */
  readonly rule?: RuleSpec;
}

/** What a run command resolves to. */
export interface RunSummary {
  readonly status: 'done' | 'cancelled' | 'failed' | 'superseded' | 'dismissed';
  readonly file: string;
  readonly runId?: number;
  readonly chosenDf?: number;
  readonly candidates?: readonly number[];
  readonly rowsUsed?: number;
  readonly rejected?: number;
  readonly message?: string;
}

/** A finished run. */
interface RunResult {
  readonly runId: number;
  readonly source: CsvSource;
  readonly columns: ColumnSelection;
  readonly tuning: XYData;
  readonly options: AnalysisOptions;
  readonly analysis: Analysis;
}

/** Everything Knotwise keeps for one CSV file. */
interface FileSession {
  readonly uri: vscode.Uri;
  panel?: PanelView | undefined;
  /** The running run's id and cancellation. */
  running?: { readonly runId: number; readonly cancel: vscode.CancellationTokenSource } | undefined;
  result?: RunResult | undefined;
  /** The person's current rule in the panel. */
  rule?: RuleSpec | undefined;
}

/** The rows analyse() fits: all rows, or those left after the held-out split (same split as core/analysis.ts). */
export function tuningRows(data: XYData, options: AnalysisOptions): XYData {
  if (!options.holdout) return data;
  const mask = holdoutMask(orderByX(data.x), options.holdout, options.seed);
  const idx: number[] = [];
  for (let i = 0; i < mask.length; i++) if (mask[i] === 0) idx.push(i);
  const pick = (a: Float64Array): Float64Array => Float64Array.from(idx, (i) => a[i] as number);
  return { x: pick(data.x), y: pick(data.y), w: data.w ? pick(data.w) : undefined, lines: data.lines ? Int32Array.from(idx, (i) => (data.lines as Int32Array)[i] as number) : undefined };
}

/** Smallest interval between progress updates (ms), so the notification is not flooded. */
const PROGRESS_INTERVAL_MS = 150;

/** The Knotwise host controller. */
export class Controller implements vscode.Disposable {
  private readonly sessions = new Map<string, FileSession>();
  private readonly memory: ColumnMemory;
  private readonly problems = new RejectedRowsView();
  private readonly runner = workerRunner();
  private nextRunId = 1;
  private settings: Settings;
  private readonly subscriptions: vscode.Disposable[] = [];
  private readonly revalidateTimers = new Map<string, ReturnType<typeof setTimeout>>();

  constructor(private readonly context: vscode.ExtensionContext) {
    this.memory = new ColumnMemory(context.workspaceState);
    this.settings = this.readSettings();
    this.subscriptions.push(
      this.problems,
      vscode.workspace.onDidChangeConfiguration((e) => {
        if (e.affectsConfiguration('knotwise')) this.settingsChanged();
      }),
      vscode.workspace.onDidCloseTextDocument((doc) => this.problems.clear(doc.uri)),
      vscode.workspace.onDidChangeTextDocument((e) => this.scheduleRevalidate(e.document.uri)),
    );
  }

  private readSettings(): Settings {
    const cfg = vscode.workspace.getConfiguration('knotwise');
    const s = readSettings((k) => cfg.get(k));
    if (s.problems.length) void vscode.window.showWarningMessage(`Knotwise ignored some settings: ${s.problems.join('; ')}`);
    return s;
  }

  private session(uri: vscode.Uri): FileSession {
    const key = uri.toString();
    let s = this.sessions.get(key);
    if (!s) {
      s = { uri };
      this.sessions.set(key, s);
    }
    return s;
  }

  /** The CSV a command is about: its argument, else the active editor's file. */
  targetUri(arg: unknown): vscode.Uri | undefined {
    if (arg instanceof vscode.Uri) return arg;
    const active = vscode.window.activeTextEditor?.document.uri;
    if (active && isTableFile(active)) return active;
    // A Knotwise panel in front: its file.
    for (const s of this.sessions.values()) if (s.panel && !s.panel.isClosed) return s.uri;
    return active;
  }

  /** Reads the file, asks for columns, tunes with progress and shows the panel. */
  async tune(uri: vscode.Uri, options: TuneCommandOptions = {}, ask = true): Promise<RunSummary> {
    const file = baseName(uri);
    const session = this.session(uri);
    // A second run on the same file replaces the first.
    session.running?.cancel.cancel();
    const runId = this.nextRunId++;
    const cancel = new vscode.CancellationTokenSource();
    session.running = { runId, cancel };
    try {
      const source = await readCsv(uri);
      const remembered = this.memory.get(uri);
      let choice = options.columns;
      if (!choice && !ask && remembered && choiceFits(source.table, remembered)) choice = remembered;
      if (!choice) choice = await pickColumns(source.table, file, remembered && choiceFits(source.table, remembered) ? remembered : undefined, cancel.token);
      if (!choice) return { status: 'dismissed', file, runId };
      await this.memory.set(uri, choice);
      const columns = selectColumns(source.table, choice, file);
      this.problems.show(uri, source.text, source.table, columns.rejected);
      const settings = this.settings;
      const opts = analysisOptions(settings);
      const tuning = tuningRows(columns.data, opts);
      const panel = this.panelFor(session, file);
      panel.post({ type: 'running', runId, message: `Tuning ${columns.data.x.length} rows…` });
      const analysis = await this.analyseWithProgress(file, columns.data, opts, runId, panel, cancel.token);
      if (session.running?.runId !== runId) return { status: 'superseded', file, runId };
      session.result = { runId, source, columns, tuning, options: opts, analysis };
      session.rule = analysis.tune.selected.rule;
      this.showResult(session, settings);
      return {
        status: 'done',
        file,
        runId,
        chosenDf: analysis.chosen.df,
        candidates: analysis.tune.candidates.map((c) => c.df),
        rowsUsed: columns.data.x.length,
        rejected: columns.rejected.length,
      };
    } catch (err) {
      if (err instanceof CancelledError || cancel.token.isCancellationRequested) {
        const superseded = session.running?.runId !== runId;
        if (!superseded) session.panel?.post({ type: 'failed', runId, message: 'Tuning was cancelled. Use “Run again” to start over.' });
        return { status: superseded ? 'superseded' : 'cancelled', file, runId };
      }
      const message = err instanceof InputError ? err.describe() : err instanceof Error ? err.message : String(err);
      session.panel?.post({ type: 'failed', runId, message: `Knotwise could not tune ${file}: ${message}` });
      void vscode.window.showErrorMessage(`Knotwise: ${message}`);
      return { status: 'failed', file, runId, message };
    } finally {
      if (session.running?.runId === runId) session.running = undefined;
      cancel.dispose();
    }
  }

  private analyseWithProgress(file: string, data: XYData, options: AnalysisOptions, runId: number, panel: PanelView, token: vscode.CancellationToken): Promise<Analysis> {
    return Promise.resolve(
      vscode.window.withProgress(
        { location: vscode.ProgressLocation.Notification, title: `Knotwise: tuning the curve for ${file}`, cancellable: true },
        async (progress, notificationToken) => {
          let last = 0;
          let shown = 0;
          return analyse(data, options, this.runner, {
            report: (done, total, message) => {
              const now = Date.now();
              if (now - last < PROGRESS_INTERVAL_MS && done < total) return;
              last = now;
              const pct = total > 0 ? Math.min(100, (100 * done) / total) : 0;
              progress.report({ message: `${message} (${Math.round(pct)} %)`, increment: Math.max(0, pct - shown) });
              shown = pct;
              panel.post({ type: 'running', runId, message: `${message}…` });
            },
            cancelled: () => notificationToken.isCancellationRequested || token.isCancellationRequested,
          });
        },
      ),
    );
  }

  private panelFor(session: FileSession, file: string): PanelView {
    if (session.panel && !session.panel.isClosed) {
      session.panel.reveal();
      return session.panel;
    }
    const panel = new PanelView(
      this.context.extensionUri,
      `Curve review · ${file}`,
      (m) => this.onPanelMessage(session, m),
      () => {
        if (session.panel === panel) session.panel = undefined;
      },
    );
    session.panel = panel;
    return panel;
  }

  private showResult(session: FileSession, settings: Settings, newView = false): void {
    const r = session.result;
    if (!r || !session.panel) return;
    const runId = newView ? this.nextRunId++ : r.runId;
    if (newView) session.result = { ...r, runId };
    const analysis = r.analysis;
    const payload = buildPanelPayload({
      runId,
      analysis: newView ? { ...analysis, tune: { ...analysis.tune, selected: selectDf(analysis.tune.candidates, settings.rule, analysis.tune.metric) } } : analysis,
      data: r.tuning,
      source: { fileName: r.source.fileName, xLabel: r.columns.labels.x, yLabel: r.columns.labels.y, ...(r.columns.labels.weights ? { weightsLabel: r.columns.labels.weights } : {}) },
      rejected: r.columns.rejected.length,
      heldOut: r.columns.data.x.length - r.tuning.x.length,
      tolerancePercent: settings.tolerancePercent,
      warnings: [...(r.source.unsaved ? ['The CSV has unsaved edits; this run used them.'] : []), ...settings.problems],
    });
    session.panel.post({ type: 'result', payload });
  }

  private onPanelMessage(session: FileSession, m: PanelMessage): void {
    const r = session.result;
    switch (m.type) {
      case 'ready':
        return;
      case 'needDetail': {
        if (!r || m.runId !== r.runId || !session.panel) return;
        const detail = detailFor(r.analysis, r.tuning, m.df);
        if (detail) session.panel.post({ type: 'detail', runId: m.runId, detail });
        return;
      }
      case 'choice':
        if (r && m.runId === r.runId) session.rule = m.rule;
        return;
      case 'save':
        void this.saveFromPanel(session, m.requestId, m.runId, m.rule);
        return;
      case 'revealLine':
        void this.revealLine(session.uri, m.line);
        return;
      case 'rerun':
        void this.tune(session.uri, {}, false);
        return;
      default:
        unreachable(m);
    }
  }

  private async saveFromPanel(session: FileSession, requestId: number, runId: number, rule: RuleSpec): Promise<void> {
    const panel = session.panel;
    if (!session.result || session.result.runId !== runId) {
      panel?.post({ type: 'saveFailed', requestId, message: 'This result is out of date; nothing was saved.' });
      return;
    }
    session.rule = rule;
    try {
      const written = await this.save(session, rule, 'ask');
      if (!written) panel?.post({ type: 'saveFailed', requestId, message: 'Nothing was saved: an existing file was not written by Knotwise.' });
      else panel?.post({ type: 'saved', requestId, files: written.map((u) => vscode.workspace.asRelativePath(u)) });
    } catch (err) {
      const message = err instanceof InputError ? err.describe() : err instanceof Error ? err.message : String(err);
      panel?.post({ type: 'saveFailed', requestId, message: `Nothing was saved: ${message}` });
    }
  }

  private async save(session: FileSession, rule: RuleSpec, answer: OverwriteAnswer): Promise<vscode.Uri[] | undefined> {
    const r = session.result;
    if (!r) throw new InputError('there is no finished run to save');
    const written = await saveDeliverables(
      {
        dataUri: session.uri,
        fileName: r.source.fileName,
        dataSha256: r.source.sha256,
        rowsRead: r.source.table.rowCount,
        labels: r.columns.labels,
        data: r.columns.data,
        tuning: r.tuning,
        rejected: r.columns.rejected,
        analysis: r.analysis,
        rule,
        settings: this.settings,
      },
      answer,
    );
    if (written) {
      void vscode.commands.executeCommand('revealInExplorer', written[0]).then(undefined, () => undefined);
      const open = 'Open Table';
      void vscode.window
        .showInformationMessage(`Knotwise saved ${written.map((u) => vscode.workspace.asRelativePath(u)).join(' and ')}.`, open)
        .then((pick) => (pick === open && written[0] ? vscode.window.showTextDocument(written[0], { preview: true }) : undefined));
    }
    return written;
  }

  /** The save command: saves the latest run of `uri`, tuning it first when there is none. */
  async saveCommand(uri: vscode.Uri, options: SaveCommandOptions = {}): Promise<RunSummary & { readonly files?: readonly string[] }> {
    const session = this.session(uri);
    if (!session.result) {
      const run = await this.tune(uri, options, !options.columns);
      if (run.status !== 'done') return run;
    }
    const r = session.result as RunResult;
    const rule = options.rule ?? session.rule ?? r.analysis.tune.selected.rule;
    try {
      const written = await this.save(session, rule, options.replaceForeignFiles ?? 'ask');
      if (!written) return { status: 'dismissed', file: r.source.fileName, runId: r.runId, message: 'an existing file was not written by Knotwise' };
      return { status: 'done', file: r.source.fileName, runId: r.runId, chosenDf: selectDf(r.analysis.tune.candidates, rule, r.analysis.tune.metric).df, files: written.map((u) => u.toString()) };
    } catch (err) {
      const message = err instanceof InputError ? err.describe() : err instanceof Error ? err.message : String(err);
      void vscode.window.showErrorMessage(`Knotwise: nothing was saved: ${message}`);
      return { status: 'failed', file: r.source.fileName, runId: r.runId, message };
    }
  }

  /** Stops every running tuning. */
  stopAll(): number {
    let n = 0;
    for (const s of this.sessions.values()) {
      if (s.running) {
        s.running.cancel.cancel();
        n++;
      }
    }
    return n;
  }

  async forgetColumns(uri: vscode.Uri): Promise<void> {
    await this.memory.forget(uri);
  }

  private async revealLine(uri: vscode.Uri, line: number): Promise<void> {
    const doc = await vscode.workspace.openTextDocument(uri);
    const l = Math.min(Math.max(0, line - 1), doc.lineCount - 1);
    const range = doc.lineAt(l).range;
    await vscode.window.showTextDocument(doc, { viewColumn: vscode.ViewColumn.One, selection: range, preserveFocus: false });
  }

  private settingsChanged(): void {
    const before = this.settings;
    this.settings = this.readSettings();
    for (const s of this.sessions.values()) {
      if (!s.result || !s.panel || s.panel.isClosed) continue;
      if (!sameAnalysis(s.result.options, analysisOptions(this.settings))) void this.tune(s.uri, {}, false);
      else if (JSON.stringify(before.rule) !== JSON.stringify(this.settings.rule) || before.tolerancePercent !== this.settings.tolerancePercent) this.showResult(s, this.settings, true);
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
        void this.revalidate(uri);
      }, 400),
    );
  }

  private async revalidate(uri: vscode.Uri): Promise<void> {
    const choice = this.memory.get(uri);
    if (!choice) return;
    try {
      const source = await readCsv(uri);
      if (!choiceFits(source.table, choice)) return;
      const columns = selectColumns(source.table, choice, source.fileName);
      this.problems.show(uri, source.text, source.table, columns.rejected);
    } catch {
      // The file is mid-edit and unreadable: keep the entries until it reads again.
    }
  }

  dispose(): void {
    this.stopAll();
    for (const t of this.revalidateTimers.values()) clearTimeout(t);
    for (const s of this.sessions.values()) s.panel?.dispose();
    for (const d of this.subscriptions) d.dispose();
  }
}
