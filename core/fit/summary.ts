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
  const { x, y } = data;
  const n = x.length;
  let residuals = solved.residuals;
  if (!residuals) {
    residuals = new Float64Array(n);
    for (let i = 0; i < n; i++) residuals[i] = (y[i] as number) - (solved.fitted[i] as number);
  }
  const r = residuals;
  const totals = dataTotals(data);
  let rss = 0;
  for (let i = 0; i < n; i++) {
    const ri = r[i] as number;
    rss += (data.w ? (data.w[i] as number) : 1) * ri * ri;
  }
  const stats = fitStatistics(n, solved.df, rss, totals);
  const rows = rowStatistics(data, solved.df, stats.sigma * stats.sigma, r, solved.leverage);
  return {
    ...baseOf(solved, n, stats),
    fitted: solved.fitted,
    residuals: r,
    leverage: solved.leverage,
    cooksDistance: rows.cooks,
    looRmse: rows.looRmse,
    notes: rows.looInfinite ? [...solved.notes, LOO_INFINITE_NOTE] : [...solved.notes],
  };
}

/** What a solver that keeps no per-row arrays hands to `summariseLazily`. */
export interface CompactFit extends Omit<SolvedFit, 'fitted' | 'residuals' | 'leverage'> {
  /** Weighted residual sum of squares. */
  readonly rss: number;
  /** Residuals and hat diagonal, built when first asked for. */
  readonly rows: () => { readonly residuals: Float64Array; readonly leverage: Float64Array };
  /** Fitted values, built when first asked for (the residual checks do not read them). */
  readonly fitted: () => Float64Array;
}

/**
 * The fit as summariseFit would return it, with the per-row arrays (fitted, residuals,
 * leverage, Cook's distance) and what needs them (the leave-one-out RMSE, its note) built
 * on first access: tuning fits every candidate, and only the chosen one's rows are usually
 * looked at. `totals` are the data's, shared by every candidate (dataTotals). Same values as
 * summariseFit given the same residual sum of squares.
 */
export function summariseLazily(data: XYData, solved: CompactFit, totals: DataTotals): FitResult {
  const n = data.x.length;
  const stats = fitStatistics(n, solved.df, solved.rss, totals);
  let rows: { residuals: Float64Array; leverage: Float64Array; cooks: Float64Array; looRmse: number; looInfinite: boolean } | undefined;
  let fitted: Float64Array | undefined;
  const built = (): NonNullable<typeof rows> => {
    if (!rows) {
      const r = solved.rows();
      rows = { ...r, ...rowStatistics(data, solved.df, stats.sigma * stats.sigma, r.residuals, r.leverage) };
    }
    return rows;
  };
  const fit = baseOf(solved, n, stats);
  return Object.defineProperties(fit, {
    fitted: { get: () => (fitted ??= solved.fitted()), enumerable: true },
    residuals: { get: () => built().residuals, enumerable: true },
    leverage: { get: () => built().leverage, enumerable: true },
    cooksDistance: { get: () => built().cooks, enumerable: true },
    looRmse: { get: () => built().looRmse, enumerable: true },
    notes: { get: () => (built().looInfinite ? [...solved.notes, LOO_INFINITE_NOTE] : [...solved.notes]), enumerable: true },
  }) as FitResult;
}

const LOO_INFINITE_NOTE = 'Some rows have leverage 1, so their leave-one-out error is undefined; the leave-one-out RMSE is reported as infinite.';

/** Totals of the data that every fit of it shares: rows' weight, log weights, total sum of squares. */
export interface DataTotals {
  readonly sw: number;
  readonly sumLogW: number;
  readonly tss: number;
}

/** The data's totals (O(n)). */
export function dataTotals(data: XYData): DataTotals {
  const { y, w } = data;
  const n = y.length;
  let sw = 0;
  let swy = 0;
  let sumLogW = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    sw += wi;
    swy += wi * (y[i] as number);
    if (w) sumLogW += Math.log(wi);
  }
  const ybar = swy / sw;
  let tss = 0;
  for (let i = 0; i < n; i++) {
    const d = (y[i] as number) - ybar;
    tss += (w ? (w[i] as number) : 1) * d * d;
  }
  return { sw, sumLogW, tss };
}

/** The statistics that follow from the residual sum of squares (formulas above). */
export function fitStatistics(n: number, df: number, rss: number, totals: DataTotals) {
  const residualDf = n - df;
  const sigma2 = residualDf > 0 ? rss / residualDf : NaN;
  const logLik = 0.5 * (totals.sumLogW - n * (Math.log(2 * Math.PI) + 1 - Math.log(n) + Math.log(rss)));
  const k = df + 1;
  const aic = -2 * logLik + 2 * k;
  return {
    residualDf,
    rss,
    sigma: Math.sqrt(sigma2),
    r2: totals.tss > 0 ? 1 - rss / totals.tss : NaN,
    logLik,
    aic,
    aicc: n - k - 1 > 0 ? aic + (2 * k * (k + 1)) / (n - k - 1) : Infinity,
    bic: -2 * logLik + Math.log(n) * k,
    gcv: rss / n / ((1 - df / n) * (1 - df / n)),
    sw: totals.sw,
  };
}

/** Cook's distances and the exact leave-one-out RMSE (formulas above). */
export function rowStatistics(data: XYData, df: number, sigma2: number, residuals: Float64Array, leverage: Float64Array): { cooks: Float64Array; looRmse: number; looInfinite: boolean } {
  const w = data.w;
  const n = residuals.length;
  const cooks = new Float64Array(n);
  let loo = 0;
  let sw = 0;
  let looInfinite = false;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    const h = leverage[i] as number;
    const r = residuals[i] as number;
    sw += wi;
    if (1 - h <= 1e-10) {
      if (Math.abs(r) > 0) looInfinite = true;
      cooks[i] = NaN;
    } else {
      const e = r / (1 - h);
      loo += wi * e * e;
      cooks[i] = (wi * r * r * h) / (df * sigma2 * (1 - h) * (1 - h));
    }
  }
  return { cooks, looRmse: looInfinite ? Infinity : Math.sqrt(loo / sw), looInfinite };
}

/** The fields every summary shares, from the solver and the statistics. */
function baseOf(solved: Omit<SolvedFit, 'fitted' | 'residuals' | 'leverage'>, n: number, stats: ReturnType<typeof fitStatistics>) {
  const { sw: _sw, ...numbers } = stats;
  return {
    kind: solved.kind,
    df: solved.df,
    n,
    curve: solved.curve,
    coefficients: solved.coefficients,
    knots: solved.knots,
    ...numbers,
    ...(solved.lambda !== undefined ? { lambda: solved.lambda } : {}),
    ...(solved.lambdaScaled !== undefined ? { lambdaScaled: solved.lambdaScaled } : {}),
  };
}
