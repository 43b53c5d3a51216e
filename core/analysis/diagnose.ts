import { testText } from '../words/numbers';
import type { Diagnostics } from './types';
import { RowBasisCurve } from '../fit/linearFit';
import { breuschPagan } from '../stats/breuschPagan';
import type { DesignRows } from '../stats/design';
import { durbinWatson } from '../stats/durbinWatson';
import { durbinWatsonAndBreuschPagan } from '../stats/designTests';
import { checkResiduals } from '../fit/modelResiduals';
import { influentialRows } from '../stats/influence';
import { lackOfFit } from '../stats/lackOfFit';
import { normalQuantiles } from '../stats/normalQuantiles';
import { shapiroWilk } from '../stats/shapiroWilk';
import { orderByX } from '../tune/plan';
import type { FitResult, XYData } from '../types';

/** Significance level of the residual checks' warnings (common practice). */
export const CHECK_LEVEL = 0.05;
/** Most points of the normal-quantile plot sent to a figure. */
const QQ_POINTS = 400;

/**
 * Residual diagnostics of a fit: Shapiro-Wilk on the residuals, Durbin-Watson on the rows
 * ordered by x, Breusch-Pagan (Koenker) on the model's design, the lack-of-fit F test when
 * x has replicates, influential rows with CSV lines, normal-quantile plot data, and
 * plain-language warnings for checks that fail at the 5 % level. Weighted fits use
 * residuals scaled by sqrt(w). O(n log n + n p^2).
 */
export function diagnose(data: XYData, fit: FitResult): Diagnostics {
  const n = fit.n;
  const { x, w } = data;
  const order = orderByX(x);
  // Counts and proportions are checked on deviance residuals, Gaussian fits on sqrt(w)-scaled ones.
  const checked = checkResiduals(fit, w);
  // x, sqrt(w) and the scaled residuals gathered once in x order, so that the design rows
  // below read memory in sequence instead of jumping through `order` on every call.
  const xSorted = new Float64Array(n);
  const rootW = w ? new Float64Array(n) : undefined;
  const scaled = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const i = order[j] as number;
    xSorted[j] = x[i] as number;
    if (rootW) rootW[j] = Math.sqrt(w?.[i] as number);
    scaled[j] = checked.residuals[i] as number;
  }
  const warnings: string[] = [];
  const design = designInXOrder(fit, xSorted, rootW);
  const out: { -readonly [K in keyof Diagnostics]: Diagnostics[K] } = { influential: influentialRows(fit.leverage, fit.cooksDistance, fit.df, data.lines), warnings };
  // With no residual df (as many coefficients as rows) the residuals are rounding noise: nothing to check.
  const interpolates = !(fit.residualDf > 0) || (design !== undefined && design.p >= n);
  if (n >= 3 && interpolates) {
    warnings.push(
      `The residual checks were not run: too few rows for the df (n = ${n}, df = ${fit.df}); a curve with as many coefficients as rows passes through every reading and leaves no residual variation to check.`,
    );
  }
  const spread = !interpolates && scaled.some((v) => Math.abs(v - (scaled[0] as number)) > 0);
  if (n >= 3 && spread && checked.gaussianChecks) {
    const sw = shapiroWilk(scaled);
    out.shapiroWilk = sw;
    if (sw.pValue < CHECK_LEVEL) warnings.push(`Residuals do not look normal (Shapiro-Wilk ${testText('W', [], sw.statistic, sw.pValue)}); the bands assume normal errors.`);
  }
  if (n >= 3 && spread) {
    // One pass over the design rows serves both tests when the model has a finite design.
    const both = design && checked.gaussianChecks ? durbinWatsonAndBreuschPagan(scaled, design) : undefined;
    const dw = both ? both.durbinWatson : durbinWatson(scaled, design);
    out.durbinWatson = dw;
    if (dw.pValue < CHECK_LEVEL)
      warnings.push(`Residuals in x order are positively correlated (Durbin-Watson ${testText('DW', [], dw.statistic, dw.pValue)}): the curve may be too stiff, or the readings drift.`);
    if (checked.gaussianChecks) {
      const bp = both ? both.breuschPagan : breuschPagan(scaled, lineDesign(xSorted, rootW));
      out.breuschPagan = bp;
      if (bp.pValue < CHECK_LEVEL)
        warnings.push(`The spread of the residuals changes with x (Breusch-Pagan ${testText('BP χ²', [bp.df], bp.statistic, bp.pValue)}); the bands assume constant spread. Consider weights.`);
    }
  }
  const lof = checked.gaussianChecks && !interpolates ? lackOfFit(data.x, data.y, w, fit.rss, fit.df, order) : undefined;
  if (lof) {
    out.lackOfFit = lof;
    if (lof.pValue < CHECK_LEVEL)
      warnings.push(
        `The curve misses the means of replicated readings more than their scatter explains (lack-of-fit ${testText('F', [lof.df1, lof.df2], lof.F, lof.pValue)}); a more flexible curve may be needed.`,
      );
  }
  if (out.influential.total > 0) {
    const strong = out.influential.rows.filter((r) => r.cooksDistance > 1);
    if (strong.length)
      warnings.push(
        `${strong.length} row(s) have Cook's distance above 1 (lines ${strong
          .slice(0, 5)
          .map((r) => r.line)
          .join(', ')}): check them before trusting the curve.`,
      );
  }
  if (n >= 3 && checked.scale > 0) {
    const std = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const h = fit.leverage[i] as number;
      std[i] = (checked.residuals[i] as number) / (checked.scale * Math.sqrt(Math.max(1e-12, 1 - h)));
    }
    const qq = normalQuantiles(std, QQ_POINTS);
    out.normalQuantiles = { theoretical: Array.from(qq.theoretical), sample: Array.from(qq.sample) };
  }
  return out;
}

/** Model-matrix rows of a regression basis at x sorted ascending (scaled by sqrt(w)), or undefined for the smoothing spline. */
function designInXOrder(fit: FitResult, xSorted: Float64Array, rootW: Float64Array | undefined): DesignRows | undefined {
  const curve = fit.curve;
  if (!(curve instanceof RowBasisCurve)) return undefined;
  return {
    p: curve.designSize,
    row(j: number, out: Float64Array): void {
      curve.designRow(xSorted[j] as number, out);
      if (rootW) {
        const s = rootW[j] as number;
        for (let k = 0; k < out.length; k++) out[k] = (out[k] as number) * s;
      }
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
