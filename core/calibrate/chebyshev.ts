/**
 * Polynomials on one piece of a curve, held as Chebyshev series in a local variable
 * s in [-1, 1]: interpolation at Chebyshev nodes, the derivative series and evaluation.
 * The Chebyshev basis keeps the coefficients well conditioned where the monomial basis
 * would not (Trefethen, Approximation Theory and Approximation Practice, 2013, chapters 3
 * and 4). The piece [a, b] maps to s by x = a + (1 + s) (b - a) / 2.
 */

/**
 * The n Chebyshev points of the first kind s_j = cos(pi (2j + 1) / (2n)), j = 0..n-1, with
 * the table T_k(s_j) for the discrete cosine transform that turns values at these points
 * into the coefficients of the interpolating polynomial of degree n - 1 (Press et al.,
 * Numerical Recipes, 3rd ed., 2007, section 5.8, eq. 5.8.7). Built once per degree, O(n^2);
 * `interpolate` is O(n^2) and allocates nothing.
 * @example
 *   const nodes = new ChebyshevNodes(4); // cubic pieces
 *   // values[j] = f(a + (1 + nodes.s[j]) * (b - a) / 2); nodes.interpolate(values, coefficients)
 */
export class ChebyshevNodes {
  /** The points s_j, decreasing from near 1 to near -1. */
  readonly s: Float64Array;
  private readonly table: Float64Array;

  constructor(readonly n: number) {
    if (!(n >= 1) || !Number.isInteger(n)) throw new Error(`Chebyshev interpolation needs at least 1 point; got ${n}`);
    this.s = new Float64Array(n);
    this.table = new Float64Array(n * n);
    for (let j = 0; j < n; j++) this.s[j] = Math.cos((Math.PI * (2 * j + 1)) / (2 * n));
    for (let k = 0; k < n; k++) for (let j = 0; j < n; j++) this.table[k * n + j] = Math.cos((Math.PI * k * (2 * j + 1)) / (2 * n));
  }

  /** x of node j on the piece [a, b]. */
  at(j: number, a: number, b: number): number {
    return a + (1 + (this.s[j] as number)) * 0.5 * (b - a);
  }

  /** Coefficients c_0..c_{n-1} of sum c_k T_k(s) through the values at the nodes; writes `out`. */
  interpolate(values: Float64Array, out: Float64Array): void {
    const { n, table } = this;
    for (let k = 0; k < n; k++) {
      let sum = 0;
      for (let j = 0; j < n; j++) sum += (values[j] as number) * (table[k * n + j] as number);
      out[k] = ((k === 0 ? 1 : 2) * sum) / n;
    }
  }
}

/**
 * Value of sum_{k<n} c_k T_k(s) by Clenshaw's recurrence (Clenshaw 1955, "A note on the
 * summation of Chebyshev series", Mathematical Tables and Other Aids to Computation 9).
 * O(n). Example: chebValue(Float64Array.of(0, 0, 1), 3, 0.5) = T_2(0.5) = -0.5.
 */
export function chebValue(c: Float64Array, n: number, s: number): number {
  if (n === 0) return 0;
  let b1 = 0;
  let b2 = 0;
  for (let k = n - 1; k >= 1; k--) {
    const b0 = 2 * s * b1 - b2 + (c[k] as number);
    b2 = b1;
    b1 = b0;
  }
  return s * b1 - b2 + (c[0] as number);
}

/**
 * Coefficients of d/ds of sum_{k<n} c_k T_k(s) (n - 1 of them, written to `out`) by the
 * recurrence c'_{k-1} = c'_{k+1} + 2k c_k, c'_0 halved (Press et al., Numerical Recipes,
 * 3rd ed., 2007, section 5.9, eq. 5.9.2). O(n). Example: T_2 = 2s^2 - 1 -> 4 T_1.
 */
export function chebDerivative(c: Float64Array, n: number, out: Float64Array): void {
  let next = 0; // c'_{k+1}
  let nextNext = 0; // c'_{k+2}
  for (let k = n - 1; k >= 1; k--) {
    const d = nextNext + 2 * k * (c[k] as number);
    out[k - 1] = d;
    nextNext = next;
    next = d;
  }
  if (n >= 2) out[0] = 0.5 * (out[0] as number);
}

/** sum_{k>=1} |c_k|: with |T_k| <= 1 on [-1, 1], the series stays within c_0 -+ this. O(n). */
export function chebSpread(c: Float64Array, n: number): number {
  let s = 0;
  for (let k = 1; k < n; k++) s += Math.abs(c[k] as number);
  return s;
}
