/**
 * Largest 1-norm condition number of the column-scaled Gram matrix for which the
 * cross-product (normal-equations) route is used. Its relative rounding error is about
 * this times the unit roundoff (Higham 2002, "Accuracy and Stability of Numerical
 * Algorithms", 2nd ed., chapter 20 on the normal equations), so at most about 1e-10;
 * worse-conditioned designs go through an orthogonal (Givens QR) route instead.
 */
export const GRAM_CONDITION_LIMIT = 1e6;

/**
 * Adds the cross products of the columns of a block of rows to the upper triangle of a
 * p x p matrix: out[a p + b] += sum_{t < rows} block[t p + a] block[t p + b] for a <= b
 * (the block is row-major, row t at block[t p ...]). Columns are taken two by two, so
 * each pass over the block does four independent multiply-adds per row from four loads;
 * summing a block before adding it to `out` is blocked summation, whose error grows with
 * rows + n / rows rather than n (Higham 2002, chapter 4 on summation).
 * Cost O(rows p^2 / 2), no allocation.
 * Example: the rows (1, 0) and (1, 2) add [2, 2; ., 4] to the upper triangle.
 */
export function addCrossProducts(block: Float64Array, rows: number, p: number, out: Float64Array): void {
  const end = rows * p;
  let a = 0;
  for (; a + 1 < p; a += 2) {
    let d00 = 0;
    let d01 = 0;
    let d11 = 0;
    for (let o = 0; o < end; o += p) {
      const x0 = block[o + a] as number;
      const x1 = block[o + a + 1] as number;
      d00 += x0 * x0;
      d01 += x0 * x1;
      d11 += x1 * x1;
    }
    add(out, a * p + a, d00);
    add(out, a * p + a + 1, d01);
    add(out, (a + 1) * p + a + 1, d11);
    let b = a + 2;
    for (; b + 1 < p; b += 2) {
      let s00 = 0;
      let s01 = 0;
      let s10 = 0;
      let s11 = 0;
      for (let o = 0; o < end; o += p) {
        const x0 = block[o + a] as number;
        const x1 = block[o + a + 1] as number;
        const y0 = block[o + b] as number;
        const y1 = block[o + b + 1] as number;
        s00 += x0 * y0;
        s01 += x0 * y1;
        s10 += x1 * y0;
        s11 += x1 * y1;
      }
      add(out, a * p + b, s00);
      add(out, a * p + b + 1, s01);
      add(out, (a + 1) * p + b, s10);
      add(out, (a + 1) * p + b + 1, s11);
    }
    if (b < p) {
      // Odd p: the last column against the pair.
      let s0 = 0;
      let s1 = 0;
      for (let o = 0; o < end; o += p) {
        const y = block[o + b] as number;
        s0 += (block[o + a] as number) * y;
        s1 += (block[o + a + 1] as number) * y;
      }
      add(out, a * p + b, s0);
      add(out, (a + 1) * p + b, s1);
    }
  }
  if (a < p) {
    let s = 0;
    for (let o = 0; o < end; o += p) s += (block[o + a] as number) ** 2;
    add(out, a * p + a, s);
  }
}

function add(out: Float64Array, at: number, v: number): void {
  out[at] = (out[at] as number) + v;
}

/**
 * Views of the first `width` entries of each row of a row-major block with `stride`
 * entries per row, made once so that `DesignRows.row` can write straight into the block.
 */
export function rowViews(block: Float64Array, rows: number, stride: number, width: number): Float64Array[] {
  const views: Float64Array[] = [];
  for (let t = 0; t < rows; t++) views.push(block.subarray(t * stride, t * stride + width));
  return views;
}

/**
 * Cholesky factor of a Gram matrix G = X'X after scaling its columns to unit diagonal:
 * G_s = S G S = L L' with S = diag(1 / sqrt(G_jj)) (Golub & Van Loan, "Matrix
 * Computations", 4th ed. (2013), section 4.2; the scaling is the equilibration of
 * van der Sluis (1969), "Condition numbers and equilibration of matrices", Numer. Math. 14,
 * which makes the condition number nearly the smallest over diagonal scalings). Used to
 * evaluate projections onto the column space of X from cross products alone:
 * tr(H K) = tr(G^-1 X'KX) and y'Hy = |L^-1 S X'y|^2 with H = X G^-1 X'.
 *
 * `ScaledCholesky.of` returns undefined when G has a zero or non-finite diagonal entry, is
 * not numerically positive definite, or its scaled 1-norm condition number exceeds
 * GRAM_CONDITION_LIMIT: the caller should then use an orthogonal factorisation.
 * Cost O(p^3), independent of n.
 * Example: ScaledCholesky.of(Float64Array.of(4, 2, 2, 4), 2) has scale [1/2, 1/2],
 * L = [1, 0; 0.5, sqrt(0.75)] and condition 3.
 */
export class ScaledCholesky {
  private constructor(
    readonly p: number,
    /** Column scale factors 1 / sqrt(G_jj). */
    readonly scale: Float64Array,
    /** Lower-triangular L (row-major p x p) with S G S = L L'. */
    readonly lower: Float64Array,
    /** 1-norm condition number of S G S. */
    readonly condition: number,
  ) {}

  /** Factors the symmetric p x p matrix whose upper triangle is `gram` (row-major); see the class note. */
  static of(gram: Float64Array, p: number): ScaledCholesky | undefined {
    const scale = new Float64Array(p);
    for (let j = 0; j < p; j++) {
      const d = gram[j * p + j] as number;
      if (!(d > 0 && d < Infinity)) return undefined;
      scale[j] = 1 / Math.sqrt(d);
    }
    // Scaled matrix, both triangles (for the 1-norm).
    const gs = new Float64Array(p * p);
    for (let a = 0; a < p; a++) {
      for (let b = a; b < p; b++) {
        const v = (gram[a * p + b] as number) * (scale[a] as number) * (scale[b] as number);
        gs[a * p + b] = v;
        gs[b * p + a] = v;
      }
    }
    const lower = new Float64Array(p * p);
    for (let j = 0; j < p; j++) {
      let d = gs[j * p + j] as number;
      for (let k = 0; k < j; k++) d -= (lower[j * p + k] as number) ** 2;
      if (!(d > 0)) return undefined;
      const ljj = Math.sqrt(d);
      lower[j * p + j] = ljj;
      for (let i = j + 1; i < p; i++) {
        let s = gs[i * p + j] as number;
        for (let k = 0; k < j; k++) s -= (lower[i * p + k] as number) * (lower[j * p + k] as number);
        lower[i * p + j] = s / ljj;
      }
    }
    const factor = new ScaledCholesky(p, scale, lower, 0);
    // ||G_s^-1||_1 from its columns G_s^-1 e_j = L^-T L^-1 e_j: O(p^3), fine for small p.
    const column = new Float64Array(p);
    let inverseNorm = 0;
    let norm = 0;
    for (let j = 0; j < p; j++) {
      column.fill(0);
      column[j] = 1;
      factor.solveLower(column);
      factor.solveUpper(column);
      let inv = 0;
      let g = 0;
      for (let i = 0; i < p; i++) {
        inv += Math.abs(column[i] as number);
        g += Math.abs(gs[i * p + j] as number);
      }
      inverseNorm = Math.max(inverseNorm, inv);
      norm = Math.max(norm, g);
    }
    const condition = norm * inverseNorm;
    if (!(condition <= GRAM_CONDITION_LIMIT)) return undefined;
    return new ScaledCholesky(p, scale, lower, condition);
  }

  /** y'Hy = |L^-1 S v|^2 for v = X'y: the fitted sum of squares of y regressed on X. O(p^2). */
  projectedSquare(v: Float64Array): number {
    const { p, scale } = this;
    const z = new Float64Array(p);
    for (let j = 0; j < p; j++) z[j] = (v[j] as number) * (scale[j] as number);
    this.solveLower(z);
    let s = 0;
    for (let j = 0; j < p; j++) s += (z[j] as number) ** 2;
    return s;
  }

  /**
   * W = L^-1 S K S L^-T (symmetric, row-major p x p) for the symmetric K = X'KX given by
   * its upper triangle; W has the nonzero eigenvalues of H K, so tr W = tr(H K) and
   * |W|_F^2 = tr(H K H K). O(p^3).
   */
  whiten(upper: Float64Array): Float64Array {
    const { p, scale } = this;
    const w = new Float64Array(p * p);
    for (let a = 0; a < p; a++) {
      for (let b = a; b < p; b++) {
        const v = (upper[a * p + b] as number) * (scale[a] as number) * (scale[b] as number);
        w[a * p + b] = v;
        w[b * p + a] = v;
      }
    }
    // Columns: W <- L^-1 W; rows (by symmetry of the result): W <- W L^-T.
    const column = new Float64Array(p);
    for (let c = 0; c < p; c++) {
      for (let i = 0; i < p; i++) column[i] = w[i * p + c] as number;
      this.solveLower(column);
      for (let i = 0; i < p; i++) w[i * p + c] = column[i] as number;
    }
    for (let r = 0; r < p; r++) this.solveLower(w.subarray(r * p, r * p + p));
    // Symmetrise against rounding.
    for (let a = 0; a < p; a++) {
      for (let b = a + 1; b < p; b++) {
        const v = 0.5 * ((w[a * p + b] as number) + (w[b * p + a] as number));
        w[a * p + b] = v;
        w[b * p + a] = v;
      }
    }
    return w;
  }

  /** In place: v <- L^-1 v (forward substitution). */
  private solveLower(v: Float64Array): void {
    const { p, lower } = this;
    for (let i = 0; i < p; i++) {
      let s = v[i] as number;
      for (let k = 0; k < i; k++) s -= (lower[i * p + k] as number) * (v[k] as number);
      v[i] = s / (lower[i * p + i] as number);
    }
  }

  /** In place: v <- L^-T v (back substitution). */
  private solveUpper(v: Float64Array): void {
    const { p, lower } = this;
    for (let i = p - 1; i >= 0; i--) {
      let s = v[i] as number;
      for (let k = i + 1; k < p; k++) s -= (lower[k * p + i] as number) * (v[k] as number);
      v[i] = s / (lower[i * p + i] as number);
    }
  }
}
