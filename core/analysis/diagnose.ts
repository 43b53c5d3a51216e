import type { Diagnostics } from './types';
import { CHECK_LEVEL, EXCESS_KURTOSIS_MATTERS, LAG1_MATTERS, misfitRatio, MISFIT_RATIO_MATTERS, SKEWNESS_MATTERS, SPREAD_RATIO_MATTERS, verdict } from './checks';
import { dispersionOf } from './dispersion';
import { exactFitResidual } from './exactFit';
import { influenceOf, noInfluence } from './influence';
import { rowOrderCheck } from './rowOrder';
import { checkWarnings } from './warnings';
import { designInXOrder, lineDesign } from './designRows';
import { abandonDesignSums, type ChecksAside, type DesignSumsJob, designSumsJob, releaseDesignSums } from './designSums';
import { breuschPagan } from '../stats/breuschPagan';
import { durbinWatson, DW_EXACT_LIMIT } from '../stats/durbinWatson';
import type { DesignCrossProducts } from '../stats/designCrossProducts';
import { durbinWatsonAndBreuschPagan } from '../stats/designTests';
import { lag1Correlation, moments, spreadRatio } from '../stats/effects';
import { checkResiduals, gaussianChecksApply } from '../fit/modelResiduals';
import { lackOfFit } from '../stats/lackOfFit';
import { normalQuantiles } from '../stats/normalQuantiles';
import { shapiroWilk as shapiroWilkTest } from '../stats/shapiroWilk';
import { orderByX } from '../tune/plan';
import { xInOrder } from '../stats/orderByX';
import { sharedFloat64 } from '../sharedMemory';
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
  return checksOf(data, fit, undefined).finish(undefined);
}

/** Fewest rows for which the design tests' cross products are summed on a helper thread (below, posting the job costs more than it saves). */
export const ASIDE_ROWS = 100_000;

/**
 * The same checks as `diagnose`, to the last bit, with the cross products of the design tests
 * (Durbin-Watson, Breusch-Pagan: O(n p) of the checks' O(n log n + n p^2)) summed on the
 * thread `aside` lends, while this one builds the residuals and runs the other checks. Runs
 * as `diagnose` does when the fit has fewer than ASIDE_ROWS rows, no basis that can be
 * rebuilt on another thread (RowBasis.spec), or the aside no free thread.
 * Example: await diagnoseAside(data, fit, runner) where runner = workerRunner(undefined, { lend: true }).
 */
export async function diagnoseAside(data: XYData, fit: FitResult, aside: ChecksAside): Promise<Diagnostics> {
  const checks = checksOf(data, fit, aside);
  return checks.finish(await checks.sums);
}

/**
 * The checks of `diagnose` up to the design tests, which `finish` completes with their cross
 * products (`sums`, when a helper thread was asked for them; otherwise summed by finish).
 */
function checksOf(
  data: XYData,
  fit: FitResult,
  aside: ChecksAside | undefined,
): { readonly sums?: Promise<DesignCrossProducts | undefined>; finish(sums: DesignCrossProducts | undefined): Diagnostics } {
  const n = fit.n;
  const { x, w } = data;
  const order = orderByX(x);
  // x (shared with the lack-of-fit test), sqrt(w) and the scaled residuals in x order, so that
  // the design rows below read memory in sequence instead of jumping through `order` on every call.
  const xSorted = xInOrder(x);
  let rootW: Float64Array | undefined;
  if (w) {
    // Shared, as x in order is (core/stats/argsort.ts): a helper thread reads both in place.
    rootW = sharedFloat64(n);
    for (let j = 0; j < n; j++) rootW[j] = Math.sqrt(w[order[j] as number] as number);
  }
  const design = designInXOrder(fit, xSorted, rootW);
  const noResidualDf = !(fit.residualDf > 0) || (design !== undefined && design.p >= n);
  // The design tests' cross products can be summed elsewhere while this thread builds the residuals (checkResiduals) and runs the rest.
  const job: DesignSumsJob | undefined =
    aside && design?.spec && !noResidualDf && gaussianChecksApply(fit) && n >= Math.max(ASIDE_ROWS, DW_EXACT_LIMIT)
      ? designSumsJob(design.spec, design.sparse?.expand, design.p, xSorted, rootW)
      : undefined;
  const pending = job && aside?.designSums(job);
  try {
    // Counts and proportions are checked on deviance residuals, Gaussian fits on sqrt(w)-scaled ones.
    const checked = checkResiduals(fit, w);
    const scaled = job ? job.residuals : new Float64Array(n);
    const residuals = checked.residuals;
    for (let j = 0; j < n; j++) scaled[j] = residuals[order[j] as number] as number;
    let exactFit: Diagnostics['exactFit'];
    // With no residual df (as many coefficients as rows) the residuals are rounding noise: nothing to check.
    if (noResidualDf) exactFit = { reason: 'no-residual-df', maxResidual: maxAbs(fit.residuals) };
    else {
      const exact = exactFitResidual(fit, data);
      if (exact !== undefined) exactFit = { reason: 'rounding', maxResidual: exact };
    }
    const spread = scaled.some((v) => Math.abs(v - (scaled[0] as number)) > 0);
    const designTests = !exactFit && n >= 3 && spread && design !== undefined && checked.gaussianChecks;
    if (job) {
      if (pending && designTests) releaseDesignSums(job);
      else abandonDesignSums(job);
    }
    if (exactFit) {
      const out: Diagnostics = { influential: noInfluence(fit, data), warnings: [], exactFit };
      return { finish: () => ({ ...out, warnings: checkWarnings(out, fit, n) }) };
    }
    const dispersion = dispersionOf(fit, data);
    const influential = influenceOf(fit, data);
    let shapiroWilk: Diagnostics['shapiroWilk'];
    if (n >= 3 && spread && checked.gaussianChecks) {
      const sw = shapiroWilkTest(scaled);
      const { skewness, excessKurtosis } = moments(scaled);
      shapiroWilk = { ...sw, skewness, excessKurtosis, ...verdict(sw.pValue, Math.abs(skewness) >= SKEWNESS_MATTERS || Math.abs(excessKurtosis) >= EXCESS_KURTOSIS_MATTERS) };
    }
    const lag1 = n >= 3 && spread ? lag1Correlation(scaled) : NaN;
    const ratio = n >= 3 && spread && checked.gaussianChecks ? spreadRatio(scaled) : NaN;
    const lof = checked.gaussianChecks ? lackOfFit(data.x, data.y, w, fit.rss, fit.df, order) : undefined;
    const rowOrder = n >= 3 && spread ? rowOrderCheck(checked.residuals, x, data.lines) : undefined;
    let normalQuantilesPlot: Diagnostics['normalQuantiles'];
    if (n >= 3 && checked.scale > 0) {
      const std = new Float64Array(n);
      // Read once: the fit's per-row arrays may be getters (core/fit/summary.ts summariseLazily).
      const leverage = fit.leverage;
      for (let i = 0; i < n; i++) {
        const h = leverage[i] as number;
        std[i] = (residuals[i] as number) / (checked.scale * Math.sqrt(Math.max(1e-12, 1 - h)));
      }
      const qq = normalQuantiles(std, QQ_POINTS);
      normalQuantilesPlot = { theoretical: Array.from(qq.theoretical), sample: Array.from(qq.sample) };
    }
    const finish = (sums: DesignCrossProducts | undefined): Diagnostics => {
      // Keys in the order the checks are reported (the --json output shows them so).
      const out: { -readonly [K in keyof Diagnostics]: Diagnostics[K] } = { influential, warnings: [] };
      if (dispersion) out.dispersion = dispersion;
      if (shapiroWilk) out.shapiroWilk = shapiroWilk;
      if (n >= 3 && spread) {
        // One pass over the design rows serves both tests when the model has a finite design.
        const both = designTests && design ? durbinWatsonAndBreuschPagan(scaled, design, sums) : undefined;
        const dw = both ? both.durbinWatson : durbinWatson(scaled, design);
        // Durbin-Watson tests against positive correlation, so only a positive lag-1 correlation counts.
        out.durbinWatson = { ...dw, lag1, ...verdict(dw.pValue, lag1 >= LAG1_MATTERS) };
        if (checked.gaussianChecks) {
          const bp = both ? both.breuschPagan : breuschPagan(scaled, lineDesign(xSorted, rootW));
          out.breuschPagan = { ...bp, spreadRatio: ratio, ...verdict(bp.pValue, ratio >= SPREAD_RATIO_MATTERS) };
        }
      }
      if (lof) {
        const misfit = misfitRatio(lof.F, lof.df1, n);
        out.lackOfFit = { ...lof, misfitRatio: misfit, ...verdict(lof.pValue, misfit >= MISFIT_RATIO_MATTERS) };
      }
      if (rowOrder) out.rowOrder = rowOrder;
      if (normalQuantilesPlot) out.normalQuantiles = normalQuantilesPlot;
      out.warnings = checkWarnings(out, fit, n);
      return out;
    };
    return pending && designTests ? { sums: pending, finish } : { finish };
  } catch (e) {
    if (job) abandonDesignSums(job);
    throw e;
  }
}

function maxAbs(a: Float64Array): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i] as number));
  return m;
}
