/**
 * The cubic smoothing spline's entry points: the fit for a df, the fit at a fixed lambda,
 * and the lambda for a df (the method is described in core/fit/smoothingSpline/index.ts).
 */
import { clampedKnots } from '../../basis/bspline';
import { FitError } from '../../errors';
import type { FitResult, XYData } from '../../types';
import { summariseFit } from '../summary';
import { makeCurve } from './curve';
import { searchLambda } from './lambdaSearch';
import { ScaledKnots } from './scaledKnots';
import { SplineSmoother } from './smoother';
import { straightLineFit } from './straightLine';
import { perRow, poolTies, tieNote, type Pooled } from './ties';

/**
 * Fits the cubic smoothing spline whose hat matrix has trace `df` (intercept included).
 *
 * df = 2 is the limit lambda -> infinity, the weighted least-squares straight line, which
 * is returned (with a note) rather than refused. Otherwise 2 < df < m (m distinct x).
 * lambda is found by a safeguarded root search (Brent 1973, "Algorithms for Minimization
 * without Derivatives", chapter 4) on log lambda of
 * log((trace - 2) / (m - trace)) = log((df - 2) / (m - df)), the trace falling monotonically
 * from m (interpolation) to 2 (the line); typically 5-8 trace evaluations, at most
 * MAX_LAMBDA_ITERATIONS.
 *
 * Output (FitResult via summariseFit): df = achieved trace; coefficients = the m + 2
 * B-spline coefficients on `knots` (clamped, every distinct x a knot); leverage of row i in
 * tied group j = w_i / W_j * S_jj; lambda in the units of x; the curve is linear beyond the
 * data range (value and slope at the boundary) and its varianceFactor is b(x)' A^-1 b(x)
 * (the Bayesian posterior covariance of Wahba 1983, "Bayesian confidence intervals for the
 * cross-validated smoothing spline", JRSS B 45, 133-150), evaluated from the stored band
 * of A^-1, also beyond the boundary with b(x) extended linearly.
 *
 * Cost: O(n log n) to check and sort the data, then O(m) per trace evaluation; about 2 s
 * in all for 10^6 rows with distinct x on a 2-core laptop-class machine. Memory about
 * 250 bytes per distinct x besides the per-row results.
 *
 * Throws InputError for non-finite values or non-positive weights (naming the line), and
 * FitError for fewer than 4 distinct x, a df outside [2, m), or a df so close to m that the
 * lambda it needs is below what double precision supports (MAX_VARIANCE_RATIO).
 * @example
 *   const fit = fitSmoothingSpline({ x, y }, 5); // fit.df ~ 5 (within 1e-9), fit.lambda > 0
 */
export function fitSmoothingSpline(data: XYData, df: number): FitResult {
  const pooled = poolTies(data);
  checkDf(df, pooled.m);
  if (df === 2) return straightLineFit(pooled, [LINE_NOTE]);
  const scaled = new ScaledKnots(pooled.u);
  const smoother = new SplineSmoother(scaled.t, pooled.w);
  const lambdaT = searchLambda(smoother, df);
  const lambda = lambdaT * scaled.cube;
  return splineFit(
    pooled,
    smoother,
    lambdaT,
    lambda,
    (trace) =>
      `Cubic smoothing spline with a knot at each of the ${pooled.m} distinct x values; lambda = ${formatLambda(lambda)} (in units of x) gives hat-matrix trace ${trace.toFixed(9)} for the asked df ${df}.`,
  );
}

/**
 * Fits the cubic smoothing spline at a fixed smoothing parameter `lambda` (in the units of
 * x, as reported by `fitSmoothingSpline` and `lambdaForDf`); df of the result is the
 * achieved trace. Used by resampling, where the lambda found on all rows is reused on each
 * resample. lambda = Infinity gives the weighted least-squares line. Same method, checks
 * and output as `fitSmoothingSpline`; cost O(n log n) + one O(m) pass.
 * @example
 *   const lam = lambdaForDf({ x, y }, 6);
 *   const refit = smoothingSplineAtLambda({ x: x2, y: y2 }, lam);
 */
export function smoothingSplineAtLambda(data: XYData, lambda: number): FitResult {
  if (!(lambda > 0)) throw new FitError(`smoothing spline lambda must be a positive number; got ${lambda}`);
  const pooled = poolTies(data);
  if (lambda === Infinity) return straightLineFit(pooled, [LINE_NOTE_LAMBDA]);
  const scaled = new ScaledKnots(pooled.u);
  const lambdaT = lambda / scaled.range / scaled.range / scaled.range;
  checkLambdaT(lambdaT, lambda);
  const smoother = new SplineSmoother(scaled.t, pooled.w);
  return splineFit(
    pooled,
    smoother,
    lambdaT,
    lambda,
    (trace) => `Cubic smoothing spline with a knot at each of the ${pooled.m} distinct x values at the fixed lambda = ${formatLambda(lambda)} (in units of x): hat-matrix trace ${trace.toFixed(9)}.`,
  );
}

/**
 * The smoothing parameter (in the units of x) at which the cubic smoothing spline on `data`
 * has hat-matrix trace `df`: Infinity for df = 2, else the root found as in
 * `fitSmoothingSpline` (same checks, same cost without building the result).
 * @example lambdaForDf({ x, y }, 4) // -> e.g. 12.7; fitSmoothingSpline({ x, y }, 4).lambda is the same
 */
export function lambdaForDf(data: XYData, df: number): number {
  const pooled = poolTies(data);
  checkDf(df, pooled.m);
  if (df === 2) return Infinity;
  const scaled = new ScaledKnots(pooled.u);
  return searchLambda(new SplineSmoother(scaled.t, pooled.w), df) * scaled.cube;
}

const LINE_NOTE = 'df = 2 is the limit lambda -> infinity of the smoothing spline: the weighted least-squares straight line is returned.';
const LINE_NOTE_LAMBDA = 'lambda = infinity is the limit of the smoothing spline: the weighted least-squares straight line is returned.';

function checkDf(df: number, m: number): void {
  if (!Number.isFinite(df)) throw new FitError(`smoothing spline df must be a finite number; got ${df}`);
  if (df < 2) throw new FitError(`smoothing spline df must be at least 2 (df 2 is the straight line); got ${df}`);
  if (df >= m) throw new FitError(`smoothing spline with df ${df} needs more than ${df} distinct x values; the data has ${m}`);
}

function checkLambdaT(lambdaT: number, lambda: number): void {
  if (!(lambdaT > 0) || !Number.isFinite(lambdaT)) {
    throw new FitError(`smoothing spline lambda ${lambda} is out of the range this data can use (after scaling x to [0, 1] it becomes ${lambdaT})`);
  }
}

/** The fit at lambdaT (x in [0, 1]) from a full smoother run, with its note; throws FitError when lambda is too small to compute. O(m + n). */
function splineFit(pooled: Pooled, smoother: SplineSmoother, lambdaT: number, lambda: number, note: (trace: number) => string): FitResult {
  smoother.run(lambdaT, pooled.y);
  if (!smoother.reliable) {
    throw new FitError(`smoothing spline lambda ${lambda} is too small to be computed accurately for these ${pooled.m} distinct x values (the fit would all but interpolate them)`);
  }
  const knots = clampedKnots(pooled.u[0] as number, pooled.u[pooled.m - 1] as number, pooled.u.subarray(1, pooled.m - 1));
  const curve = makeCurve(knots, smoother.coefficients, smoother.covarianceBand, smoother.trace);
  const fitted = new Float64Array(pooled.n);
  const leverage = new Float64Array(pooled.n);
  perRow(pooled, smoother.value, smoother.leverage, fitted, leverage);
  return summariseFit(pooled.data, {
    kind: 'smoothing-spline',
    df: smoother.trace,
    curve,
    coefficients: curve.coefficients,
    knots,
    fitted,
    leverage,
    lambda,
    notes: [note(smoother.trace), ...tieNote(pooled)],
  });
}

function formatLambda(lambda: number): string {
  return lambda.toPrecision(6);
}
