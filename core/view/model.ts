/**
 * The view model: what the panel shows of one run and what the report's figures are drawn
 * from (the payload, its curves and readings, the residual details of one df). Built in
 * core/view/ (payload.ts, detail.ts, cloud.ts); sent to the panel inside the messages of
 * core/protocol.ts. Everything here is plain JSON (numbers, strings, arrays): no typed
 * arrays, no Maps. Text that comes from the CSV is marked; the panel inserts it as text only.
 */
import type { CurveKindId, Outcome, Shape } from '../types';
import type { CandidateResult, HoldoutReport, Metric, RuleSpec } from '../tune/types';

/** The panel's calibration section for one df (built by core/view/calibration.ts). */
export interface CalibrationView {
  /** The inverse table in words, or why there is none. */
  readonly inverse: { readonly words: string; readonly method: string } | { readonly refused: string };
  /** True when saving writes the inverse table too (knotwise.inverse.write). */
  readonly inverseSaved: boolean;
  /** The drift from the recorded curve, when a fit record of this data exists and overlaps; `within`: inside the recorded band everywhere (null: cannot be judged). */
  readonly drift?: { readonly words: string; readonly svg: string; readonly within: boolean | null } | undefined;
  /** Set when a record exists but cannot be compared (no curve sample, no common range). */
  readonly driftNote?: string | undefined;
}

/** Readings drawn one by one (small n) or as a 2-D count grid (large n or heavy overplotting). */
export type Cloud = CloudPoints | CloudBins;

/** Every reading as a point, with its 1-based CSV line for hover text and navigation. */
export interface CloudPoints {
  readonly kind: 'points';
  readonly x: readonly number[];
  readonly y: readonly number[];
  /** 1-based CSV line of each point (0 when unknown). */
  readonly lines: readonly number[];
}

/** Readings counted on an nx-by-ny grid over [xMin, xMax] x [yMin, yMax]; counts are row-major from the lowest y row. */
export interface CloudBins {
  readonly kind: 'bins';
  readonly xMin: number;
  readonly xMax: number;
  readonly yMin: number;
  readonly yMax: number;
  readonly nx: number;
  readonly ny: number;
  /** counts[j * nx + i] is the number of readings in x cell i, y cell j. */
  readonly counts: readonly number[];
  /** Number of readings binned (may be less than n when some are not finite). */
  readonly total: number;
}

/** One candidate's curve and both 95 % bands on the payload's shared grid. */
export interface CurveView {
  readonly df: number;
  readonly fit: readonly number[];
  readonly ciLower: readonly number[];
  readonly ciUpper: readonly number[];
  readonly piLower: readonly number[];
  readonly piUpper: readonly number[];
}

/** A row that stands out by leverage or Cook's distance, named by its CSV line. */
export interface InfluentialRow {
  readonly line: number;
  readonly x: number;
  readonly y: number;
  readonly leverage: number;
  readonly cooksDistance: number;
  /** Studentized residual (likelihood residual for counts and proportions; absent where undefined). */
  readonly studentized?: number;
  /** Which thresholds it exceeds, in words. */
  readonly exceeds: readonly string[];
}

/** One residual check's outcome in words (statistic, p-value, effect size, verdict). */
export interface CheckView {
  readonly name: string;
  readonly text: string;
  /** True when the test is significant at the 5 % level and its effect size matters. */
  readonly flagged: boolean;
  /** The effect size that decides with the p-value, with the threshold from which it matters (core/analysis/checks.ts). */
  readonly effect?: { readonly name: string; readonly value: number; readonly threshold: number; readonly matters: boolean };
}

/** A row a robust (Huber) fit gave weight below 1, named by its CSV line. */
export interface DownweightedRow {
  readonly line: number;
  readonly x: number;
  readonly y: number;
  /** Huber weight in (0, 1). */
  readonly weight: number;
}

/** The model report of one fitted df (outcome, shape constraints, robust weights); see core/types.ts ModelReport. */
export interface ModelReportView {
  readonly converged: boolean;
  /** Reweighting iterations (1 for a single constrained least-squares solve). */
  readonly iterations: number;
  /** Counts and proportions: deviance, null deviance, Pearson dispersion (about 1 when the variance follows the distribution). */
  readonly glm?: { readonly deviance: number; readonly nullDeviance: number; readonly dispersion: number };
  /** Shape constraints: inequalities in total, how many hold with equality, df minus the independent active ones. */
  readonly constraints?: { readonly total: number; readonly active: number; readonly effectiveDf: number };
  /** Huber fitting: tuning constant, robust scale, rows down-weighted (lowest weight first, at most a few dozen listed). */
  readonly robust?: { readonly k: number; readonly scale: number; readonly total: number; readonly rows: readonly DownweightedRow[] };
  /** The report in plain words, one fact per line. */
  readonly lines: readonly string[];
}

/** Everything the residual figures and texts need for one df. */
export interface FitDetail {
  readonly df: number;
  readonly sigma: number;
  readonly r2: number;
  readonly residualDf: number;
  readonly aic: number;
  readonly bic: number;
  readonly lambda?: number;
  /** Plain-language notes of the fit (tied knots moved, ...). */
  readonly notes: readonly string[];
  readonly knots: readonly number[];
  /** What the residual figures show: reading minus fit ('response'), or deviance residuals of a Poisson or binomial fit. */
  readonly residualKind: 'response' | 'deviance';
  readonly residualsVsX: Cloud;
  readonly residualsVsFitted: Cloud;
  /** Normal quantile plot of standardised residuals, at most a few hundred quantiles. */
  readonly qq: { readonly theoretical: readonly number[]; readonly sample: readonly number[] };
  /** Cook's distance against x: every row for small n, else the largest value per x cell. */
  readonly cooks: { readonly x: readonly number[]; readonly d: readonly number[]; readonly lines: readonly number[]; readonly binned: boolean };
  /** Leverage against x, drawn like `cooks`. */
  readonly leverage: { readonly x: readonly number[]; readonly h: readonly number[]; readonly lines: readonly number[]; readonly binned: boolean };
  /** Cook's distance above the median of F(df, n - df) marks a row (1 where that is undefined). */
  readonly cooksThreshold: number;
  /** Leverage above max(0.5, 3 df / n) marks a row. */
  readonly leverageThreshold: number;
  /** |Studentized residual| above this marks an outlier (Bonferroni test at 5 %); absent without residual df. */
  readonly outlierThreshold?: number;
  /** The influential rows by line, furthest past a threshold first: at most MAX_INFLUENTIAL_LISTED (core/view/detail.ts) of them (core/stats/influence.ts). */
  readonly influential: readonly InfluentialRow[];
  /** How many of `influential` the panel shows at first (the first ten at most, as the report lists); the rest on request. */
  readonly influentialShown: number;
  /** How many rows exceed a threshold in total (all are listed in the fit record). */
  readonly influentialTotal: number;
  /** Residual checks (present for the df they were computed for). */
  readonly checks: readonly CheckView[];
  /** Warnings specific to this df (failed checks, negative predictions, ...). */
  readonly warnings: readonly string[];
  /** Present when the readings are counts or proportions, or shape constraints or robust fitting were used. */
  readonly model?: ModelReportView;
  /** The inverse table in words (or why there is none) and the drift from the recorded curve (core/view/calibration.ts); absent until the host adds it. */
  readonly calibration?: CalibrationView | undefined;
  /** Residuals against row order (the order of the file, usually of measurement), for a drift plot; absent when the checks were not run. */
  readonly rowOrder?: RowOrderView | undefined;
}

/** Residuals in row order and the drift measure (core/analysis/rowOrder.ts). */
export interface RowOrderView {
  /** 1-based row position of each point (the first row of its block). */
  readonly row: readonly number[];
  /** CSV line of each point (0 when unknown). */
  readonly line: readonly number[];
  /** The residual, or the mean residual of the block (residuals as the checks examine them). */
  readonly residual: readonly number[];
  /** Rows per point: 1 up to 500 rows, else consecutive blocks. */
  readonly blockSize: number;
  /** Correlation of neighbouring rows' residuals. */
  readonly lag1: number;
  /** Runs test on the signs: z and one-sided p-value (too few runs means drift); absent when the residuals all share one sign. */
  readonly runsZ?: number;
  readonly runsPValue?: number;
  /** The rows are in x order, so this repeats the Durbin-Watson check. */
  readonly sameAsX: boolean;
  /** Drift that matters: significant, and a correlation of neighbouring rows of 0.1 or more. */
  readonly flagged: boolean;
}

/** Where the data came from and what the columns are called (text from the CSV: insert as text only). */
export interface SourceView {
  readonly fileName: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly weightsLabel?: string;
}

/** The options the panel's controls switch: outcome, shape constraints, robust fitting. */
export interface ModelChoice {
  readonly outcome: Outcome;
  readonly shape: readonly Shape[];
  readonly robust: boolean;
}

/** Which outcome, shapes and robust fitting a run used. */
export interface ModelView extends ModelChoice {
  readonly link: 'identity' | 'log' | 'logit';
  /** Huber tuning constant when robust. */
  readonly robustK?: number;
  /** Binomial outcome with a trials column: its label (text from the CSV). */
  readonly trialsLabel?: string;
  /** The options in plain words. */
  readonly words: string;
  /** True when the panel's controls set them (they override the settings for this file). */
  readonly fromPanel: boolean;
  /** What the curve kind supports (resolveModel of core/registry/curves). */
  readonly supports: { readonly outcomes: readonly Outcome[]; readonly shapes: boolean; readonly robust: boolean };
}

/** The whole panel content of one run. */
export interface PanelPayload {
  readonly runId: number;
  readonly source: SourceView;
  /** Rows used for tuning and fitting, rows rejected while reading, rows held out. */
  readonly rows: { readonly used: number; readonly rejected: number; readonly heldOut: number };
  readonly kind: CurveKindId;
  /** Outcome, shapes and robust fitting used. */
  readonly model: ModelView;
  /** The curve kind in words. */
  readonly curveWords: string;
  /** How candidate errors were estimated, in words (e.g. "bootstrap, 50 resamples, seed 1"). */
  readonly resamplingWords: string;
  readonly metric: Metric;
  /** Candidates as tuned (per-resample values removed to keep the message small). */
  readonly candidates: readonly CandidateResult[];
  /** The rule the settings ask for; the panel starts with it. */
  readonly rule: RuleSpec;
  /** Tolerance the panel offers when the person switches to the simplest-within rule. */
  readonly tolerancePercent: number;
  readonly holdout?: HoldoutReport;
  /** Tuning and analysis notes. */
  readonly notes: readonly string[];
  /** Warnings that hold for the whole run (extrapolation, held-out set much worse, ...). */
  readonly warnings: readonly string[];
  /** The short caution shown on every panel. */
  readonly caution: string;
  readonly data: Cloud;
  /** Shared x grid of every curve in `curves`. */
  readonly grid: readonly number[];
  readonly curves: readonly CurveView[];
  /** Details of the df `rule` chooses; others are asked for with `needDetail`. */
  readonly details: readonly FitDetail[];
  /** Present when this run replaced an earlier one of the same file and columns: what moved. */
  readonly refit?: RefitView;
  /** Present when the panel set the candidate df (as the command line's --df takes them, e.g. '2..20'); they override the settings for this file. */
  readonly candidatesFromPanel?: string;
}

/**
 * What changed in the data since the analysis the panel shows: the analysed data rows
 * (the lines after the header) compared with the current ones as lines, so an edited
 * value counts as a changed row, a new line as an added row and a deleted line as a
 * removed row.
 */
export interface DataChangeView {
  /** Where the current data is: unsaved edits in an editor, the file on disk (saved here or written by another program), or no file any more. */
  readonly where: 'editor' | 'disk' | 'missing';
  readonly added: number;
  readonly removed: number;
  readonly changed: number;
  /** True when the header line changed. */
  readonly header: boolean;
}

/** Whether the analysis the panel shows is of the data as it is now, and what the host does about a change. */
export interface DataStateView {
  /** Where the analysed bytes came from: the file on disk, or unsaved edits in an editor (reviewable, but no curve table is saved from them). */
  readonly analysed: 'disk' | 'unsaved';
  /** Present when the data changed since the analysis. */
  readonly change?: DataChangeView;
  /**
   * What happens after a change: the host refits when the file is saved (`automatic`), it
   * asked the person first because the file is large (`asked`), or refit on save is off (`manual`).
   */
  readonly refit: 'automatic' | 'asked' | 'manual';
  /** The file is too large for the editor to hand to extensions: Knotwise follows it on disk only. */
  readonly followedOnDisk: boolean;
}

/** What moved when the analysis ran again on changed data, compared with the analysis shown before. */
export interface RefitView {
  /** Why it ran again: the data file was saved (or changed on disk), or the person asked. */
  readonly reason: 'saved' | 'asked';
  /** Data rows used before and now. */
  readonly rowsBefore: number;
  readonly rowsNow: number;
  /** The df shown before and the df chosen now (by the kept rule, or by the settings' rule when the kept one no longer applies). */
  readonly dfBefore: number;
  readonly dfNow: number;
  /** True when the person's rule (a df picked by hand included) could not be kept and the settings' rule chose. */
  readonly ruleDropped: boolean;
  /** Largest |curve now - curve before| over the x range both cover, and the x where it is. */
  readonly largestChange: number;
  readonly atX: number;
  /** Spread of the readings now (largest minus smallest y), to judge the change against. */
  readonly ySpread: number;
}
