/**
 * Symmetric positive definite band matrices: LDL' factorisation with a pivot check, solve,
 * and the band of the inverse.
 *
 * Storage ("compact lower band", shared by every function here): a symmetric n x n matrix
 * with half-bandwidth p (A(i, j) = 0 when |i - j| > p) is held in a Float64Array of length
 * n (p + 1) with
 *
 *     band[j * (p + 1) + d] = A(j + d, j) = A(j, j + d),   d = 0..p,
 *
 * so row j of the array is the diagonal entry of column j followed by the p entries below
 * it. Entries with j + d >= n are ignored. A factor uses the same layout, with D(j) in slot
 * d = 0 and L(j + d, j) (unit lower triangular L) in slots d = 1..p.
 */
import { FitError } from '../errors';

/**
 * Smallest accepted ratio D(j) / A(j, j) of a pivot to its diagonal entry. D(j) is the
 * Schur complement of A(j, j), so a ratio near machine precision means that column j is,
 * to working precision, a combination of the earlier ones.
 */
export const PIVOT_TOLERANCE = 1e-13;

/**
 * LDL' factorisation of a symmetric positive definite band matrix, A = L D L'.
 *
 * Method: band version of the square-root-free Cholesky factorisation, Golub & Van Loan,
 * "Matrix Computations", 4th ed. (2013), chapter 4 (LDL' and band Cholesky).
 * Cost O(n p^2) time, no allocation besides `out`.
 *
 * Checks: every pivot must satisfy D(j) > PIVOT_TOLERANCE * A(j, j). Because
 * lambda_min(A) <= D(j) <= A(j, j) <= lambda_max(A), a failing pivot proves that A is not
 * positive definite or is singular to working precision (condition number above
 * 1 / PIVOT_TOLERANCE); the error names the column.
 *
 * @param band A in compact lower band storage (see the module comment); not modified.
 * @param n order of A.
 * @param p half-bandwidth (p >= 0; slots beyond the last row are ignored).
 * @param out factor storage of length n (p + 1); allocated when absent.
 * @returns the factor (D on slot 0, L below).
 * @throws FitError when a pivot fails the check.
 * @example
 *   // A = [[4, 2], [2, 3]] with p = 1: band = [4, 2, 3, 0]
 *   bandLdl(new Float64Array([4, 2, 3, 0]), 2, 1); // -> [4, 0.5, 2, 0]: D = (4, 2), L21 = 0.5
 */
export function bandLdl(band: Float64Array, n: number, p: number, out: Float64Array = new Float64Array(n * (p + 1))): Float64Array {
  checkShape(band, n, p, 'matrix');
  checkShape(out, n, p, 'factor');
  const w = p + 1;
  for (let j = 0; j < n; j++) {
    const ajj = band[j * w] as number;
    let djj = ajj;
    const k0 = j - p > 0 ? j - p : 0;
    for (let k = k0; k < j; k++) {
      const ljk = out[k * w + (j - k)] as number;
      djj -= ljk * ljk * (out[k * w] as number);
    }
    if (!(ajj > 0) || !(djj > PIVOT_TOLERANCE * ajj)) {
      throw new FitError(`band matrix is not positive definite to working precision: pivot ${j + 1} of ${n} is ${djj.toPrecision(3)} against a diagonal entry of ${ajj.toPrecision(3)}`);
    }
    out[j * w] = djj;
    const iEnd = j + p < n - 1 ? j + p : n - 1;
    for (let i = j + 1; i <= iEnd; i++) {
      // L(i, j) = (A(i, j) - sum_k L(i, k) L(j, k) D(k)) / D(j), k over the common band.
      let s = band[j * w + (i - j)] as number;
      const kk0 = i - p > 0 ? i - p : 0;
      for (let k = kk0; k < j; k++) {
        s -= (out[k * w + (i - k)] as number) * (out[k * w + (j - k)] as number) * (out[k * w] as number);
      }
      out[j * w + (i - j)] = s / djj;
    }
    for (let d = iEnd - j + 1; d <= p; d++) out[j * w + d] = 0;
  }
  return out;
}

/**
 * Solves A x = b from the factor of `bandLdl` (forward substitution with L, division by D,
 * back substitution with L'). Golub & Van Loan (2013), chapter 4. Cost O(n p).
 *
 * `out` may be the same array as `b` (in-place solve).
 * @example
 *   const f = bandLdl(new Float64Array([4, 2, 3, 0]), 2, 1);
 *   bandSolve(f, 2, 1, new Float64Array([6, 5])); // -> [1, 1]
 */
export function bandSolve(factor: Float64Array, n: number, p: number, b: Float64Array, out: Float64Array = new Float64Array(n)): Float64Array {
  checkShape(factor, n, p, 'factor');
  if (b.length !== n || out.length !== n) throw new RangeError(`bandSolve: right-hand side and result need length ${n}`);
  const w = p + 1;
  if (out !== b) out.set(b);
  // L z = b
  for (let j = 0; j < n; j++) {
    const zj = out[j] as number;
    const iEnd = j + p < n - 1 ? j + p : n - 1;
    for (let i = j + 1; i <= iEnd; i++) out[i] = (out[i] as number) - (factor[j * w + (i - j)] as number) * zj;
  }
  // D y = z
  for (let j = 0; j < n; j++) out[j] = (out[j] as number) / (factor[j * w] as number);
  // L' x = y
  for (let j = n - 1; j >= 0; j--) {
    let s = out[j] as number;
    const iEnd = j + p < n - 1 ? j + p : n - 1;
    for (let i = j + 1; i <= iEnd; i++) s -= (factor[j * w + (i - j)] as number) * (out[i] as number);
    out[j] = s;
  }
  return out;
}

/**
 * The band of the inverse: S(j, j + d) = (A^-1)(j, j + d) for d = 0..p, without forming the
 * (generally full) inverse.
 *
 * Method: Hutchinson & de Hoog (1985), "Smoothing noisy data with spline functions",
 * Numerische Mathematik 47, 99-106: from A = L D L' follows
 * S = D^-1 L^-1 + (I - L') S, and since D^-1 L^-1 is lower triangular with diagonal D^-1,
 *
 *     S(i, j) = delta(i, j) / D(i) - sum_{k = i+1}^{i+p} L(k, i) S(k, j),   j >= i,
 *
 * which, run for i = n-1 down to 0 and j = i+p down to i, only reads entries of S inside the
 * band. Cost O(n p^2); no allocation besides `out`.
 *
 * @returns S in compact lower band storage (S(j + d, j) = S(j, j + d) in slot d of row j).
 * @example
 *   const f = bandLdl(new Float64Array([4, 2, 3, 0]), 2, 1);
 *   bandInverse(f, 2, 1); // -> [0.375, -0.25, 0.5, 0]: inverse of [[4, 2], [2, 3]] is [[3, -2], [-2, 4]] / 8
 */
export function bandInverse(factor: Float64Array, n: number, p: number, out: Float64Array = new Float64Array(n * (p + 1))): Float64Array {
  checkShape(factor, n, p, 'factor');
  checkShape(out, n, p, 'inverse');
  const w = p + 1;
  for (let i = n - 1; i >= 0; i--) {
    const kEnd = i + p < n - 1 ? i + p : n - 1;
    for (let j = kEnd; j >= i; j--) {
      let s = j === i ? 1 / (factor[i * w] as number) : 0;
      for (let k = i + 1; k <= kEnd; k++) {
        // S(k, j) is in the band because both k and j lie in i+1..i+p (or j = i, then S(k, i) = S(i, k), just computed).
        const lo = k < j ? k : j;
        const hi = k < j ? j : k;
        s -= (factor[i * w + (k - i)] as number) * (out[lo * w + (hi - lo)] as number);
      }
      out[i * w + (j - i)] = s;
    }
    for (let d = kEnd - i + 1; d <= p; d++) out[i * w + d] = 0;
  }
  return out;
}

function checkShape(a: Float64Array, n: number, p: number, what: string): void {
  if (!Number.isInteger(n) || !Number.isInteger(p) || n < 1 || p < 0) {
    throw new RangeError(`band ${what}: order ${n} and half-bandwidth ${p} must be integers with n >= 1 and p >= 0`);
  }
  if (a.length !== n * (p + 1)) throw new RangeError(`band ${what}: expected length ${n * (p + 1)} for order ${n} and half-bandwidth ${p}, got ${a.length}`);
}
