import type { Curve, CurveKindId, FitResult, XYData } from '../types';

/** What a family's solver hands to `summariseFit`. */
export interface SolvedFit {
  readonly kind: CurveKindId;
  readonly df: number;
  readonly curve: Curve;
  readonly coefficients: Float64Array;
  readonly knots: Float64Array;
  readonly fitted: Float64Array;
  /**
   * y - fitted, when the solver has them more accurately than the subtraction here: a fit of
   * y - c (c the mean of y) gives (y - c) - fitted_c, where fitted = c + fitted_c is rounded
   * to the precision of c (y = 1e14 + signal). Absent: computed as y - fitted.
   */
  readonly residuals?: Float64Array;
  readonly leverage: Float64Array;
  readonly lambda?: number;
  readonly lambdaScaled?: number;
  readonly notes: readonly string[];
}

/**
 * Residuals and the summary statistics every family shares.
 *
 * - sigma^2 = sum w r^2 / (n - df);
 * - log-likelihood of the Gaussian model with variance sigma^2 / w_i at the ML estimate,
 *   as R's logLik.lm: 0.5 (sum log w - n (log 2 pi + 1 - log n + log sum w r^2));
 * - AIC = -2 logLik + 2 (df + 1), BIC = -2 logLik + log(n) (df + 1) (the +1 counts sigma),
 *   AICc = AIC + 2 K (K + 1) / (n - K - 1) with K = df + 1 (Hurvich & Tsai 1989);
 * - Cook's distance D_i = w_i r_i^2 h_i / (df sigma^2 (1 - h_i)^2) (Cook 1977);
 * - exact leave-one-out residual r_i / (1 - h_i), valid for any linear smoother with a
 *   fixed penalty (Sherman-Morrison), giving looRmse = sqrt(sum w e^2 / sum w);
 * - GCV = (rss / n) / (1 - df / n)^2 (Craven & Wahba 1979).
 * Cost O(n).
 */
export function summariseFit(data: XYData, solved: SolvedFit): FitResult {
  const { x, y, w } = data;
  const n = x.length;
  const df = solved.df;
  let residuals = solved.residuals;
  if (!residuals) {
    residuals = new Float64Array(n);
    for (let i = 0; i < n; i++) residuals[i] = (y[i] as number) - (solved.fitted[i] as number);
  }
  const cooks = new Float64Array(n);
  let rss = 0;
  let sw = 0;
  let swy = 0;
  let sumLogW = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    const r = residuals[i] as number;
    rss += wi * r * r;
    sw += wi;
    swy += wi * (y[i] as number);
    if (w) sumLogW += Math.log(wi);
  }
  const ybar = swy / sw;
  let tss = 0;
  let loo = 0;
  let looInfinite = false;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    const d = (y[i] as number) - ybar;
    tss += wi * d * d;
    const h = solved.leverage[i] as number;
    const r = residuals[i] as number;
    if (1 - h <= 1e-10) {
      if (Math.abs(r) > 0) looInfinite = true;
    } else {
      const e = r / (1 - h);
      loo += wi * e * e;
    }
  }
  const residualDf = n - df;
  const sigma2 = residualDf > 0 ? rss / residualDf : NaN;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    const h = solved.leverage[i] as number;
    const r = residuals[i] as number;
    cooks[i] = 1 - h <= 1e-10 ? NaN : (wi * r * r * h) / (df * sigma2 * (1 - h) * (1 - h));
  }
  const logLik = 0.5 * (sumLogW - n * (Math.log(2 * Math.PI) + 1 - Math.log(n) + Math.log(rss)));
  const k = df + 1;
  const aic = -2 * logLik + 2 * k;
  const notes = [...solved.notes];
  if (looInfinite) notes.push('Some rows have leverage 1, so their leave-one-out error is undefined; the leave-one-out RMSE is reported as infinite.');
  return {
    kind: solved.kind,
    df,
    n,
    residualDf,
    curve: solved.curve,
    coefficients: solved.coefficients,
    knots: solved.knots,
    fitted: solved.fitted,
    residuals,
    leverage: solved.leverage,
    cooksDistance: cooks,
    rss,
    sigma: Math.sqrt(sigma2),
    r2: tss > 0 ? 1 - rss / tss : NaN,
    logLik,
    aic,
    aicc: n - k - 1 > 0 ? aic + (2 * k * (k + 1)) / (n - k - 1) : Infinity,
    bic: -2 * logLik + Math.log(n) * k,
    looRmse: looInfinite ? Infinity : Math.sqrt(loo / sw),
    gcv: rss / n / ((1 - df / n) * (1 - df / n)),
    ...(solved.lambda !== undefined ? { lambda: solved.lambda } : {}),
    ...(solved.lambdaScaled !== undefined ? { lambdaScaled: solved.lambdaScaled } : {}),
    notes,
  };
}
