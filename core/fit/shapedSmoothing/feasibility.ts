/**
 * When a shape constraint counts as satisfied: the rounding allowance and the check of
 * every row (step 1 of core/fit/shapedSmoothing/index.ts).
 */
import type { ShapeRows } from '../shape';

/**
 * A constraint row (unit norm) counts as satisfied when its value is at least
 * -FEASIBILITY_TOLERANCE times the largest coefficient: smaller deficits are rounding. This
 * matters from the start: the unconstrained smoothing spline is natural, so its convexity
 * rows at the two boundary knots are zero up to rounding.
 */
export const FEASIBILITY_TOLERANCE = 1e-12;

/**
 * True when every row of A theta is at least -tol (A the shape rows, r x p, row-major).
 * Cost O(r p).
 * @example satisfies(shapeRows(fit.knots, ['increasing'], false), fit.coefficients, 1e-12)
 */
export function satisfies(rows: ShapeRows, theta: Float64Array, tol: number): boolean {
  const p = theta.length;
  for (let i = 0; i < rows.rows; i++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += (rows.a[i * p + j] as number) * (theta[j] as number);
    if (!(s >= -tol)) return false;
  }
  return true;
}
