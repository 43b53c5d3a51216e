/**
 * Shared data shapes of the Knotwise core. Everything here is plain data or a small
 * interface over typed arrays, so the command line, the VS Code host and the webview can
 * all use it. Definitions follow DESIGN.md (df = trace of the hat matrix, intercept included).
 */

/** The curve families. */
export type Family = 'natural' | 'poly' | 'smooth';

/** Paired observations, all arrays of the same length n. */
export interface XYData {
  readonly x: Float64Array;
  readonly y: Float64Array;
  /** Prior weights (> 0); absent means all 1. */
  readonly w?: Float64Array | undefined;
  /** 1-based line in the source CSV of each row, for messages and influence listings. */
  readonly lines?: Int32Array | undefined;
}

/** A fitted curve that can be evaluated anywhere (linearly beyond the data for splines). */
export interface Curve {
  readonly family: Family;
  /** Effective degrees of freedom (trace of the hat matrix). */
  readonly df: number;
  /** Smallest and largest x of the data the curve was fitted to. */
  readonly lower: number;
  readonly upper: number;
  /** Value of the fitted mean curve at x. */
  value(x: number): number;
  /**
   * b(x)' V b(x), where V is the unscaled covariance of the coefficients
   * ((X'WX)^-1 for regression bases, (X'WX + lambda Omega)^-1 for the smoothing spline).
   * Multiply by sigma^2 for the variance of the fitted mean at x.
   */
  varianceFactor(x: number): number;
}

/** Complete regression output of one curve fitted at one df. */
export interface FitResult {
  readonly family: Family;
  /** Effective degrees of freedom: trace of the hat matrix, intercept included. */
  readonly df: number;
  /** Rows used. */
  readonly n: number;
  /** n - df. */
  readonly residualDf: number;
  readonly curve: Curve;
  /** Coefficients in the family's own basis (B-spline coefficients for splines). */
  readonly coefficients: Float64Array;
  /** Knot vector: boundary and interior knots in increasing order (empty for polynomials). */
  readonly knots: Float64Array;
  readonly fitted: Float64Array;
  readonly residuals: Float64Array;
  /** Hat-matrix diagonal. */
  readonly leverage: Float64Array;
  readonly cooksDistance: Float64Array;
  /** Weighted residual sum of squares. */
  readonly rss: number;
  /** Residual standard error sqrt(rss / (n - df)). */
  readonly sigma: number;
  readonly r2: number;
  readonly logLik: number;
  readonly aic: number;
  readonly aicc: number;
  readonly bic: number;
  /** Exact leave-one-out RMSE from the hat diagonal: sqrt(sum w (r/(1-h))^2 / sum w). */
  readonly looRmse: number;
  /** Generalised cross-validation score (rss/n) / (1 - df/n)^2. */
  readonly gcv: number;
  /** Smoothing parameter (smoothing spline only). */
  readonly lambda?: number;
  /** Plain-language notes (tied knots moved, ...). */
  readonly notes: readonly string[];
}

/** What to fit. */
export interface FitSpec {
  readonly family: Family;
  readonly df: number;
}
