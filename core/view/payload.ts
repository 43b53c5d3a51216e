/**
 * Turns an Analysis into the panel's message: per candidate df the curve with both bands
 * on a few hundred grid points, the readings as dots or a density grid, and the residual
 * details of the df the rules choose (others are built on request with detailFor). The
 * message size depends on the number of candidates, not on n.
 */
import type { Analysis } from '../analysisTypes';
import { diagnose } from '../diagnose';
import { bandsAt } from '../fit/bands';
import type { FitDetail, PanelPayload, SourceView, CurveView } from '../protocol';
import { selectDf } from '../tune/rules';
import type { CandidateResult, ErrorSummary, RuleSpec } from '../tune/types';
import type { FitResult, XYData } from '../types';
import { cloudOf } from './cloud';
import { fitDetail } from './detail';
import { roundAll } from './round';
import { CAUTION, familyWords, resampleWords } from './words';

/** Number of grid points of each curve in the panel. */
export const PANEL_GRID_POINTS = 240;

/** What buildPanelPayload needs besides the analysis. */
export interface PayloadInput {
  readonly runId: number;
  readonly analysis: Analysis;
  /** The rows the analysis fitted, in the order of the fits' per-row arrays. */
  readonly data: XYData;
  readonly source: SourceView;
  /** Rows rejected while reading the CSV. */
  readonly rejected: number;
  /** Rows held out for the final check. */
  readonly heldOut: number;
  /** Tolerance the panel offers for the tolerance rule. */
  readonly tolerancePercent: number;
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
  for (const k of ['rmse', 'mae', 'maxAbs', 'gcv'] as const) {
    const e = s(c.errors[k]);
    if (e) errors[k] = e;
  }
  return { ...c, errors };
}

/** The residual details and checks of df `df` of an analysis (undefined when df was not fitted). O(n log n). */
export function detailFor(analysis: Analysis, data: XYData, df: number): FitDetail | undefined {
  const fit = analysis.fits.get(df);
  if (!fit) return undefined;
  return fitDetail(fit, data, { diagnostics: df === analysis.chosen.df ? analysis.diagnostics : diagnose(data, fit) });
}

/** The df each rule would choose (settings' rule, lowest, one-SE, tolerance). */
export function ruleChoices(analysis: Analysis, tolerancePercent: number): number[] {
  const rules: RuleSpec[] = [analysis.tune.selected.rule, { kind: 'lowest' }, { kind: '1se' }, { kind: 'tol', percent: tolerancePercent }];
  const out = new Set<number>([analysis.chosen.df]);
  for (const r of rules) {
    try {
      out.add(selectDf(analysis.tune.candidates, r, analysis.tune.metric).df);
    } catch {
      // A rule that cannot choose (e.g. manual df no longer a candidate) adds nothing.
    }
  }
  return [...out];
}

/**
 * Builds the panel message of one run. O(n) per prefetched df plus O(n log n) for the
 * normal quantiles; curves cost O(grid) per candidate.
 * Example: buildPanelPayload({ runId: 1, analysis, data, source, rejected: 0, heldOut: 0, tolerancePercent: 2 }).
 */
export function buildPanelPayload(input: PayloadInput): PanelPayload {
  const { analysis, data } = input;
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of data.x) {
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const grid = evenGrid(lo, hi, PANEL_GRID_POINTS);
  const curves: CurveView[] = [];
  for (const fit of [...analysis.fits.values()].sort((a, b) => a.df - b.df)) curves.push(curveView(fit, grid));
  const details: FitDetail[] = [];
  for (const df of ruleChoices(analysis, input.tolerancePercent)) {
    const d = detailFor(analysis, data, df);
    if (d) details.push(d);
  }
  const tune = analysis.tune;
  const warnings = [...(input.warnings ?? [])];
  if (tune.holdout?.warning) warnings.push(tune.holdout.warning);
  return {
    runId: input.runId,
    source: input.source,
    rows: { used: analysis.n, rejected: input.rejected, heldOut: input.heldOut },
    family: analysis.options.family,
    familyWords: familyWords(analysis.options.family),
    resampleWords: resampleWords(tune.resample, tune.seed),
    metric: tune.metric,
    candidates: tune.candidates.map(slim),
    rule: tune.selected.rule,
    tolerancePercent: input.tolerancePercent,
    ...(tune.holdout ? { holdout: tune.holdout } : {}),
    notes: [...tune.notes],
    warnings,
    caution: CAUTION,
    data: cloudOf(data.x, data.y, data.lines),
    grid: roundAll(grid),
    curves,
    details,
  };
}
