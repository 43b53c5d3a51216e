import { addCrossProducts, rowViews } from './crossProducts';
import type { DesignRows } from './design';

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
