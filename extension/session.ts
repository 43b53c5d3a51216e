/**
 * One data file's session: the single owner of which bytes were analysed (their SHA-256
 * and text), which analysis the panel shows, which rule and model options the person
 * chose, and what is saved from it. A session runs its analyses (one at a time: a new run
 * cancels the previous one), follows the data while its panel is open (an edit, a save,
 * a change on disk mark the analysis out of date at once, and a save refits when the
 * settings say so), and saves the curve table and fit record only of an analysis of the
 * bytes on disk. A grouped run (the rows split by a column, extension/groupRun.ts) keeps
 * one group on show as its result and saves every group's outputs at once.
 */
import * as vscode from 'vscode';
import type { Analysis } from '../core/analysis/types';
import { CancelledError, InputError } from '../core/errors';
import { selectColumns } from '../core/ingest/select';
import { selectTrials } from '../core/ingest/trials';
import { placed } from '../core/node/pipeline';
import type { HostMessage, PanelState } from '../core/protocol';
import { resolveModel } from '../core/registry/curves/index';
import type { ResampleRunner } from '../core/tune/tune';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec } from '../core/tune/types';
import type { DataChangeView, DataStateView, ModelChoice, PanelPayload, RefitView } from '../core/view/model';
import { buildPanelPayload } from '../core/view/payload';
import type { RunSummary, SaveCommandOptions, SaveSummary, TuneCommandOptions } from './api';
import { choiceFits, pickColumns, pickTrials, type ColumnChoice, type ColumnMemory } from './columns';
import { baseName, diskSha256, isNotFound, LARGE_FILE_BYTES, openDocument, readCsv, readData, type CsvSource, type DataText } from './csvSource';
import { compareRows, dataRowCount } from './dataChange';
import { DataFollower, type Touch } from './follow';
import { stillValid, whatMoved } from './moved';
import { PanelView } from './panel';
import { routePanelMessage } from './panelMessages';
import type { RejectedRowsView } from './problems';
import { detailFor, errorText, modelSummary, recordedCurve, withCalibration, type RunResult } from './result';
import { analyseGroupsWithProgress, analyseWithProgress, RunTicket } from './run';
import { commonCurveFor } from '../core/groups/commonRun';
import type { GroupAnalysis } from '../core/groups/analyse';
import { buildGroupsView, type GroupsView } from '../core/view/groups';
import { groupRunResult, splitRows } from './groupRun';
import { groupPick } from './groupPick';
import { saveGroupDeliverables } from './groupSave';
import { splitByColumn } from '../core/groups/split';
import { parseCsvText } from '../core/ingest/reader';
import { outputFolder, previousRecord, saveDeliverables, type OverwriteAnswer } from './save';
import { analysisOptions, modelOptions, outputName, type ModelSettings, type Settings } from './settings';
import type { AnalysisOptions } from '../core/analysis/types';
import { parseDfList } from '../core/tune/candidates';
import { pickSurfaceColumns, runSurface, saveSurface, surfaceState, withPair, type SurfaceRunState } from './surfaceRun';

/** Rows from which a run starts its worker threads before the column picks (core/node/pool.ts warm). */
const WARM_ROWS = 100_000;
/** What every session shares: the extension's folder, remembered columns, Problems, the worker pool, settings and run ids. */
export interface SessionContext {
  readonly extensionUri: vscode.Uri;
  readonly memory: ColumnMemory;
  readonly problems: RejectedRowsView;
  readonly runner: ResampleRunner;
  /** The current settings snapshot for a file (settings can differ per workspace folder). */
  settings(uri: vscode.Uri): Settings;
  /** Called when a run starts or ends, so the host can tell whether any run is going. */
  runningChanged(): void;
  /** A run id, larger than every one before it. */
  newRunId(): number;
}

/** How a run starts. */
export interface RunRequest {
  readonly options?: TuneCommandOptions;
  /** Ask for the columns even when some are remembered. */
  readonly ask?: boolean;
  /** A run nobody asked for (settings changed): only for a panel that is still open. */
  readonly background?: boolean;
  /** Keep the person's rule where it still applies (default: when not asking for the columns). */
  readonly keep?: boolean;
  /** Never ask for the columns: without remembered ones the panel says how to choose them (a restored panel). */
  readonly noPicks?: boolean;
  /** Why the run replaces the shown one, for the panel's line about what moved. */
  readonly reason?: RefitView['reason'];
  /** A grouped run: the name of the group to show (default: the one shown before, else the first). */
  readonly group?: string;
  /** Ask for the columns of a surface (two inputs and the reading) rather than a curve's. */
  readonly surface?: boolean;
}

/** What a save that writes nothing says in the panel and the command's answer. */
class NotSaved extends Error {}

/** The two column choices name the same columns. */
function sameColumns(a: ColumnChoice, b: ColumnChoice): boolean {
  return a.x === b.x && a.y === b.y && (a.weights ?? null) === (b.weights ?? null) && (a.trials ?? null) === (b.trials ?? null) && (a.per ?? null) === (b.per ?? null);
}

/** Everything Knotwise keeps for one data file. */
export class DataSession implements vscode.Disposable {
  readonly file: string;
  panel: PanelView | undefined;
  /** The running run. */
  private running: RunTicket | undefined;
  /** The latest finished run (the one the panel shows). */
  result: RunResult | undefined;
  /** The person's current rule in the panel. */
  rule: RuleSpec | undefined;
  /** Model options set with the panel's controls; they replace the settings' for this file until those change. */
  model: ModelSettings | undefined;
  /** Candidate df set with the panel's "Widen the candidates" button (the command line's --df text); they replace the setting's for this file until it changes. */
  candidates: string | undefined;
  /** The latest surface run (two inputs), while the panel shows it; a curve run clears it. */
  surface: SurfaceRunState | undefined;
  /** The latest payload posted to the panel, and counts for the API. */
  payload: PanelPayload | undefined;
  posted = 0;
  analysed = 0;
  /** How the data differs from the bytes the shown run analysed (undefined: not at all, as far as known). */
  private change: DataChangeView | undefined;
  /** The person was asked whether to refit a large file after a save. */
  private refitAsked = false;
  /** The latest run could not keep the person's rule (a picked df was not fitted to the new data). */
  private ruleDropped = false;
  private readonly follower: DataFollower;

  constructor(
    readonly uri: vscode.Uri,
    private readonly ctx: SessionContext,
  ) {
    this.file = baseName(uri);
    this.follower = new DataFollower(uri, (touches) => void this.compareNow(touches));
  }

  /** True while the panel is open. */
  /** Whether the panel's script has loaded (it says `ready`). */
  get panelReady(): boolean {
    return this.hasPanel && (this.panel as PanelView).isReady;
  }

  get hasPanel(): boolean {
    return this.panel !== undefined && !this.panel.isClosed;
  }

  /** True while a run is going. */
  get isRunning(): boolean {
    return this.running !== undefined;
  }

  /** The model options of this file: the panel's when set and still possible with the curve kind, else the settings'. */
  modelFor(): ModelSettings {
    const settings = this.ctx.settings(this.uri);
    if (this.model) {
      try {
        resolveModel(settings.kind, modelOptions(this.model));
        return this.model;
      } catch {
        this.model = undefined;
      }
    }
    return settings.model;
  }

  /** The analysis options of this file's next run: the settings with the panel's model options and candidates where set. */
  analysisOptionsFor(settings: Settings = this.ctx.settings(this.uri)): AnalysisOptions {
    const opts = analysisOptions(settings, this.modelFor());
    return this.candidates !== undefined ? { ...opts, candidates: parseDfList(this.candidates) } : opts;
  }

  /** The columns for a run: given, remembered (when not asking), or picked; undefined when the person dismissed a pick or none may be asked. */
  private async columnsFor(source: CsvSource, request: RunRequest, binomial: boolean, token: vscode.CancellationToken): Promise<ColumnChoice | undefined> {
    const { options = {}, ask = false, noPicks = false } = request;
    if (options.columns) return options.columns;
    const stored = this.ctx.memory.get(this.uri);
    const remembered = stored && choiceFits(source.table, stored) ? stored : undefined;
    if (noPicks) return remembered && (!binomial || remembered.trials !== undefined) ? remembered : undefined;
    if (request.surface) return pickSurfaceColumns(source.table, this.file, remembered, token);
    let choice = !ask && remembered ? remembered : await pickColumns(source.table, this.file, remembered, token, binomial, groupPick(source.table, source.text, this.file, token));
    // A binomial outcome asks once for the trials column (null: none) before using a remembered choice.
    if (choice && binomial && choice.trials === undefined) choice = await pickTrials(source.table, this.file, choice, token);
    return choice;
  }

  /**
   * Reads the file, asks for columns, tunes with progress and shows the panel. A
   * `background` run (after a settings change) only updates a panel that is still open.
   * The person's rule is kept where it still applies (`keep`), and a run on changed data
   * says what moved.
   */
  async tune(request: RunRequest = {}): Promise<RunSummary> {
    const { ask = false, background = false } = request;
    const keep = request.keep ?? !ask;
    const file = this.file;
    if (background && !this.hasPanel) return { status: 'dismissed', file };
    // A second run on the same file replaces the first.
    this.running?.cancel();
    const ticket = new RunTicket(this.ctx.newRunId());
    const runId = ticket.runId;
    this.running = ticket;
    this.ctx.runningChanged();
    const current = (): boolean => this.running === ticket;
    try {
      const source = await readCsv(this.uri, this.ctx.settings(this.uri).memoryBudget);
      ticket.sha256 = source.sha256;
      // A file this large resamples on worker threads: they load while the columns are picked.
      if (source.table.rowCount >= WARM_ROWS) this.ctx.runner.warm?.();
      const settings = this.ctx.settings(this.uri);
      const model = this.modelFor();
      const binomial = model.outcome === 'proportions';
      const choice = await this.columnsFor(source, request, binomial, ticket.token);
      if (!choice) {
        if (request.noPicks) this.post({ type: 'failed', runId, message: `Knotwise does not know which columns of ${file} to use yet. Run again to choose them.` });
        return { status: 'dismissed', file, runId };
      }
      if (!current()) return { status: 'superseded', file, runId };
      await this.ctx.memory.set(this.uri, choice);
      // A binomial outcome with a trials column: proportions weighted by the trials (as --trials on the command line).
      const trials = binomial && typeof choice.trials === 'string' ? choice.trials : undefined;
      if (typeof choice.x2 === 'string') return await this.tuneSurface(ticket, source, { ...choice, x2: choice.x2 }, request);
      this.surface = undefined;
      if (typeof choice.per === 'string') return await this.tuneGroups(ticket, source, choice, choice.per, trials, request);
      const columns =
        trials !== undefined ? selectTrials(source.table, { x: choice.x, y: choice.y }, trials, file) : selectColumns(source.table, { x: choice.x, y: choice.y, weights: choice.weights }, file);
      const opts = this.analysisOptionsFor(settings);
      if (background && !this.hasPanel) return { status: 'dismissed', file, runId };
      this.ctx.problems.show(this.uri, source.text, source.table, columns.rejected);
      const panel = this.openPanel();
      panel.post({ type: 'running', runId, message: `Tuning ${columns.data.x.length} rows…` });
      let analysis: Analysis;
      try {
        analysis = await analyseWithProgress(this.ctx.runner, file, columns.data, opts, ticket.token, (message, fraction) => panel.post({ type: 'running', runId, message: `${message}…`, fraction }));
      } catch (err) {
        throw placed(err, file, columns.labels);
      }
      this.analysed++;
      if (!current()) return { status: 'superseded', file, runId };
      // The chosen fit's residual checks are not run yet (analyseWithProgress): they follow the curve.
      const result: RunResult = { runId, source, choice, columns, trials, options: opts, analysis, checks: new Map(), details: new Map() };
      // The curve of the fit record beside the data, for the drift.
      result.recorded = await this.recordedCurve();
      // The person's rule (read now: it may have changed in the panel during the run) where it still applies.
      const before = this.result;
      const ruleBefore = this.rule;
      const kept = keep ? stillValid(analysis, ruleBefore) : undefined;
      const rule = kept ?? analysis.tune.selected.rule;
      const dropped = keep && ruleBefore !== undefined && kept === undefined;
      const moved =
        before && ruleBefore && before.source.sha256 !== source.sha256 && sameColumns(before.choice, choice)
          ? whatMoved(before.analysis, ruleBefore, analysis, rule, dropped, request.reason ?? 'asked')
          : undefined;
      this.result = result;
      this.rule = rule;
      this.ruleDropped = dropped;
      this.refitAsked = false;
      // The curve and the choice first; then the residual checks of the shown df, which the
      // panel asks for, and whether the data changed again while the run went on.
      this.change = undefined;
      this.showResult(undefined, moved, 'checks-follow');
      this.checkSoon(result, selectDf(analysis.tune.candidates, rule, analysis.tune.metric).df);
      const seen = await this.changeSince(result);
      if (this.result?.analysis !== analysis) return { status: 'superseded', file, runId };
      this.change = seen.change;
      this.postDataState();
      if (seen.change?.where === 'disk' && seen.now) this.refitOnSave(seen.now);
      return {
        status: 'done',
        file,
        runId,
        chosenDf: selectDf(analysis.tune.candidates, rule, analysis.tune.metric).df,
        candidates: analysis.tune.candidates.map((c) => c.df),
        rowsUsed: columns.data.x.length,
        rejected: columns.rejected.length,
        model: modelSummary(analysis.chosen, opts, trials),
      };
    } catch (err) {
      if (err instanceof CancelledError || ticket.cancelled) {
        const superseded = !current();
        if (!superseded) this.post({ type: 'failed', runId, message: `Tuning was cancelled.${this.result ? ' The result shown is from the run before.' : ''}` });
        return { status: superseded ? 'superseded' : 'cancelled', file, runId };
      }
      const message = errorText(err);
      this.post({ type: 'failed', runId, message: `Knotwise could not tune ${file}: ${message}` });
      void vscode.window.showErrorMessage(`Knotwise: ${message}`);
      return { status: 'failed', file, runId, message };
    } finally {
      if (current()) {
        this.running = undefined;
        this.ctx.runningChanged();
      }
      ticket.dispose();
    }
  }

  /**
   * The grouped part of tune(): splits the rows by the group column `per`, tunes every group
   * with the settings' options (one df for all when knotwise.groups.sharedDf is on), tests
   * whether one curve serves all, and shows the overview with one group (the one shown
   * before, or the one `request.group` names, else the first). Errors and cancellation go
   * to tune()'s handling.
   */
  private async tuneGroups(ticket: RunTicket, source: CsvSource, choice: ColumnChoice, per: string, trials: string | undefined, request: RunRequest): Promise<RunSummary> {
    const file = this.file;
    const runId = ticket.runId;
    const settings = this.ctx.settings(this.uri);
    const opts = this.analysisOptionsFor(settings);
    const { table, split } = splitRows(source, choice, per, opts, trials);
    if (request.background && !this.hasPanel) return { status: 'dismissed', file, runId };
    this.ctx.problems.show(this.uri, source.text, table, split.rejected);
    const panel = this.openPanel();
    panel.post({ type: 'running', runId, message: `Tuning ${split.groups.length} groups…` });
    let analysis: GroupAnalysis;
    try {
      analysis = await analyseGroupsWithProgress(this.ctx.runner, file, split.groups, opts, settings.groups.sharedDf, ticket.token, (message, fraction) =>
        panel.post({ type: 'running', runId, message: `${message}…`, fraction }),
      );
    } catch (err) {
      throw placed(err, file, split.labels);
    }
    this.analysed++;
    if (this.running !== ticket) return { status: 'superseded', file, runId };
    const common = commonCurveFor(split, analysis);
    const view = buildGroupsView({ setId: runId, fileName: file, split, analysis, common });
    const wanted = request.group ?? (this.result?.groups ? this.result.groups.analysis.groups[this.result.groups.index]?.name : undefined);
    const index = Math.max(
      0,
      analysis.groups.findIndex((g) => g.name === wanted),
    );
    const result = groupRunResult({ source, choice, options: opts }, { setId: runId, per, table, split, analysis, common, view, index }, index, runId);
    this.result = result;
    this.rule = undefined;
    this.ruleDropped = false;
    this.refitAsked = false;
    const seen = await this.changeSince(result);
    if (this.result !== result) return { status: 'superseded', file, runId };
    this.change = seen.change;
    panel.post({ type: 'groups', view });
    this.showResult();
    if (seen.change?.where === 'disk' && seen.now) this.refitOnSave(seen.now);
    return {
      status: 'done',
      file,
      runId,
      chosenDf: result.analysis.chosen.df,
      candidates: result.analysis.tune.candidates.map((c) => c.df),
      rowsUsed: split.groups.reduce((n, g) => n + g.data.x.length, 0),
      rejected: split.rejected.length,
      groups: analysis.groups.map((g) => ({ name: g.name, chosenDf: g.analysis.chosen.df, rowsUsed: g.analysis.n })),
      ...(analysis.shared ? { sharedDf: analysis.shared.selection.df } : {}),
    };
  }

  /**
   * The surface part of tune() (a choice with a second input): tunes the df pair with the
   * settings' resampling, rule and seed, and shows the surface. Errors and cancellation go
   * to tune()'s handling.
   */
  private async tuneSurface(ticket: RunTicket, source: CsvSource, choice: ColumnChoice & { readonly x2: string }, request: RunRequest): Promise<RunSummary> {
    const file = this.file;
    const runId = ticket.runId;
    if (request.background && !this.hasPanel) return { status: 'dismissed', file, runId };
    const panel = this.openPanel();
    panel.post({ type: 'running', runId, message: `Tuning the surface of ${choice.y} over ${choice.x} and ${choice.x2}…` });
    let state: SurfaceRunState;
    try {
      state = await runSurface(runId, source, choice, this.ctx.settings(this.uri), ticket.token, (message, fraction) => panel.post({ type: 'running', runId, message: `${message}…`, fraction }));
    } catch (err) {
      throw placed(err, file, { x: choice.x, y: choice.y });
    }
    this.analysed++;
    if (this.running !== ticket) return { status: 'superseded', file, runId };
    this.ctx.problems.show(this.uri, source.text, source.table, state.selection.rejected);
    // The curve result goes: the panel's curve handlers see no run of theirs.
    this.result = undefined;
    this.surface = state;
    panel.post({ type: 'surface', view: state.view });
    return { status: 'done', file, runId, rowsUsed: state.shown.n, rejected: state.selection.rejected.length, surface: { x: state.shown.dfU, x2: state.shown.dfV } };
  }

  /** The panel asked for slices at other values, a pair picked by hand, or the rule's pair again: a new view of the same surface run. */
  surfaceMessage(runId: number, change: { readonly slices?: SurfaceRunState['slices']; readonly pair?: { readonly x: number; readonly x2: number } | 'rule' }): void {
    const s = this.surface;
    if (!s || s.runId !== runId) return;
    try {
      let next = s;
      if (change.pair === 'rule') next = withPair(next, s.ruled.dfU, s.ruled.dfV);
      else if (change.pair) next = withPair(next, change.pair.x, change.pair.x2);
      if (change.slices) next = surfaceState({ ...next, slices: change.slices });
      this.surface = next;
      this.post({ type: 'surface', view: next.view });
    } catch (err) {
      this.post({ type: 'failed', runId, message: `Knotwise could not fit that pair: ${errorText(err)}. The surface shown is unchanged.` });
    }
  }

  /** The panel's Save for a surface: writes what the command line writes for the pair shown. */
  async saveSurfaceFromPanel(requestId: number, runId: number): Promise<void> {
    const s = this.surface;
    if (!s || s.runId !== runId) {
      this.post({ type: 'saveFailed', requestId, message: 'This surface is out of date; nothing was saved.' });
      return;
    }
    try {
      if ((await diskSha256(this.uri)) !== s.source.sha256) throw new NotSaved(`${this.file} changed since this surface was tuned; run again first`);
      const uris = await saveSurface(s, this.ctx.settings(this.uri), this.uri, 'ask');
      if (!uris) this.post({ type: 'saveFailed', requestId, message: 'Nothing was saved: an existing file was not written by Knotwise.' });
      else this.post({ type: 'saved', requestId, files: uris.map((u) => vscode.workspace.asRelativePath(u)) });
    } catch (err) {
      this.post({ type: 'saveFailed', requestId, message: `Nothing was saved: ${errorText(err)}.`.replace(/\.\.$/, '.') });
    }
  }

  /**
   * The save command for a surface: tunes it first when none is shown or the shown one is
   * not of the bytes on disk (with the columns given, else the shown surface's), then writes
   * what the command line writes for the pair shown.
   */
  private async saveSurfaceCommand(options: SaveCommandOptions): Promise<SaveSummary> {
    const file = this.file;
    const stale = async (): Promise<boolean> => {
      const shown = this.surface;
      return !shown || shown.source.unsaved || (await diskSha256(this.uri)) !== shown.source.sha256;
    };
    if (await stale()) {
      const columns = options.columns ?? this.surface?.choice;
      const run = await this.tune({ options: columns ? { columns } : {}, ask: !columns, surface: true });
      if (run.status !== 'done') return run;
      if (!this.surface || (await stale())) return { status: 'failed', file, message: `${file} changed while its surface was tuned; nothing was saved` };
    }
    const s = this.surface as SurfaceRunState;
    const summary = { file: s.source.fileName, runId: s.runId, rowsUsed: s.shown.n, surface: { x: s.shown.dfU, x2: s.shown.dfV } };
    try {
      const uris = await saveSurface(s, this.ctx.settings(this.uri), this.uri, options.replaceForeignFiles ?? 'ask');
      if (!uris) return { status: 'dismissed', ...summary, message: 'an existing file was not written by Knotwise' };
      return { status: 'done', ...summary, files: uris.map((u) => u.toString()) };
    } catch (err) {
      const message = errorText(err);
      void vscode.window.showErrorMessage(`Knotwise: nothing was saved: ${message}`);
      return { status: 'failed', ...summary, message };
    }
  }

  /** The overview of the grouped run on show and the index of the group shown (undefined: not a grouped run). */
  get groupsShown(): { readonly view: GroupsView; readonly index: number } | undefined {
    const g = this.result?.groups;
    return g ? { view: g.view, index: g.index } : undefined;
  }

  /** The panel asked for group `index` of the grouped run `setId`: shows it as a new view of the same run. */
  selectGroup(setId: number, index: number): void {
    const r = this.result;
    const g = r?.groups;
    if (!r || !g || g.setId !== setId || index >= g.analysis.groups.length || !this.panel) return;
    this.result = groupRunResult(r, g, index, this.ctx.newRunId());
    // Each group starts from its own choice.
    this.rule = undefined;
    this.showResult();
  }

  /** Stops the running run; true when one was running. */
  stop(): boolean {
    if (!this.running) return false;
    this.running.cancel();
    return true;
  }

  /** Sends a message to the panel when it is open. */
  post(message: HostMessage): void {
    this.panel?.post(message);
  }

  /** The panel, opened (or brought forward) when needed; `restored` is a panel the window brought back after a reload. */
  private openPanel(restored?: vscode.WebviewPanel): PanelView {
    if (this.panel && !this.panel.isClosed) {
      if (!restored) this.panel.reveal();
      return this.panel;
    }
    const panel = new PanelView(
      this.ctx.extensionUri,
      `Curve review · ${this.file}`,
      (m) => routePanelMessage(this, m),
      () => this.panelClosed(panel),
      restored,
    );
    this.panel = panel;
    panel.post({ type: 'file', uri: this.uri.toString(), fileName: this.file });
    this.follower.start();
    return panel;
  }

  /** The panel was closed: its Problems entries, its following of the data and its banner go with it. */
  private panelClosed(panel: PanelView): void {
    if (this.panel !== panel) return;
    this.panel = undefined;
    this.follower.stop();
    this.ctx.problems.clear(this.uri);
    this.change = undefined;
    this.refitAsked = false;
  }

  /** The editor column of the panel (for showing the data beside it). */
  get panelColumn(): vscode.ViewColumn | undefined {
    return this.panel?.viewColumn;
  }

  /**
   * Takes over a panel the window restored after a reload: its model options and rule come
   * back from its saved state, and the analysis runs again (without asking for columns).
   */
  restore(restored: vscode.WebviewPanel, state: PanelState): void {
    this.openPanel(restored);
    if (state.model) {
      const next = this.modelFromChoice(state.model);
      if (typeof next !== 'string') this.model = this.differsFromSettings(next) ? next : undefined;
    }
    if (state.rule) this.rule = state.rule;
    if (state.candidates !== undefined) this.candidates = state.candidates;
    void this.tune({ noPicks: true, keep: true, ...(state.group !== undefined ? { group: state.group } : {}) });
  }

  /**
   * Posts the result to the panel; `rule` starts a new view of the same run with that rule;
   * `moved` says what a rerun changed; 'checks-follow' posts it without residual details that
   * are not computed yet (the panel shows them as being computed and asks for them).
   */
  showResult(rule?: RuleSpec, moved?: RefitView, checks: 'with-checks' | 'checks-follow' = 'with-checks'): void {
    const r0 = this.result;
    if (!r0 || !this.panel) return;
    const settings = this.ctx.settings(this.uri);
    // A new view of the same analysis gets a new run id, so the panel forgets the rule it kept for the old one.
    const r = rule ? { ...r0, runId: this.ctx.newRunId() } : r0;
    this.result = r;
    const payload = buildPanelPayload({
      runId: r.runId,
      analysis: r.analysis,
      source: {
        fileName: r.source.fileName,
        xLabel: r.columns.labels.x,
        yLabel: r.columns.labels.y,
        ...(r.columns.labels.weights && r.trials === undefined ? { weightsLabel: r.columns.labels.weights } : {}),
      },
      rejected: r.columns.rejected.length,
      heldOut: r.analysis.heldOut?.x.length ?? 0,
      tolerancePercent: settings.tolerancePercent,
      rule: rule ?? this.rule,
      trialsLabel: r.trials !== undefined ? r.columns.labels.weights : undefined,
      modelFromPanel: this.model !== undefined,
      candidatesFromPanel: this.candidates,
      // A group's panel has no calibration section (no inverse table with groups yet).
      detail: (df) => {
        const d = checks === 'with-checks' ? detailFor(r, df) : r.details.get(df);
        return r.groups ? d : withCalibration(r, d, settings);
      },
      warnings: settings.problems,
    });
    const shown: PanelPayload = moved ? { ...payload, refit: moved } : payload;
    this.rule = shown.rule;
    this.payload = shown;
    this.posted++;
    const g = r.groups;
    this.panel.post(g ? { type: 'groupResult', setId: g.setId, group: g.index, payload: shown } : { type: 'result', payload: shown });
    this.postDataState();
  }

  /**
   * The panel's inverse-table switch: sets knotwise.inverse.write for the data file's
   * workspace folder (the workspace when it has none); the settings change re-renders the panel.
   */
  async setInverseSaved(save: boolean): Promise<void> {
    const config = vscode.workspace.getConfiguration('knotwise', this.uri);
    const folder = vscode.workspace.getWorkspaceFolder(this.uri);
    await config.update('inverse.write', save, folder ? vscode.ConfigurationTarget.WorkspaceFolder : vscode.ConfigurationTarget.Workspace);
  }

  /** The curve of the fit record the next save would replace (core/calibrate/baseline.ts). */
  private async recordedCurve(): Promise<RunResult['recorded']> {
    try {
      const settings = this.ctx.settings(this.uri);
      const name = outputName(settings.recordName, baseName(this.uri));
      return recordedCurve(await previousRecord(vscode.Uri.joinPath(outputFolder(this.uri, settings.outputFolder), name)));
    } catch {
      return 'none';
    }
  }

  /**
   * Runs the residual checks of df `df` of `r` once the posted result has reached the
   * panel's page (they hold the extension host's thread for a while), so that the panel's
   * request for them (sendDetail) finds them done; nothing when `r` is no longer shown.
   */
  private checkSoon(r: RunResult, df: number): void {
    void (this.panel?.delivered() ?? Promise.resolve()).then(() => {
      if (this.result?.analysis === r.analysis) detailFor(this.result, df);
    });
  }

  /** Answers the panel's request for the residual details of one df of the shown run. */
  sendDetail(runId: number, df: number): void {
    const r = this.result;
    if (!r || runId !== r.runId) return;
    const detail = r.groups ? detailFor(r, df) : withCalibration(r, detailFor(r, df), this.ctx.settings(this.uri));
    if (detail) this.post({ type: 'detail', runId, detail });
  }

  // ---- Following the data ----

  /** The data file was edited, saved, closed or changed on disk: the shown analysis is compared with it shortly. */
  touch(t: Touch): void {
    if (this.result && this.hasPanel) this.follower.touch(t);
  }

  /** Whether the shown run's bytes are the data as it is now, as the panel shows it. */
  dataState(): DataStateView | undefined {
    const r = this.result;
    if (!r) return undefined;
    const s = this.ctx.settings(this.uri);
    return {
      analysed: r.source.unsaved ? 'unsaved' : 'disk',
      ...(this.change ? { change: this.change } : {}),
      refit: !s.refitOnSave ? 'manual' : this.refitAsked ? 'asked' : 'automatic',
      followedOnDisk: !r.source.unsaved && r.source.size >= LARGE_FILE_BYTES,
    };
  }

  /** Sends the data state of the shown run to the panel. */
  postDataState(): void {
    const r = this.result;
    const state = this.dataState();
    if (r && state) this.post({ type: 'dataState', runId: r.runId, state });
  }

  /** How the data now differs from the bytes `r` analysed, and the data now (undefined when the file is gone). */
  private async changeSince(r: RunResult): Promise<{ change: DataChangeView | undefined; now: DataText | undefined }> {
    let now: DataText;
    try {
      now = await readData(this.uri, r.source);
    } catch (err) {
      if (isNotFound(err)) return { change: { where: 'missing', added: 0, removed: 0, changed: 0, header: false }, now: undefined };
      // Unreadable for a moment (a program is writing it): what was known stands.
      return { change: this.change, now: undefined };
    }
    if (now.sha256 === r.source.sha256) return { change: undefined, now };
    return { change: { where: now.unsaved ? 'editor' : 'disk', ...compareRows(r.source.text, now.text) }, now };
  }

  /**
   * Compares the data with the shown run's bytes and tells the panel. When the analysed
   * unsaved text has since been saved byte for byte, the run is of bytes on disk. A save
   * or a change on disk refits when the settings say so (`autoRefit`).
   */
  private async compareNow(touches: ReadonlySet<Touch>, autoRefit = true): Promise<void> {
    const r = this.result;
    if (!r) return;
    const seen = await this.changeSince(r);
    // A newer run compared for itself.
    if (this.result !== r) return;
    if (!seen.change && seen.now && r.source.unsaved && !seen.now.unsaved) this.result = { ...r, source: { ...r.source, unsaved: false } };
    this.change = seen.change;
    this.postDataState();
    if (autoRefit && seen.change?.where === 'disk' && seen.now && (touches.has('save') || touches.has('disk'))) this.refitOnSave(seen.now);
  }

  /** Refits after a save or a change on disk (settings permitting); a large file asks first. */
  private refitOnSave(now: DataText): void {
    const settings = this.ctx.settings(this.uri);
    if (!settings.refitOnSave || !this.hasPanel) return;
    // A run that read (or is about to read) these bytes brings them in already.
    if (this.running && (this.running.sha256 === undefined || this.running.sha256 === now.sha256)) return;
    const rows = dataRowCount(now.text);
    if (rows > settings.refitAskAboveRows) {
      if (this.refitAsked) return;
      this.refitAsked = true;
      this.postDataState();
      const refit = 'Refit';
      void vscode.window
        .showInformationMessage(`Knotwise: ${this.file} changed; it has ${rows} data rows, more than knotwise.refit.askAboveRows (${settings.refitAskAboveRows}). Refit the curve now?`, refit)
        .then((pick) => (pick === refit ? this.tune({ reason: 'saved' }) : undefined));
      return;
    }
    void this.tune({ reason: 'saved' });
  }

  // ---- Saving ----

  /** Saves the data file's unsaved edits (asking first unless `answer` says); false when it stays unsaved. */
  private async dataOnDisk(answer: OverwriteAnswer): Promise<boolean> {
    const doc = openDocument(this.uri);
    if (!doc?.isDirty) return true;
    if (answer === 'no') return false;
    if (answer === 'ask') {
      const save = 'Save and Refit';
      const pick = await vscode.window.showWarningMessage(
        `${this.file} has unsaved edits. A curve table is saved only from data on disk, so that its fit record names bytes anyone can check. Save ${this.file} first and refit?`,
        { modal: true },
        save,
      );
      if (pick !== save) return false;
    }
    const saved = await doc.save();
    // Compare now, so the refit comes from the caller rather than from the save's events.
    if (saved) await this.compareNow(this.follower.take(), false);
    return saved;
  }

  /** Why the shown run cannot be saved as it is (its bytes are not the file's bytes on disk), or undefined when it can. */
  private async saveBlocker(): Promise<string | undefined> {
    const r = this.result;
    if (!r) return 'there is no finished run to save';
    if (r.source.unsaved) return `this analysis read unsaved edits of ${this.file}, and a curve table is saved only from data on disk`;
    // Events still waiting for their comparison (a watcher's late report of the save that started this run): compare now.
    if (this.follower.pending) await this.compareNow(this.follower.take());
    if (this.result !== r) return 'a newer analysis replaced this one';
    if (this.change) return `${this.file} changed since this analysis`;
    const disk = await diskSha256(this.uri);
    if (disk === undefined) return `${this.file} is no longer on disk`;
    if (disk !== r.source.sha256) {
      this.follower.touch('disk');
      return `the bytes of ${this.file} on disk are not the ones this analysis read`;
    }
    return undefined;
  }

  /** Runs again on the data now (keeping the person's rule) when the shown run is not of the bytes on disk. */
  private async refitForSave(options: TuneCommandOptions = {}): Promise<void> {
    if (!(await this.saveBlocker())) return;
    const run = await this.tune({ options, reason: 'asked' });
    if (run.status === 'failed') throw new NotSaved(`the refit failed: ${run.message ?? 'unknown error'}`);
    if (run.status === 'superseded') throw new NotSaved('a newer run replaced the refit; save again once it is done');
    if (run.status !== 'done') throw new NotSaved(`the refit was ${run.status}`);
    if (this.ruleDropped) throw new NotSaved('the df picked before was not fitted to the new data; pick a df again and save');
  }

  /** The panel's save button (`refit`: "Refit and save": save the data file when needed and run again first). */
  async saveFromPanel(requestId: number, runId: number, rule: RuleSpec, refit: boolean): Promise<void> {
    if (!this.result || this.result.runId !== runId) {
      this.post({ type: 'saveFailed', requestId, message: 'This result is out of date; nothing was saved.' });
      return;
    }
    this.rule = rule;
    try {
      if (refit) {
        if (!(await this.dataOnDisk('ask'))) throw new NotSaved(`${this.file} has unsaved edits, and a curve table is saved only from data on disk`);
        await this.refitForSave();
      }
      const blocker = await this.saveBlocker();
      if (blocker) {
        this.postDataState();
        throw new NotSaved(`${blocker}. Use “Refit and save”`);
      }
      const saved = await this.save(this.rule ?? rule, 'ask');
      if (!saved) this.post({ type: 'saveFailed', requestId, message: 'Nothing was saved: an existing file was not written by Knotwise.' });
      else this.post({ type: 'saved', requestId, files: (saved.named ?? saved.uris).map((u) => vscode.workspace.asRelativePath(u)), note: saved.note });
    } catch (err) {
      this.post({ type: 'saveFailed', requestId, message: `Nothing was saved: ${errorText(err)}.`.replace(/\.\.$/, '.') });
    }
  }

  /**
   * Saves the table and record of the shown run with `rule`, or of a grouped run every
   * group's outputs as the command line writes them (the rule of the settings chose each
   * group's df, as on the command line); undefined when the person declined to replace a file.
   * `named`: the files to name in the panel when not all of them.
   */
  private async save(rule: RuleSpec, answer: OverwriteAnswer): Promise<{ uris: readonly vscode.Uri[]; note: string; named?: readonly vscode.Uri[] } | undefined> {
    const r = this.result;
    if (!r) throw new InputError('there is no finished run to save');
    if (r.groups) return this.saveGroups(r, answer);
    const saved = await saveDeliverables(
      {
        dataUri: this.uri,
        fileName: r.source.fileName,
        dataSha256: r.source.sha256,
        rowsRead: r.source.table.rowCount,
        columns: { x: r.choice.x, y: r.choice.y, weights: r.trials === undefined ? r.choice.weights : undefined, trials: r.trials },
        selection: r.columns,
        analysis: r.analysis,
        rule,
        settings: this.ctx.settings(this.uri),
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

  /** Saves every group of the grouped run `r` (its source, columns and options as run). */
  private async saveGroups(r: RunResult, answer: OverwriteAnswer): Promise<{ uris: readonly vscode.Uri[]; note: string; named: readonly vscode.Uri[] } | undefined> {
    const g = r.groups;
    if (!g) throw new InputError('this run has no groups');
    const saved = await saveGroupDeliverables(
      {
        dataUri: this.uri,
        fileName: r.source.fileName,
        dataSha256: r.source.sha256,
        rowsRead: g.table.rowCount,
        columns: { x: r.choice.x, y: r.choice.y, weights: r.choice.weights },
        per: g.per,
        split: g.split,
        analysis: g.analysis,
        common: g.common,
        options: r.options,
        settings: this.ctx.settings(this.uri),
      },
      answer,
    );
    if (saved) {
      const summary = saved.named[0];
      void vscode.commands.executeCommand('revealInExplorer', summary).then(undefined, () => undefined);
      const open = 'Open Summary';
      void vscode.window
        .showInformationMessage(`Knotwise saved ${saved.named.map((u) => vscode.workspace.asRelativePath(u)).join(' and ')}. ${saved.note}`, open)
        .then((pick) => (pick === open && summary ? vscode.window.showTextDocument(summary, { preview: true }) : undefined));
    }
    return saved;
  }

  /**
   * The save command: saves the data file's unsaved edits first (asking), runs the
   * analysis when there is none or the shown one is not of the bytes on disk, then saves.
   */
  async saveCommand(options: SaveCommandOptions = {}): Promise<SaveSummary> {
    const file = this.file;
    if (!(await this.dataOnDisk(options.saveEditedData ?? 'ask'))) return { status: 'dismissed', file, message: `${file} has unsaved edits; a curve table is saved only from data on disk` };
    // A surface on show, or asked for by its columns: saved as the command line's fit --x --x2 --y.
    if (options.columns ? typeof options.columns.x2 === 'string' : this.surface && !this.result) return this.saveSurfaceCommand(options);
    try {
      if (!this.result) {
        const run = await this.tune({ options, ask: !options.columns });
        if (run.status !== 'done') return run;
        if (this.surface && !this.result) return this.saveSurfaceCommand(options);
      } else {
        await this.compareNow(this.follower.take(), false);
        await this.refitForSave(options);
      }
    } catch (err) {
      if (err instanceof NotSaved) return { status: 'failed', file, message: err.message };
      throw err;
    }
    const r = this.result as RunResult;
    const rule = options.rule ?? this.rule ?? r.analysis.tune.selected.rule;
    try {
      const blocker = await this.saveBlocker();
      if (blocker) throw new NotSaved(blocker);
      const saved = await this.save(rule, options.replaceForeignFiles ?? 'ask');
      if (!saved) return { status: 'dismissed', file: r.source.fileName, runId: r.runId, message: 'an existing file was not written by Knotwise' };
      const chosenDf = r.groups ? r.analysis.chosen.df : selectDf(r.analysis.tune.candidates, rule, r.analysis.tune.metric).df;
      return { status: 'done', file: r.source.fileName, runId: r.runId, chosenDf, files: saved.uris.map((u) => u.toString()) };
    } catch (err) {
      const message = errorText(err);
      void vscode.window.showErrorMessage(`Knotwise: nothing was saved: ${message}`);
      return { status: 'failed', file: r.source.fileName, runId: r.runId, message };
    }
  }

  // ---- Model options ----

  /** Model settings for the panel's controls (checked against the curve kind), or why they cannot be used. */
  private modelFromChoice(choice: ModelChoice): ModelSettings | string {
    const settings = this.ctx.settings(this.uri);
    const current = this.modelFor();
    const next: ModelSettings = { outcome: choice.outcome, shape: choice.shape, robustK: choice.robust ? (current.robustK ?? settings.huberK) : undefined };
    try {
      resolveModel(settings.kind, modelOptions(next));
      return next;
    } catch (err) {
      return errorText(err);
    }
  }

  private differsFromSettings(m: ModelSettings): boolean {
    const s = this.ctx.settings(this.uri).model;
    return !(m.outcome === s.outcome && m.robustK === s.robustK && JSON.stringify(m.shape) === JSON.stringify(s.shape));
  }

  /** The panel's outcome, shape and robust controls: checks the combination, keeps it for this file and reruns. */
  switchModel(choice: ModelChoice): void {
    const r = this.result;
    if (!r) return;
    const next = this.modelFromChoice(choice);
    if (typeof next === 'string') {
      this.post({ type: 'failed', runId: r.runId, message: `Not changed: ${next}` });
      return;
    }
    this.model = this.differsFromSettings(next) ? next : undefined;
    void this.tune();
  }

  /**
   * The panel's "Widen the candidates" button: keeps these candidate df (the command line's
   * --df text, already checked by the protocol's guard) for this file and reruns, keeping
   * the person's rule, model options and columns.
   */
  widenCandidates(text: string): void {
    if (!this.result) return;
    this.candidates = text;
    void this.tune();
  }

  /** Re-checks the rows of the edited file for the Problems panel (the columns as last chosen). */
  async revalidate(): Promise<void> {
    const choice = this.ctx.memory.get(this.uri);
    if (!choice || !this.hasPanel) return;
    try {
      const source = await readCsv(this.uri);
      if (!choiceFits(source.table, choice)) return;
      if (typeof choice.per === 'string') {
        // The rows of a grouped run, as its split rejects them (an empty group cell too).
        const table = parseCsvText(source.text, { file: source.fileName, keepText: choice.per });
        this.ctx.problems.show(this.uri, source.text, table, splitByColumn(table, { x: choice.x, y: choice.y, weights: choice.weights }, choice.per, source.fileName).rejected);
        return;
      }
      const trials = this.result?.trials;
      const columns =
        trials !== undefined
          ? selectTrials(source.table, { x: choice.x, y: choice.y }, trials, source.fileName)
          : selectColumns(source.table, { x: choice.x, y: choice.y, weights: choice.weights }, source.fileName);
      this.ctx.problems.show(this.uri, source.text, source.table, columns.rejected);
    } catch {
      // The file is mid-edit and unreadable: keep the entries until it reads again.
    }
  }

  dispose(): void {
    this.stop();
    this.follower.dispose();
    this.panel?.dispose();
  }
}
