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
  const lambda = lambdaInXUnits(lambdaT, scaled);
  return splineFit(
    pooled,
    smoother,
    lambdaT,
    lambda,
    (trace) =>
      `Cubic smoothing spline with a knot at each of the ${pooled.m} distinct x values; ${lambdaWords(lambda, lambdaT, scaled.range)} gives hat-matrix trace ${trace.toFixed(9)} for the asked df ${df}.`,
  );
}

/**
 * Fits the cubic smoothing spline at a fixed smoothing parameter `lambda`, given for x
 * measured in units of `unit`: the penalty is lambda * integral f''(v)^2 dv with v = x / unit,
 * so with the default unit 1 lambda is in the units of x, as reported by
 * `fitSmoothingSpline` and `lambdaForDf`. The resampling engine passes the `lambdaScaled`
 * of the fit to all tuning rows with unit = their x range, which stays finite at any scale
 * of x where lambda in x units (proportional to range^3) may overflow or vanish. df of the
 * result is the achieved trace. lambda = Infinity gives the weighted least-squares line.
 * Same method, checks and output as `fitSmoothingSpline`; cost O(n log n) + one O(m) pass.
 * @example
 *   const lam = lambdaForDf({ x, y }, 6);
 *   const refit = smoothingSplineAtLambda({ x: x2, y: y2 }, lam);
 *   const same = smoothingSplineAtLambda({ x: x2, y: y2 }, fitSmoothingSpline({ x, y }, 6).lambdaScaled as number, xRange);
 */
export function smoothingSplineAtLambda(data: XYData, lambda: number, unit = 1): FitResult {
  if (!(lambda > 0)) throw new FitError(`smoothing spline lambda must be a positive number; got ${lambda}`);
  if (!(unit > 0) || !Number.isFinite(unit)) throw new FitError(`smoothing spline lambda unit must be a positive finite number; got ${unit}`);
  const pooled = poolTies(data);
  if (lambda === Infinity) return straightLineFit(pooled, [LINE_NOTE_LAMBDA]);
  const scaled = new ScaledKnots(pooled.u);
  let lambdaT: number;
  if (unit === 1) {
    lambdaT = lambda / scaled.range / scaled.range / scaled.range;
  } else {
    const ratio = unit / scaled.range;
    lambdaT = lambda * ratio * ratio * ratio;
  }
  checkLambdaT(lambdaT, lambda);
  const smoother = new SplineSmoother(scaled.t, pooled.w);
  const lambdaX = unit === 1 ? lambda : lambdaInXUnits(lambdaT, scaled);
  return splineFit(
    pooled,
    smoother,
    lambdaT,
    lambdaX,
    (trace) => `Cubic smoothing spline with a knot at each of the ${pooled.m} distinct x values at the fixed ${lambdaWords(lambdaX, lambdaT, scaled.range)}: hat-matrix trace ${trace.toFixed(9)}.`,
  );
}

/**
 * lambda in the units of x from lambdaT, the lambda for x mapped to [0, 1] over the range R
 * of the distinct x: lambdaT R^3 (the penalty integral of f''^2 scales as 1 / R^3). NaN when
 * that is not a finite normal double (R above about 1e100 or below about 1e-100 at usual
 * lambdaT); the fit then reports lambdaScaled and says so in its note. Cost O(1).
 * Example: lambdaInXUnits(1e-4, new ScaledKnots(Float64Array.of(0, 5, 10))) === 0.1.
 */
export function lambdaInXUnits(lambdaT: number, scaled: ScaledKnots): number {
  // range^3 first, as before, when it is itself a normal double; else lambdaT first, which keeps a representable product representable.
  const v = scaled.cube >= MIN_NORMAL && Number.isFinite(scaled.cube) ? lambdaT * scaled.cube : lambdaT * scaled.range * scaled.range * scaled.range;
  return v >= MIN_NORMAL && Number.isFinite(v) ? v : NaN;
}

/** Smallest positive normal double. */
const MIN_NORMAL = 2.2250738585072014e-308;

/** The note's words for lambda: in x units where representable, else for x scaled to [0, 1] over the range. */
function lambdaWords(lambda: number, lambdaT: number, range: number): string {
  if (Number.isFinite(lambda)) return `lambda = ${formatLambda(lambda)} (in units of x)`;
  return `lambda = ${formatLambda(lambdaT)} for x scaled to [0, 1] over its range ${range.toPrecision(6)} (in units of x it would be ${formatLambda(lambdaT)} x ${range.toPrecision(6)}^3, beyond the range of double precision, so the record leaves it empty)`;
}

/**
 * The smoothing parameter (in the units of x) at which the cubic smoothing spline on `data`
 * has hat-matrix trace `df`: Infinity for df = 2, else the root found as in
 * `fitSmoothingSpline` (same checks, same cost without building the result); NaN when it is
 * beyond double precision in x units (see `lambdaInXUnits`; the fit's lambdaScaled is not).
 * @example lambdaForDf({ x, y }, 4) // -> e.g. 12.7; fitSmoothingSpline({ x, y }, 4).lambda is the same
 */
export function lambdaForDf(data: XYData, df: number): number {
  const pooled = poolTies(data);
  checkDf(df, pooled.m);
  if (df === 2) return Infinity;
  const scaled = new ScaledKnots(pooled.u);
  return lambdaInXUnits(searchLambda(new SplineSmoother(scaled.t, pooled.w), df), scaled);
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

/**
 * The fit at lambdaT (x in [0, 1]) from a full smoother run, with its note; throws FitError
 * when lambda is too small to compute. The run sees the pooled means of y - offset (offset
 * the weighted mean of y; core/fit/smoothingSpline/ties.ts) and the offset is added back (the
 * B-splines sum to 1), so a small signal on a large offset keeps its digits. O(m + n).
 */
function splineFit(pooled: Pooled, smoother: SplineSmoother, lambdaT: number, lambda: number, note: (trace: number) => string): FitResult {
  const { m, offset } = pooled;
  smoother.run(lambdaT, pooled.yc);
  if (!smoother.reliable) {
    throw new FitError(
      `smoothing spline lambda ${Number.isFinite(lambda) ? lambda : `${lambdaT} (x scaled to [0, 1])`} is too small to be computed accurately for these ${m} distinct x values (the fit would all but interpolate them)`,
    );
  }
  const knots = clampedKnots(pooled.u[0] as number, pooled.u[m - 1] as number, pooled.u.subarray(1, m - 1));
  const curve = makeCurve(knots, smoother.coefficients, smoother.covarianceBand, smoother.trace, offset);
  const value = new Float64Array(m);
  for (let j = 0; j < m; j++) value[j] = offset + (smoother.value[j] as number);
  const fitted = new Float64Array(pooled.n);
  const leverage = new Float64Array(pooled.n);
  perRow(pooled, value, smoother.leverage, fitted, leverage);
  // (y - offset) - value_c: residuals without the rounding of fitted to the offset's precision.
  const residuals = new Float64Array(pooled.n);
  const y = pooled.data.y;
  for (let i = 0; i < pooled.n; i++) residuals[i] = (y[i] as number) - offset - (smoother.value[pooled.group[i] as number] as number);
  return summariseFit(pooled.data, {
    kind: 'smoothing-spline',
    df: smoother.trace,
    curve,
    coefficients: curve.coefficients,
    knots,
    fitted,
    residuals,
    leverage,
    lambda,
    lambdaScaled: lambdaT,
    notes: [note(smoother.trace), ...tieNote(pooled)],
  });
}

function formatLambda(lambda: number): string {
  return lambda.toPrecision(6);
}
