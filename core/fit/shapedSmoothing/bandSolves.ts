/** Triangular solves with the band factor R of the shape-constrained smoothing spline. */

/**
 * Solves R x = b in place, R upper triangular with bandwidth w (r[k * w + a] = R(k, k + a)),
 * by back substitution (Golub & Van Loan 2013, "Matrix Computations", 4th ed., section 4.3).
 * O(q w).
 * @example backSolve(acc.r, q, 4, theta) // theta = R^-1 theta
 */
export function backSolve(r: Float64Array, q: number, w: number, b: Float64Array): void {
  for (let k = q - 1; k >= 0; k--) {
    let s = b[k] as number;
    for (let a = 1; a < w && k + a < q; a++) s -= (r[k * w + a] as number) * (b[k + a] as number);
    b[k] = s / (r[k * w] as number);
  }
}

/**
 * Solves R' x = b in place (R' lower triangular with bandwidth w) by forward substitution
 * (Golub & Van Loan 2013, section 4.3), skipping the leading zeros of b. O(q w).
 * @example forwardSolveT(acc.r, q, 4, row) // row = R^-T row
 */
export function forwardSolveT(r: Float64Array, q: number, w: number, b: Float64Array): void {
  let k0 = 0;
  while (k0 < q && b[k0] === 0) k0++;
  for (let k = k0; k < q; k++) {
    let s = b[k] as number;
    for (let a = 1; a < w && k - a >= k0; a++) s -= (r[(k - a) * w + a] as number) * (b[k - a] as number);
    b[k] = s / (r[k * w] as number);
  }
}
