/**
 * The penalised problem of the shape-constrained smoothing spline as a banded least-squares
 * system (step 2 of core/fit/shapedSmoothing/index.ts): its form, its bandwidth and the
 * scaled knots its rows are built on.
 */
import { clampedKnots } from '../../basis/bspline';
import type { ShapeRows } from '../shape';
import { ScaledKnots } from '../smoothingSpline/scaledKnots';
import type { Pooled } from '../smoothingSpline/ties';

/** Half-bandwidth + 1 of the penalised factor: every row has 4 consecutive nonzero B-spline entries. */
export const BAND = 4;

/**
 * The penalised problem as min ||R beta - d||^2 (+ constant) in q coefficients beta, R upper
 * triangular with bandwidth `w` (r[k * w + a] = R(k, k + a)); `constraints` maps the shape
 * rows to beta, `toSpline` maps beta and the band of its covariance to the spline's
 * coefficients theta and the band (half-bandwidth 3, core/linalg/banded.ts layout) of theirs.
 */
export interface BandSystem {
  readonly q: number;
  readonly w: number;
  readonly r: Float64Array;
  readonly d: Float64Array;
  /** Shape rows (r x (m + 2)) as rows on beta (rows x q); null where a row vanishes identically. */
  constraints(rows: ShapeRows): (Float64Array | null)[];
  toSpline(beta: Float64Array, band: Float64Array): { theta: Float64Array; band: Float64Array };
  /** Largest |theta_j| for these beta: the scale of the feasibility tolerance. */
  scale(beta: Float64Array): number;
}

/**
 * x scaled to [0, 1] as the state-space smoother does (the rows of E do not depend on the
 * scaling, their sizes do), and the clamped knot vector on them. Throws FitError for x too
 * close together to stay distinct. Cost O(m).
 * @example scaledKnots(poolTies({ x: [10, 20, 40, 50], y })).t // [0, 0.25, 0.75, 1]
 */
export function scaledKnots(pooled: Pooled): { t: Float64Array; knots: Float64Array } {
  const { t } = new ScaledKnots(pooled.u);
  return { t, knots: clampedKnots(0, 1, t.subarray(1, pooled.m - 1)) };
}
