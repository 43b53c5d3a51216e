import type { CurveKindId } from '../types';

/** How candidate errors are estimated. The same resamples serve every candidate. */
export type ResampleSpec =
  | { readonly kind: 'bootstrap'; readonly resamples: number }
  | { readonly kind: 'folds'; readonly folds: number; readonly repeats: number }
  | { readonly kind: 'leave-one-out' }
  | { readonly kind: 'gcv' }
  /** Rows dealt into bundles by a seeded hash, bundles drawn with replacement (core/stream/bundles.ts). */
  | { readonly kind: 'bundles'; readonly resamples: number };

/** How the df is chosen from the candidates. */
export type RuleSpec = { readonly kind: 'least-error' } | { readonly kind: 'one-se' } | { readonly kind: 'simplest-within'; readonly percent: number } | { readonly kind: 'pick'; readonly df: number };

/**
 * Error measure the rules compare. 'deviance' is the mean deviance per unit prior weight of
 * the held-out rows (Poisson and binomial outcomes; McCullagh & Nelder 1989, section 2.3):
 * sum_i w_i d(y_i, mu_i) / sum_i w_i, with d the family's unit deviance.
 */
export type Metric = 'rmse' | 'mae' | 'maxAbs' | 'gcv' | 'deviance';

/** Mean over resamples, its standard error (SD / sqrt(count)) and the per-resample values. */
export interface ErrorSummary {
  readonly mean: number;
  readonly se: number;
  readonly values: readonly number[];
}

/** One candidate df of one family: its errors, or the reason it was skipped. */
export interface CandidateResult {
  readonly df: number;
  readonly skipped?: string;
  readonly errors: {
    readonly rmse?: ErrorSummary;
    readonly mae?: ErrorSummary;
    readonly maxAbs?: ErrorSummary;
    readonly gcv?: ErrorSummary;
    /** Poisson and binomial outcomes: mean deviance of the held-out rows. */
    readonly deviance?: ErrorSummary;
  };
  /** Information criteria of the fit to all tuning rows (absent when skipped). */
  readonly aic?: number;
  readonly aicc?: number;
  readonly bic?: number;
}

/** The outcome of applying a rule. */
export interface Selection {
  readonly df: number;
  readonly rule: RuleSpec;
  readonly metric: Metric;
  /** Plain-language explanation with the numbers behind it (the record's `selection.reason`): ruleReason, the other rules, then caveats. */
  readonly reason: string;
  /** The rule's own sentences: what it compared and what it chose (the start of `reason`). */
  readonly ruleReason: string;
  /** What `reason` says after the other rules: skipped candidates and a choice at an end of the candidates ('' when neither). */
  readonly caveats: string;
  /** The tolerance in percent the simplest-within rule is listed with among `alternatives` (its own when it is the rule in use). */
  readonly otherRulesTolerance: number;
  /** For the one-SE and tolerance rules: the error threshold the chosen df is under. */
  readonly threshold?: number;
  /** What each of the other rules would have chosen. */
  readonly alternatives: readonly { readonly rule: RuleSpec; readonly df: number }[];
  /** Present when the chosen df or the least error sits at an end of the candidates (core/tune/rules.ts candidateEdge). */
  readonly edge?: CandidateEdge;
}

/**
 * A choice at an end of the candidate range: the best df may lie beyond the candidates.
 * `widen` is a wider candidate range in the form the command line's --df and the editor's
 * knotwise.candidates setting take (e.g. '2..20').
 */
export interface CandidateEdge {
  /** Which end: the largest candidate df ('upper') or the smallest one above df 2 ('lower'). */
  readonly side: 'lower' | 'upper';
  /** The candidate df at that end. */
  readonly df: number;
  /** True when the chosen df is that candidate. */
  readonly chosen: boolean;
  /** True when the least mean error is at that candidate. */
  readonly leastError: boolean;
  readonly widen: string;
}

/** Errors of the chosen fit on the held-out check set, next to the resampled estimate. */
export interface HoldoutReport {
  readonly fraction: number;
  readonly rows: number;
  readonly rmse: number;
  readonly mae: number;
  readonly maxAbs: number;
  readonly resampledRmse: number;
  readonly warning?: string;
}

/** The full outcome of tuning one family. */
export interface TuneResult {
  readonly kind: CurveKindId;
  readonly resample: ResampleSpec;
  readonly seed: number;
  readonly metric: Metric;
  readonly candidates: readonly CandidateResult[];
  readonly selected: Selection;
  readonly holdout?: HoldoutReport;
  readonly notes: readonly string[];
  /**
   * Resampled tunings: the weight of the rows scored in each resample (their count without
   * weights), aligned with each candidate's `errors.rmse.values`, so that RMSE^2 x scored is
   * the resample's squared-error sum (pooled errors over groups, core/groups/).
   */
  readonly scored?: readonly number[];
}

/** Progress and cancellation, so a host can show a long run and stop it. */
export interface Progress {
  report(done: number, total: number, message: string): void;
  readonly cancelled: () => boolean;
}
