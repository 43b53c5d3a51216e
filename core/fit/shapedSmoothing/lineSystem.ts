/**
 * The limit lambda -> infinity of the shape-constrained smoothing spline: the straight line,
 * as a banded least-squares system on its two coefficients.
 */
import type { Pooled } from '../smoothingSpline/ties';
import { BandAccumulator } from './bandAccumulator';
import { scaledKnots, type BandSystem } from './bandSystem';

/** Constraint rows whose restriction to straight lines is below this norm (of 1) vanish on lines and cannot bind at df = 2. */
const LINE_ROW_TOLERANCE = 1e-12;

/**
 * The straight line (lambda = infinity): theta_j = beta_0 + beta_1 (xi_j - 1/2), xi the
 * Greville abscissae on [0, 1] (de Boor 2001, "A Practical Guide to Splines", rev. ed.: a
 * spline with these coefficients is the line), as a 2-coefficient least-squares system.
 * Cost O(m).
 * @example lineSystem(poolTies(data)).q // 2
 */
export function lineSystem(pooled: Pooled): BandSystem {
  const { m, w: W, y } = pooled;
  const { t, knots } = scaledKnots(pooled);
  const p = m + 2;
  const xi = new Float64Array(p);
  for (let i = 0; i < p; i++) xi[i] = ((knots[i + 1] as number) + (knots[i + 2] as number) + (knots[i + 3] as number)) / 3 - 0.5;
  const acc = new BandAccumulator(2, 2);
  const x = new Float64Array(2);
  for (let j = 0; j < m; j++) {
    const sw = Math.sqrt(W[j] as number);
    x[0] = sw;
    x[1] = sw * ((t[j] as number) - 0.5);
    acc.add(0, x, sw * (y[j] as number));
  }
  acc.check();
  return {
    q: 2,
    w: 2,
    r: acc.r,
    d: acc.d,
    constraints: (rows) =>
      Array.from({ length: rows.rows }, (_, i) => {
        let s0 = 0;
        let s1 = 0;
        for (let j = 0; j < p; j++) {
          const a = rows.a[i * p + j] as number;
          s0 += a;
          s1 += a * (xi[j] as number);
        }
        return Math.hypot(s0, s1) > LINE_ROW_TOLERANCE ? Float64Array.of(s0, s1) : null;
      }),
    toSpline: (beta, band2) => {
      const theta = new Float64Array(p);
      for (let i = 0; i < p; i++) theta[i] = (beta[0] as number) + (beta[1] as number) * (xi[i] as number);
      const v00 = band2[0] as number;
      const v01 = band2[1] as number;
      const v11 = band2[2] as number;
      const band = new Float64Array(4 * p);
      for (let i = 0; i < p; i++)
        for (let d = 0; d < 4 && i + d < p; d++) {
          const a = xi[i] as number;
          const b = xi[i + d] as number;
          band[4 * i + d] = v00 + v01 * (a + b) + v11 * a * b;
        }
      return { theta, band };
    },
    // A line's coefficients are largest in size at one of the two ends.
    scale: (beta) => Math.max(Math.abs((beta[0] as number) + (beta[1] as number) * (xi[0] as number)), Math.abs((beta[0] as number) + (beta[1] as number) * (xi[p - 1] as number))),
  };
}
