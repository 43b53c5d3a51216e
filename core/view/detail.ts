/**
 * The residual figures' data and texts of one fitted df, thinned so the panel message
 * stays small at any n.
 */
import type { Diagnostics } from '../analysis/types';
import { influenceOf } from '../analysis/influence';
import { checkResiduals } from '../fit/modelResiduals';
import type { InfluenceRule } from '../stats/influence';
import type { FitDetail, InfluentialRow, ModelReportView, RowOrderView } from './model';
import { num } from '../plots/svg';
import type { FitResult, XYData } from '../types';
import { cloudOf, DEFAULT_CLOUD_LIMITS, type CloudLimits } from './cloud';
import { roundAll, roundSig } from './round';
import { maxPerCell } from './series';
import { normalQuantiles } from '../stats/normalQuantiles';
import { checkViews, modelReportLines } from './words';
import { renderOptions } from '../words/options';

/** Largest number of influential rows the panel can list by line (most influential first); the fit record lists them all. */
export const MAX_INFLUENTIAL_LISTED = 200;
/** Largest number of down-weighted rows (robust fits) listed by line. */
export const MAX_DOWNWEIGHTED_LISTED = 30;
/** Number of x cells of the thinned influence figures. */
const INFLUENCE_CELLS = 240;
/** Number of quantiles of the normal quantile plot for large n. */
const QQ_POINTS = 300;
/** Cook's distance line drawn where the median of F(df, n - df) is undefined (no residual df): Cook & Weisberg's (1982) rule of thumb of 1. */
const COOKS_FALLBACK = 1;

/** Options of fitDetail. */
export interface DetailOptions {
  /** Residual checks and thresholds, when this is the df they were computed for. */
  readonly diagnostics?: Diagnostics | undefined;
  readonly limits?: CloudLimits | undefined;
}

/**
 * The model report of a fit for the panel (undefined for plain least squares): the numbers
 * rounded for display, the first MAX_DOWNWEIGHTED_LISTED down-weighted rows with their x,
 * y and CSV line, and the report in words. O(listed rows).
 * Example: modelReportView(fitCurve(data, { family: 'natural-spline', df: 5, robust: true }), data)?.robust?.total.
 */
export function modelReportView(fit: FitResult, data: XYData): ModelReportView | undefined {
  const m = fit.model;
  if (!m) return undefined;
  const out: { -readonly [K in keyof ModelReportView]: ModelReportView[K] } = { converged: m.converged, iterations: m.iterations, lines: modelReportLines(m, fit.residualDf) };
  if (m.glm) out.glm = { deviance: roundSig(m.glm.deviance), nullDeviance: roundSig(m.glm.nullDeviance), dispersion: roundSig(m.glm.dispersion) };
  if (m.constraints) out.constraints = { total: m.constraints.total, active: m.constraints.active, effectiveDf: roundSig(m.constraints.effectiveDf) };
  if (m.robust) {
    const r = m.robust;
    out.robust = {
      k: r.k,
      scale: roundSig(r.scale),
      total: r.downweighted.total,
      rows: r.downweighted.rows
        .slice(0, MAX_DOWNWEIGHTED_LISTED)
        .map((d) => ({ line: d.line, x: roundSig(data.x[d.index] as number), y: roundSig(data.y[d.index] as number), weight: roundSig(d.weight, 4) })),
    };
  }
  return out;
}

/**
 * Builds the FitDetail of `fit`, whose per-row arrays match the rows of `data` (the rows
 * it was fitted to). Residuals are those the checks examine (core/fit/modelResiduals.ts
 * checkResiduals): reading minus fit for least-squares and robust fits, deviance residuals
 * for Poisson and binomial fits; the normal quantile plot standardises them by their scale
 * and sqrt(1 - leverage). O(n log n) for the normal quantiles, O(n) otherwise.
 * Example: fitDetail(fitCurve(data, { family: 'natural-spline', df: 4 }), data).influential.
 */
export function fitDetail(fit: FitResult, data: XYData, options: DetailOptions = {}): FitDetail {
  const n = fit.fitted.length;
  if (data.x.length !== n) throw new Error(`fitDetail: the fit has ${n} rows but the data ${data.x.length}`);
  const limits = options.limits ?? DEFAULT_CLOUD_LIMITS;
  const lines = data.lines;
  const checked = checkResiduals(fit, data.w);
  const standardised = new Float64Array(n);
  // Read once: a fit's per-row arrays may be getters (core/fit/summary.ts summariseLazily).
  const { leverage, fitted } = fit;
  for (let i = 0; i < n; i++) {
    const h = leverage[i] as number;
    standardised[i] = h < 1 && checked.scale > 0 ? (checked.residuals[i] as number) / (checked.scale * Math.sqrt(1 - h)) : NaN;
  }
  // Counts and proportions: deviance residuals (on a common scale); otherwise reading minus fit, in units of y.
  const shown = checked.kind === 'deviance' ? checked.residuals : fit.residuals;
  // The analysis's influence report when given (the same rows the record and the report list), else the same rules here.
  const report = options.diagnostics?.influential ?? influenceOf(fit, data);
  const limit = (rule: InfluenceRule): number => report.thresholds.find((t) => t.rule === rule)?.value ?? NaN;
  const cooksThreshold = Number.isFinite(limit('cooks')) ? limit('cooks') : COOKS_FALLBACK;
  const leverageThreshold = limit('leverage');
  const outlierThreshold = limit('outlier');
  const influential: InfluentialRow[] = report.rows.slice(0, MAX_INFLUENTIAL_LISTED).map((r) => {
    const exceeds: string[] = [];
    if (r.exceeds.includes('outlier')) exceeds.push(`|studentized residual| ${num(Math.abs(r.studentized), 3)} > ${num(outlierThreshold, 3)} (Bonferroni outlier test)`);
    if (r.exceeds.includes('cooks')) exceeds.push(`Cook's distance ${num(r.cooksDistance, 3)} > ${num(cooksThreshold, 3)}`);
    if (r.exceeds.includes('leverage')) exceeds.push(`leverage ${num(r.leverage, 3)} > ${num(leverageThreshold, 3)}`);
    return {
      line: lines ? (lines[r.index] as number) : 0,
      x: roundSig(data.x[r.index] as number),
      y: roundSig(data.y[r.index] as number),
      leverage: roundSig(r.leverage, 5),
      cooksDistance: roundSig(r.cooksDistance, 5),
      ...(Number.isFinite(r.studentized) ? { studentized: roundSig(r.studentized, 5) } : {}),
      exceeds,
    };
  });

  const warnings: string[] = [];
  let minY = Infinity;
  for (let i = 0; i < n; i++) minY = Math.min(minY, data.y[i] as number);
  let negative = 0;
  for (let i = 0; i < n; i++) if ((fitted[i] as number) < 0) negative++;
  if (minY >= 0 && negative > 0) {
    warnings.push(`Every reading is zero or more, but the curve goes below zero at ${negative} of the ${n} rows; check before using it for a quantity that cannot be negative.`);
  }
  const checks = options.diagnostics ? checkViews(options.diagnostics) : [];
  if (options.diagnostics) warnings.push(...options.diagnostics.warnings);

  const cooks = maxPerCell(data.x, fit.cooksDistance, lines, limits.maxPoints, INFLUENCE_CELLS);
  const lev = maxPerCell(data.x, fit.leverage, lines, limits.maxPoints, INFLUENCE_CELLS);
  const model = modelReportView(fit, data);
  const rowOrder = rowOrderView(options.diagnostics);
  if (fit.model && !fit.model.converged) warnings.push(`The fit at df ${num(fit.df, 4)} did not converge; treat this curve with caution.`);
  return {
    df: fit.df,
    sigma: roundSig(fit.sigma),
    r2: roundSig(fit.r2),
    residualDf: roundSig(fit.residualDf),
    aic: roundSig(fit.aic),
    bic: roundSig(fit.bic),
    ...(fit.lambda !== undefined ? { lambda: roundSig(fit.lambda) } : {}),
    notes: fit.notes.map((t) => renderOptions(t, 'editor')),
    knots: roundAll(fit.knots),
    residualKind: checked.kind === 'deviance' ? 'deviance' : 'response',
    residualsVsX: cloudOf(data.x, shown, lines, limits),
    residualsVsFitted: cloudOf(fit.fitted, shown, lines, limits),
    qq: qqView(standardised),
    cooks: { x: cooks.x, d: cooks.v, lines: cooks.lines, binned: cooks.binned },
    leverage: { x: lev.x, h: lev.v, lines: lev.lines, binned: lev.binned },
    cooksThreshold: roundSig(cooksThreshold, 5),
    leverageThreshold: roundSig(leverageThreshold, 5),
    ...(Number.isFinite(outlierThreshold) ? { outlierThreshold: roundSig(outlierThreshold, 5) } : {}),
    influential,
    influentialShown: report.shown,
    influentialTotal: report.total,
    checks,
    warnings: warnings.map((t) => renderOptions(t, 'editor')),
    ...(model ? { model } : {}),
    ...(rowOrder ? { rowOrder } : {}),
  };
}

/** The row-order series and its drift measure for the panel (numbers rounded for display). */
function rowOrderView(d: Diagnostics | undefined): RowOrderView | undefined {
  const r = d?.rowOrder;
  if (!r) return undefined;
  return {
    row: r.series.row,
    line: r.series.line,
    residual: roundAll(r.series.residual),
    blockSize: r.series.blockSize,
    lag1: roundSig(r.lag1, 5),
    ...(Number.isFinite(r.runs.z) ? { runsZ: roundSig(r.runs.z, 5), runsPValue: roundSig(r.runs.pValue, 5) } : {}),
    sameAsX: r.sameAsX,
    flagged: r.flagged,
  };
}

/**
 * The normal-quantile figure's points: those of the residual checks' normal quantile plot
 * (core/stats/normalQuantiles.ts: every point up to QQ_POINTS, else both tails whole and the
 * middle thinned, the kept order statistics found by selection), rounded for the panel.
 */
function qqView(standardised: Float64Array): { theoretical: number[]; sample: number[] } {
  const q = normalQuantiles(standardised, QQ_POINTS);
  return { theoretical: roundAll(Array.from(q.theoretical), 5), sample: roundAll(Array.from(q.sample)) };
}
