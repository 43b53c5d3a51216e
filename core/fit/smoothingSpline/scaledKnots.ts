/**
 * The distinct x of the smoothing spline mapped to [0, 1], where the state-space smoother
 * works, with the scale that converts lambda back to the units of x.
 */
import { FitError } from '../../errors';

/**
 * Distinct x mapped to t in [0, 1], with the scale to convert lambda back to x units (the
 * penalty integral of f''^2 scales as 1 / range^3). Throws FitError when two distinct x are
 * too close together to stay distinct after scaling. Cost O(m).
 * @example new ScaledKnots(Float64Array.of(10, 20, 40)) // t = [0, 1/3, 1], range 30, cube 27000
 */
export class ScaledKnots {
  readonly t: Float64Array;
  readonly range: number;
  /** range^3: lambda in x units = lambda for t times range^3. */
  readonly cube: number;
  constructor(readonly u: Float64Array) {
    const m = u.length;
    const lo = u[0] as number;
    this.range = (u[m - 1] as number) - lo;
    this.cube = this.range * this.range * this.range;
    this.t = new Float64Array(m);
    for (let j = 0; j < m; j++) this.t[j] = ((u[j] as number) - lo) / this.range;
    this.t[m - 1] = 1;
    for (let j = 1; j < m; j++) {
      if (!((this.t[j] as number) > (this.t[j - 1] as number))) {
        throw new FitError(`smoothing spline: the distinct x values ${u[j - 1]} and ${u[j]} are too close together, relative to the x range ${this.range}, to be separate knots`);
      }
    }
  }
}
