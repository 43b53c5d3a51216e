/**
 * The one message protocol between the VS Code host and the Knotwise panel (webview).
 * Every message is a tagged union member with readonly fields; both sides switch on
 * `type` with an exhaustiveness check. Requests that need an answer carry an id, results
 * carry the run id they belong to so that the panel drops anything from an outdated run.
 * Everything here is plain JSON (numbers, strings, arrays): no typed arrays, no Maps.
 */
import type { CurveKindId, Outcome, Shape } from './types';
import type { CandidateResult, HoldoutReport, Metric, RuleSpec } from './tune/types';

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
  /** Which thresholds it exceeds, in words. */
  readonly exceeds: readonly string[];
}

/** One residual check's outcome in words (statistic, p-value, verdict). */
export interface CheckView {
  readonly name: string;
  readonly text: string;
  /** True when the check flags a problem at the 5 % level. */
  readonly flagged: boolean;
}

/** A row a robust (Huber) fit gave weight below 1, named by its CSV line. */
export interface DownweightedRow {
  readonly line: number;
  readonly x: number;
  readonly y: number;
  /** Huber weight in (0, 1). */
  readonly weight: number;
}

/** The model report of one fitted df (outcome family, shape constraints, robust weights); see core/types.ts ModelReport. */
export interface ModelReportView {
  readonly converged: boolean;
  /** Reweighting iterations (1 for a single constrained least-squares solve). */
  readonly iterations: number;
  /** Poisson and binomial: deviance, null deviance, Pearson dispersion (about 1 when the variance follows the family). */
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
  readonly cooksThreshold: number;
  readonly leverageThreshold: number;
  /** Influential rows, largest Cook's distance first, at most a few dozen. */
  readonly influential: readonly InfluentialRow[];
  /** How many rows exceed a threshold in total. */
  readonly influentialTotal: number;
  /** Residual checks (present for the df they were computed for). */
  readonly checks: readonly CheckView[];
  /** Warnings specific to this df (failed checks, negative predictions, ...). */
  readonly warnings: readonly string[];
  /** Present when an outcome family other than Gaussian, shape constraints or robust fitting was used. */
  readonly model?: ModelReportView;
}

/** Where the data came from and what the columns are called (text from the CSV: insert as text only). */
export interface SourceView {
  readonly fileName: string;
  readonly xLabel: string;
  readonly yLabel: string;
  readonly weightsLabel?: string;
}

/** The options the panel's controls switch: outcome family, shape constraints, robust fitting. */
export interface ModelChoice {
  readonly outcome: Outcome;
  readonly shape: readonly Shape[];
  readonly robust: boolean;
}

/** Which outcome family, shapes and robust fitting a run used. */
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
  /** What the curve family supports (core/fit/model.ts resolveModel). */
  readonly supports: { readonly outcomes: readonly Outcome[]; readonly shapes: boolean; readonly robust: boolean };
}

/** The whole panel content of one run. */
export interface PanelPayload {
  readonly runId: number;
  readonly source: SourceView;
  /** Rows used for tuning and fitting, rows rejected while reading, rows held out. */
  readonly rows: { readonly used: number; readonly rejected: number; readonly heldOut: number };
  readonly kind: CurveKindId;
  /** Outcome family, shapes and robust fitting used. */
  readonly model: ModelView;
  /** The curve family in words. */
  readonly curveWords: string;
  /** How candidate errors were estimated, in words (e.g. "bootstrap, 50 resamples, seed 1"). */
  readonly resamplingWords: string;
  readonly metric: Metric;
  /** Candidates as tuned (per-resample values removed to keep the message small). */
  readonly candidates: readonly CandidateResult[];
  /** The rule the settings ask for; the panel starts with it. */
  readonly rule: RuleSpec;
  /** Tolerance the panel offers when the person switches to the tolerance rule. */
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
}

/** Messages from the host to the panel. */
export type HostMessage =
  /** A run started or advanced; the panel shows the text and keeps the previous result greyed. */
  | { readonly type: 'running'; readonly runId: number; readonly message: string }
  /** A run finished: replace everything shown. */
  | { readonly type: 'result'; readonly payload: PanelPayload }
  /** A run failed or was cancelled; the text says why. */
  | { readonly type: 'failed'; readonly runId: number; readonly message: string }
  /** Answer to `needDetail`. */
  | { readonly type: 'detail'; readonly runId: number; readonly detail: FitDetail }
  /** Answer to `save`: the files written, as workspace-relative paths, and a line about the table. */
  | { readonly type: 'saved'; readonly requestId: number; readonly files: readonly string[]; readonly note?: string }
  /** Answer to `save` when nothing was written; the text says why. */
  | { readonly type: 'saveFailed'; readonly requestId: number; readonly message: string };

/** Messages from the panel to the host. */
export type PanelMessage =
  /** The panel's script is listening; the host sends the latest result (again). */
  | { readonly type: 'ready' }
  /** The panel needs the residual details of one df of a run. */
  | { readonly type: 'needDetail'; readonly runId: number; readonly df: number }
  /** The person changed the rule or picked a df; the host saves this choice. */
  | { readonly type: 'choice'; readonly runId: number; readonly rule: RuleSpec; readonly df: number }
  /** Save the curve table and fit record for the current choice. */
  | { readonly type: 'save'; readonly requestId: number; readonly runId: number; readonly rule: RuleSpec }
  /** Reveal a 1-based line of the CSV in its editor. */
  | { readonly type: 'revealLine'; readonly line: number }
  /** Run the analysis again with the current settings. */
  | { readonly type: 'rerun' }
  /** Run the analysis again with these model options (they override the settings for this file). */
  | { readonly type: 'model'; readonly runId: number; readonly model: ModelChoice };

/** Compile-time exhaustiveness check for switches over message tags. */
export function unreachable(x: never): never {
  throw new Error(`unexpected message ${JSON.stringify(x)}`);
}

/** True when `m` looks like a PanelMessage (the host checks everything it receives). */
export function isPanelMessage(m: unknown): m is PanelMessage {
  if (typeof m !== 'object' || m === null) return false;
  const o = m as Record<string, unknown>;
  const num = (k: string): boolean => typeof o[k] === 'number' && Number.isFinite(o[k]);
  switch (o.type) {
    case 'ready':
    case 'rerun':
      return true;
    case 'needDetail':
      return num('runId') && num('df');
    case 'choice':
      return num('runId') && num('df') && isRuleSpec(o.rule);
    case 'save':
      return num('requestId') && num('runId') && isRuleSpec(o.rule);
    case 'revealLine':
      return num('line');
    case 'model':
      return num('runId') && isModelChoice(o.model);
    default:
      return false;
  }
}

const OUTCOMES: readonly string[] = ['continuous', 'counts', 'proportions'];
const SHAPE_NAMES: readonly string[] = ['increasing', 'decreasing', 'nonnegative', 'convex', 'concave'];

/** True when `m` is a well-formed ModelChoice (names known; combinations are checked by the host). */
export function isModelChoice(m: unknown): m is ModelChoice {
  if (typeof m !== 'object' || m === null) return false;
  const o = m as Record<string, unknown>;
  return OUTCOMES.includes(o.outcome as string) && Array.isArray(o.shape) && o.shape.every((s) => SHAPE_NAMES.includes(s as string)) && typeof o.robust === 'boolean';
}

/** True when `r` is a well-formed RuleSpec. */
export function isRuleSpec(r: unknown): r is RuleSpec {
  if (typeof r !== 'object' || r === null) return false;
  const o = r as Record<string, unknown>;
  switch (o.kind) {
    case 'least-error':
    case 'one-se':
      return true;
    case 'simplest-within':
      return typeof o.percent === 'number' && Number.isFinite(o.percent) && o.percent >= 0;
    case 'pick':
      return typeof o.df === 'number' && Number.isFinite(o.df);
    default:
      return false;
  }
}
