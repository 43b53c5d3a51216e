/**
 * Bands and leverage of the shape-constrained smoothing spline: the covariance of its
 * coefficients with the active constraints held as equalities, as a band.
 */
import { bandInverse } from '../../linalg/banded';
import { ACTIVE_RANK_TOLERANCE } from '../../linalg/lsi';
import { backSolve } from './bandSolves';
import { dot } from './vectors';

/**
 * Fills `rows` in place with an orthonormal basis of their span (two passes of Gram-Schmidt,
 * Golub & Van Loan 2013, "Matrix Computations", 4th ed., section 5.2; dependent rows dropped
 * as in core/linalg/lsi.ts); returns the rank. O(k^2 q).
 * @example orthonormalise([Float64Array.of(1, 0), Float64Array.of(1, 1)]) // 2; the rows become e1, e2
 */
export function orthonormalise(rows: Float64Array[]): number {
  let k = 0;
  for (const row of rows) {
    const norm0 = Math.sqrt(dot(row, row));
    if (!(norm0 > 0)) continue;
    for (let pass = 0; pass < 2; pass++) {
      for (let b = 0; b < k; b++) {
        const base = rows[b] as Float64Array;
        const s = dot(base, row);
        for (let j = 0; j < row.length; j++) row[j] = (row[j] as number) - s * (base[j] as number);
      }
    }
    const norm = Math.sqrt(dot(row, row));
    if (norm <= ACTIVE_RANK_TOLERANCE * norm0) continue;
    for (let j = 0; j < row.length; j++) row[j] = (row[j] as number) / norm;
    rows[k] = row;
    k++;
  }
  rows.length = k;
  return k;
}

/**
 * Band (q x w) of V = R^-1 (I - U'U) R^-T, U the orthonormal rows of `basis` (q-vectors):
 * the band of (R'R)^-1 by Hutchinson & de Hoog's recursion on the LDL' form of R'R, minus
 * the band of T T', T = R^-1 U'. O(q w^2 + k q w) for k rows; `basis` is overwritten by T.
 * @example activeSetBand(acc.r, q, 4, activeRows) // band (q x 4) of the active-set covariance
 */
export function activeSetBand(r: Float64Array, q: number, w: number, basis: Float64Array[]): Float64Array {
  // R'R = L D L' with D = diag(R)^2, L(k + a, k) = R(k, k + a) / R(k, k).
  const ldl = new Float64Array(q * w);
  for (let k = 0; k < q; k++) {
    const rkk = r[k * w] as number;
    ldl[k * w] = rkk * rkk;
    for (let a = 1; a < w; a++) ldl[k * w + a] = (r[k * w + a] as number) / rkk;
  }
  const band = bandInverse(ldl, q, w - 1);
  for (const t of basis) {
    backSolve(r, q, w, t);
    for (let k = 0; k < q; k++) {
      const tk = t[k] as number;
      for (let a = 0; a < w && k + a < q; a++) band[k * w + a] = (band[k * w + a] as number) - tk * (t[k + a] as number);
    }
  }
  return band;
}
