import type { Diagnostics } from './types';
import { CHECK_LEVEL, EXCESS_KURTOSIS_MATTERS, LAG1_MATTERS, misfitRatio, MISFIT_RATIO_MATTERS, SKEWNESS_MATTERS, SPREAD_RATIO_MATTERS, verdict } from './checks';
import { dispersionOf } from './dispersion';
import { exactFitResidual } from './exactFit';
import { influenceOf, noInfluence } from './influence';
import { rowOrderCheck } from './rowOrder';
import { checkWarnings } from './warnings';
import { RowBasisCurve } from '../fit/linearFit';
import { breuschPagan } from '../stats/breuschPagan';
import type { DesignRows } from '../stats/design';
import { durbinWatson } from '../stats/durbinWatson';
import { durbinWatsonAndBreuschPagan } from '../stats/designTests';
import { lag1Correlation, moments, spreadRatio } from '../stats/effects';
import { checkResiduals } from '../fit/modelResiduals';
import { lackOfFit } from '../stats/lackOfFit';
import { normalQuantiles } from '../stats/normalQuantiles';
import { shapiroWilk } from '../stats/shapiroWilk';
import { orderByX } from '../tune/plan';
import { xInOrder } from '../stats/orderByX';
import type { FitResult, XYData } from '../types';

export { CHECK_LEVEL };

/** Most points of the normal-quantile plot sent to a figure. */
const QQ_POINTS = 400;

/**
 * Residual diagnostics of a fit: Shapiro-Wilk on the residuals, Durbin-Watson on the rows
 * ordered by x, Breusch-Pagan (Koenker) on the model's design, the lack-of-fit F test when
 * x has replicates, each with an effect size (skewness and excess kurtosis, lag-1
 * correlation, spread ratio across thirds of x, misfit ratio; core/analysis/checks.ts) that
 * decides with the p-value whether it warns; the dispersion of counts and proportions; the
 * residuals in row order with a measure of drift; influential rows by the rules of
 * core/stats/influence.ts with CSV lines; normal-quantile plot data; and plain-language
 * warnings (core/analysis/warnings.ts). A fit through every reading (residuals at rounding
 * level, or as many coefficients as rows) skips the residual tests, the influence rules and
 * the row-order check, and says so. Weighted fits use residuals scaled by sqrt(w); counts
 * and proportions deviance residuals. O(n log n + n p^2).
 */
export function diagnose(data: XYData, fit: FitResult): Diagnostics {
  const n = fit.n;
  const { x, w } = data;
  const order = orderByX(x);
  // Counts and proportions are checked on deviance residuals, Gaussian fits on sqrt(w)-scaled ones.
  const checked = checkResiduals(fit, w);
  // x (shared with the lack-of-fit test), sqrt(w) and the scaled residuals in x order, so that
  // the design rows below read memory in sequence instead of jumping through `order` on every call.
  const xSorted = xInOrder(x);
  const rootW = w ? new Float64Array(n) : undefined;
  const scaled = new Float64Array(n);
  const residuals = checked.residuals;
  for (let j = 0; j < n; j++) {
    const i = order[j] as number;
    if (rootW) rootW[j] = Math.sqrt(w?.[i] as number);
    scaled[j] = residuals[i] as number;
  }
  const design = designInXOrder(fit, xSorted, rootW);
  const out: { -readonly [K in keyof Diagnostics]: Diagnostics[K] } = { influential: noInfluence(fit, data), warnings: [] };
  // With no residual df (as many coefficients as rows) the residuals are rounding noise: nothing to check.
  if (!(fit.residualDf > 0) || (design !== undefined && design.p >= n)) {
    out.exactFit = { reason: 'no-residual-df', maxResidual: maxAbs(fit.residuals) };
  } else {
    const exact = exactFitResidual(fit, data);
    if (exact !== undefined) out.exactFit = { reason: 'rounding', maxResidual: exact };
  }
  if (out.exactFit) {
    out.warnings = checkWarnings(out, fit, n);
    return out;
  }
  const dispersion = dispersionOf(fit, data);
  if (dispersion) out.dispersion = dispersion;
  out.influential = influenceOf(fit, data);
  const spread = scaled.some((v) => Math.abs(v - (scaled[0] as number)) > 0);
  if (n >= 3 && spread && checked.gaussianChecks) {
    const sw = shapiroWilk(scaled);
    const { skewness, excessKurtosis } = moments(scaled);
    out.shapiroWilk = { ...sw, skewness, excessKurtosis, ...verdict(sw.pValue, Math.abs(skewness) >= SKEWNESS_MATTERS || Math.abs(excessKurtosis) >= EXCESS_KURTOSIS_MATTERS) };
  }
  if (n >= 3 && spread) {
    // One pass over the design rows serves both tests when the model has a finite design.
    const both = design && checked.gaussianChecks ? durbinWatsonAndBreuschPagan(scaled, design) : undefined;
    const dw = both ? both.durbinWatson : durbinWatson(scaled, design);
    const lag1 = lag1Correlation(scaled);
    // Durbin-Watson tests against positive correlation, so only a positive lag-1 correlation counts.
    out.durbinWatson = { ...dw, lag1, ...verdict(dw.pValue, lag1 >= LAG1_MATTERS) };
    if (checked.gaussianChecks) {
      const bp = both ? both.breuschPagan : breuschPagan(scaled, lineDesign(xSorted, rootW));
      const ratio = spreadRatio(scaled);
      out.breuschPagan = { ...bp, spreadRatio: ratio, ...verdict(bp.pValue, ratio >= SPREAD_RATIO_MATTERS) };
    }
  }
  const lof = checked.gaussianChecks ? lackOfFit(data.x, data.y, w, fit.rss, fit.df, order) : undefined;
  if (lof) {
    const misfit = misfitRatio(lof.F, lof.df1, n);
    out.lackOfFit = { ...lof, misfitRatio: misfit, ...verdict(lof.pValue, misfit >= MISFIT_RATIO_MATTERS) };
  }
  if (n >= 3 && spread) out.rowOrder = rowOrderCheck(checked.residuals, x, data.lines);
  if (n >= 3 && checked.scale > 0) {
    const std = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const h = fit.leverage[i] as number;
      std[i] = (checked.residuals[i] as number) / (checked.scale * Math.sqrt(Math.max(1e-12, 1 - h)));
    }
    const qq = normalQuantiles(std, QQ_POINTS);
    out.normalQuantiles = { theoretical: Array.from(qq.theoretical), sample: Array.from(qq.sample) };
  }
  out.warnings = checkWarnings(out, fit, n);
  return out;
}

function maxAbs(a: Float64Array): number {
  let m = 0;
  for (const v of a) m = Math.max(m, Math.abs(v));
  return m;
}

/** Model-matrix rows of a regression basis at x sorted ascending (scaled by sqrt(w)), or undefined for the smoothing spline. */
function designInXOrder(fit: FitResult, xSorted: Float64Array, rootW: Float64Array | undefined): DesignRows | undefined {
  const curve = fit.curve;
  if (!(curve instanceof RowBasisCurve)) return undefined;
  const sparse = curve.sparseDesign();
  return {
    p: curve.designSize,
    row(j: number, out: Float64Array): void {
      curve.designRow(xSorted[j] as number, out);
      if (rootW) {
        const s = rootW[j] as number;
        for (let k = 0; k < out.length; k++) out[k] = (out[k] as number) * s;
      }
    },
    // The same rows as basis rows with a few non-zeros, so the cross products skip the zeros.
    sparse: {
      size: sparse.size,
      width: sparse.width,
      expand: sparse.expand,
      row(j: number, out: Float64Array): number {
        const first = sparse.row(xSorted[j] as number, out);
        if (rootW) {
          const s = rootW[j] as number;
          for (let k = 0; k < sparse.width; k++) out[k] = (out[k] as number) * s;
        }
        return first;
      },
    },
  };
}

/**
 * [1, u] rows at x sorted ascending (scaled by sqrt(w)), u = (x - mid) / half mapping the x
 * range to [-1, 1]: the Breusch-Pagan regressors when the model has no finite design. They
 * span the same columns as [1, x], so the test is the same, and their squares stay finite
 * and normal at any scale of x.
 */
function lineDesign(xSorted: Float64Array, rootW: Float64Array | undefined): DesignRows {
  const lo = xSorted[0] as number;
  const hi = xSorted[xSorted.length - 1] as number;
  const mid = lo / 2 + hi / 2;
  const half = hi > lo ? hi / 2 - lo / 2 : 1;
  return {
    p: 2,
    row(j: number, out: Float64Array): void {
      const s = rootW ? (rootW[j] as number) : 1;
      out[0] = s;
      out[1] = s * (((xSorted[j] as number) - mid) / half);
    },
  };
}
