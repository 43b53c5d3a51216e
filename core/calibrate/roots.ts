/**
 * Every real root in [-1, 1] of a polynomial held as a Chebyshev series: closed form for
 * degree 1 and 2, recursive isolation for higher degree.
 */
import { chebDerivative, chebValue } from './chebyshev';

/** Cap on bisection halvings: from width 2 down to 2^-99, far below any double spacing that matters. */
const MAX_BISECTION_STEPS = 100;

/**
 * Roots in [-1, 1] of p(s) = sum_{k<n} c_k T_k(s), sorted ascending.
 *
 * Degree 2 uses the quadratic formula in the form that avoids cancellation,
 * q = -(B + sign(B) sqrt(B^2 - 4AC)) / 2, roots q / A and C / q (Press et al., Numerical
 * Recipes, 3rd ed., 2007, section 5.6, eq. 5.6.4-5.6.5). Higher degree: the roots of p' split
 * [-1, 1] into stretches on which p is monotone, found by the same method one degree lower
 * (recursive isolation down to the quadratic); each stretch whose ends have opposite signs
 * holds exactly one root, located by bisection to the last bit (Kincaid & Cheney, Numerical
 * Analysis, 3rd ed., 2002, section 3.1, for bisection; the isolation by the roots of the
 * derivative is Rolle's theorem).
 *
 * Touching zeros: a local extremum of p (a root of p') or an end of [-1, 1] where
 * |p| <= `noise` is reported as a root too, so a double root that rounding pushed just off
 * zero is not lost. Below degree 3 the extremum is the vertex of the parabola.
 *
 * Work space for every degree up to `maxDegree` is allocated once by the constructor;
 * `roots` allocates nothing. Cost O(d^3 + d^2 B) for degree d (B bisection steps per root).
 * @example
 *   const rf = new RootFinder(3);
 *   const out = new Float64Array(3);
 *   rf.roots(Float64Array.of(0, 0, 1), 3, 0, out); // T_2 = 2s^2 - 1: 2 roots, -0.7071.., 0.7071..
 */
export class RootFinder {
  private readonly coef: Float64Array[] = [];
  private readonly found: Float64Array[] = [];

  constructor(readonly maxDegree: number) {
    for (let level = 0; level <= maxDegree; level++) {
      this.coef.push(new Float64Array(maxDegree + 1));
      this.found.push(new Float64Array(2 * maxDegree + 2));
    }
  }

  /**
   * Writes the roots of sum_{k<n} c_k T_k(s) in [-1, 1] to `out` (ascending; room for 2n
   * values, as zeros within `noise` at the ends and extrema come on top of the crossings) and returns their number. A series that is zero throughout has no roots here;
   * callers test for that first.
   */
  roots(c: Float64Array, n: number, noise: number, out: Float64Array): number {
    if (n - 1 > this.maxDegree) throw new Error(`root finder set up for degree ${this.maxDegree}; got degree ${n - 1}`);
    const top = this.coef[0] as Float64Array;
    for (let k = 0; k < n; k++) top[k] = c[k] as number;
    const count = this.solve(0, n, noise);
    const f = this.found[0] as Float64Array;
    for (let i = 0; i < count; i++) out[i] = f[i] as number;
    return count;
  }

  private solve(level: number, n: number, noise: number): number {
    const c = this.coef[level] as Float64Array;
    const out = this.found[level] as Float64Array;
    if (n <= 1) return 0;
    if (n === 2) return linearRoot(c[0] as number, c[1] as number, noise, out);
    if (n === 3) return quadraticRoots(c, noise, out);
    // Critical points: the sign changes of p' (exact zeros only; a touching zero of p'
    // leaves p monotone, so it need not split anything).
    const d = this.coef[level + 1] as Float64Array;
    chebDerivative(c, n, d);
    const kc = this.solve(level + 1, n - 1, 0);
    const crit = this.found[level + 1] as Float64Array;
    let count = 0;
    let prev = -1;
    let vPrev = chebValue(c, n, -1);
    if (Math.abs(vPrev) <= noise) out[count++] = -1;
    for (let i = 0; i <= kc; i++) {
      const p = i < kc ? (crit[i] as number) : 1;
      if (!(p > prev)) continue;
      const v = chebValue(c, n, p);
      if (Math.abs(vPrev) > noise && Math.abs(v) > noise && v < 0 !== vPrev < 0) out[count++] = bisect(c, n, prev, p, vPrev);
      if (Math.abs(v) <= noise && (count === 0 || (out[count - 1] as number) < p)) out[count++] = p;
      prev = p;
      vPrev = v;
    }
    return count;
  }
}

/** Root of c0 + c1 s in [-1, 1] (or an end within noise). */
function linearRoot(c0: number, c1: number, noise: number, out: Float64Array): number {
  let count = 0;
  if (Math.abs(c0 - c1) <= noise) out[count++] = -1;
  if (c1 !== 0) {
    const r = -c0 / c1;
    if (r > -1 && r < 1) out[count++] = r;
  }
  if (Math.abs(c0 + c1) <= noise) out[count++] = 1;
  return count;
}

/** Roots of c0 + c1 T_1 + c2 T_2 in [-1, 1], plus a vertex or an end where |p| <= noise. */
function quadraticRoots(c: Float64Array, noise: number, out: Float64Array): number {
  // c0 + c1 s + c2 (2 s^2 - 1) = A s^2 + B s + C.
  const A = 2 * (c[2] as number);
  const B = c[1] as number;
  const C = (c[0] as number) - (c[2] as number);
  let r1 = NaN;
  let r2 = NaN;
  if (A === 0) {
    if (B !== 0) r1 = -C / B;
  } else {
    const disc = B * B - 4 * A * C;
    if (disc >= 0) {
      const sq = Math.sqrt(disc);
      const q = -0.5 * (B + (B >= 0 ? sq : -sq));
      r1 = q / A;
      r2 = q !== 0 ? C / q : r1;
    } else {
      // No real root: the vertex counts if the parabola touches zero within rounding.
      const v = -B / (2 * A);
      if (Math.abs(C + v * (B + v * A)) <= noise) r1 = v;
    }
  }
  if (r2 < r1) [r1, r2] = [r2, r1];
  let count = 0;
  const push = (r: number): void => {
    if (r >= -1 && r <= 1 && (count === 0 || (out[count - 1] as number) < r)) out[count++] = r;
  };
  if (Math.abs(A - B + C) <= noise) push(-1);
  push(r1);
  push(r2);
  if (Math.abs(A + B + C) <= noise) push(1);
  return count;
}

/** The root of the series in (lo, hi), where it changes sign once, to the last bit. */
function bisect(c: Float64Array, n: number, lo: number, hi: number, vLo: number): number {
  const negLo = vLo < 0;
  for (let step = 0; step < MAX_BISECTION_STEPS; step++) {
    const mid = 0.5 * (lo + hi);
    if (!(mid > lo && mid < hi)) break;
    const v = chebValue(c, n, mid);
    if (v === 0) return mid;
    if (v < 0 === negLo) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
