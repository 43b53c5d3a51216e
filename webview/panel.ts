/**
 * The Knotwise panel: shows one run's payload, lets the person switch the rule, the
 * tolerance or pick a df by hand (applied at once with core's selectDf, no round trip),
 * asks the host for residual details it does not have yet, switches the outcome family,
 * shape constraints and robust fitting (the host reruns the analysis), and sends save and
 * reveal-line requests. It shows a run's progress with a Stop button, a failed or
 * cancelled run with a Run again button, and a banner when the data changed since the
 * analysis (then saving becomes "Refit and save"). Every text from the CSV is set with
 * textContent.
 */
import type { HostMessage } from '../core/protocol';
import { unreachable } from '../core/protocol';
import { OUTCOME_LIST } from '../core/registry/outcomes/index';
import { MAX_TOLERANCE_PERCENT, RULE_LIST, ruleWords } from '../core/registry/rules/index';
import type { Outcome, Shape } from '../core/types';
import { metricLabel, sig } from '../core/tune/format';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec, Selection } from '../core/tune/types';
import type { DataChangeView, DataStateView, FitDetail, ModelChoice, PanelPayload, RefitView } from '../core/view/model';
import { percent } from '../core/words/numbers';
import { el, replaceChildren } from './dom';
import { renderFigures } from './figures';
import type { Host } from './vscodeApi';

type RuleKind = RuleSpec['kind'];

const SHAPE_CHOICES: readonly { readonly shape: Shape; readonly label: string; readonly opposite?: Shape }[] = [
  { shape: 'increasing', label: 'increasing', opposite: 'decreasing' },
  { shape: 'decreasing', label: 'decreasing', opposite: 'increasing' },
  { shape: 'nonnegative', label: 'non-negative' },
  { shape: 'convex', label: 'convex', opposite: 'concave' },
  { shape: 'concave', label: 'concave', opposite: 'convex' },
];

/** The panel's state and DOM. */
export class Panel {
  private payload: PanelPayload | undefined;
  private rule: RuleSpec = { kind: 'one-se' };
  private tolerance = 2;
  private readonly details = new Map<number, FitDetail>();
  private readonly requested = new Set<number>();
  private nextRequest = 1;
  private pendingSave: number | undefined;
  /** The data file this panel belongs to (from the host's `file` message). */
  private file: { readonly uri: string; readonly fileName: string } | undefined;
  /** Whether the shown run's data changed since (the host's latest `dataState` for it). */
  private dataState: DataStateView | undefined;
  /** True from a `running` message (or a request that starts a run) until the run's result or failure. */
  private running = false;

  constructor(
    private readonly root: HTMLElement,
    private readonly host: Host,
  ) {
    root.addEventListener('click', (e) => this.onActivate(e));
    root.addEventListener('keydown', (e) => {
      if ((e.key === 'Enter' || e.key === ' ') && (e.target as Element | null)?.closest?.('svg [data-line][tabindex]')) {
        e.preventDefault();
        this.onActivate(e);
      }
    });
    root.addEventListener('mouseover', (e) => this.onHover(e));
    root.addEventListener('focusin', (e) => this.onHover(e));
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
        this.show(message.payload);
        return;
      case 'failed':
        if (this.payload && message.runId < this.payload.runId) return;
        this.running = false;
        this.root.dataset.state = this.payload ? 'ready' : 'failed';
        if (!this.payload) this.renderFailed(message.message);
        else {
          this.setRunning(false);
          this.status(message.message);
          // The shown result still stands: its model options go back into the controls.
          this.syncModelControls();
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

  private show(payload: PanelPayload): void {
    if (this.payload && payload.runId < this.payload.runId) return;
    const kept = this.host.loadState();
    this.payload = payload;
    this.details.clear();
    this.requested.clear();
    for (const d of payload.details) this.details.set(d.df, d);
    this.rule = kept && kept.runId === payload.runId && kept.rule ? kept.rule : payload.rule;
    this.tolerance = this.rule.kind === 'simplest-within' ? this.rule.percent : payload.tolerancePercent;
    this.dataState = undefined;
    this.running = false;
    this.root.dataset.state = 'ready';
    this.root.dataset.runId = String(payload.runId);
    this.build(payload);
    this.update();
    // A save asked for before this run (Refit and save) is still waiting for its answer.
    this.setSaveBusy(this.pendingSave !== undefined);
    if (this.pendingSave !== undefined) this.status('Saving…');
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
    this.running = running;
    if (running) this.root.dataset.state = 'running';
    this.root.setAttribute('aria-busy', running ? 'true' : 'false');
    if (!this.payload) {
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
    const banner = this.root.querySelector<HTMLElement>('#kw-banner');
    if (!p || !banner) return;
    const state = this.dataState;
    const fileName = this.file?.fileName ?? p.source.fileName;
    const text = state ? bannerText(state, fileName) : '';
    banner.hidden = text === '';
    this.byId('kw-banner-text').textContent = text;
    this.byId('kw-refit').hidden = !(state?.change && state.change.where !== 'missing');
    const note = this.byId('kw-follow-note');
    note.hidden = !state?.followedOnDisk;
    note.textContent = state?.followedOnDisk
      ? `${fileName} is too large (about 50 MB or more) for the editor to hand its text to extensions, so Knotwise follows the file on disk: edits show here once saved.`
      : '';
    this.root.dataset.data = !state ? 'current' : state.change ? `changed-${state.change.where}` : state.analysed === 'unsaved' ? 'unsaved' : 'current';
    const save = this.byId<HTMLButtonElement>('kw-save');
    save.textContent = this.needsRefit() ? 'Refit and save' : 'Save table and record';
    this.setSaveBusy(this.pendingSave !== undefined);
  }

  /** True when a save must run the analysis again first (the data changed, or the analysis read unsaved edits). */
  private needsRefit(): boolean {
    const s = this.dataState;
    return s !== undefined && (s.change !== undefined || s.analysed === 'unsaved');
  }

  /** Keeps the file, run, rule and panel-set model options in the webview's state (restored after a window reload). */
  private keepState(): void {
    if (!this.file) return;
    const p = this.payload;
    this.host.saveState({
      file: this.file.uri,
      ...(p ? { runId: p.runId, rule: this.rule } : {}),
      ...(p?.model.fromPanel ? { model: { outcome: p.model.outcome, shape: [...p.model.shape], robust: p.model.robust } } : {}),
    });
  }

  private currentSelection(): Selection | undefined {
    if (!this.payload) return undefined;
    try {
      return selectDf(this.payload.candidates, this.rule, this.payload.metric);
    } catch {
      return undefined;
    }
  }

  private build(p: PanelPayload): void {
    const s = p.source;
    const evaluated = p.candidates.filter((c) => c.skipped === undefined);
    const ruleGroup = el('fieldset', { class: 'kw-rules' }, el('legend', {}, 'How the df is chosen'));
    for (const r of RULE_LIST) {
      const id = `kw-rule-${r.id}`;
      ruleGroup.append(el('div', { class: 'kw-radio' }, el('input', { type: 'radio', name: 'kw-rule', id, value: r.id }), el('label', { for: id }, r.label)));
    }
    const dfSelect = el('select', { id: 'kw-df' });
    for (const c of evaluated) dfSelect.append(el('option', { value: c.df }, `df ${c.df}`));
    const modelGroup = this.modelControls(p);
    const controls = el(
      'section',
      { class: 'kw-controls', 'aria-label': 'Choice of df and model' },
      ruleGroup,
      el(
        'div',
        { class: 'kw-inputs' },
        el('label', { for: 'kw-tolerance' }, 'Tolerance (%)'),
        el('input', { type: 'number', id: 'kw-tolerance', min: 0, max: MAX_TOLERANCE_PERCENT, step: 0.5, value: this.tolerance }),
        el('label', { for: 'kw-df' }, 'The df I pick'),
        dfSelect,
      ),
      modelGroup,
      el(
        'div',
        { class: 'kw-actions' },
        el('button', { type: 'button', id: 'kw-save', class: 'kw-primary' }, 'Save table and record'),
        el('button', { type: 'button', id: 'kw-rerun', class: 'kw-secondary' }, 'Run again'),
        el('button', { type: 'button', id: 'kw-stop', class: 'kw-secondary', hidden: true }, 'Stop'),
      ),
    );
    const rows = `${p.rows.used} rows used` + (p.rows.rejected ? `, ${p.rows.rejected} rejected (see Problems)` : '') + (p.rows.heldOut ? `, ${p.rows.heldOut} held out` : '');
    replaceChildren(
      this.root,
      el(
        'header',
        { class: 'kw-header' },
        el('h1', {}, `${s.yLabel} against ${s.xLabel}`),
        el('p', { class: 'kw-meta' }, `${s.fileName} · ${rows}${s.weightsLabel ? ` · weights: ${s.weightsLabel}` : ''} · ${p.curveWords} · ${p.resamplingWords}`),
        el('p', { class: 'kw-meta', id: 'kw-model-words' }, `Model: ${p.model.words}${p.model.fromPanel ? ' (set in this panel; the settings say otherwise)' : ''}`),
        el('p', { class: 'kw-meta', id: 'kw-follow-note', hidden: true }),
      ),
      el(
        'div',
        { class: 'kw-banner', id: 'kw-banner', role: 'status', hidden: true },
        el('p', { id: 'kw-banner-text' }),
        el('button', { type: 'button', id: 'kw-refit', class: 'kw-secondary' }, 'Refit now'),
      ),
      el(
        'section',
        { class: 'kw-verdict', 'aria-labelledby': 'kw-verdict-title' },
        el('h2', { id: 'kw-verdict-title' }, 'Chosen flexibility'),
        el('p', { class: 'kw-df-line' }, el('span', { class: 'kw-df-badge', id: 'kw-chosen-df' }), el('span', { id: 'kw-fit-stats', class: 'kw-muted' })),
        el('p', { id: 'kw-reason', 'aria-live': 'polite' }),
        p.refit ? el('p', { id: 'kw-moved', class: 'kw-moved' }, movedText(p.refit, p)) : null,
        el('ul', { id: 'kw-alternatives', class: 'kw-list' }),
      ),
      controls,
      el(
        'div',
        { class: 'kw-progress-row' },
        el('p', { id: 'kw-status', role: 'status', class: 'kw-status' }),
        el('progress', { id: 'kw-progress', max: 1, hidden: true, 'aria-label': 'Progress of the analysis' }),
      ),
      el(
        'section',
        { class: 'kw-warnings', 'aria-labelledby': 'kw-warn-title' },
        el('h2', { id: 'kw-warn-title' }, 'Warnings and checks'),
        el('ul', { id: 'kw-warning-list', class: 'kw-list' }),
        el('ul', { id: 'kw-check-list', class: 'kw-list' }),
      ),
      el('section', { class: 'kw-figures', id: 'kw-figures', 'aria-label': 'Figures' }),
      el('section', { class: 'kw-model', 'aria-labelledby': 'kw-model-title' }, el('h2', { id: 'kw-model-title' }, 'Model report'), el('div', { id: 'kw-model-body' })),
      el('section', { class: 'kw-influence', 'aria-labelledby': 'kw-infl-title' }, el('h2', { id: 'kw-infl-title' }, 'Influential rows'), el('div', { id: 'kw-influence-body' })),
      el('section', { class: 'kw-candidates', 'aria-labelledby': 'kw-cand-title' }, el('h2', { id: 'kw-cand-title' }, 'Candidates'), el('div', { id: 'kw-candidate-body' })),
      el('section', { class: 'kw-notes', 'aria-labelledby': 'kw-notes-title' }, el('h2', { id: 'kw-notes-title' }, 'Notes'), el('ul', { id: 'kw-note-list', class: 'kw-list' })),
      el('footer', { class: 'kw-caution', id: 'kw-caution' }, p.caution),
    );
    for (const input of Array.from(this.root.querySelectorAll<HTMLInputElement>('input[name="kw-rule"]'))) {
      input.addEventListener('change', () => this.setRuleKind(input.value as RuleKind));
    }
    this.byId<HTMLInputElement>('kw-tolerance').addEventListener('change', (e) => {
      const v = Number((e.target as HTMLInputElement).value);
      if (!(v >= 0 && v <= MAX_TOLERANCE_PERCENT)) {
        this.status(`The tolerance must be a percentage from 0 to ${MAX_TOLERANCE_PERCENT}.`);
        return;
      }
      this.tolerance = v;
      this.setRule({ kind: 'simplest-within', percent: v });
    });
    dfSelect.addEventListener('change', () => this.setRule({ kind: 'pick', df: Number(dfSelect.value) }));
    this.byId('kw-save').addEventListener('click', () => this.save());
    this.byId('kw-rerun').addEventListener('click', () => this.rerun());
    this.byId('kw-stop').addEventListener('click', () => this.stop());
    this.byId('kw-refit').addEventListener('click', () => this.rerun());
    for (const input of Array.from(this.root.querySelectorAll<HTMLInputElement | HTMLSelectElement>('#kw-model-controls select, #kw-model-controls input'))) {
      input.addEventListener('change', () => this.modelChanged());
    }
    this.syncModelControls();
  }

  /** What the readings are, shape constraints and robust fitting: changing one tunes again in the host. */
  private modelControls(p: PanelPayload): HTMLFieldSetElement {
    const sup = p.model.supports;
    const outcome = el('select', { id: 'kw-outcome' });
    for (const o of OUTCOME_LIST) outcome.append(el('option', { value: o.id, disabled: !sup.outcomes.includes(o.id) }, o.label));
    const shapes = el('div', { class: 'kw-shapes', role: 'group', 'aria-label': 'Shape the curve must have' });
    for (const c of SHAPE_CHOICES) {
      const id = `kw-shape-${c.shape}`;
      shapes.append(el('span', { class: 'kw-check-item' }, el('input', { type: 'checkbox', id, value: c.shape }), el('label', { for: id }, c.label)));
    }
    const missing = OUTCOME_LIST.filter((o) => !sup.outcomes.includes(o.id)).map((o) => o.id);
    const unsupported = [!sup.shapes ? 'shape constraints' : '', !sup.robust ? 'robust fitting' : '', missing.length ? `readings that are ${missing.join(' or ')}` : ''].filter((t) => t !== '');
    return el(
      'fieldset',
      { class: 'kw-model-controls', id: 'kw-model-controls' },
      el('legend', {}, 'Readings and shape (changing these tunes again)'),
      el('div', { class: 'kw-inputs' }, el('label', { for: 'kw-outcome' }, 'The readings are'), outcome),
      el('div', { class: 'kw-shape-row' }, el('span', { class: 'kw-muted' }, 'Shape: '), shapes),
      el(
        'div',
        { class: 'kw-check-item' },
        el('input', { type: 'checkbox', id: 'kw-robust' }),
        el('label', { for: 'kw-robust' }, `Robust (Huber${p.model.robustK !== undefined ? `, k = ${p.model.robustK}` : ''}): down-weight outliers`),
      ),
      unsupported.length ? el('p', { class: 'kw-muted kw-small' }, `The ${p.curveWords} does not support ${unsupported.join(', ')}.`) : null,
    );
  }

  /** Sets the model controls to the shown result's options and enables what the curve kind and the readings allow. */
  private syncModelControls(): void {
    const p = this.payload;
    const outcome = this.root.querySelector<HTMLSelectElement>('#kw-outcome');
    if (!p || !outcome) return;
    outcome.value = p.model.outcome;
    for (const c of SHAPE_CHOICES) {
      const box = this.byId<HTMLInputElement>(`kw-shape-${c.shape}`);
      box.checked = p.model.shape.includes(c.shape);
    }
    this.byId<HTMLInputElement>('kw-robust').checked = p.model.robust;
    this.enableModelControls();
  }

  /** Disables the controls the current combination does not allow (opposite shapes, robust with counts, ...). */
  private enableModelControls(): void {
    const p = this.payload;
    if (!p) return;
    const sup = p.model.supports;
    const choice = this.modelChoice();
    for (const c of SHAPE_CHOICES) {
      const box = this.byId<HTMLInputElement>(`kw-shape-${c.shape}`);
      box.disabled = !sup.shapes || (c.opposite !== undefined && choice.shape.includes(c.opposite));
    }
    this.byId<HTMLInputElement>('kw-robust').disabled = !sup.robust || choice.outcome !== 'continuous';
  }

  /** The options the controls show. */
  private modelChoice(): ModelChoice {
    const outcome = this.byId<HTMLSelectElement>('kw-outcome').value as Outcome;
    const shape = SHAPE_CHOICES.filter((c) => this.byId<HTMLInputElement>(`kw-shape-${c.shape}`).checked).map((c) => c.shape);
    const robust = outcome === 'continuous' && this.byId<HTMLInputElement>('kw-robust').checked;
    return { outcome, shape, robust };
  }

  private modelChanged(): void {
    const p = this.payload;
    if (!p) return;
    this.enableModelControls();
    const model = this.modelChoice();
    this.setRunning(true, 'Tuning again with the new readings and shape…');
    this.host.post({ type: 'model', runId: p.runId, model });
  }

  private rerun(): void {
    this.setRunning(true, 'Running the analysis again…');
    this.host.post({ type: 'rerun' });
  }

  private stop(): void {
    this.status('Stopping…');
    this.host.post({ type: 'stop' });
  }

  private setRuleKind(kind: RuleKind): void {
    switch (kind) {
      case 'least-error':
      case 'one-se':
        this.setRule({ kind });
        return;
      case 'simplest-within':
        this.setRule({ kind: 'simplest-within', percent: this.tolerance });
        return;
      case 'pick':
        this.setRule({ kind: 'pick', df: this.currentSelection()?.df ?? Number(this.byId<HTMLSelectElement>('kw-df').value) });
        return;
      default:
        unreachable(kind);
    }
  }

  private setRule(rule: RuleSpec): void {
    this.rule = rule;
    this.update();
  }

  /** Re-renders everything that depends on the chosen df. */
  private update(): void {
    const p = this.payload;
    if (!p) return;
    const sel = this.currentSelection();
    for (const input of Array.from(this.root.querySelectorAll<HTMLInputElement>('input[name="kw-rule"]'))) input.checked = input.value === this.rule.kind;
    this.byId<HTMLInputElement>('kw-tolerance').disabled = this.rule.kind !== 'simplest-within';
    if (!sel) {
      this.byId('kw-reason').textContent = 'No candidate df could be evaluated with this rule.';
      return;
    }
    this.byId<HTMLSelectElement>('kw-df').value = String(sel.df);
    this.keepState();
    this.host.post({ type: 'choice', runId: p.runId, rule: this.rule, df: sel.df });
    const detail = this.details.get(sel.df);
    if (!detail && !this.requested.has(sel.df)) {
      this.requested.add(sel.df);
      this.host.post({ type: 'needDetail', runId: p.runId, df: sel.df });
    }
    this.root.dataset.chosenDf = String(sel.df);
    this.byId('kw-chosen-df').textContent = `df ${sel.df}`;
    this.byId('kw-fit-stats').textContent = detail
      ? ` residual SD ${sig(detail.sigma, 4)}, ${detail.model?.glm ? `deviance explained ${percent(detail.r2)}` : `R² ${sig(detail.r2, 4)}`}, AIC ${sig(detail.aic, 5)}${detail.lambda !== undefined ? `, lambda ${sig(detail.lambda, 3)}` : ''}`
      : '';
    this.byId('kw-reason').textContent = sel.reason;
    replaceChildren(this.byId('kw-alternatives'), ...sel.alternatives.map((a) => el('li', {}, `${capitalise(ruleWords(a.rule))}: df ${a.df}${a.df === sel.df ? ' (the same)' : ''}`)));
    const warnings = [...p.warnings, ...(detail?.warnings ?? [])];
    if (p.holdout) warnings.push(`Held-out check on ${p.holdout.rows} rows: RMSE ${sig(p.holdout.rmse)} against ${sig(p.holdout.resampledRmse)} estimated by resampling.`);
    replaceChildren(this.byId('kw-warning-list'), ...(warnings.length ? warnings.map((w) => el('li', { class: 'kw-warning' }, w)) : [el('li', { class: 'kw-muted' }, 'No warnings for this df.')]));
    replaceChildren(this.byId('kw-check-list'), ...(detail?.checks ?? []).map((c) => el('li', { class: c.flagged ? 'kw-check kw-flagged' : 'kw-check' }, el('strong', {}, `${c.name}: `), c.text)));
    replaceChildren(this.byId('kw-figures'), ...renderFigures(p, sel, detail));
    this.renderModel(p, detail);
    this.renderInfluence(detail);
    this.renderCandidates(p, sel);
    replaceChildren(this.byId('kw-note-list'), ...[...p.notes, ...(detail?.notes ?? [])].map((n) => el('li', {}, n)));
  }

  /** The fit's model report: how it was fitted, deviance and dispersion, active constraints, down-weighted rows (each opens its CSV line). */
  private renderModel(p: PanelPayload, detail: FitDetail | undefined): void {
    const body = this.byId('kw-model-body');
    const intro = el('p', {}, `${capitalise(p.model.words)}.`);
    if (!detail) return replaceChildren(body, intro, el('p', { class: 'kw-muted' }, 'Computing…'));
    const m = detail.model;
    if (!m) return replaceChildren(body, intro, el('p', { class: 'kw-muted' }, 'One weighted least-squares solve: no reweighting, no shape constraints.'));
    const lines = el('ul', { class: 'kw-list', id: 'kw-model-lines' }, ...m.lines.map((l) => el('li', { class: m.converged ? undefined : 'kw-warning' }, l)));
    const parts: Node[] = [intro, lines];
    const rob = m.robust;
    if (rob && rob.rows.length > 0) {
      const table = el(
        'table',
        { class: 'kw-table', id: 'kw-downweighted' },
        el('caption', {}, `${rob.total} row${rob.total === 1 ? '' : 's'} down-weighted${rob.total > rob.rows.length ? `; the ${rob.rows.length} with the lowest weight` : ''}`),
        el('thead', {}, el('tr', {}, ...['CSV line', p.source.xLabel, p.source.yLabel, 'Huber weight'].map((h) => el('th', { scope: 'col' }, h)))),
      );
      const tbody = el('tbody');
      for (const r of rob.rows) {
        tbody.append(el('tr', {}, lineCell(r.line), el('td', {}, sig(r.x, 6)), el('td', {}, sig(r.y, 6)), el('td', {}, sig(r.weight, 3))));
      }
      table.append(tbody);
      parts.push(table);
    }
    replaceChildren(body, ...parts);
  }

  private renderInfluence(detail: FitDetail | undefined): void {
    const body = this.byId('kw-influence-body');
    if (!detail) return replaceChildren(body, el('p', { class: 'kw-muted' }, 'Computing…'));
    if (detail.influential.length === 0) return replaceChildren(body, el('p', { class: 'kw-muted' }, 'No row exceeds the leverage or Cook\u2019s distance threshold.'));
    const table = el(
      'table',
      { class: 'kw-table' },
      el(
        'caption',
        {},
        `${detail.influentialTotal} row${detail.influentialTotal === 1 ? '' : 's'} over a threshold${detail.influentialTotal > detail.influential.length ? `; the ${detail.influential.length} largest by Cook's distance` : ''}`,
      ),
      el(
        'thead',
        {},
        el('tr', {}, ...['CSV line', this.payload?.source.xLabel ?? 'x', this.payload?.source.yLabel ?? 'y', "Cook's distance", 'leverage', 'why'].map((h) => el('th', { scope: 'col' }, h))),
      ),
    );
    const tbody = el('tbody');
    for (const r of detail.influential) {
      tbody.append(
        el(
          'tr',
          {},
          lineCell(r.line),
          el('td', {}, sig(r.x, 6)),
          el('td', {}, sig(r.y, 6)),
          el('td', {}, sig(r.cooksDistance, 3)),
          el('td', {}, sig(r.leverage, 3)),
          el('td', {}, r.exceeds.join('; ')),
        ),
      );
    }
    table.append(tbody);
    replaceChildren(body, table);
  }

  private renderCandidates(p: PanelPayload, sel: Selection): void {
    const name = metricLabel(p.metric);
    const table = el(
      'table',
      { class: 'kw-table' },
      el('caption', {}, `Every candidate df with its resampled ${name} (mean ± standard error) and information criteria`),
      el('thead', {}, el('tr', {}, ...['df', `mean ${name}`, 'SE', 'AIC', 'BIC', 'status'].map((h) => el('th', { scope: 'col' }, h)))),
    );
    const tbody = el('tbody');
    for (const c of p.candidates) {
      const e = c.errors[p.metric];
      const chosen = c.df === sel.df;
      tbody.append(
        el(
          'tr',
          { class: chosen ? 'kw-chosen-row' : undefined, 'aria-current': chosen ? 'true' : undefined },
          el('td', {}, String(c.df)),
          el('td', {}, e ? sig(e.mean, 4) : '–'),
          el('td', {}, e && Number.isFinite(e.se) ? sig(e.se, 2) : '–'),
          el('td', {}, c.aic !== undefined ? sig(c.aic, 5) : '–'),
          el('td', {}, c.bic !== undefined ? sig(c.bic, 5) : '–'),
          el('td', {}, c.skipped !== undefined ? `skipped: ${c.skipped}` : chosen ? 'chosen' : ''),
        ),
      );
    }
    table.append(tbody);
    replaceChildren(this.byId('kw-candidate-body'), table);
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

  private onHover(e: Event): void {
    const target = e.target as Element | null;
    const mark = target?.closest?.('svg circle, svg rect.kw-bin');
    const figure = target?.closest?.('figure');
    if (!mark || !figure) return;
    const title = mark.querySelector('title')?.textContent ?? '';
    const readout = figure.querySelector('.kw-readout');
    if (readout) readout.textContent = title;
  }

  private status(text: string): void {
    const s = this.root.querySelector('#kw-status');
    if (s) s.textContent = text;
    else this.root.dataset.status = text;
  }

  private byId<T extends HTMLElement = HTMLElement>(id: string): T {
    const e = this.root.querySelector<T>(`#${id}`);
    if (!e) throw new Error(`panel element #${id} is missing`);
    return e;
  }
}

/** "2 rows added, 1 row changed" (or that no data row changed). */
function changeCounts(c: DataChangeView): string {
  const rows = (n: number, what: string): string => `${n} row${n === 1 ? '' : 's'} ${what}`;
  const parts = [c.header ? 'the header line changed' : '', c.added ? rows(c.added, 'added') : '', c.removed ? rows(c.removed, 'removed') : '', c.changed ? rows(c.changed, 'changed') : ''].filter(
    (t) => t !== '',
  );
  return parts.length ? parts.join(', ') : 'no data row changed (only blank lines, spacing or line endings)';
}

/** The banner's sentence about the data, or '' when the analysis is of the data as it is now. */
export function bannerText(state: DataStateView, fileName: string): string {
  const c = state.change;
  if (!c) {
    return state.analysed === 'unsaved'
      ? `This analysis read unsaved edits of ${fileName}. Review it here; a curve table is saved only from data on disk, so saving first saves ${fileName} and refits.`
      : '';
  }
  if (c.where === 'missing') return `${fileName} is no longer on disk. This analysis stays for review; nothing can be saved from it.`;
  const next =
    state.refit === 'asked'
      ? ' The file is large, so Knotwise asks before refitting (knotwise.refit.askAboveRows).'
      : state.refit === 'automatic'
        ? c.where === 'editor'
          ? ` Saving ${fileName} refits the curve.`
          : ' Refitting follows.'
        : '';
  const where = c.where === 'editor' ? `Unsaved edits in ${fileName} since this analysis` : `${fileName} changed on disk since this analysis`;
  return `${where}: ${changeCounts(c)}.${next}`;
}

/** What moved when the analysis ran again on changed data. */
export function movedText(r: RefitView, p: PanelPayload): string {
  const why = r.reason === 'saved' ? `Refitted after ${p.source.fileName} changed` : 'Refitted';
  const rows = r.rowsBefore === r.rowsNow ? `${r.rowsNow} rows as before` : `${r.rowsBefore} → ${r.rowsNow} rows`;
  const df = r.ruleDropped
    ? `the earlier choice no longer applies, so the ${ruleWords(p.rule)} chose df ${r.dfNow} (df ${r.dfBefore} before)`
    : r.dfNow === r.dfBefore
      ? `the chosen df stayed at ${r.dfNow}`
      : `the chosen df moved from ${r.dfBefore} to ${r.dfNow}`;
  const share = r.ySpread > 0 ? ` (${percent(r.largestChange / r.ySpread)} of the spread of ${p.source.yLabel})` : '';
  return `${why}: ${rows}; ${df}; the curve moved by at most ${sig(r.largestChange, 3)} at ${p.source.xLabel} = ${sig(r.atX, 4)}${share}.`;
}

function capitalise(s: string): string {
  return s.charAt(0).toUpperCase() + s.slice(1);
}

/** A table cell with a button that reveals a CSV line (handled by the panel's data-line click), or a dash. */
function lineCell(line: number): HTMLElement {
  return el('td', {}, line > 0 ? el('button', { type: 'button', class: 'kw-link', 'data-line': line, title: `Show line ${line} in the CSV` }, `line ${line}`) : '–');
}
