/**
 * The limit lambda -> infinity of the cubic smoothing spline: the weighted least-squares
 * straight line, written as a spline on the same knots.
 */
import { clampedKnots } from '../../basis/bspline';
import type { FitResult } from '../../types';
import { summariseFit } from '../summary';
import { makeCurve } from './curve';
import { perRow, tieNote, type Pooled } from './ties';

/**
 * Weighted least-squares line as a spline on the same knots: B-spline coefficients
 * a + b * (Greville abscissa), and A^-1 band (1 / W + (xi_i - xbar)(xi_l - xbar) / Sxx),
 * the limit of the smoothing spline's posterior covariance as lambda -> infinity (Wahba
 * 1983, JRSS B 45, 133-150). Cost O(n + m).
 * @example straightLineFit(poolTies({ x, y }), ['the line']).df // 2
 */
export function straightLineFit(pooled: Pooled, notes: string[]): FitResult {
  const { u, w: W, y, m } = pooled;
  let sw = 0;
  let swx = 0;
  let swy = 0;
  for (let j = 0; j < m; j++) {
    sw += W[j] as number;
    swx += (W[j] as number) * (u[j] as number);
    swy += (W[j] as number) * (y[j] as number);
  }
  const xbar = swx / sw;
  const ybar = swy / sw;
  let sxx = 0;
  let sxy = 0;
  for (let j = 0; j < m; j++) {
    const dx = (u[j] as number) - xbar;
    sxx += (W[j] as number) * dx * dx;
    sxy += (W[j] as number) * dx * ((y[j] as number) - ybar);
  }
  const slope = sxy / sxx;
  const knots = clampedKnots(u[0] as number, u[m - 1] as number, u.subarray(1, m - 1));
  const nb = m + 2;
  const coefficients = new Float64Array(nb);
  const band = new Float64Array(4 * nb);
  const greville = new Float64Array(nb);
  for (let i = 0; i < nb; i++) greville[i] = ((knots[i + 1] as number) + (knots[i + 2] as number) + (knots[i + 3] as number)) / 3 - xbar;
  for (let i = 0; i < nb; i++) {
    coefficients[i] = ybar + slope * (greville[i] as number);
    for (let d = 0; d < 4 && i + d < nb; d++) band[4 * i + d] = 1 / sw + ((greville[i] as number) * (greville[i + d] as number)) / sxx;
  }
  const curve = makeCurve(knots, coefficients, band, 2);
  const value = new Float64Array(m);
  const lev = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    const dx = (u[j] as number) - xbar;
    value[j] = ybar + slope * dx;
    lev[j] = (W[j] as number) * (1 / sw + (dx * dx) / sxx);
  }
  const fitted = new Float64Array(pooled.n);
  const leverage = new Float64Array(pooled.n);
  perRow(pooled, value, lev, fitted, leverage);
  return summariseFit(pooled.data, {
    kind: 'smoothing-spline',
    df: 2,
    curve,
    coefficients,
    knots,
    fitted,
    leverage,
    lambda: Infinity,
    notes: [...notes, ...tieNote(pooled)],
  });
}
