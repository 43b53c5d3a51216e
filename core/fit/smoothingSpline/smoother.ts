/**
 * The cubic smoothing spline's state-space smoother: one filter and smoother pass per
 * smoothing parameter on the storage of SmootherState.
 */
import { smoothBackward } from './fixedIntervalSmoother';
import { filterForward } from './kalmanFilter';
import { SmootherState } from './smootherState';

/**
 * Kalman filter and fixed-interval smoother for the cubic smoothing spline (the model and
 * storage of SmootherState; Wecker & Ansley 1983, JASA 78, 81-89; de Jong 1989, 1991).
 * @example
 *   const smoother = new SplineSmoother(scaled.t, pooled.w);
 *   smoother.run(1e-4, null); // trace of the hat matrix at lambda 1e-4 (x in [0, 1])
 */
export class SplineSmoother extends SmootherState {
  /**
   * One filter and smoother pass at smoothing parameter lambdaT (for x scaled to [0, 1]).
   * Always computes the hat diagonal and its trace; with `y` (pooled means) also the fit,
   * its B-spline coefficients and the band of A^-1. O(m).
   */
  run(lambdaT: number, y: Float64Array | null): number {
    return smoothBackward(this, y, filterForward(this, lambdaT, y));
  }
}
