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
 * 1983, JRSS B 45, 133-150). x is mapped to [0, 1] over its range first (v = (x - min) /
 * range), which leaves all of these unchanged and keeps the sums of squares of x finite and
 * normal at any scale of x. Cost O(n + m).
 * @example straightLineFit(poolTies({ x, y }), ['the line']).df // 2
 */
export function straightLineFit(pooled: Pooled, notes: string[]): FitResult {
  // y enters as the pooled means of y - offset (ties.ts), and the offset is added back.
  const { u, w: W, yc: y, m, offset } = pooled;
  // x enters as v = (x - min) / range in [0, 1], so its squares neither overflow nor vanish
  // at any scale of x; the slope, the band and the leverage are taken in units of v.
  const lo = u[0] as number;
  const range = (u[m - 1] as number) - lo;
  let sw = 0;
  let swx = 0;
  let swy = 0;
  for (let j = 0; j < m; j++) {
    sw += W[j] as number;
    swx += (W[j] as number) * (((u[j] as number) - lo) / range);
    swy += (W[j] as number) * (y[j] as number);
  }
  const xbar = swx / sw;
  const ybar = swy / sw;
  let sxx = 0;
  let sxy = 0;
  for (let j = 0; j < m; j++) {
    const dx = ((u[j] as number) - lo) / range - xbar;
    sxx += (W[j] as number) * dx * dx;
    sxy += (W[j] as number) * dx * ((y[j] as number) - ybar);
  }
  const slope = sxy / sxx;
  const knots = clampedKnots(lo, u[m - 1] as number, u.subarray(1, m - 1));
  const nb = m + 2;
  const coefficients = new Float64Array(nb);
  const band = new Float64Array(4 * nb);
  const greville = new Float64Array(nb);
  for (let i = 0; i < nb; i++) greville[i] = ((knots[i + 1] as number) - lo + ((knots[i + 2] as number) - lo) + ((knots[i + 3] as number) - lo)) / 3 / range - xbar;
  for (let i = 0; i < nb; i++) {
    coefficients[i] = ybar + slope * (greville[i] as number);
    for (let d = 0; d < 4 && i + d < nb; d++) band[4 * i + d] = 1 / sw + ((greville[i] as number) * (greville[i + d] as number)) / sxx;
  }
  // The curve adds the offset to b(x)' c itself: summing coefficients near a large offset would lose its digits beyond the data.
  const curve = makeCurve(knots, coefficients, band, 2, offset);
  const value = new Float64Array(m);
  const lev = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    const dx = ((u[j] as number) - lo) / range - xbar;
    value[j] = ybar + slope * dx;
    lev[j] = (W[j] as number) * (1 / sw + (dx * dx) / sxx);
  }
  const fitted = new Float64Array(pooled.n);
  const leverage = new Float64Array(pooled.n);
  const residuals = new Float64Array(pooled.n);
  const yRows = pooled.data.y;
  for (let i = 0; i < pooled.n; i++) residuals[i] = (yRows[i] as number) - offset - (value[pooled.group[i] as number] as number);
  for (let j = 0; j < m; j++) value[j] = offset + (value[j] as number);
  perRow(pooled, value, lev, fitted, leverage);
  return summariseFit(pooled.data, {
    kind: 'smoothing-spline',
    df: 2,
    curve,
    coefficients: curve.coefficients,
    knots,
    fitted,
    residuals,
    leverage,
    lambda: Infinity,
    lambdaScaled: Infinity,
    notes: [...notes, ...tieNote(pooled)],
  });
}
