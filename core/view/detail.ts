/**
 * The residual figures' data and texts of one fitted df, thinned so the panel message
 * stays small at any n.
 */
import type { Diagnostics } from '../analysisTypes';
import type { FitDetail, InfluentialRow } from '../protocol';
import { num } from '../plots/svg';
import type { FitResult, XYData } from '../types';
import { cloudOf, DEFAULT_CLOUD_LIMITS, type CloudLimits } from './cloud';
import { roundAll, roundSig } from './round';
import { maxPerCell, normalQuantiles } from './series';
import { checkViews } from './words';

/** Largest number of influential rows listed by line. */
export const MAX_INFLUENTIAL_LISTED = 30;
/** Number of x cells of the thinned influence figures. */
const INFLUENCE_CELLS = 240;
/** Number of quantiles of the normal quantile plot for large n. */
const QQ_POINTS = 300;

/** Thresholds that mark a row as influential, with where they come from. */
export interface InfluenceThresholds {
  readonly cooks: number;
  readonly leverage: number;
}

/**
 * Cook's distance above 4/n (common practice) and leverage above 2 df / n (Hoaglin &
 * Welsch 1978, "The hat matrix in regression and ANOVA", The American Statistician 32(1),
 * 17-22). Used when the analysis supplied no thresholds. Example: defaultThresholds(100, 5).leverage === 0.1.
 */
export function defaultThresholds(n: number, df: number): InfluenceThresholds {
  return { cooks: 4 / n, leverage: (2 * df) / n };
}

/** Options of fitDetail. */
export interface DetailOptions {
  /** Residual checks and thresholds, when this is the df they were computed for. */
  readonly diagnostics?: Diagnostics | undefined;
  readonly limits?: CloudLimits | undefined;
}

/**
 * Builds the FitDetail of `fit`, whose per-row arrays match the rows of `data` (the rows
 * it was fitted to). O(n log n) for the normal quantiles, O(n) otherwise.
 * Example: fitDetail(fitCurve(data, { family: 'natural', df: 4 }), data).influential.
 */
export function fitDetail(fit: FitResult, data: XYData, options: DetailOptions = {}): FitDetail {
  const n = fit.fitted.length;
  if (data.x.length !== n) throw new Error(`fitDetail: the fit has ${n} rows but the data ${data.x.length}`);
  const limits = options.limits ?? DEFAULT_CLOUD_LIMITS;
  const lines = data.lines;
  const standardised = new Float64Array(n);
  const w = data.w;
  for (let i = 0; i < n; i++) {
    const h = fit.leverage[i] as number;
    const r = (fit.residuals[i] as number) * Math.sqrt(w ? (w[i] as number) : 1);
    standardised[i] = h < 1 && fit.sigma > 0 ? r / (fit.sigma * Math.sqrt(1 - h)) : NaN;
  }
  const given = options.diagnostics?.influential.thresholds;
  const th = defaultThresholds(n, fit.df);
  const cooksThreshold = given?.find((t) => t.measure === 'cooks')?.value ?? th.cooks;
  const leverageThreshold = given?.find((t) => t.measure === 'leverage')?.value ?? th.leverage;

  const flagged: number[] = [];
  for (let i = 0; i < n; i++) {
    if ((fit.cooksDistance[i] as number) > cooksThreshold || (fit.leverage[i] as number) > leverageThreshold) flagged.push(i);
  }
  flagged.sort((a, b) => (fit.cooksDistance[b] as number) - (fit.cooksDistance[a] as number));
  const influential: InfluentialRow[] = flagged.slice(0, MAX_INFLUENTIAL_LISTED).map((i) => {
    const exceeds: string[] = [];
    const d = fit.cooksDistance[i] as number;
    const h = fit.leverage[i] as number;
    if (d > cooksThreshold) exceeds.push(`Cook's distance ${num(d, 3)} > ${num(cooksThreshold, 3)}`);
    if (h > leverageThreshold) exceeds.push(`leverage ${num(h, 3)} > ${num(leverageThreshold, 3)}`);
    return { line: lines ? (lines[i] as number) : 0, x: roundSig(data.x[i] as number), y: roundSig(data.y[i] as number), leverage: roundSig(h, 5), cooksDistance: roundSig(d, 5), exceeds };
  });

  const warnings: string[] = [];
  let minY = Infinity;
  for (let i = 0; i < n; i++) minY = Math.min(minY, data.y[i] as number);
  let negative = 0;
  for (let i = 0; i < n; i++) if ((fit.fitted[i] as number) < 0) negative++;
  if (minY >= 0 && negative > 0) {
    warnings.push(`Every reading is zero or more, but the curve goes below zero at ${negative} of the ${n} rows; check before using it for a quantity that cannot be negative.`);
  }
  const checks = options.diagnostics ? checkViews(options.diagnostics) : [];
  if (options.diagnostics) warnings.push(...options.diagnostics.warnings);

  const cooks = maxPerCell(data.x, fit.cooksDistance, lines, limits.maxPoints, INFLUENCE_CELLS);
  const lev = maxPerCell(data.x, fit.leverage, lines, limits.maxPoints, INFLUENCE_CELLS);
  return {
    df: fit.df,
    sigma: roundSig(fit.sigma),
    r2: roundSig(fit.r2),
    residualDf: roundSig(fit.residualDf),
    aic: roundSig(fit.aic),
    bic: roundSig(fit.bic),
    ...(fit.lambda !== undefined ? { lambda: roundSig(fit.lambda) } : {}),
    notes: fit.notes,
    knots: roundAll(fit.knots),
    residualsVsX: cloudOf(data.x, fit.residuals, lines, limits),
    residualsVsFitted: cloudOf(fit.fitted, fit.residuals, lines, limits),
    qq: normalQuantiles(standardised, QQ_POINTS),
    cooks: { x: cooks.x, d: cooks.v, lines: cooks.lines, binned: cooks.binned },
    leverage: { x: lev.x, h: lev.v, lines: lev.lines, binned: lev.binned },
    cooksThreshold: roundSig(cooksThreshold, 5),
    leverageThreshold: roundSig(leverageThreshold, 5),
    influential,
    influentialTotal: flagged.length,
    checks,
    warnings,
  };
}
