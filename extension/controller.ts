/**
 * The host side of Knotwise: one session per CSV file (columns, latest run, panel, model
 * options set in the panel), tuning with a cancellable progress notification off the main
 * thread (core's worker pool), Problems entries for rejected rows, and saving.
 */
import * as vscode from 'vscode';
import { analyse } from '../core/analysis/analysis';
import type { Analysis, AnalysisOptions, Diagnostics } from '../core/analysis/types';
import { diagnose } from '../core/analysis/diagnose';
import { CancelledError, InputError } from '../core/errors';
import { selectColumns, type Selection as ColumnSelection } from '../core/ingest/select';
import { selectTrials } from '../core/ingest/trials';
import { placed } from '../core/node/pipeline';
import { workerRunner } from '../core/node/pool';
import type { PanelMessage } from '../core/protocol';
import type { FitDetail, ModelChoice, PanelPayload } from '../core/view/model';
import { unreachable } from '../core/protocol';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec } from '../core/tune/types';
import type { FitResult, Outcome, Shape, XYData } from '../core/types';
import { fitDetail } from '../core/view/detail';
import { buildPanelPayload } from '../core/view/payload';
import { choiceFits, ColumnMemory, pickColumns, pickTrials, type ColumnChoice } from './columns';
import { baseName, isTableFile, readCsv, type CsvSource } from './csvSource';
import { PanelView } from './panel';
import { RejectedRowsView } from './problems';
import { saveDeliverables, type OverwriteAnswer } from './save';
import { analysisOptions, modelOptions, readSettings, sameAnalysis, type ModelSettings, type Settings } from './settings';
import { resolveModel } from '../core/registry/curves/index';

/** Options of the tune command (for keybindings, other extensions and tests). */
export interface TuneCommandOptions {
  /** Columns to use without asking (`trials`: a binomial outcome's trials column). */
  readonly columns?: ColumnChoice;
}

/** Options of the save command. */
export interface SaveCommandOptions extends TuneCommandOptions {
  /** Answer to "replace a file Knotwise did not write?" without asking (default: ask). */
  readonly replaceForeignFiles?: OverwriteAnswer;
  /** Rule to save with (default: the panel's current choice, else the settings' rule). */
  readonly rule?: RuleSpec;
}

/** The outcome family, shapes and robust fitting of a run's chosen fit, with its model report's numbers. */
export interface ModelSummary {
  readonly outcome: Outcome;
  readonly shape: readonly Shape[];
  /** Huber tuning constant when robust. */
  readonly robustK?: number;
  /** Binomial: the trials column used. */
  readonly trials?: string;
  readonly converged: boolean;
  readonly iterations: number;
  readonly deviance?: number;
  readonly dispersion?: number;
  /** Robust scale. */
  readonly scale?: number;
  /** Down-weighted rows by CSV line (at most the listed ones). */
  readonly downweightedLines?: readonly number[];
  readonly activeConstraints?: number;
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
  readonly model?: ModelSummary;
  readonly message?: string;
}

/** What the extension offers other extensions and its tests (the value `activate` returns). */
export interface KnotwiseApi {
  /** The panel of a file: its latest payload, how many results were posted to it and how many analyses ran. */
  panelState(uri: vscode.Uri): { readonly payload: PanelPayload; readonly posted: number; readonly analysed: number } | undefined;
}

/** A finished run. */
interface RunResult {
  readonly runId: number;
  readonly source: CsvSource;
  readonly choice: ColumnChoice;
  readonly columns: ColumnSelection;
  /** Binomial outcome: the trials column used. */
  readonly trials: string | undefined;
  readonly options: AnalysisOptions;
  readonly analysis: Analysis;
  /** Residual checks and panel details by df, computed once each. */
  readonly checks: Map<number, Diagnostics>;
  readonly details: Map<number, FitDetail>;
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
  /** Model options set with the panel's controls; they replace the settings' for this file until those change. */
  model?: ModelSettings | undefined;
  /** The latest payload posted to the panel, and counts for the API. */
  payload?: PanelPayload | undefined;
  posted: number;
  analysed: number;
}

/** Smallest interval between progress updates (ms), so the notification is not flooded. */
const PROGRESS_INTERVAL_MS = 150;

function errorText(err: unknown): string {
  return err instanceof InputError ? err.describe('editor') : err instanceof Error ? err.message : String(err);
}

/** The model report of a fit as a RunSummary field. */
function modelSummary(fit: FitResult, options: AnalysisOptions, trials: string | undefined): ModelSummary {
  const m = resolveModel(options.kind, options);
  const r = fit.model;
  return {
    outcome: m.outcome,
    shape: m.shape,
    ...(m.robustK !== undefined ? { robustK: m.robustK } : {}),
    ...(trials !== undefined ? { trials } : {}),
    converged: r?.converged ?? true,
    iterations: r?.iterations ?? 1,
    ...(r?.glm ? { deviance: r.glm.deviance, dispersion: r.glm.dispersion } : {}),
    ...(r?.robust ? { scale: r.robust.scale, downweightedLines: r.robust.downweighted.rows.map((d) => d.line) } : {}),
    ...(r?.constraints ? { activeConstraints: r.constraints.active } : {}),
  };
}

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

  /** The API returned by `activate`. */
  api(): KnotwiseApi {
    return {
      panelState: (uri) => {
        const s = this.sessions.get(uri.toString());
        return s?.payload ? { payload: s.payload, posted: s.posted, analysed: s.analysed } : undefined;
      },
    };
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
      s = { uri, posted: 0, analysed: 0 };
      this.sessions.set(key, s);
    }
    return s;
  }

  /** The model options of a file: the panel's when set and still possible with the curve family, else the settings'. */
  private modelFor(session: FileSession): ModelSettings {
    if (session.model) {
      try {
        resolveModel(this.settings.kind, modelOptions(session.model));
        return session.model;
      } catch {
        session.model = undefined;
      }
    }
    return this.settings.model;
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

  /** The columns for a run: given, remembered (when not asking), or picked; undefined when the person dismissed a pick. */
  private async columnsFor(uri: vscode.Uri, source: CsvSource, options: TuneCommandOptions, ask: boolean, binomial: boolean, token: vscode.CancellationToken): Promise<ColumnChoice | undefined> {
    if (options.columns) return options.columns;
    const file = source.fileName;
    const stored = this.memory.get(uri);
    const remembered = stored && choiceFits(source.table, stored) ? stored : undefined;
    let choice = !ask && remembered ? remembered : await pickColumns(source.table, file, remembered, token, binomial);
    // A binomial outcome asks once for the trials column (null: none) before using a remembered choice.
    if (choice && binomial && choice.trials === undefined) choice = await pickTrials(source.table, file, choice, token);
    return choice;
  }

  /**
   * Reads the file, asks for columns, tunes with progress and shows the panel. A
   * `background` run (after a settings change) only updates a panel that is still open.
   */
  async tune(uri: vscode.Uri, options: TuneCommandOptions = {}, ask = true, background = false): Promise<RunSummary> {
    const file = baseName(uri);
    const session = this.session(uri);
    if (background && (!session.panel || session.panel.isClosed)) return { status: 'dismissed', file };
    // A second run on the same file replaces the first.
    session.running?.cancel.cancel();
    const runId = this.nextRunId++;
    const cancel = new vscode.CancellationTokenSource();
    session.running = { runId, cancel };
    try {
      const source = await readCsv(uri);
      const settings = this.settings;
      const model = this.modelFor(session);
      const binomial = model.outcome === 'proportions';
      const choice = await this.columnsFor(uri, source, options, ask, binomial, cancel.token);
      if (!choice) return { status: 'dismissed', file, runId };
      if (session.running?.runId !== runId) return { status: 'superseded', file, runId };
      await this.memory.set(uri, choice);
      // A binomial outcome with a trials column: proportions weighted by the trials (as --trials on the command line).
      const trials = binomial && typeof choice.trials === 'string' ? choice.trials : undefined;
      const columns = trials !== undefined ? selectTrials(source.table, { x: choice.x, y: choice.y }, trials, file) : selectColumns(source.table, { x: choice.x, y: choice.y, weights: choice.weights }, file);
      this.problems.show(uri, source.text, source.table, columns.rejected);
      const opts = analysisOptions(settings, model);
      if (background && (!session.panel || session.panel.isClosed)) return { status: 'dismissed', file, runId };
      const panel = this.panelFor(session, file);
      panel.post({ type: 'running', runId, message: `Tuning ${columns.data.x.length} rows…` });
      let analysis: Analysis;
      try {
        analysis = await this.analyseWithProgress(file, columns.data, opts, runId, panel, cancel.token);
      } catch (err) {
        throw placed(err, file, columns.labels);
      }
      session.analysed++;
      if (session.running?.runId !== runId) return { status: 'superseded', file, runId };
      session.result = { runId, source, choice, columns, trials, options: opts, analysis, checks: new Map([[analysis.chosen.df, analysis.diagnostics]]), details: new Map() };
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
        model: modelSummary(analysis.chosen, opts, trials),
      };
    } catch (err) {
      if (err instanceof CancelledError || cancel.token.isCancellationRequested) {
        const superseded = session.running?.runId !== runId;
        if (!superseded) session.panel?.post({ type: 'failed', runId, message: 'Tuning was cancelled. Use “Run again” to start over.' });
        return { status: superseded ? 'superseded' : 'cancelled', file, runId };
      }
      const message = errorText(err);
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

  /** Residual checks of one df of a run, computed once. */
  private checksFor(r: RunResult, fit: FitResult): Diagnostics {
    let d = r.checks.get(fit.df);
    if (!d) {
      d = diagnose(r.analysis.data, fit);
      r.checks.set(fit.df, d);
    }
    return d;
  }

  /** The panel's residual details of one df of a run, computed once (undefined when df was not fitted). */
  private detailFor(r: RunResult, df: number): FitDetail | undefined {
    const cached = r.details.get(df);
    if (cached) return cached;
    const fit = r.analysis.fits.get(df);
    if (!fit) return undefined;
    const detail = fitDetail(fit, r.analysis.data, { diagnostics: this.checksFor(r, fit) });
    r.details.set(df, detail);
    return detail;
  }

  /** Posts the result of a session to its panel; `rule` starts a new view of the same run with that rule. */
  private showResult(session: FileSession, settings: Settings, rule?: RuleSpec): void {
    const r0 = session.result;
    if (!r0 || !session.panel) return;
    // A new view of the same analysis gets a new run id, so the panel forgets the rule it kept for the old one.
    const r = rule ? { ...r0, runId: this.nextRunId++ } : r0;
    session.result = r;
    const payload = buildPanelPayload({
      runId: r.runId,
      analysis: r.analysis,
      source: { fileName: r.source.fileName, xLabel: r.columns.labels.x, yLabel: r.columns.labels.y, ...(r.columns.labels.weights && r.trials === undefined ? { weightsLabel: r.columns.labels.weights } : {}) },
      rejected: r.columns.rejected.length,
      heldOut: r.analysis.heldOut?.x.length ?? 0,
      tolerancePercent: settings.tolerancePercent,
      rule: rule ?? session.rule,
      trialsLabel: r.trials !== undefined ? r.columns.labels.weights : undefined,
      modelFromPanel: session.model !== undefined,
      detail: (df) => this.detailFor(r, df),
      warnings: [...(r.source.unsaved ? ['The CSV has unsaved edits; this run used them.'] : []), ...settings.problems],
    });
    session.rule = payload.rule;
    session.payload = payload;
    session.posted++;
    session.panel.post({ type: 'result', payload });
  }

  private onPanelMessage(session: FileSession, m: PanelMessage): void {
    const r = session.result;
    switch (m.type) {
      case 'ready':
        return;
      case 'needDetail': {
        if (!r || m.runId !== r.runId || !session.panel) return;
        const detail = this.detailFor(r, m.df);
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
      case 'model':
        if (r && m.runId === r.runId) this.switchModel(session, r, m.model);
        return;
      default:
        unreachable(m);
    }
  }

  /** The panel's outcome, shape and robust controls: checks the combination, keeps it for this file and reruns. */
  private switchModel(session: FileSession, r: RunResult, choice: ModelChoice): void {
    const current = this.modelFor(session);
    const next: ModelSettings = {
      outcome: choice.outcome,
      shape: choice.shape,
      robustK: choice.robust ? (current.robustK ?? this.settings.huberK) : undefined,
    };
    try {
      resolveModel(this.settings.kind, modelOptions(next));
    } catch (err) {
      session.panel?.post({ type: 'failed', runId: r.runId, message: `Not changed: ${errorText(err)}` });
      return;
    }
    const s = this.settings.model;
    const same = next.outcome === s.outcome && next.robustK === s.robustK && JSON.stringify(next.shape) === JSON.stringify(s.shape);
    session.model = same ? undefined : next;
    void this.tune(session.uri, {}, false);
  }

  private async saveFromPanel(session: FileSession, requestId: number, runId: number, rule: RuleSpec): Promise<void> {
    const panel = session.panel;
    if (!session.result || session.result.runId !== runId) {
      panel?.post({ type: 'saveFailed', requestId, message: 'This result is out of date; nothing was saved.' });
      return;
    }
    session.rule = rule;
    try {
      const saved = await this.save(session, rule, 'ask');
      if (!saved) panel?.post({ type: 'saveFailed', requestId, message: 'Nothing was saved: an existing file was not written by Knotwise.' });
      else panel?.post({ type: 'saved', requestId, files: saved.uris.map((u) => vscode.workspace.asRelativePath(u)), note: saved.note });
    } catch (err) {
      panel?.post({ type: 'saveFailed', requestId, message: `Nothing was saved: ${errorText(err)}` });
    }
  }

  private async save(session: FileSession, rule: RuleSpec, answer: OverwriteAnswer): Promise<{ uris: readonly vscode.Uri[]; note: string } | undefined> {
    const r = session.result;
    if (!r) throw new InputError('there is no finished run to save');
    const saved = await saveDeliverables(
      {
        dataUri: session.uri,
        fileName: r.source.fileName,
        dataSha256: r.source.sha256,
        rowsRead: r.source.table.rowCount,
        columns: { x: r.choice.x, y: r.choice.y, weights: r.trials === undefined ? r.choice.weights : undefined, trials: r.trials },
        selection: r.columns,
        analysis: r.analysis,
        rule,
        settings: this.settings,
        diagnostics: (df) => r.checks.get(df),
      },
      answer,
    );
    if (saved) {
      const table = saved.uris[0];
      void vscode.commands.executeCommand('revealInExplorer', table).then(undefined, () => undefined);
      const open = 'Open Table';
      void vscode.window
        .showInformationMessage(`Knotwise saved ${saved.uris.map((u) => vscode.workspace.asRelativePath(u)).join(' and ')}. ${saved.note}`, open)
        .then((pick) => (pick === open && table ? vscode.window.showTextDocument(table, { preview: true }) : undefined));
    }
    return saved;
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
      const saved = await this.save(session, rule, options.replaceForeignFiles ?? 'ask');
      if (!saved) return { status: 'dismissed', file: r.source.fileName, runId: r.runId, message: 'an existing file was not written by Knotwise' };
      return { status: 'done', file: r.source.fileName, runId: r.runId, chosenDf: selectDf(r.analysis.tune.candidates, rule, r.analysis.tune.metric).df, files: saved.uris.map((u) => u.toString()) };
    } catch (err) {
      const message = errorText(err);
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

  /**
   * Applies changed settings to open panels where it matters: options that change the
   * analysis rerun it; a new rule or tolerance re-renders the same run; table and output
   * settings only affect the next save. Changed model settings replace the panel's own.
   */
  private settingsChanged(): void {
    const before = this.settings;
    this.settings = this.readSettings();
    const modelChanged = JSON.stringify(before.model) !== JSON.stringify(this.settings.model) || before.huberK !== this.settings.huberK;
    const ruleChanged = JSON.stringify(before.rule) !== JSON.stringify(this.settings.rule) || before.tolerancePercent !== this.settings.tolerancePercent;
    for (const s of this.sessions.values()) {
      if (modelChanged) s.model = undefined;
      if (!s.result || !s.panel || s.panel.isClosed) continue;
      if (!sameAnalysis(s.result.options, analysisOptions(this.settings, this.modelFor(s)))) void this.tune(s.uri, {}, false, true);
      else if (ruleChanged) this.showResult(s, this.settings, this.settings.rule);
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
      const session = this.sessions.get(uri.toString());
      const trials = session?.result?.trials;
      const columns = trials !== undefined ? selectTrials(source.table, { x: choice.x, y: choice.y }, trials, source.fileName) : selectColumns(source.table, { x: choice.x, y: choice.y, weights: choice.weights }, source.fileName);
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
