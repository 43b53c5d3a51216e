import { InputError } from '../errors';
import { argsortStable } from './argsort';
import { isOrderOf, xInOrder } from './orderByX';
import { pf } from './distributions';

/** Result of the lack-of-fit F test against one mean per distinct x. */
export interface LackOfFitResult {
  /** (lackOfFitSS / df1) / (pureErrorSS / df2). */
  readonly F: number;
  /** Distinct x values minus the model's df. */
  readonly df1: number;
  /** Rows minus distinct x values. */
  readonly df2: number;
  /** Upper F tail. */
  readonly pValue: number;
  /** Weighted scatter of the readings about their own group means. */
  readonly pureErrorSS: number;
  /** Model residual sum of squares minus the pure error. */
  readonly lackOfFitSS: number;
  /** Distinct x values that occur more than once. */
  readonly replicatedLevels: number;
}

/**
 * Lack-of-fit F test of a fitted curve against the saturated model with one mean per
 * distinct x (pure error): Draper & Smith (1998), "Applied Regression Analysis", 3rd ed.,
 * section 2.1. The residual sum of squares splits into pure error (scatter of replicated
 * readings about their x-group means, df2 = n - distinct x) and lack of fit
 * (df1 = distinct x - modelDf), and F = (LOF / df1) / (PE / df2) is referred to F(df1, df2).
 * Equals R's `anova(fit, lm(y ~ factor(x)))` for a linear model (modelDf = number of
 * coefficients); for a smoothing spline modelDf is its trace and df1 need not be whole.
 *
 * `w` are prior weights (> 0) or undefined; `modelRss` is the model's weighted residual
 * sum of squares and `modelDf` its df (trace of the hat matrix, intercept included).
 * Returns undefined when no x value is replicated or df1 <= 0. x values are grouped by
 * exact equality. `order` lists the rows by ascending x (ties in any order), e.g.
 * `orderByX(x)` when the caller has it already; otherwise the rows are ordered here with
 * the radix `argsortStable`. Cost O(n).
 * Throws InputError for arrays of different lengths, non-finite values, weights <= 0 or
 * an `order` that is not a permutation of the rows by ascending x.
 * Example: x = [1, 1, 2, 2, 3, 3] under a straight line (modelDf 2) gives df1 = 1, df2 = 3.
 */
export function lackOfFit(x: Float64Array, y: Float64Array, w: Float64Array | undefined, modelRss: number, modelDf: number, order: Int32Array = argsortStable(x)): LackOfFitResult | undefined {
  const n = x.length;
  if (y.length !== n) throw new InputError(`lack of fit: x has ${n} values but y has ${y.length}`);
  if (w && w.length !== n) throw new InputError(`lack of fit: x has ${n} values but the weights have ${w.length}`);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i] as number) || !Number.isFinite(y[i] as number)) {
      throw new InputError(`lack of fit: row ${i + 1} has a non-finite x or y`);
    }
    if (w && !((w[i] as number) > 0)) throw new InputError(`lack of fit: weight ${i + 1} must be > 0, got ${w[i]}`);
  }
  if (!(modelRss >= 0)) throw new InputError(`lack of fit: the model's residual sum of squares must be >= 0, got ${modelRss}`);
  const xSorted = sortedByOrder(x, order);
  let levels = 0;
  let replicated = 0;
  let pureError = 0;
  let start = 0;
  while (start < n) {
    const xv = xSorted[start] as number;
    let end = start + 1;
    while (end < n && (xSorted[end] as number) === xv) end++;
    levels++;
    if (end - start > 1) {
      replicated++;
      // One-pass weighted mean and scatter: West (1979), "Updating mean and variance
      // estimates: an improved method", Communications of the ACM 22(9), 532-535.
      let sw = 0;
      let mean = 0;
      let scatter = 0;
      for (let k = start; k < end; k++) {
        const i = order[k] as number;
        const wi = w ? (w[i] as number) : 1;
        const yi = y[i] as number;
        const newSw = sw + wi;
        const delta = yi - mean;
        const step = (delta * wi) / newSw;
        mean += step;
        scatter += sw * delta * step;
        sw = newSw;
      }
      pureError += scatter;
    }
    start = end;
  }
  const df2 = n - levels;
  const df1 = levels - modelDf;
  if (replicated === 0 || df2 <= 0 || !(df1 > 0)) return undefined;
  // Pure error never exceeds the model's RSS in exact arithmetic; clamp rounding.
  const lackOfFitSS = Math.max(0, modelRss - pureError);
  if (!(pureError > 0)) {
    // Replicates agree exactly: any lack of fit is infinitely significant.
    const F = lackOfFitSS > 0 ? Infinity : 0;
    return { F, df1, df2, pValue: lackOfFitSS > 0 ? 0 : 1, pureErrorSS: 0, lackOfFitSS, replicatedLevels: replicated };
  }
  const F = lackOfFitSS / df1 / (pureError / df2);
  const pValue = pf(F, df1, df2, false);
  return { F, df1, df2, pValue, pureErrorSS: pureError, lackOfFitSS, replicatedLevels: replicated };
}

/**
 * x in the given row order, checking that `order` is a permutation of the row indices by
 * ascending x (throws InputError otherwise); the shared order of x (orderByX) is taken as it
 * is. O(n).
 */
function sortedByOrder(x: Float64Array, order: Int32Array): Float64Array {
  // The shared order of x was made by sorting: nothing to check, and x in it is gathered already.
  if (isOrderOf(x, order)) return xInOrder(x);
  const n = x.length;
  const bad = (): InputError => new InputError('lack of fit: the row order given does not list every row once by ascending x');
  if (order.length !== n) throw bad();
  const seen = new Uint8Array(n);
  const out = new Float64Array(n);
  let prev = -Infinity;
  for (let k = 0; k < n; k++) {
    const i = order[k] as number;
    if (!(i >= 0 && i < n) || seen[i] === 1) throw bad();
    seen[i] = 1;
    const v = x[i] as number;
    if (v < prev) throw bad();
    out[k] = v;
    prev = v;
  }
  return out;
}
