/**
 * The shape-constrained smoothing spline's entry points (the method is described in
 * core/fit/shapedSmoothing/index.ts) and its size limit.
 */
import { opt } from '../../words/options';
import { FitError } from '../../errors';
import type { FitResult, Shape, XYData } from '../../types';
import { checkShapes } from '../shape';
import { fitSmoothingSpline, smoothingSplineAtLambda } from '../smoothingSpline/fit';
import { poolTies } from '../smoothingSpline/ties';
import { backSolve } from './bandSolves';
import { constrain } from './constrain';
import { penalisedSystem } from './penalisedSystem';

/** Largest number of distinct x accepted with shape constraints (dense constrained solve; see core/fit/shapedSmoothing/index.ts). */
export const MAX_SHAPED_SMOOTHING_DISTINCT = 1000;

/**
 * Refuses a shape-constrained smoothing spline on more than MAX_SHAPED_SMOOTHING_DISTINCT
 * distinct x, with the limit and the alternative in the message. Throws FitError.
 * Example: checkShapedSmoothingSize(5000) throws "... limited to 1000 distinct x values ...".
 */
export function checkShapedSmoothingSize(distinct: number): void {
  if (distinct > MAX_SHAPED_SMOOTHING_DISTINCT) {
    throw new FitError(
      `a shape-constrained smoothing spline is limited to ${MAX_SHAPED_SMOOTHING_DISTINCT} distinct x values (it has a knot at each, and its constrained solve is dense, with a cost growing as the cube of their number); the data has ${distinct}. ` +
        `Use the shape-constrained natural spline (${opt('curve')} natural-spline), which handles millions of rows`,
    );
  }
}

/**
 * Fits the cubic smoothing spline with df `df` (lambda from the unconstrained fit, see
 * `fitSmoothingSpline`) under the shape constraints `shapes`, by the method of
 * core/fit/shapedSmoothing/index.ts. Without shapes, or when no constraint binds, the result is the unconstrained
 * fit (plus the `model` report and a note). FitResult: df = the unconstrained trace,
 * lambda in x units, coefficients on `knots` (clamped, every distinct x a knot), leverage at
 * the active set, `model.constraints` = { total, active (independent), effectiveDf (trace at
 * the active set) }.
 *
 * Cost: O(n log n + m) for the unconstrained fit; with a binding constraint O(m) for the
 * factor, then the NNLS rounds of that method, O(m^3) when many rows bind
 * (m distinct x; about 8 s at m = 1000 in the worst case measured).
 * Throws InputError for bad data (naming the line), FitError for more than
 * MAX_SHAPED_SMOOTHING_DISTINCT distinct x, for a df the smoothing spline cannot reach, or
 * for constraints that cannot hold together.
 * @example
 *   const fit = fitShapedSmoothingSpline({ x, y }, 6, ['increasing']);
 *   fit.model?.constraints?.effectiveDf; // <= 6
 */
export function fitShapedSmoothingSpline(data: XYData, df: number, shapes: readonly Shape[]): FitResult {
  const list = checkShapes(shapes);
  const pooled = poolTies(data);
  if (list.length > 0) checkShapedSmoothingSize(pooled.m);
  return constrain(pooled, fitSmoothingSpline(data, df), list);
}

/**
 * As `fitShapedSmoothingSpline` at a fixed smoothing parameter `lambda` for x in units of
 * `unit` (default 1: x units, as reported by `lambdaForDf`; Infinity = the straight line;
 * see `smoothingSplineAtLambda`): the resampling engine refits each resample at the
 * `lambdaScaled` of all tuning rows, with unit = their x range, this way. Same checks, cost
 * and output; df is the unconstrained trace at this lambda.
 * @example shapedSmoothingSplineAtLambda({ x, y }, lambdaForDf({ x, y }, 5), ['convex']).curve.value(2)
 */
export function shapedSmoothingSplineAtLambda(data: XYData, lambda: number, shapes: readonly Shape[], unit = 1): FitResult {
  const list = checkShapes(shapes);
  const pooled = poolTies(data);
  if (list.length > 0) checkShapedSmoothingSize(pooled.m);
  return constrain(pooled, smoothingSplineAtLambda(data, lambda, unit), list);
}

/**
 * The unconstrained penalised minimiser theta0 = R^-1 Q'f of step 2 (B-spline coefficients on
 * the clamped knot vector with every distinct x a knot), the starting point of the
 * constrained solve. It is the same minimiser the state-space smoother of
 * core/fit/smoothingSpline/ computes by another route, which makes it a check of the
 * data and penalty rows. lambda in x units (finite). Cost O(n log n + m).
 * @example penalisedCoefficients({ x, y }, lambdaForDf({ x, y }, 5)) // ~ fitSmoothingSpline({ x, y }, 5).coefficients
 */
export function penalisedCoefficients(data: XYData, lambda: number): Float64Array {
  if (!(lambda > 0) || !Number.isFinite(lambda)) throw new FitError(`smoothing spline lambda must be a positive finite number; got ${lambda}`);
  const pooled = poolTies(data);
  const range = (pooled.u[pooled.m - 1] as number) - (pooled.u[0] as number);
  const sys = penalisedSystem(pooled, lambda / range / range / range);
  const theta = Float64Array.from(sys.d);
  backSolve(sys.r, sys.q, sys.w, theta);
  return theta;
}
