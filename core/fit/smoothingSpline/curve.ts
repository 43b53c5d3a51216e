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
 * Curve from B-spline coefficients and the band of A^-1: value offset + b(x)'c (c the
 * coefficients of y - offset; `coefficients` of the curve are c + offset, as the B-splines
 * sum to 1) and variance factor
 * b(x)' A^-1 b(x) inside [lower, upper]; beyond, b(x) = b(edge) + (x - edge) b'(edge), so
 * the value continues linearly with the boundary slope and the variance factor is that of
 * the linear continuation. Evaluation by de Boor's recursion (de Boor 2001, "A Practical
 * Guide to Splines", rev. ed.; core/basis/bspline.ts). Cost O(log m) per point (the knot
 * span lookup) after an O(1) set-up.
 * @example makeCurve(knots, coefficients, band, 5).value(2.5)
 */
export function makeCurve(knots: Float64Array, centred: Float64Array, band: Float64Array, df: number, offset = 0): SplineCurve {
  const coefficients = offset === 0 ? centred : centred.map((c) => c + offset);
  const ev = new BSplineEvaluator(knots);
  const lower = knots[0] as number;
  const upper = knots[knots.length - 1] as number;
  // Boundary values and slopes on the knots mapped to [0, 1]: slopes in x units scale as
  // 1 / spacing and overflow for x spacings near 1e-300; in units of u they stay moderate.
  const range = upper - lower;
  const unit = new BSplineEvaluator(knots.map((t) => (t - lower) / range));
  const edge = (u: number): { first: number; b: Float64Array; d: Float64Array } => {
    const first = unit.eval(u, 1);
    return { first, b: Float64Array.from(unit.value), d: Float64Array.from(unit.d1) };
  };
  const lo = edge(0);
  const hi = edge(1);
  const basis = new Float64Array(4);
  /** Fills `basis` with b(x) (linearly continued outside) and returns the first index. */
  const load = (x: number): number => {
    if (x < lower || x > upper) {
      const e = x < lower ? lo : hi;
      const du = (x - (x < lower ? lower : upper)) / range;
      for (let a = 0; a < 4; a++) basis[a] = (e.b[a] as number) + du * (e.d[a] as number);
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
      for (let a = 0; a < 4; a++) s += (basis[a] as number) * (centred[first + a] as number);
      return offset + s;
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
