/**
 * The smoothing spline's data and penalty rows at a finite lambda, as a banded least-squares
 * system on the B-spline coefficients.
 */
import { BSplineEvaluator } from '../../basis/bspline';
import type { Pooled } from '../smoothingSpline/ties';
import { BandAccumulator } from './bandAccumulator';
import { BAND, scaledKnots, type BandSystem } from './bandSystem';
import { maxAbs } from './vectors';

/**
 * Data and penalty rows of the smoothing spline at finite lambdaT, the smoothing parameter
 * for x mapped to [0, 1] over its range (a fit's `lambdaScaled`; lambda in x units is
 * lambdaT range^3 and may be beyond double precision), q = m + 2 coefficients, bandwidth 4,
 * accumulated into the band factor (Lawson & Hanson 1974, chapter 27; the penalty rows as
 * in core/fit/shapedSmoothing/index.ts, step 2). Throws FitError when the penalised
 * problem is singular to working precision. Cost O(m).
 * @example penalisedSystem(poolTies(data), fitSmoothingSpline(data, 5).lambdaScaled as number).r // the band of R
 */
export function penalisedSystem(pooled: Pooled, lambdaT: number): BandSystem {
  const { m, w: W, y } = pooled;
  const { t, knots } = scaledKnots(pooled);
  const ev = new BSplineEvaluator(knots);
  const q = m + 2;
  const acc = new BandAccumulator(q, BAND);
  const x = new Float64Array(BAND);
  const g0 = new Float64Array(BAND);
  for (let j = 0; j < m; j++) {
    const tj = t[j] as number;
    const sw = Math.sqrt(W[j] as number);
    const first = ev.eval(tj, 0);
    for (let a = 0; a < BAND; a++) x[a] = sw * (ev.value[a] as number);
    acc.add(first, x, sw * (y[j] as number));
    if (j === m - 1) break;
    // f'' on [t_j, t_j+1] is linear in the 4 coefficients of this span: its end values from
    // the value at t_j and at the midpoint (the right end belongs to the next span).
    const h = (t[j + 1] as number) - tj;
    const span = ev.eval(tj, 2);
    g0.set(ev.d2);
    if (ev.eval(tj + 0.5 * h, 2) !== span) throw new Error('shapedSmoothing: knot span lookup disagrees');
    const s1 = Math.sqrt((lambdaT * h) / 4);
    const s2 = Math.sqrt((lambdaT * h) / 12);
    for (let a = 0; a < BAND; a++) x[a] = s1 * 2 * (ev.d2[a] as number); // g0 + g1 = 2 f''(mid)
    acc.add(span, x, 0);
    for (let a = 0; a < BAND; a++) x[a] = s2 * 2 * ((g0[a] as number) - (ev.d2[a] as number)); // g0 - g1 = 2 (g0 - f''(mid))
    acc.add(span, x, 0);
  }
  acc.check();
  return {
    q,
    w: BAND,
    r: acc.r,
    d: acc.d,
    constraints: (rows) => Array.from({ length: rows.rows }, (_, i) => rows.a.subarray(i * q, (i + 1) * q)),
    toSpline: (beta, band) => ({ theta: beta, band }),
    scale: maxAbs,
  };
}
