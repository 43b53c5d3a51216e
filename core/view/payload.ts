/**
 * Turns an Analysis into the panel's message: per candidate df the curve with both bands
 * on a few hundred grid points, the readings as dots or a density grid, the model options
 * used, and the residual details of the one df the starting rule chooses (others are built
 * on request with detailFor, since each costs a pass of residual checks over every row).
 * The message size depends on the number of candidates, not on n.
 */
import { outcomeKind } from '../registry/outcomes/index';
import type { Analysis } from '../analysis/types';
import { diagnose } from '../analysis/diagnose';
import { bandsAt } from '../fit/bands';
import type { CurveView, FitDetail, ModelView, PanelPayload, SourceView } from './model';
import { selectDf } from '../tune/rules';
import type { CandidateResult, ErrorSummary, RuleSpec, Selection } from '../tune/types';
import type { CurveKindId, FitResult, Outcome } from '../types';
import { cloudOf } from './cloud';
import { fitDetail } from './detail';
import { roundAll } from './round';
import { CAUTION, modelWords } from './words';
import { curveWords, resolveModel } from '../registry/curves/index';
import { resamplingWords } from '../registry/resampling/index';
import { renderOptions } from '../words/options';

/** A core message for the panel: any option it names reads as the editor setting, never as a command-line flag. */
export function forEditor(text: string): string {
  return renderOptions(text, 'editor');
}

/** Number of grid points of each curve in the panel. */
export const PANEL_GRID_POINTS = 240;

/** What buildPanelPayload needs besides the analysis (whose `data` are the rows shown). */
export interface PayloadInput {
  readonly runId: number;
  readonly analysis: Analysis;
  readonly source: SourceView;
  /** Rows rejected while reading the CSV. */
  readonly rejected: number;
  /** Rows held out for the final check. */
  readonly heldOut: number;
  /** Tolerance the panel offers for the tolerance rule. */
  readonly tolerancePercent: number;
  /** Rule the panel starts with; default (and when it cannot choose) the analysis's own rule. */
  readonly rule?: RuleSpec | undefined;
  /** Binomial outcome with a trials column: the column's label. */
  readonly trialsLabel?: string | undefined;
  /** True when the model options came from the panel's controls rather than the settings. */
  readonly modelFromPanel?: boolean | undefined;
  /** The candidate df text when the panel set them (they override the settings for this file). */
  readonly candidatesFromPanel?: string | undefined;
  /** Residual details by df (e.g. a host's cache); default detailFor. */
  readonly detail?: ((df: number) => FitDetail | undefined) | undefined;
  /** Extra run-level warnings (e.g. from the grid settings). */
  readonly warnings?: readonly string[];
}
/** `count` equally spaced points from lo to hi (both included). */
export function evenGrid(lo: number, hi: number, count: number): Float64Array {
  const g = new Float64Array(count);
  for (let i = 0; i < count; i++) g[i] = count === 1 ? lo : lo + ((hi - lo) * i) / (count - 1);
  return g;
}

/** The curve of one fit with both 95 % bands on `grid`, rounded for display. */
export function curveView(fit: FitResult, grid: Float64Array): CurveView {
  const b = bandsAt(fit, grid);
  return { df: fit.df, fit: roundAll(b.fit), ciLower: roundAll(b.ciLower), ciUpper: roundAll(b.ciUpper), piLower: roundAll(b.piLower), piUpper: roundAll(b.piUpper) };
}

/** A candidate without its per-resample values (the panel needs only mean and SE). */
function slim(c: CandidateResult): CandidateResult {
  const s = (e: ErrorSummary | undefined): ErrorSummary | undefined => (e ? { mean: e.mean, se: e.se, values: [] } : undefined);
  const errors: Record<string, ErrorSummary> = {};
  // Every metric a rule may compare, deviance included (Poisson and binomial candidates are tuned on it).
  for (const k of ['rmse', 'mae', 'maxAbs', 'gcv', 'deviance'] as const) {
    const e = s(c.errors[k]);
    if (e) errors[k] = e;
  }
  return { ...c, errors };
}

/**
 * The residual details and checks of df `df` of an analysis, on its tuning rows
 * (undefined when df was not fitted). The chosen df reuses the analysis's diagnostics;
 * another df runs the residual checks (diagnose) first. O(n log n).
 * Example: detailFor(analysis, 6)?.checks.
 */
export function detailFor(analysis: Analysis, df: number): FitDetail | undefined {
  const fit = analysis.fits.get(df);
  if (!fit) return undefined;
  return fitDetail(fit, analysis.data, { diagnostics: fit === analysis.chosen ? analysis.diagnostics : diagnose(analysis.data, fit) });
}

/** The selection of `rule`, or of the analysis's own rule when `rule` cannot choose (e.g. a df by hand that is no candidate). */
export function startSelection(analysis: Analysis, rule: RuleSpec | undefined): Selection {
  if (rule) {
    try {
      const sel = selectDf(analysis.tune.candidates, rule, analysis.tune.metric);
      if (analysis.fits.has(sel.df)) return sel;
    } catch {
      // Fall back to the analysis's own choice below.
    }
  }
  return analysis.tune.selected;
}

/** What each curve family supports (core/fit/model.ts resolveModel decides; probed here so the two never disagree). */
function supports(kind: CurveKindId): ModelView['supports'] {
  const ok = (m: Parameters<typeof resolveModel>[1]): boolean => {
    try {
      resolveModel(kind, m);
      return true;
    } catch {
      return false;
    }
  };
  const outcomes = (['continuous', 'counts', 'proportions'] as const).filter((o) => ok({ outcome: o })) as Outcome[];
  return { outcomes, shapes: ok({ shape: ['increasing'] }), robust: ok({ robust: true }) };
}

/** The model options of an analysis for the panel. */
export function modelView(analysis: Analysis, trialsLabel: string | undefined, fromPanel: boolean): ModelView {
  const m = resolveModel(analysis.options.kind, analysis.options);
  const trials = m.outcome === 'proportions' ? trialsLabel : undefined;
  return {
    outcome: m.outcome,
    shape: m.shape,
    robust: m.robustK !== undefined,
    link: outcomeKind(m.outcome).link,
    ...(m.robustK !== undefined ? { robustK: m.robustK } : {}),
    ...(trials !== undefined ? { trialsLabel: trials } : {}),
    words: modelWords({ outcome: m.outcome, shape: m.shape, robustK: m.robustK, trialsLabel: trials }),
    fromPanel,
    supports: supports(analysis.options.kind),
  };
}

/**
 * Builds the panel message of one run: O(grid) per candidate curve, O(n) for the readings'
 * cloud, and the details of the starting rule's df (O(n log n); the chosen df's residual
 * checks come from the analysis, so nothing is diagnosed again unless the starting rule
 * chooses another df).
 * Example: buildPanelPayload({ runId: 1, analysis, source, rejected: 0, heldOut: 0, tolerancePercent: 2 }).
 */
export function buildPanelPayload(input: PayloadInput): PanelPayload {
  const { analysis } = input;
  const data = analysis.data;
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of data.x) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const grid = evenGrid(lo, hi, PANEL_GRID_POINTS);
  const curves: CurveView[] = [];
  for (const fit of [...analysis.fits.values()].sort((a, b) => a.df - b.df)) curves.push(curveView(fit, grid));
  const selection = startSelection(analysis, input.rule);
  const detail = (input.detail ?? ((df: number) => detailFor(analysis, df)))(selection.df);
  const tune = analysis.tune;
  const warnings = [...(input.warnings ?? [])];
  if (tune.holdout?.warning) warnings.push(tune.holdout.warning);
  return {
    runId: input.runId,
    source: input.source,
    rows: { used: analysis.n, rejected: input.rejected, heldOut: input.heldOut },
    kind: analysis.options.kind,
    model: modelView(analysis, input.trialsLabel, input.modelFromPanel === true),
    curveWords: curveWords(analysis.options.kind),
    resamplingWords: resamplingWords(tune.resample, tune.seed),
    metric: tune.metric,
    candidates: tune.candidates.map(slim),
    rule: selection.rule,
    tolerancePercent: input.tolerancePercent,
    ...(tune.holdout ? { holdout: tune.holdout } : {}),
    notes: tune.notes.map(forEditor),
    warnings: warnings.map(forEditor),
    caution: CAUTION,
    data: cloudOf(data.x, data.y, data.lines),
    grid: roundAll(grid),
    curves,
    details: detail ? [detail] : [],
    ...(input.candidatesFromPanel !== undefined ? { candidatesFromPanel: input.candidatesFromPanel } : {}),
  };
}
