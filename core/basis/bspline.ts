/**
 * Cubic B-spline basis evaluation on a clamped knot vector.
 *
 * Method: the triangular Cox-de Boor recurrence with derivatives, Piegl & Tiller,
 * "The NURBS Book", 2nd ed. (1997), algorithms A2.1 (FindSpan) and A2.3 (DersBasisFuns).
 * At any x at most 4 cubic B-splines are nonzero, which every spline kernel in Knotwise
 * uses to keep its cost linear in the number of rows.
 */

/** Spline order (degree 3 + 1). */
export const ORDER = 4;
const P = 3;

/**
 * Clamped knot vector: the boundary knots repeated 4 times around the interior knots.
 * Number of basis functions = interior.length + 4.
 * Example: clampedKnots(0, 1, [0.5]) -> [0,0,0,0,0.5,1,1,1,1].
 */
export function clampedKnots(lower: number, upper: number, interior: ArrayLike<number>): Float64Array {
  const t = new Float64Array(interior.length + 8);
  for (let i = 0; i < 4; i++) {
    t[i] = lower;
    t[t.length - 1 - i] = upper;
  }
  for (let i = 0; i < interior.length; i++) t[4 + i] = interior[i] as number;
  return t;
}

/**
 * Index s of the knot span with t[s] <= x < t[s+1], clamped to [3, nBasis-1] so that x at
 * or beyond the upper boundary uses the last span. Binary search, O(log K).
 */
export function findSpan(t: Float64Array, x: number): number {
  const nBasis = t.length - ORDER;
  if (x >= (t[nBasis] as number)) return nBasis - 1;
  if (x <= (t[P] as number)) return P;
  let lo = P;
  let hi = nBasis;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (x < (t[mid] as number)) hi = mid;
    else lo = mid;
  }
  return lo;
}

/**
 * Evaluator of the 4 nonzero cubic B-splines (and optionally their first and second
 * derivatives) at a point. Scratch space is allocated once per evaluator, so `eval` does
 * not allocate. After `eval(x)`, `value[j]`, `d1[j]`, `d2[j]` (j = 0..3) refer to basis
 * function `first + j`.
 */
export class BSplineEvaluator {
  readonly value = new Float64Array(4);
  readonly d1 = new Float64Array(4);
  readonly d2 = new Float64Array(4);
  first = 0;
  private readonly left = new Float64Array(4);
  private readonly right = new Float64Array(4);
  private readonly ndu = new Float64Array(16); // 4x4, ndu[j*4+r]
  private readonly a = new Float64Array(8); // two rows of 4

  constructor(readonly knots: Float64Array) {
    if (knots.length < 8) throw new Error('a cubic B-spline knot vector needs at least 8 knots');
  }

  /** Number of basis functions. */
  get size(): number {
    return this.knots.length - ORDER;
  }

  /**
   * Evaluates at x (x is clamped into the knot range; extrapolation is the caller's job).
   * `derivs` = 0, 1 or 2 says how many derivative orders to compute. Returns `first`.
   */
  eval(x: number, derivs: 0 | 1 | 2 = 0): number {
    const t = this.knots;
    const lo = t[P] as number;
    const hi = t[t.length - ORDER] as number;
    const u = x < lo ? lo : x > hi ? hi : x;
    const span = findSpan(t, u);
    if (derivs === 0) {
      this.valuesOnly(t, span, u);
      this.first = span - P;
      return this.first;
    }
    const { left, right, ndu, a } = this;
    ndu[0] = 1;
    for (let j = 1; j <= P; j++) {
      left[j] = u - (t[span + 1 - j] as number);
      right[j] = (t[span + j] as number) - u;
      let saved = 0;
      for (let r = 0; r < j; r++) {
        ndu[j * 4 + r] = (right[r + 1] as number) + (left[j - r] as number);
        const temp = (ndu[r * 4 + j - 1] as number) / (ndu[j * 4 + r] as number);
        ndu[r * 4 + j] = saved + (right[r + 1] as number) * temp;
        saved = (left[j - r] as number) * temp;
      }
      ndu[j * 4 + j] = saved;
    }
    for (let j = 0; j <= P; j++) this.value[j] = ndu[j * 4 + P] as number;
    if (derivs > 0) {
      for (let r = 0; r <= P; r++) {
        let s1 = 0;
        let s2 = 4;
        a[0] = 1;
        for (let k = 1; k <= derivs; k++) {
          let d = 0;
          const rk = r - k;
          const pk = P - k;
          if (r >= k) {
            a[s2] = (a[s1] as number) / (ndu[(pk + 1) * 4 + rk] as number);
            d = (a[s2] as number) * (ndu[rk * 4 + pk] as number);
          }
          const j1 = rk >= -1 ? 1 : -rk;
          const j2 = r - 1 <= pk ? k - 1 : P - r;
          for (let j = j1; j <= j2; j++) {
            a[s2 + j] = ((a[s1 + j] as number) - (a[s1 + j - 1] as number)) / (ndu[(pk + 1) * 4 + rk + j] as number);
            d += (a[s2 + j] as number) * (ndu[(rk + j) * 4 + pk] as number);
          }
          if (r <= pk) {
            a[s2 + k] = -(a[s1 + k - 1] as number) / (ndu[(pk + 1) * 4 + r] as number);
            d += (a[s2 + k] as number) * (ndu[r * 4 + pk] as number);
          }
          if (k === 1) this.d1[r] = d * P;
          else this.d2[r] = d * P * (P - 1);
          const tmp = s1;
          s1 = s2;
          s2 = tmp;
        }
      }
    }
    this.first = span - P;
    return this.first;
  }

  /**
   * The values alone: the loop of eval above for the cubic, unrolled on local variables
   * (the same operations in the same order, so the same bits), into `value`. Nij below is
   * ndu[j * 4 + i] there, before the triangle is transposed. O(1).
   */
  private valuesOnly(t: Float64Array, s: number, u: number): void {
    const zero = 0;
    const l1 = u - (t[s] as number);
    const r1 = (t[s + 1] as number) - u;
    let temp = 1 / (r1 + l1);
    const n01 = zero + r1 * temp;
    const n11 = l1 * temp;
    const l2 = u - (t[s - 1] as number);
    const r2 = (t[s + 2] as number) - u;
    temp = n01 / (r1 + l2);
    const n02 = zero + r1 * temp;
    let saved = l2 * temp;
    temp = n11 / (r2 + l1);
    const n12 = saved + r2 * temp;
    const n22 = l1 * temp;
    const l3 = u - (t[s - 2] as number);
    const r3 = (t[s + 3] as number) - u;
    temp = n02 / (r1 + l3);
    const value = this.value;
    value[0] = zero + r1 * temp;
    saved = l3 * temp;
    temp = n12 / (r2 + l2);
    value[1] = saved + r2 * temp;
    saved = l2 * temp;
    temp = n22 / (r3 + l1);
    value[2] = saved + r3 * temp;
    value[3] = l1 * temp;
  }
}
