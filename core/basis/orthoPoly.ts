import { FitError } from '../errors';
import type { RowBasis } from './rowBasis';

/**
 * Orthogonal polynomial basis of degree d on the data x: P_0 = 1, P_1 = u - a_0,
 * P_{j+1} = (u - a_j) P_j - b_j P_{j-1}, with a_j = sum u P_j^2 / sum P_j^2 and
 * b_j = sum P_j^2 / sum P_{j-1}^2 (the Stieltjes procedure; Forsythe 1957, "Generation and
 * use of orthogonal polynomials for data-fitting with a digital computer", J. SIAM 5(2)),
 * where u = (x - mid) / half maps the data range to [-1, 1]. Columns are scaled to unit
 * root-mean-square on the data. The basis spans the same space as R's poly(x, d) plus an
 * intercept, so fitted values agree; the recurrence coefficients evaluate it at any x.
 * Building costs O(n d) with two scratch columns. Width = size = d + 1 (dense rows).
 */
export class OrthoPolyBasis implements RowBasis {
  readonly size: number;
  readonly width: number;
  readonly alpha: Float64Array;
  readonly beta: Float64Array;
  readonly norm: Float64Array;
  readonly mid: number;
  readonly half: number;

  constructor(
    sortedX: Float64Array,
    x: Float64Array,
    readonly degree: number,
  ) {
    const n = x.length;
    const lo = sortedX[0] as number;
    const hi = sortedX[n - 1] as number;
    if (!(hi > lo)) throw new FitError(`polynomial of degree ${degree} needs at least two distinct x values; all x equal ${lo}`);
    this.mid = lo / 2 + hi / 2;
    this.half = hi / 2 - lo / 2;
    this.size = this.width = degree + 1;
    this.alpha = new Float64Array(degree + 1);
    this.beta = new Float64Array(degree + 1);
    this.norm = new Float64Array(degree + 1);
    let prev = new Float64Array(n);
    let cur = new Float64Array(n).fill(1);
    let next = new Float64Array(n);
    let prevNorm2 = 1;
    for (let j = 0; j <= degree; j++) {
      let s2 = 0;
      let su = 0;
      for (let i = 0; i < n; i++) {
        const pj = cur[i] as number;
        const u = ((x[i] as number) - this.mid) / this.half;
        s2 += pj * pj;
        su += u * pj * pj;
      }
      this.norm[j] = Math.sqrt(s2 / n);
      this.alpha[j] = su / s2;
      this.beta[j] = j === 0 ? 0 : s2 / prevNorm2;
      prevNorm2 = s2;
      if (j === degree) break;
      const a = this.alpha[j] as number;
      const b = this.beta[j] as number;
      for (let i = 0; i < n; i++) {
        const u = ((x[i] as number) - this.mid) / this.half;
        next[i] = (u - a) * (cur[i] as number) - b * (prev[i] as number);
      }
      const t = prev;
      prev = cur;
      cur = next;
      next = t;
    }
  }

  /** The constant 1 is the first column exactly (P_0 = 1 with root-mean-square 1): coefficients (1, 0, ..., 0). */
  unitCoefficients(out: Float64Array): void {
    out.fill(0, 0, this.size);
    out[0] = 1;
  }

  row(x: number, out: Float64Array): number {
    const u = (x - this.mid) / this.half;
    let pPrev = 0;
    let p = 1;
    for (let j = 0; j <= this.degree; j++) {
      out[j] = p / (this.norm[j] as number);
      const pNext = (u - (this.alpha[j] as number)) * p - (this.beta[j] as number) * pPrev;
      pPrev = p;
      p = pNext;
    }
    return 0;
  }
}
