/**
 * The Knotwise panel: shows one run's payload, the answer first (the chosen df and why,
 * the curve, the error against df, each with the controls that change it), then the
 * details in folding sections (webview/sections/). It applies a rule, a tolerance or a df
 * picked by hand at once with core's selectDf (no round trip), asks the host for residual
 * details it does not have yet, switches the outcome family, shape constraints and robust
 * fitting (the host reruns the analysis), and sends save and reveal-line requests. It
 * shows a run's progress with a Stop button, a failed or cancelled run with a Run again
 * button, and a banner when the data changed since the analysis (then saving becomes
 * "Refit and save"). What the person set (rule, open sections, the error figure's range)
 * is kept in the webview's state. A grouped run (the rows split into groups) adds a group
 * selector at the top and the overview of every group above the details; the rest shows
 * the selected group as a file of its own. Every text from the CSV is set with textContent.
 */
import { FOLD_IDS, unreachable, type FoldId, type HostMessage, type PanelState } from '../core/protocol';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec, Selection } from '../core/tune/types';
import type { DataStateView, FitDetail, ModelChoice, PanelPayload } from '../core/view/model';
import { el, replaceChildren } from './dom';
import { panelFigureView } from './figures';
import { attachHover } from './hover';
import { answerSection } from './sections/answer';
import { bannerElement, showDataState } from './sections/banner';
import { candidatesSection } from './sections/candidates';
import { curveSection, type CurveSection } from './sections/curve';
import { errorSection } from './sections/errorChart';
import { headerSection } from './sections/header';
import { influenceSection } from './sections/influence';
import { modelReportSection } from './sections/modelReport';
import { notesSection } from './sections/notes';
import { calibrationSection } from './sections/calibration';
import { residualChecksSection } from './sections/residualChecks';
import { groupBar, groupsOverview, SMALL_MULTIPLES_SHOWN, type GroupActions } from './sections/groups';
import type { GroupsView } from '../core/view/groups';
import type { SurfaceView } from '../core/view/surface';
import { surfaceSection, type SurfaceActions } from './sections/surface';
import type { PanelActions, Section } from './sections/section';
import type { Host } from './vscodeApi';

/** The panel's state and DOM. */
export class Panel {
  private payload: PanelPayload | undefined;
  private rule: RuleSpec = { kind: 'one-se' };
  /** The tolerance the simplest-within rule uses (or would use): what the tolerance box shows. */
  private tolerance = 2;
  /** The folding sections the person left open. */
  private readonly open = new Set<FoldId>();
  /** What the error figure shows. */
  private errorRange: 'decision' | 'all' = 'decision';
  /** Every listed influential row shown, not only the first ten. */
  private allInfluential = false;
  private readonly details = new Map<number, FitDetail>();
  private readonly requested = new Set<number>();
  private nextRequest = 1;
  private pendingSave: number | undefined;
  /** The data file this panel belongs to (from the host's `file` message). */
  private file: { readonly uri: string; readonly fileName: string } | undefined;
  /** Whether the shown run's data changed since (the host's latest `dataState` for it). */
  private dataState: DataStateView | undefined;
  /** The sections of the shown payload, in page order. */
  private sections: Section[] = [];
  private curve: CurveSection | undefined;
  /** A grouped run's overview (from the host's `groups` message) and the group on show; undefined for a file of one data set. */
  private groups: GroupsView | undefined;
  private groupIndex = 0;
  /** Every group's small figure shown, not only the first ones. */
  private allGroups = false;
  private readonly groupActions: GroupActions = {
    select: (index) => this.selectGroup(index),
    showAll: () => {
      this.allGroups = true;
      if (!this.payload) return;
      this.build(this.payload, `#kw-small-button-${SMALL_MULTIPLES_SHOWN}`);
      this.update();
    },
  };
  /** The surface on show (two inputs); undefined while a curve is shown. */
  private surface: SurfaceView | undefined;
  private readonly surfaceActions: SurfaceActions = {
    slices: (input, at) => {
      if (!this.surface) return;
      this.status('Slicing…');
      this.host.post({ type: 'surfaceSlices', runId: this.surface.runId, input, at });
    },
    pair: (x, x2) => {
      if (!this.surface) return;
      this.status(`Fitting df ${x} × ${x2}…`);
      this.host.post({ type: 'surfacePair', runId: this.surface.runId, x, x2 });
    },
    rule: () => {
      if (this.surface) this.host.post({ type: 'surfaceRule', runId: this.surface.runId });
    },
    save: () => {
      if (!this.surface || this.pendingSave !== undefined) return;
      this.pendingSave = this.nextRequest++;
      this.setSaveBusy(true);
      this.status('Saving…');
      this.host.post({ type: 'surfaceSave', requestId: this.pendingSave, runId: this.surface.runId });
    },
    rerun: () => this.rerun(),
    stop: () => this.stop(),
  };
  private readonly actions: PanelActions = {
    setRule: (rule) => this.setRule(rule),
    setTolerance: (percent) => {
      this.tolerance = percent;
      if (this.rule.kind === 'simplest-within') this.setRule({ kind: 'simplest-within', percent });
      else this.update();
    },
    setErrorRange: (range) => {
      this.errorRange = range;
      this.keepState();
      this.update();
    },
    foldToggled: (id, open) => {
      if (open) this.open.add(id);
      else this.open.delete(id);
      this.keepState();
    },
    openFold: (id) => {
      const details = this.root.querySelector<HTMLDetailsElement>(`#kw-fold-${id}`);
      if (!details) return;
      details.open = true;
      details.querySelector('summary')?.focus();
      details.scrollIntoView({ block: 'start' });
    },
    changeModel: (model) => this.changeModel(model),
    widenCandidates: (candidates) => this.widenCandidates(candidates),
    setInverseSaved: (save) => this.host.post({ type: 'inverseTable', save }),
    setAllInfluential: (all) => {
      this.allInfluential = all;
      this.keepState();
      this.update();
    },
    save: () => this.save(),
    rerun: () => this.rerun(),
    stop: () => this.stop(),
  };

  constructor(
    private readonly root: HTMLElement,
    private readonly host: Host,
  ) {
    // What a reloaded webview (hidden and shown again, or a reloaded window) left open.
    const kept = host.loadState();
    for (const id of kept?.open ?? []) this.open.add(id);
    if (kept?.errorRange) this.errorRange = kept.errorRange;
    if (kept?.allInfluential) this.allInfluential = true;
    root.addEventListener('click', (e) => this.onActivate(e));
    root.addEventListener('keydown', (e) => {
      if ((e.key === 'Enter' || e.key === ' ') && (e.target as Element | null)?.closest?.('svg [data-line][tabindex]')) {
        e.preventDefault();
        this.onActivate(e);
      }
    });
    attachHover(root);
  }

  /** Handles one message from the host. */
  handle(message: HostMessage): void {
    switch (message.type) {
      case 'file':
        this.file = { uri: message.uri, fileName: message.fileName };
        this.keepState();
        return;
      case 'running':
        this.setRunning(true, message.message, message.fraction);
        return;
      case 'result':
        this.groups = undefined;
        this.surface = undefined;
        this.show(message.payload);
        return;
      case 'surface':
        this.showSurface(message.view);
        return;
      case 'groups': {
        // Shown with its first group's result, which follows; an overview older than what is shown is dropped.
        const newest = this.groups ? this.groups.setId : this.payload ? this.payload.runId : -1;
        if (message.view.setId < newest) return;
        this.groups = message.view;
        this.allGroups = false;
        return;
      }
      case 'groupResult':
        if (!this.groups || message.setId !== this.groups.setId || message.group >= this.groups.groups.length) return;
        this.groupIndex = message.group;
        this.show(message.payload);
        return;
      case 'failed':
        if (this.surface) {
          if (message.runId < this.surface.runId) return;
          this.root.dataset.state = 'ready';
          this.setRunning(false);
          this.status(message.message);
          return;
        }
        if (this.payload && message.runId < this.payload.runId) return;
        this.root.dataset.state = this.payload ? 'ready' : 'failed';
        if (!this.payload) this.renderFailed(message.message);
        else {
          this.setRunning(false);
          this.status(message.message);
          // The shown result still stands: its model options go back into the controls.
          this.curve?.model.sync();
        }
        return;
      case 'dataState':
        if (!this.payload || message.runId !== this.payload.runId) return;
        this.dataState = message.state;
        this.renderDataState();
        return;
      case 'detail':
        if (!this.payload || message.runId !== this.payload.runId) return;
        this.details.set(message.detail.df, message.detail);
        if (this.currentSelection()?.df === message.detail.df) this.update();
        return;
      case 'saved':
        if (message.requestId !== this.pendingSave) return;
        this.pendingSave = undefined;
        this.setSaveBusy(false);
        this.status(`Saved ${message.files.join(' and ')}.${message.note ? ` ${message.note}` : ''}`);
        return;
      case 'saveFailed':
        if (message.requestId !== this.pendingSave) return;
        this.pendingSave = undefined;
        this.setSaveBusy(false);
        this.status(message.message);
        return;
      default:
        unreachable(message);
    }
  }

  /** Shows a surface (a newer run, or a new view of the one shown): replaces everything shown. */
  private showSurface(view: SurfaceView): void {
    const newest = Math.max(this.payload?.runId ?? -1, this.groups?.setId ?? -1);
    if (view.runId < newest || (this.surface && view.runId < this.surface.runId)) return;
    const focused = (document.activeElement as HTMLElement | null)?.id;
    this.payload = undefined;
    this.groups = undefined;
    this.curve = undefined;
    this.sections = [];
    this.surface = view;
    this.root.dataset.state = 'ready';
    this.root.dataset.runId = String(view.runId);
    this.root.dataset.view = 'surface';
    this.root.dataset.pair = `${view.pair.x}x${view.pair.x2}`;
    this.root.setAttribute('aria-busy', 'false');
    replaceChildren(this.root, ...surfaceSection(view, this.surfaceActions));
    const again = focused ? this.root.querySelector<HTMLElement>(`#${CSS.escape(focused)}`) : null;
    again?.focus();
    this.setSaveBusy(this.pendingSave !== undefined);
    if (this.pendingSave !== undefined) this.status('Saving…');
  }

  private show(payload: PanelPayload): void {
    if (this.payload && payload.runId < this.payload.runId) return;
    this.surface = undefined;
    this.root.dataset.view = 'curve';
    const kept = this.host.loadState();
    this.payload = payload;
    this.details.clear();
    this.requested.clear();
    for (const d of payload.details) this.details.set(d.df, d);
    this.rule = kept && kept.runId === payload.runId && kept.rule ? kept.rule : payload.rule;
    this.tolerance = this.rule.kind === 'simplest-within' ? this.rule.percent : payload.tolerancePercent;
    this.dataState = undefined;
    this.root.dataset.state = 'ready';
    this.root.dataset.runId = String(payload.runId);
    this.build(payload);
    this.update();
    // A save asked for before this run (Refit and save) is still waiting for its answer.
    this.setSaveBusy(this.pendingSave !== undefined);
    if (this.pendingSave !== undefined) this.status('Saving…');
  }

  /**
   * Lays out the sections of a new payload: header, banner and answer; the curve and the
   * error figure with their controls; the folding details; the caution. A grouped run adds
   * the group selector first and the overview of every group before the details (and has no
   * calibration section). The element that had the focus gets it back when it is still
   * there, else `focusFallback`.
   */
  private build(p: PanelPayload, focusFallback?: string): void {
    const focused = (document.activeElement as HTMLElement | null)?.id;
    const open = (id: FoldId): boolean => this.open.has(id);
    const groups = this.groups;
    const answer = answerSection(p, this.actions);
    const curve = curveSection(p, this.actions);
    const error = errorSection(p, this.actions);
    const folds = [
      residualChecksSection(open('residual-checks'), this.actions),
      influenceSection(open('influential-rows'), this.actions),
      groups ? undefined : calibrationSection(open('calibration'), this.actions),
      candidatesSection(open('candidates'), this.actions),
      modelReportSection(open('model-report'), this.actions),
      notesSection(open('notes'), this.actions),
    ].filter((f): f is Section => f !== undefined);
    this.curve = curve;
    this.sections = [answer, curve, error, ...folds];
    this.root.dataset.groups = groups ? String(groups.groups.length) : '';
    replaceChildren(
      this.root,
      groups ? groupBar(groups, this.groupIndex, this.groupActions) : null,
      headerSection(p),
      bannerElement(() => this.rerun()),
      answer.element,
      el('div', { class: 'kw-decision', id: 'kw-decision' }, curve.element, error.element, curve.model.element),
      groups ? groupsOverview(groups, this.groupIndex, this.allGroups, this.groupActions) : null,
      ...folds.map((f) => f.element),
      el('footer', { class: 'kw-caution', id: 'kw-caution' }, p.caution),
    );
    if (groups) {
      // The group's name in the title, beside what is plotted against what.
      const h1 = this.root.querySelector('.kw-header h1');
      const g = groups.groups[this.groupIndex];
      if (h1 && g) h1.textContent = `${groups.groupLabel} ${g.name}: ${h1.textContent ?? ''}`;
    }
    const save = this.root.querySelector<HTMLButtonElement>('#kw-save');
    if (save) save.textContent = this.saveLabel();
    const again = (focused ? this.root.querySelector<HTMLElement>(`#${CSS.escape(focused)}`) : null) ?? (focusFallback ? this.root.querySelector<HTMLElement>(focusFallback) : null);
    if (focused || focusFallback) again?.focus();
  }

  /** Shows group `index` of the grouped run on show: the host answers with its result. */
  private selectGroup(index: number): void {
    const g = this.groups;
    if (!g || index < 0 || index >= g.groups.length || index === this.groupIndex) return;
    this.status(`Showing ${g.groupLabel} ${g.groups[index]?.name ?? ''}…`);
    this.host.post({ type: 'selectGroup', setId: g.setId, group: index });
  }

  /** The save button's words: a grouped run saves every group; a changed file refits first. */
  private saveLabel(): string {
    if (this.groups) return this.needsRefit() ? 'Refit and save every group' : 'Save every group';
    return this.needsRefit() ? 'Refit and save' : 'Save table and record';
  }

  /** The view before the first result: what the run is doing, how far it is, and a Stop button. */
  private renderWaiting(message: string, fraction: number | undefined): void {
    if (!this.root.querySelector('#kw-waiting')) {
      const stop = el('button', { type: 'button', id: 'kw-stop', class: 'kw-secondary' }, 'Stop');
      stop.addEventListener('click', () => this.stop());
      replaceChildren(
        this.root,
        el(
          'section',
          { id: 'kw-waiting', class: 'kw-waiting', 'aria-label': 'Analysis in progress' },
          el('p', { id: 'kw-status', role: 'status', class: 'kw-status' }),
          el('progress', { id: 'kw-progress', max: 1, 'aria-label': 'Progress of the analysis' }),
          el('div', { class: 'kw-actions' }, stop),
        ),
      );
    }
    this.status(message);
    this.setProgress(fraction);
  }

  /** The view when the first run failed or was cancelled: why, and a Run again button. */
  private renderFailed(message: string): void {
    const again = el('button', { type: 'button', id: 'kw-rerun', class: 'kw-primary' }, 'Run again');
    again.addEventListener('click', () => this.rerun());
    replaceChildren(
      this.root,
      el('p', { class: 'kw-error', role: 'alert', id: 'kw-failure' }, message),
      el('div', { class: 'kw-actions' }, again),
      el('p', { id: 'kw-status', role: 'status', class: 'kw-status' }),
    );
  }

  /** Shows or hides the running state: the status text, the progress bar and the Stop button. */
  private setRunning(running: boolean, message?: string, fraction?: number): void {
    if (running) this.root.dataset.state = 'running';
    this.root.setAttribute('aria-busy', running ? 'true' : 'false');
    if (!this.payload && !this.surface) {
      if (running) this.renderWaiting(message ?? 'Running…', fraction);
      return;
    }
    if (message !== undefined) this.status(message);
    const stop = this.root.querySelector<HTMLButtonElement>('#kw-stop');
    if (stop) stop.hidden = !running;
    const progress = this.root.querySelector<HTMLProgressElement>('#kw-progress');
    if (progress) progress.hidden = !running;
    if (running) this.setProgress(fraction);
  }

  /** Sets the progress bar: a fraction from 0 to 1, or indeterminate when unknown. */
  private setProgress(fraction: number | undefined): void {
    const progress = this.root.querySelector<HTMLProgressElement>('#kw-progress');
    if (!progress) return;
    if (fraction === undefined) progress.removeAttribute('value');
    else progress.value = fraction;
  }

  /** The banner about changed data, the note about a file followed on disk, and the save button's label. */
  private renderDataState(): void {
    const p = this.payload;
    if (!p) return;
    const state = this.dataState;
    showDataState(this.root, state, this.file?.fileName ?? p.source.fileName);
    this.root.dataset.data = !state ? 'current' : state.change ? `changed-${state.change.where}` : state.analysed === 'unsaved' ? 'unsaved' : 'current';
    const save = this.root.querySelector<HTMLButtonElement>('#kw-save');
    if (save) save.textContent = this.saveLabel();
    this.setSaveBusy(this.pendingSave !== undefined);
  }

  /** True when a save must run the analysis again first (the data changed, or the analysis read unsaved edits). */
  private needsRefit(): boolean {
    const s = this.dataState;
    return s !== undefined && (s.change !== undefined || s.analysed === 'unsaved');
  }

  /** Keeps the file, run, rule, panel-set model options and candidates, and the view the person left in the webview's state (restored after a reload). */
  private keepState(): void {
    if (!this.file) return;
    const p = this.payload;
    const open = FOLD_IDS.filter((id) => this.open.has(id));
    const shownGroup = this.groups?.groups[this.groupIndex];
    const state: PanelState = {
      file: this.file.uri,
      ...(p ? { runId: p.runId, rule: this.rule } : {}),
      ...(p?.model.fromPanel ? { model: { outcome: p.model.outcome, shape: [...p.model.shape], robust: p.model.robust } } : {}),
      ...(open.length ? { open } : {}),
      ...(this.errorRange !== 'decision' ? { errorRange: this.errorRange } : {}),
      ...(p?.candidatesFromPanel !== undefined ? { candidates: p.candidatesFromPanel } : {}),
      ...(this.allInfluential ? { allInfluential: true } : {}),
      ...(p && shownGroup ? { group: shownGroup.name } : {}),
    };
    this.host.saveState(state);
  }

  private currentSelection(): Selection | undefined {
    if (!this.payload) return undefined;
    try {
      // The editor's words (an option named in the explanation is a setting, not a flag), and the tolerance the box shows for the simplest-within rule.
      return selectDf(this.payload.candidates, this.rule, this.payload.metric, 'editor', this.tolerance);
    } catch {
      return undefined;
    }
  }

  private setRule(rule: RuleSpec): void {
    this.rule = rule;
    if (rule.kind === 'simplest-within') this.tolerance = rule.percent;
    this.update();
  }

  /** Shows the current choice in every section. */
  private update(): void {
    const p = this.payload;
    if (!p) return;
    const selection = this.currentSelection();
    if (!selection) {
      const reason = this.root.querySelector('#kw-reason');
      if (reason) reason.textContent = 'No candidate df could be evaluated with this rule.';
      return;
    }
    this.keepState();
    this.host.post({ type: 'choice', runId: p.runId, rule: this.rule, df: selection.df });
    const detail = this.details.get(selection.df);
    if (!detail && !this.requested.has(selection.df)) {
      this.requested.add(selection.df);
      this.host.post({ type: 'needDetail', runId: p.runId, df: selection.df });
    }
    this.root.dataset.chosenDf = String(selection.df);
    const choice = {
      payload: p,
      selection,
      detail,
      view: panelFigureView(p, selection, detail, this.errorRange),
      rule: this.rule,
      tolerance: this.tolerance,
      allInfluential: this.allInfluential,
    };
    for (const s of this.sections) s.show(choice);
  }

  private changeModel(model: ModelChoice): void {
    const p = this.payload;
    if (!p) return;
    this.setRunning(true, 'Tuning again with the new readings and shape…');
    this.host.post({ type: 'model', runId: p.runId, model });
  }

  private widenCandidates(candidates: string): void {
    const p = this.payload;
    if (!p) return;
    this.setRunning(true, `Tuning again with the candidates df ${candidates}…`);
    this.host.post({ type: 'candidates', runId: p.runId, candidates });
  }

  private rerun(): void {
    this.setRunning(true, 'Running the analysis again…');
    this.host.post({ type: 'rerun' });
  }

  private stop(): void {
    this.status('Stopping…');
    this.host.post({ type: 'stop' });
  }

  private save(): void {
    if (!this.payload || this.pendingSave !== undefined) return;
    this.pendingSave = this.nextRequest++;
    this.setSaveBusy(true);
    const refit = this.needsRefit();
    this.status(refit ? 'Refitting, then saving…' : 'Saving…');
    this.host.post({ type: refit ? 'refitAndSave' : 'save', requestId: this.pendingSave, runId: this.payload.runId, rule: this.rule });
  }

  private setSaveBusy(busy: boolean): void {
    const b = this.root.querySelector<HTMLButtonElement>('#kw-save');
    // Nothing can be saved from data that is no longer on disk.
    if (b) b.disabled = busy || this.dataState?.change?.where === 'missing';
  }

  private onActivate(e: Event): void {
    const target = (e.target as Element | null)?.closest?.('[data-line]');
    if (!target) return;
    const line = Number(target.getAttribute('data-line'));
    if (Number.isInteger(line) && line > 0) this.host.post({ type: 'revealLine', line });
  }

  private status(text: string): void {
    const s = this.root.querySelector('#kw-status');
    if (s) s.textContent = text;
    else this.root.dataset.status = text;
  }
}
