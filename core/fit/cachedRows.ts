import type { RowBasis } from '../basis/rowBasis';

/**
 * The nonzero basis values of every data row, evaluated once and reused by every pass of an
 * iteratively reweighted fit (IRLS, Huber weights, constrained refits), so each pass costs
 * O(n width^2) arithmetic and no basis evaluation. Memory: n (4 + 8 width) bytes, 36 bytes
 * per row for cubic B-splines; building costs one basis evaluation per row, O(n).
 * Example: const rows = new CachedRows(basis, x); rows.gram(w, y, g, rhs); rows.apply(theta, fitted).
 */
export class CachedRows {
  readonly n: number;
  readonly width: number;
  readonly size: number;
  /** Index of the first nonzero basis function of each row. */
  readonly first: Int32Array;
  /** Row i's values at values[i * width .. i * width + width). */
  readonly values: Float64Array;

  constructor(basis: RowBasis, x: Float64Array) {
    const n = x.length;
    const width = basis.width;
    this.n = n;
    this.width = width;
    this.size = basis.size;
    this.first = new Int32Array(n);
    this.values = new Float64Array(n * width);
    const buf = new Float64Array(width);
    for (let i = 0; i < n; i++) {
      this.first[i] = basis.row(x[i] as number, buf);
      this.values.set(buf, i * width);
    }
  }

  /**
   * Weighted Gram matrix G = B' diag(w) B (full, row-major size x size) and right-hand side
   * B' diag(w) u, overwriting g and rhs. Rows with w_i = 0 are skipped. O(n width^2).
   */
  gram(w: Float64Array, u: Float64Array, g: Float64Array, rhs: Float64Array): void {
    const { n, width, size: p, first, values } = this;
    g.fill(0);
    rhs.fill(0);
    for (let i = 0; i < n; i++) {
      const wi = w[i] as number;
      if (wi === 0) continue;
      const f = first[i] as number;
      const o = i * width;
      const wu = wi * (u[i] as number);
      for (let a = 0; a < width; a++) {
        const ba = values[o + a] as number;
        const wa = wi * ba;
        rhs[f + a] = (rhs[f + a] as number) + wu * ba;
        const rowOff = (f + a) * p + f;
        for (let b = 0; b <= a; b++) g[rowOff + b] = (g[rowOff + b] as number) + wa * (values[o + b] as number);
      }
    }
    for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) g[j * p + i] = g[i * p + j] as number;
  }

  /** out = B theta. O(n width). */
  apply(theta: Float64Array, out: Float64Array): void {
    const { n, width, first, values } = this;
    for (let i = 0; i < n; i++) {
      const f = first[i] as number;
      const o = i * width;
      let s = 0;
      for (let a = 0; a < width; a++) s += (values[o + a] as number) * (theta[f + a] as number);
      out[i] = s;
    }
  }

  /** out_i = w_i b_i' V b_i (the hat diagonal when V = (B'WB)^-1). O(n width^2). */
  quadratic(cov: Float64Array, w: Float64Array | undefined, out: Float64Array): void {
    const { n, width, size: p, first, values } = this;
    for (let i = 0; i < n; i++) {
      const f = first[i] as number;
      const o = i * width;
      let h = 0;
      for (let a = 0; a < width; a++) {
        const rowOff = (f + a) * p + f;
        let s = 0;
        for (let b = 0; b < width; b++) s += (cov[rowOff + b] as number) * (values[o + b] as number);
        h += (values[o + a] as number) * s;
      }
      out[i] = (w ? (w[i] as number) : 1) * h;
    }
  }
}
