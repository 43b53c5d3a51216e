/**
 * A banded triangular factor built row by row with Givens rotations, for the penalised
 * least-squares system of the shape-constrained smoothing spline.
 */
import { FitError } from '../../errors';

/** A diagonal entry of R below this fraction of the largest means the penalised problem is singular to working precision. */
const R_PIVOT_TOLERANCE = 1e-13;

/**
 * Accumulates rows into a band factor by Givens rotations (Lawson & Hanson 1974, "Solving
 * Least Squares Problems", chapter 27; rotations as Golub & Van Loan 2013, "Matrix
 * Computations", 4th ed., section 5.1). O(w^2) per row added in order, q * w numbers stored.
 * @example const acc = new BandAccumulator(q, 4); acc.add(first, row, rhs); acc.check(); // acc.r, acc.d
 */
export class BandAccumulator {
  readonly r: Float64Array;
  readonly d: Float64Array;
  constructor(
    readonly q: number,
    readonly w: number,
  ) {
    this.r = new Float64Array(q * w);
    this.d = new Float64Array(q);
  }

  /**
   * Rotates the row with entries x[0..w) at columns first.. and right-hand side y into the
   * factor; x is overwritten. Any order gives the same factor up to signs; in non-decreasing
   * order of `first` a row meets an empty factor row after at most w rotations, O(w^2).
   */
  add(first: number, x: Float64Array, y: number): void {
    const { r, d, q, w } = this;
    let rhs = y;
    for (let k = first; k < q; k++) {
      const x0 = x[0] as number;
      if (x0 !== 0) {
        const o = k * w;
        const rkk = r[o] as number;
        if (rkk === 0) {
          // An empty factor row takes the rotated row as it is.
          for (let a = 0; a < w && k + a < q; a++) r[o + a] = x[a] as number;
          d[k] = rhs;
          return;
        }
        const h = Math.hypot(rkk, x0);
        const c = rkk / h;
        const s = x0 / h;
        for (let a = 0; a < w && k + a < q; a++) {
          const ra = r[o + a] as number;
          const xa = x[a] as number;
          r[o + a] = c * ra + s * xa;
          x[a] = c * xa - s * ra;
        }
        const dk = d[k] as number;
        d[k] = c * dk + s * rhs;
        rhs = c * rhs - s * dk;
      }
      let any = false;
      for (let a = 0; a + 1 < w; a++) {
        const v = x[a + 1] as number;
        x[a] = v;
        if (v !== 0) any = true;
      }
      x[w - 1] = 0;
      if (!any) return;
    }
  }

  /** Throws FitError when a diagonal entry of R is negligible against the largest. */
  check(): void {
    const { r, q, w } = this;
    let max = 0;
    for (let k = 0; k < q; k++) max = Math.max(max, Math.abs(r[k * w] as number));
    for (let k = 0; k < q; k++) {
      if (!(Math.abs(r[k * w] as number) > R_PIVOT_TOLERANCE * max)) {
        throw new FitError(`shape-constrained smoothing spline: the penalised problem is singular to working precision (coefficient ${k + 1} of ${q})`);
      }
    }
  }
}
