import type { RowBasis } from '../../basis/rowBasis';
import { FitError } from '../../errors';
import { congruenceT, type SparseRows, sparseCongruence, sparseRows, sparseTimes, sparseTransposeTimes } from '../linearFit';
import { factorSpd } from '../../linalg/spd';
import { type Cells, SUMS_PER_CELL } from './cells';

/** Interior sample points of a cell, where the 4 active B-splines are sampled to recover their cubic. */
export const TAU = [1 / 8, 3 / 8, 5 / 8, 7 / 8];
/** Inverse of the Vandermonde matrix V[m][p] = TAU[m]^p, row-major (a cubic's coefficients from its values at TAU). */
export const VANDER_INV = invert4(TAU.flatMap((tau) => [1, tau, tau * tau, tau * tau * tau]));

function invert4(v: number[]): Float64Array {
  const a = v.slice();
  const inv = [1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1, 0, 0, 0, 0, 1];
  for (let c = 0; c < 4; c++) {
    let piv = c;
    for (let r = c + 1; r < 4; r++) if (Math.abs(a[r * 4 + c] as number) > Math.abs(a[piv * 4 + c] as number)) piv = r;
    for (let k = 0; k < 4; k++) {
      [a[c * 4 + k], a[piv * 4 + k]] = [a[piv * 4 + k] as number, a[c * 4 + k] as number];
      [inv[c * 4 + k], inv[piv * 4 + k]] = [inv[piv * 4 + k] as number, inv[c * 4 + k] as number];
    }
    const d = a[c * 4 + c] as number;
    for (let k = 0; k < 4; k++) {
      a[c * 4 + k] = (a[c * 4 + k] as number) / d;
      inv[c * 4 + k] = (inv[c * 4 + k] as number) / d;
    }
    for (let r = 0; r < 4; r++) {
      if (r === c) continue;
      const f = a[r * 4 + c] as number;
      for (let k = 0; k < 4; k++) {
        a[r * 4 + k] = (a[r * 4 + k] as number) - f * (a[c * 4 + k] as number);
        inv[r * 4 + k] = (inv[r * 4 + k] as number) - f * (inv[c * 4 + k] as number);
      }
    }
  }
  return Float64Array.from(inv);
}

/**
 * One natural-spline candidate prepared for fitting from per-cell power sums: for each cell
 * the index of its first active B-spline and the cubic coefficients (in t) of the 4 active
 * B-splines. Fitting from sums costs O(cells + p^3), independent of the number of rows.
 */
export class SplineFromSums {
  private readonly first: Int32Array;
  /** poly[c*16 + a*4 + p]: coefficient of t^p of active basis function a in cell c. */
  private readonly poly: Float64Array;
  /**
   * The candidate's knot intervals as runs of cells: run r covers cells runStart[r] ..
   * runStart[r + 1] - 1, its 4 cubics in the run's own frame s in [0, 1] are runPoly[r*16 + a*4 + p],
   * and cell k sits at s = shift[2k] + shift[2k + 1] t.
   */
  private readonly runStart: Int32Array;
  private readonly runPoly: Float64Array;
  private readonly shift: Float64Array;
  /** The power sums of one run in its frame, gathered from its cells. */
  private readonly runSums = new Float64Array(11);
  private readonly g: Float64Array;
  private readonly rhs: Float64Array;
  /** The null space z by rows (mostly a unit matrix) and the scratch of its products. */
  private readonly zRows: SparseRows;
  private readonly gz: Float64Array;
  private readonly gq: Float64Array;
  private readonly rq: Float64Array;
  /** Per-cell cubic of the last fit: fitPoly[c*4 + p]. */
  readonly fitPoly: Float64Array;
  /** B-spline coefficients of the last successful fit. */
  theta: Float64Array = new Float64Array(0);
  /** Why the last fit failed. */
  lastError = '';
  readonly cellCount: number;

  constructor(
    cells: Cells,
    private readonly basis: RowBasis,
    private readonly z: Float64Array,
    private readonly label: string,
  ) {
    const cellCount = cells.breaks.length - 1;
    this.cellCount = cellCount;
    this.first = new Int32Array(cellCount);
    this.poly = new Float64Array(cellCount * 16);
    this.fitPoly = new Float64Array(cellCount * 4);
    const p = basis.size;
    this.g = new Float64Array(p * p);
    this.rhs = new Float64Array(p);
    const q = z.length / p;
    this.zRows = sparseRows(z, p, q);
    this.gz = new Float64Array(p * q);
    this.gq = new Float64Array(q * q);
    this.rq = new Float64Array(q);
    const vals = new Float64Array(16);
    const buf = new Float64Array(4);
    const piece = new Float64Array(16);
    // Within one knot interval of the candidate the 4 active B-splines are one cubic each, and
    // row() reports the same first index there (it changes exactly at the knots). So each run of
    // cells with one first index is one piece: its cubics are sampled once over the whole run
    // and carried into each cell's frame, instead of 4 basis evaluations in every cell.
    const breaks = cells.breaks;
    const runStarts: number[] = [];
    const runPolys: number[] = [];
    this.shift = new Float64Array(2 * cellCount);
    // Where the pieces join, when the basis says (its knots, which are among the cells' breaks):
    // a run then ends at the next of them, without evaluating the basis in every cell.
    const joins = basis.pieceBreaks;
    let j = 0;
    let c = 0;
    while (c < cellCount) {
      const first = basis.row(((breaks[c] as number) + (breaks[c + 1] as number)) / 2, buf);
      let end = c + 1;
      if (joins) {
        while (j < joins.length && (joins[j] as number) <= (breaks[c] as number)) j++;
        while (end < cellCount && (breaks[end] as number) < (j < joins.length ? (joins[j] as number) : Infinity)) end++;
      } else while (end < cellCount && basis.row(((breaks[end] as number) + (breaks[end + 1] as number)) / 2, buf) === first) end++;
      const start = breaks[c] as number;
      const width = (breaks[end] as number) - start;
      for (let mIdx = 0; mIdx < 4; mIdx++) {
        basis.row(start + width * (TAU[mIdx] as number), buf);
        for (let a = 0; a < 4; a++) vals[mIdx * 4 + a] = buf[a] as number;
      }
      for (let a = 0; a < 4; a++)
        for (let pw = 0; pw < 4; pw++) {
          let v = 0;
          for (let mIdx = 0; mIdx < 4; mIdx++) v += (VANDER_INV[pw * 4 + mIdx] as number) * (vals[mIdx * 4 + a] as number);
          piece[a * 4 + pw] = v;
        }
      runStarts.push(c);
      for (let j = 0; j < 16; j++) runPolys.push(piece[j] as number);
      // Cell k of the run: s = alpha + beta t with t its own position in [0, 1].
      for (let k = c; k < end; k++) {
        const alpha = ((breaks[k] as number) - start) / width;
        const beta = ((breaks[k + 1] as number) - (breaks[k] as number)) / width;
        this.shift[2 * k] = alpha;
        this.shift[2 * k + 1] = beta;
        this.first[k] = first;
        for (let a = 0; a < 4; a++) {
          const c0 = piece[a * 4] as number;
          const c1 = piece[a * 4 + 1] as number;
          const c2 = piece[a * 4 + 2] as number;
          const c3 = piece[a * 4 + 3] as number;
          const o = k * 16 + a * 4;
          this.poly[o] = c0 + alpha * (c1 + alpha * (c2 + alpha * c3));
          this.poly[o + 1] = beta * (c1 + alpha * (2 * c2 + 3 * alpha * c3));
          this.poly[o + 2] = beta * beta * (c2 + 3 * alpha * c3);
          this.poly[o + 3] = beta * beta * beta * c3;
        }
      }
      c = end;
    }
    runStarts.push(cellCount);
    this.runStart = Int32Array.from(runStarts);
    this.runPoly = Float64Array.from(runPolys);
  }

  /**
   * Weighted least-squares fit from training sums; fills `fitPoly`. Returns false when the
   * training rows cannot determine the coefficients (rank deficient in this resample).
   */
  fit(sums: Float64Array): boolean {
    const { g, rhs, poly, first } = this;
    const p = this.basis.size;
    g.fill(0);
    rhs.fill(0);
    const { runStart, runPoly, shift, runSums: r } = this;
    const runs = runStart.length - 1;
    for (let run = 0; run < runs; run++) {
      // The run's power sums in its own frame: each cell's sums of t^p scaled by beta^p and
      // shifted by alpha (sum (alpha + beta t)^p = sum_k C(p, k) alpha^(p-k) beta^k t^k, by
      // repeated one-step shifts, a Pascal matrix factored; all terms of the t-power sums are
      // non-negative, so nothing cancels). One Gram block per knot interval of the candidate
      // then serves all of its cells.
      r.fill(0);
      for (let k = runStart[run] as number, end = runStart[run + 1] as number; k < end; k++) {
        const o = k * SUMS_PER_CELL;
        const alpha = shift[2 * k] as number;
        const beta = shift[2 * k + 1] as number;
        const t0 = sums[o] as number;
        let t1 = beta * (sums[o + 1] as number);
        const b2 = beta * beta;
        let t2 = b2 * (sums[o + 2] as number);
        const b3 = b2 * beta;
        let t3 = b3 * (sums[o + 3] as number);
        let t4 = b2 * b2 * (sums[o + 4] as number);
        let t5 = b2 * b3 * (sums[o + 5] as number);
        let t6 = b3 * b3 * (sums[o + 6] as number);
        const u0 = sums[o + 7] as number;
        let u1 = beta * (sums[o + 8] as number);
        let u2 = b2 * (sums[o + 9] as number);
        let u3 = b3 * (sums[o + 10] as number);
        if (alpha !== 0) {
          t6 += alpha * t5;
          t5 += alpha * t4;
          t4 += alpha * t3;
          t3 += alpha * t2;
          t2 += alpha * t1;
          t1 += alpha * t0;
          t6 += alpha * t5;
          t5 += alpha * t4;
          t4 += alpha * t3;
          t3 += alpha * t2;
          t2 += alpha * t1;
          t6 += alpha * t5;
          t5 += alpha * t4;
          t4 += alpha * t3;
          t3 += alpha * t2;
          t6 += alpha * t5;
          t5 += alpha * t4;
          t4 += alpha * t3;
          t6 += alpha * t5;
          t5 += alpha * t4;
          t6 += alpha * t5;
          u3 += alpha * u2;
          u2 += alpha * u1;
          u1 += alpha * u0;
          u3 += alpha * u2;
          u2 += alpha * u1;
          u3 += alpha * u2;
        }
        r[0] = (r[0] as number) + t0;
        r[1] = (r[1] as number) + t1;
        r[2] = (r[2] as number) + t2;
        r[3] = (r[3] as number) + t3;
        r[4] = (r[4] as number) + t4;
        r[5] = (r[5] as number) + t5;
        r[6] = (r[6] as number) + t6;
        r[7] = (r[7] as number) + u0;
        r[8] = (r[8] as number) + u1;
        r[9] = (r[9] as number) + u2;
        r[10] = (r[10] as number) + u3;
      }
      const f = first[runStart[run] as number] as number;
      const pc = run * 16;
      // The run's Gram block P H P' (H the Hankel matrix of the power sums S_0..S_6) and
      // right-hand side P Y, written out: this runs for every candidate, knot interval and resample.
      const s0 = r[0] as number;
      const s1 = r[1] as number;
      const s2 = r[2] as number;
      const s3 = r[3] as number;
      const s4 = r[4] as number;
      const s5 = r[5] as number;
      const s6 = r[6] as number;
      const y0 = r[7] as number;
      const y1 = r[8] as number;
      const y2 = r[9] as number;
      const y3 = r[10] as number;
      for (let a = 0; a < 4; a++) {
        const pa = pc + a * 4;
        const a0 = runPoly[pa] as number;
        const a1 = runPoly[pa + 1] as number;
        const a2 = runPoly[pa + 2] as number;
        const a3 = runPoly[pa + 3] as number;
        // Row a of P H.
        const m0 = a0 * s0 + a1 * s1 + a2 * s2 + a3 * s3;
        const m1 = a0 * s1 + a1 * s2 + a2 * s3 + a3 * s4;
        const m2 = a0 * s2 + a1 * s3 + a2 * s4 + a3 * s5;
        const m3 = a0 * s3 + a1 * s4 + a2 * s5 + a3 * s6;
        rhs[f + a] = (rhs[f + a] as number) + a0 * y0 + a1 * y1 + a2 * y2 + a3 * y3;
        const row = (f + a) * p + f;
        for (let b = 0; b <= a; b++) {
          const pb = pc + b * 4;
          g[row + b] = (g[row + b] as number) + (runPoly[pb] as number) * m0 + (runPoly[pb + 1] as number) * m1 + (runPoly[pb + 2] as number) * m2 + (runPoly[pb + 3] as number) * m3;
        }
      }
    }
    for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) g[j * p + i] = g[i * p + j] as number;
    const zRows = this.zRows;
    let theta: Float64Array;
    try {
      const factor = factorSpd(sparseCongruence(g, zRows, this.gz, this.gq), zRows.q, this.label, undefined, true);
      theta = sparseTimes(zRows, factor.solve(sparseTransposeTimes(zRows, rhs, this.rq)), new Float64Array(p));
      this.theta = theta;
      this.inverse = factor.inverse;
    } catch (e) {
      if (e instanceof FitError) {
        this.lastError = e.message;
        return false;
      }
      throw e;
    }
    for (let c = 0; c < this.cellCount; c++) {
      const f = first[c] as number;
      for (let pw = 0; pw < 4; pw++) {
        let s = 0;
        for (let a = 0; a < 4; a++) s += (theta[f + a] as number) * (poly[c * 16 + a * 4 + pw] as number);
        this.fitPoly[c * 4 + pw] = s;
      }
    }
    return true;
  }

  /** Weighted sum of squared errors of the last fit over the rows summarised in `sums`. */
  sse(sums: Float64Array): number {
    let total = 0;
    const fp = this.fitPoly;
    for (let c = 0; c < this.cellCount; c++) {
      const o = c * SUMS_PER_CELL;
      const f0 = fp[c * 4] as number;
      const f1 = fp[c * 4 + 1] as number;
      const f2 = fp[c * 4 + 2] as number;
      const f3 = fp[c * 4 + 3] as number;
      const cross = f0 * (sums[o + 7] as number) + f1 * (sums[o + 8] as number) + f2 * (sums[o + 9] as number) + f3 * (sums[o + 10] as number);
      const s = (k: number): number => sums[o + k] as number;
      const square = f0 * f0 * s(0) + 2 * f0 * f1 * s(1) + (f1 * f1 + 2 * f0 * f2) * s(2) + (2 * f0 * f3 + 2 * f1 * f2) * s(3) + (f2 * f2 + 2 * f1 * f3) * s(4) + 2 * f2 * f3 * s(5) + f3 * f3 * s(6);
      total += (sums[o + 11] as number) - 2 * cross + square;
    }
    return total > 0 ? total : 0;
  }

  private inverse: Float64Array = new Float64Array(0);

  /** Unscaled covariance Z (Z'GZ)^-1 Z' of the last successful fit, size x size. */
  covariance(): Float64Array {
    return congruenceT(this.inverse, this.z, this.basis.size, this.z.length / this.basis.size);
  }

  /** Values of the 4 active B-splines at (cell, t) into out; returns the index of the first. */
  basisAt(cell: number, t: number, out: Float64Array): number {
    const o = cell * 16;
    const poly = this.poly;
    for (let a = 0; a < 4; a++) {
      const q = o + a * 4;
      out[a] = (poly[q] as number) + t * ((poly[q + 1] as number) + t * ((poly[q + 2] as number) + t * (poly[q + 3] as number)));
    }
    return this.first[cell] as number;
  }

  /** Value of the last fit at a row given its cell and scaled position. */
  valueAt(cell: number, t: number): number {
    const fp = this.fitPoly;
    const o = cell * 4;
    return (fp[o] as number) + t * ((fp[o + 1] as number) + t * ((fp[o + 2] as number) + t * (fp[o + 3] as number)));
  }
}
