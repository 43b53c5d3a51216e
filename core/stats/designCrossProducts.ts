import { addCrossProducts, rowViews } from './crossProducts';
import type { DesignRows, SparseRows } from './design';

/** Rows gathered per block of cross products (scratch of a few BLOCK_ROWS x p blocks). */
const BLOCK_ROWS = 128;

/** What `designCrossProducts` gathers besides X'X. */
export interface CrossProductRequest {
  /**
   * Residuals (same order as the design rows) whose centred squares u_i = e_i^2 - mean(e^2)
   * are regressed on the design by the Breusch-Pagan test: gathers X'u and u'u.
   */
  readonly squaresOf?: Float64Array;
  /** Gathers X'AX and X'A^2X for the first-difference matrix A, for the Durbin-Watson moments. */
  readonly differences?: boolean;
}

/** Cross products of a design gathered in one pass over its rows (matrices row-major p x p, upper triangle filled). */
export interface DesignCrossProducts {
  readonly p: number;
  readonly n: number;
  /** X'X. */
  readonly gram: Float64Array;
  /** With `squaresOf`: X'u, u'u and mean(e^2). */
  readonly squares?: { readonly xu: Float64Array; readonly uu: number; readonly meanSquare: number };
  /** With `differences`: X'AX = sum_i d_i d_i' and X'A^2X = sum_i a_i a_i' (see below). */
  readonly differences?: { readonly xax: Float64Array; readonly xa2x: Float64Array };
}

/**
 * Gathers X'X and, on request, the cross products the Durbin-Watson moments and the
 * Breusch-Pagan regression need, calling `design.row` once per row:
 * - X'AX = sum_i d_i d_i' with d_i = x_i - x_(i-1) (d_0 = d_n = 0), since A = D'D for the
 *   (n-1) x n first-difference matrix D;
 * - X'A^2X = sum_i a_i a_i' with a_i = d_i - d_(i+1), the rows of AX;
 * - X'u and u'u for u_i = e_i^2 - mean(e^2) (Koenker 1981).
 * The differences are taken between design rows, never between sums, so nothing cancels.
 * Rows are gathered in blocks of BLOCK_ROWS and summed by `addCrossProducts` (blocked
 * summation). The residuals are assumed finite (the tests check them first).
 * Cost O(n p^2) time, O(p BLOCK_ROWS) scratch, no allocation per row.
 * Example: designCrossProducts(denseDesign(Float64Array.of(1, 0, 1, 1, 1, 2), 2), 3,
 * { differences: true }) has gram [3, 3; ., 5] and X'AX [0, 0; ., 2].
 */
export function designCrossProducts(design: DesignRows, n: number, request: CrossProductRequest): DesignCrossProducts {
  if (design.sparse) return sparseCrossProducts(design.sparse, design.p, n, request);
  const p = design.p;
  const e = request.squaresOf;
  // Row-major block of [x_i | u_i]; the design writes straight into its rows.
  const q = e ? p + 1 : p;
  const m = BLOCK_ROWS;
  const block = new Float64Array(m * q);
  const designRows = rowViews(block, m, q, p);
  const products = new Float64Array(q * q);
  let meanSquare = 0;
  if (e) {
    for (let i = 0; i < n; i++) meanSquare += (e[i] as number) * (e[i] as number);
    meanSquare /= n;
  }
  let uu = 0;
  const differences = request.differences ? new DifferenceSums(p, m) : undefined;
  for (let start = 0; start < n; start += m) {
    const rows = Math.min(m, n - start);
    for (let t = 0; t < rows; t++) design.row(start + t, designRows[t] as Float64Array);
    if (e) {
      for (let t = 0; t < rows; t++) {
        const v = e[start + t] as number;
        const u = v * v - meanSquare;
        uu += u * u;
        block[t * q + p] = u;
      }
    }
    addCrossProducts(block, rows, q, products);
    if (differences) differences.add(block, q, rows, start === 0);
  }
  const gram = new Float64Array(p * p);
  for (let a = 0; a < p; a++) for (let b = a; b < p; b++) gram[a * p + b] = products[a * q + b] as number;
  const out: { -readonly [K in keyof DesignCrossProducts]: DesignCrossProducts[K] } = { p, n, gram };
  if (e) {
    const xu = new Float64Array(p);
    for (let a = 0; a < p; a++) xu[a] = products[a * q + p] as number;
    out.squares = { xu, uu, meanSquare };
  }
  if (differences) out.differences = differences.finish();
  return out;
}

/** Running sums of d_i d_i' and a_i a_i' over blocks of design rows. */
class DifferenceSums {
  private readonly dBlock: Float64Array;
  private readonly aBlock: Float64Array;
  private readonly prevRow: Float64Array;
  private readonly prevDiff: Float64Array; // d_(i-1)
  private readonly xax: Float64Array;
  private readonly xa2x: Float64Array;

  constructor(
    private readonly p: number,
    blockRows: number,
  ) {
    this.dBlock = new Float64Array(blockRows * p);
    this.aBlock = new Float64Array(blockRows * p);
    this.prevRow = new Float64Array(p);
    this.prevDiff = new Float64Array(p);
    this.xax = new Float64Array(p * p);
    this.xa2x = new Float64Array(p * p);
  }

  /** Adds the rows of a block (design columns first, `stride` entries per row). */
  add(block: Float64Array, stride: number, rows: number, firstBlock: boolean): void {
    const { p, dBlock, aBlock, prevRow, prevDiff } = this;
    for (let t = 0; t < rows; t++) {
      const first = firstBlock && t === 0;
      const o = t * stride;
      const od = t * p;
      for (let k = 0; k < p; k++) {
        const v = block[o + k] as number;
        const d = first ? 0 : v - (prevRow[k] as number);
        dBlock[od + k] = d;
        // a_(i-1) = d_(i-1) - d_i (zero for i = 0, where both are zero).
        aBlock[od + k] = (prevDiff[k] as number) - d;
        prevRow[k] = v;
        prevDiff[k] = d;
      }
    }
    addCrossProducts(dBlock, rows, p, this.xax);
    addCrossProducts(aBlock, rows, p, this.xa2x);
  }

  /** X'AX and X'A^2X, adding the last row of AX, a_(n-1) = d_(n-1). */
  finish(): { xax: Float64Array; xa2x: Float64Array } {
    addCrossProducts(this.prevDiff, 1, this.p, this.xa2x);
    return { xax: this.xax, xa2x: this.xa2x };
  }
}

/**
 * The same cross products as `designCrossProducts` for rows x_i = E' b_i with sparse b_i
 * (SparseRows): b b', b u, d d' and a a' are summed in the sparse basis, where a row touches
 * only the entries its non-zeros span (a B-spline row 4, a difference between neighbouring
 * rows at most 8), and mapped back as E' M E once. The same sums up to rounding; cost
 * O(n width^2 + size^2 p) instead of O(n p^2). Runs of rows in one knot interval of a
 * 4-wide basis (most rows, x being sorted) go through fastRun, which adds the same products
 * in the same order (the same bits) with the four entries held in variables.
 */
function sparseCrossProducts(rows: SparseRows, p: number, n: number, request: CrossProductRequest): DesignCrossProducts {
  const { size, width } = rows;
  const e = request.squaresOf;
  let meanSquare = 0;
  if (e) {
    for (let i = 0; i < n; i++) meanSquare += (e[i] as number) * (e[i] as number);
    meanSquare /= n;
  }
  const g = new Float64Array(size * size);
  const xu = new Float64Array(size);
  const dd = request.differences ? new Float64Array(size * size) : undefined;
  const aa = request.differences ? new Float64Array(size * size) : undefined;
  const vals = new Float64Array(width);
  // Dense b_i, b_(i-1), d_i = b_i - b_(i-1), d_(i-1) over the basis, and where each is non-zero.
  let b = new Float64Array(size);
  let bPrev = new Float64Array(size);
  let d = new Float64Array(size);
  let dPrev = new Float64Array(size);
  const a = new Float64Array(size);
  let bLo = 0;
  let bHi = -1;
  let dLo = 0;
  let dHi = -1;
  let uu = 0;
  for (let i = 0; i < n; i++) {
    let first = rows.row(i, vals);
    if (width === 4 && dd && aa && i >= 2 && first === bLo && dLo === bLo && dHi === bHi) {
      // Rows i-2, i-1 and i share one knot interval: every vector spans the same 4 entries.
      const run = fastRun(i, first);
      uu = run.uu;
      i = run.next;
      if (i >= n) break;
      // Row i left the interval; its entries are in vals already.
      first = run.first;
    }
    // b_i replaces b_(i-1), whose old non-zeros are cleared.
    const t = bPrev;
    bPrev = b;
    b = t;
    for (let k = bLo; k <= bHi; k++) b[k] = 0;
    const prevLo = bLo;
    const prevHi = bHi;
    bLo = first;
    bHi = first + width - 1;
    for (let k = 0; k < width; k++) b[first + k] = vals[k] as number;
    outer(g, size, b, bLo, bHi, 1);
    if (e) {
      const v = e[i] as number;
      const u = v * v - meanSquare;
      uu += u * u;
      for (let k = bLo; k <= bHi; k++) xu[k] = (xu[k] as number) + (b[k] as number) * u;
    }
    if (dd && aa) {
      // d_i = b_i - b_(i-1) (d_0 = 0); a_(i-1) = d_(i-1) - d_i.
      const td = dPrev;
      dPrev = d;
      d = td;
      const pdLo = dLo;
      const pdHi = dHi;
      for (let k = pdLo; k <= pdHi; k++) d[k] = 0;
      if (i === 0) {
        dLo = 0;
        dHi = -1;
      } else {
        dLo = Math.min(bLo, prevLo);
        dHi = Math.max(bHi, prevHi);
        for (let k = dLo; k <= dHi; k++) d[k] = (b[k] as number) - (bPrev[k] as number);
      }
      outer(dd, size, d, dLo, dHi, 1);
      const aLo = pdHi < pdLo ? dLo : dHi < dLo ? pdLo : Math.min(pdLo, dLo);
      const aHi = Math.max(pdHi, dHi);
      for (let k = aLo; k <= aHi; k++) a[k] = (dPrev[k] as number) - (d[k] as number);
      outer(aa, size, a, aLo, aHi, 1);
      for (let k = aLo; k <= aHi; k++) a[k] = 0;
    }
  }
  // The last row of AX, a_(n-1) = d_(n-1).
  if (aa) outer(aa, size, d, dLo, dHi, 1);

  /**
   * Adds rows i, i+1, ... while they stay in the knot interval starting at basis entry f,
   * with rows i-2 and i-1 in it too: the same products added to the same entries in the same
   * row order as the general loop (which adds zero products besides, changing no sum), without
   * its range bookkeeping. Leaves b, bPrev, d and dPrev as the general loop would have them;
   * returns the first row not added (with its entries in vals) and uu.
   */
  function fastRun(i: number, f: number): { next: number; first: number; uu: number } {
    const G = g;
    const DD = dd as Float64Array;
    const AA = aa as Float64Array;
    const o0 = f * size + f;
    const o1 = o0 + size;
    const o2 = o1 + size;
    const o3 = o2 + size;
    // b_(i-1), b_(i-2), d_(i-1), d_(i-2) over the 4 entries.
    let b0 = b[f] as number;
    let b1 = b[f + 1] as number;
    let b2 = b[f + 2] as number;
    let b3 = b[f + 3] as number;
    let q0 = bPrev[f] as number;
    let q1 = bPrev[f + 1] as number;
    let q2 = bPrev[f + 2] as number;
    let q3 = bPrev[f + 3] as number;
    let d0 = d[f] as number;
    let d1 = d[f + 1] as number;
    let d2 = d[f + 2] as number;
    let d3 = d[f + 3] as number;
    let p0 = dPrev[f] as number;
    let p1 = dPrev[f + 1] as number;
    let p2 = dPrev[f + 2] as number;
    let p3 = dPrev[f + 3] as number;
    let sumU = uu;
    let first = f;
    let row = i;
    for (; row < n; row++) {
      if (row > i) {
        first = rows.row(row, vals);
        if (first !== f) break;
      }
      const c0 = vals[0] as number;
      const c1 = vals[1] as number;
      const c2 = vals[2] as number;
      const c3 = vals[3] as number;
      addOuter4(G, o0, o1, o2, o3, c0, c1, c2, c3);
      if (e) {
        const v = e[row] as number;
        const u = v * v - meanSquare;
        sumU += u * u;
        xu[f] = (xu[f] as number) + c0 * u;
        xu[f + 1] = (xu[f + 1] as number) + c1 * u;
        xu[f + 2] = (xu[f + 2] as number) + c2 * u;
        xu[f + 3] = (xu[f + 3] as number) + c3 * u;
      }
      const e0 = c0 - b0;
      const e1 = c1 - b1;
      const e2 = c2 - b2;
      const e3 = c3 - b3;
      addOuter4(DD, o0, o1, o2, o3, e0, e1, e2, e3);
      addOuter4(AA, o0, o1, o2, o3, d0 - e0, d1 - e1, d2 - e2, d3 - e3);
      q0 = b0;
      q1 = b1;
      q2 = b2;
      q3 = b3;
      b0 = c0;
      b1 = c1;
      b2 = c2;
      b3 = c3;
      p0 = d0;
      p1 = d1;
      p2 = d2;
      p3 = d3;
      d0 = e0;
      d1 = e1;
      d2 = e2;
      d3 = e3;
    }
    b.set([b0, b1, b2, b3], f);
    bPrev.set([q0, q1, q2, q3], f);
    d.set([d0, d1, d2, d3], f);
    dPrev.set([p0, p1, p2, p3], f);
    return { next: row, first, uu: sumU };
  }
  const out: { -readonly [K in keyof DesignCrossProducts]: DesignCrossProducts[K] } = { p, n, gram: mapped(g, rows.expand, size, p) };
  if (e) out.squares = { xu: rows.expand ? mappedVector(xu, rows.expand, size, p) : xu, uu, meanSquare };
  if (dd && aa) out.differences = { xax: mapped(dd, rows.expand, size, p), xa2x: mapped(aa, rows.expand, size, p) };
  return out;
}

/** Adds v v' to the upper triangle of a 4 x 4 block of m whose rows start at o0..o3 (the products outer() forms, in its order). */
function addOuter4(m: Float64Array, o0: number, o1: number, o2: number, o3: number, v0: number, v1: number, v2: number, v3: number): void {
  m[o0] = (m[o0] as number) + v0 * v0;
  m[o0 + 1] = (m[o0 + 1] as number) + v0 * v1;
  m[o0 + 2] = (m[o0 + 2] as number) + v0 * v2;
  m[o0 + 3] = (m[o0 + 3] as number) + v0 * v3;
  m[o1 + 1] = (m[o1 + 1] as number) + v1 * v1;
  m[o1 + 2] = (m[o1 + 2] as number) + v1 * v2;
  m[o1 + 3] = (m[o1 + 3] as number) + v1 * v3;
  m[o2 + 2] = (m[o2 + 2] as number) + v2 * v2;
  m[o2 + 3] = (m[o2 + 3] as number) + v2 * v3;
  m[o3 + 3] = (m[o3 + 3] as number) + v3 * v3;
}

/** Adds s v v' to the upper triangle of m (size x size) over the entries lo..hi of v. */
function outer(m: Float64Array, size: number, v: Float64Array, lo: number, hi: number, s: number): void {
  for (let r = lo; r <= hi; r++) {
    const vr = s * (v[r] as number);
    if (vr === 0) continue;
    const o = r * size;
    for (let c = r; c <= hi; c++) m[o + c] = (m[o + c] as number) + vr * (v[c] as number);
  }
}

/** E' M E (p x p, upper triangle) for M symmetric with its upper triangle filled; M itself when E is absent. */
function mapped(m: Float64Array, expand: Float64Array | undefined, size: number, p: number): Float64Array {
  if (!expand) return m;
  const full = (r: number, c: number): number => (r <= c ? (m[r * size + c] as number) : (m[c * size + r] as number));
  // M E first (size x p), then E' (M E).
  const me = new Float64Array(size * p);
  for (let r = 0; r < size; r++)
    for (let j = 0; j < p; j++) {
      let s = 0;
      for (let k = 0; k < size; k++) s += full(r, k) * (expand[k * p + j] as number);
      me[r * p + j] = s;
    }
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++)
    for (let j = i; j < p; j++) {
      let s = 0;
      for (let k = 0; k < size; k++) s += (expand[k * p + i] as number) * (me[k * p + j] as number);
      out[i * p + j] = s;
    }
  return out;
}

/** E' v. */
function mappedVector(v: Float64Array, expand: Float64Array, size: number, p: number): Float64Array {
  const out = new Float64Array(p);
  for (let k = 0; k < size; k++) for (let j = 0; j < p; j++) out[j] = (out[j] as number) + (expand[k * p + j] as number) * (v[k] as number);
  return out;
}
