/**
 * Shared data shapes of the Knotwise core. Everything here is plain data or a small
 * interface over typed arrays, so the command line, the VS Code host and the webview can
 * all use it. Definitions follow docs/design.md (df = trace of the hat matrix, intercept included).
 */

/** Id of a registered curve kind (core/registry/curves/): 'natural-spline', 'polynomial', 'smoothing-spline', ... */
export type CurveKindId = string;

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
  readonly kind: CurveKindId;
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

/**
 * The per-row arrays and summary statistics every least-squares fit reports, a curve's
 * (FitResult) and a surface's (core/surface/fit.ts SurfaceFit) alike.
 */
export interface RegressionOutput {
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
}

/** Complete regression output of one curve fitted at one df. */
export interface FitResult extends RegressionOutput {
  readonly kind: CurveKindId;
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
  /**
   * Smoothing parameter in the units of x (smoothing spline only); Infinity for the straight
   * line (df 2), NaN when it is beyond double precision (it grows as the cube of the x
   * range: x of about 1e100 or 1e-100 and beyond), in which case `lambdaScaled` holds it.
   */
  readonly lambda?: number;
  /**
   * The same smoothing parameter for x mapped to [0, 1] over the data range
   * (lambda = lambdaScaled * (curve.upper - curve.lower)^3): finite at any scale of x, and
   * what resampling refits with (smoothing spline only; Infinity for the straight line).
   */
  readonly lambdaScaled?: number;
  /** Plain-language notes (tied knots moved, ...). */
  readonly notes: readonly string[];
  /** Present when an outcome family other than Gaussian, shape constraints or robust fitting was used. */
  readonly model?: ModelReport;
}

/** Distribution of the outcome: least squares, counts (log link) or proportions (logit link). */
export type Outcome = 'continuous' | 'counts' | 'proportions';

/** Shape constraints of a spline, guaranteed everywhere in the data range (see core/fit/shape.ts). */
export type Shape = 'increasing' | 'decreasing' | 'nonnegative' | 'convex' | 'concave';

/** How the curve is estimated besides its family and df; every field optional (absent = plain least squares). */
export interface ModelOptions {
  /** Outcome distribution; default 'continuous'. */
  readonly outcome?: Outcome | undefined;
  /** Shape constraints (natural spline and smoothing spline); empty or absent for none. */
  readonly shape?: readonly Shape[] | undefined;
  /** Huber M-estimation (Gaussian outcome only): true for the tuning constant 1.345, or { k }. */
  readonly robust?: boolean | { readonly k: number } | undefined;
}

/** What to fit. */
export interface FitSpec extends ModelOptions {
  readonly kind: CurveKindId;
  readonly df: number;
  /**
   * Binomial outcome only: number of trials of each row (y is then the number of
   * successes). Absent: y is a proportion in [0, 1] (0/1 outcomes, or proportions whose
   * trials are the prior weights).
   */
  readonly trials?: Float64Array | undefined;
}

/** What a fit with an outcome family, shape constraints or robust weights adds to FitResult. */
export interface ModelReport {
  readonly outcome: Outcome;
  /** 'identity', 'log' or 'logit'. */
  readonly link: 'identity' | 'log' | 'logit';
  readonly shape: readonly Shape[];
  /** Iterations of the reweighting (IRLS) loop; 1 for a single constrained least-squares solve. */
  readonly iterations: number;
  readonly converged: boolean;
  /** Poisson and binomial: deviance, null deviance, Pearson chi-square, per-row residuals, linear predictor. */
  readonly glm?: {
    readonly deviance: number;
    readonly nullDeviance: number;
    readonly pearsonChi2: number;
    /** Pearson chi-square / (n - df): about 1 when the variance follows the outcome family. */
    readonly dispersion: number;
    readonly pearsonResiduals: Float64Array;
    readonly devianceResiduals: Float64Array;
    readonly linearPredictor: Float64Array;
  };
  /** Shape constraints: how many linear inequalities, how many hold with equality. */
  readonly constraints?: {
    readonly total: number;
    readonly active: number;
    /** df minus the independent active constraints: the trace of the hat matrix at the active set. */
    readonly effectiveDf: number;
  };
  /** Huber M-estimation: tuning constant, robust scale and the rows given weight below 1. */
  readonly robust?: {
    readonly k: number;
    /** Robust scale: median |residual| / 0.6745 at convergence (as MASS::rlm's default). */
    readonly scale: number;
    /** Huber weight of each row, min(1, k s / |r|). */
    readonly weights: Float64Array;
    /** Rows with weight below 1, lowest weight first (at most ROBUST_LIST_LIMIT listed). */
    readonly downweighted: {
      readonly total: number;
      readonly rows: readonly { readonly index: number; readonly line: number; readonly weight: number }[];
    };
  };
}
