import type { RowBasis } from '../basis/rowBasis';
import { sparseCongruence, sparseRows, sparseTransposeTimes } from '../fit/linearFit';

/**
 * Weighted least-squares sums of a row basis restricted to span(Z), kept apart for each of
 * `cells` cells (a cell is one group's rows in one cross-validation fold): the Gram matrix
 * A_c = Z' B_c' W_c B_c Z (q x q) and the right-hand side b_c = Z' B_c' W_c y_c (q), where
 * q is the number of columns of Z. Any union of cells then has the sums of its cells added
 * up, so every model that gives some groups one curve and others their own, and every fold
 * of cross-validation, is solved from these sums without another pass over the rows
 * (the sufficient statistics of linear least squares: Seber & Lee (2003), "Linear
 * Regression Analysis", 2nd ed., chapter 3, from memory).
 *
 * Rows are added in the basis's own sparse form (`width` nonzero entries), so a row costs
 * O(width^2) whatever the number of cells; `finish` maps each cell by Z once, O(cells p^2 q).
 * Memory O(cells p^2). y should be centred by the caller and the weights brought near 1
 * (a power of two), as in fitRowBasis (core/fit/linearFit.ts).
 * Example: const s = new CellSums(basis, z, 2); s.add(0, 1.5, 0.2, 1); ...; s.finish().gram.
 */
export class CellSums {
  /** Columns of Z (coefficients of the restricted basis). */
  readonly q: number;
  private readonly p: number;
  private readonly buf: Float64Array;
  /** Per cell, the Gram matrix in the full basis (lower triangle) then its right-hand side: p^2 + p numbers. */
  private readonly raw: Float64Array;

  constructor(
    private readonly basis: RowBasis,
    private readonly z: Float64Array,
    readonly cells: number,
  ) {
    this.p = basis.size;
    this.q = z.length / basis.size;
    this.buf = new Float64Array(basis.width);
    this.raw = new Float64Array(cells * (this.p * this.p + this.p));
  }

  /** Adds the row (x, y) with weight w to cell c. O(width^2). */
  add(c: number, x: number, y: number, w: number): void {
    const { p, buf, raw, basis } = this;
    const width = basis.width;
    const first = basis.row(x, buf);
    const g = c * (p * p + p);
    const r = g + p * p;
    for (let a = 0; a < width; a++) {
      const wa = w * (buf[a] as number);
      raw[r + first + a] = (raw[r + first + a] as number) + wa * y;
      const rowOff = g + (first + a) * p + first;
      for (let b = 0; b <= a; b++) raw[rowOff + b] = (raw[rowOff + b] as number) + wa * (buf[b] as number);
    }
  }

  /**
   * The sums of every cell in the restricted coordinates: gram (cells x q x q, both
   * triangles) and rhs (cells x q), cell-major.
   */
  finish(): { readonly gram: Float64Array; readonly rhs: Float64Array } {
    const { p, q, z, raw, cells } = this;
    const gram = new Float64Array(cells * q * q);
    const rhs = new Float64Array(cells * q);
    const g = new Float64Array(p * p);
    // Z is mostly a unit matrix: its products touch its nonzero entries only (the same sums).
    const zRows = sparseRows(z, p, q);
    const gz = new Float64Array(p * q);
    for (let c = 0; c < cells; c++) {
      const off = c * (p * p + p);
      for (let i = 0; i < p; i++)
        for (let j = 0; j <= i; j++) {
          const v = raw[off + i * p + j] as number;
          g[i * p + j] = v;
          g[j * p + i] = v;
        }
      sparseCongruence(g, zRows, gz, gram.subarray(c * q * q, (c + 1) * q * q));
      sparseTransposeTimes(zRows, raw.subarray(off + p * p, off + p * p + p), rhs.subarray(c * q, (c + 1) * q));
    }
    return { gram, rhs };
  }
}

/**
 * Sum of the blocks from..to-1 of `blocks` (consecutive blocks of `len` numbers), into a
 * new array. O((to - from) len). Example: sumBlocks(Float64Array.of(1, 2, 3, 4), 2, 0, 2) -> [4, 6].
 */
export function sumBlocks(blocks: Float64Array, len: number, from: number, to: number): Float64Array {
  const out = new Float64Array(len);
  for (let k = from; k < to; k++) for (let j = 0; j < len; j++) out[j] = (out[j] as number) + (blocks[k * len + j] as number);
  return out;
}

/**
 * For each of `count` blocks of `len` numbers, the sum of all the other blocks
 * (leave-one-out sums), from prefix and suffix sums: O(count len), and no sum is taken
 * apart by subtraction, so a block that dominates the total costs the others no digits.
 * Example: sumsExcept(Float64Array.of(1, 2, 4), 3, 1) -> [6, 5, 3].
 */
export function sumsExcept(blocks: Float64Array, count: number, len: number): Float64Array {
  const out = new Float64Array(count * len);
  // out[k] first holds the sum of blocks before k, then the running suffix is added.
  for (let k = 1; k < count; k++) for (let j = 0; j < len; j++) out[k * len + j] = (out[(k - 1) * len + j] as number) + (blocks[(k - 1) * len + j] as number);
  const suffix = new Float64Array(len);
  for (let k = count - 1; k >= 0; k--) {
    for (let j = 0; j < len; j++) out[k * len + j] = (out[k * len + j] as number) + (suffix[j] as number);
    for (let j = 0; j < len; j++) suffix[j] = (suffix[j] as number) + (blocks[k * len + j] as number);
  }
  return out;
}

/**
 * d' A d for the q x q matrix A stored at a[offset..] (row-major) and d = u - v: the
 * weighted sum of squares between two curves with coefficients u and v over the rows whose
 * Gram matrix A is. O(q^2). Example: differenceSquares(Float64Array.of(2, 0, 0, 1), 0, 2, [1, 1], [0, 0]) -> 3.
 */
export function differenceSquares(a: Float64Array, offset: number, q: number, u: ArrayLike<number>, v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < q; i++) {
    const di = (u[i] as number) - (v[i] as number);
    if (di === 0) continue;
    let t = 0;
    for (let j = 0; j < q; j++) t += (a[offset + i * q + j] as number) * ((u[j] as number) - (v[j] as number));
    s += di * t;
  }
  // A is positive semi-definite: a negative result is rounding.
  return Math.max(0, s);
}
