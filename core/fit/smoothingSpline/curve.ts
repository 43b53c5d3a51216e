/**
 * The curve of a cubic smoothing spline: value and variance factor from its B-spline
 * coefficients and the band of A^-1, continued linearly beyond the data range.
 */
import { BSplineEvaluator } from '../../basis/bspline';
import type { Curve } from '../../types';

/** A smoothing-spline curve with its B-spline coefficients. */
export interface SplineCurve extends Curve {
  readonly coefficients: Float64Array;
}

/**
 * Curve from B-spline coefficients and the band of A^-1: value b(x)'c and variance factor
 * b(x)' A^-1 b(x) inside [lower, upper]; beyond, b(x) = b(edge) + (x - edge) b'(edge), so
 * the value continues linearly with the boundary slope and the variance factor is that of
 * the linear continuation. Evaluation by de Boor's recursion (de Boor 2001, "A Practical
 * Guide to Splines", rev. ed.; core/basis/bspline.ts). Cost O(log m) per point (the knot
 * span lookup) after an O(1) set-up.
 * @example makeCurve(knots, coefficients, band, 5).value(2.5)
 */
export function makeCurve(knots: Float64Array, coefficients: Float64Array, band: Float64Array, df: number): SplineCurve {
  const ev = new BSplineEvaluator(knots);
  const lower = knots[0] as number;
  const upper = knots[knots.length - 1] as number;
  const edge = (x: number): { first: number; b: Float64Array; d: Float64Array } => {
    const first = ev.eval(x, 1);
    return { first, b: Float64Array.from(ev.value), d: Float64Array.from(ev.d1) };
  };
  const lo = edge(lower);
  const hi = edge(upper);
  const basis = new Float64Array(4);
  /** Fills `basis` with b(x) (linearly continued outside) and returns the first index. */
  const load = (x: number): number => {
    if (x < lower || x > upper) {
      const e = x < lower ? lo : hi;
      const dx = x - (x < lower ? lower : upper);
      for (let a = 0; a < 4; a++) basis[a] = (e.b[a] as number) + dx * (e.d[a] as number);
      return e.first;
    }
    const first = ev.eval(x, 0);
    basis.set(ev.value);
    return first;
  };
  return {
    kind: 'smoothing-spline',
    df,
    lower,
    upper,
    coefficients,
    value(x: number): number {
      const first = load(x);
      let s = 0;
      for (let a = 0; a < 4; a++) s += (basis[a] as number) * (coefficients[first + a] as number);
      return s;
    },
    varianceFactor(x: number): number {
      const first = load(x);
      let s = 0;
      for (let a = 0; a < 4; a++) {
        const ba = basis[a] as number;
        s += ba * ba * (band[4 * (first + a)] as number);
        for (let b = a + 1; b < 4; b++) s += 2 * ba * (basis[b] as number) * (band[4 * (first + a) + (b - a)] as number);
      }
      return s;
    },
  };
}
