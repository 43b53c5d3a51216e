import { FitError } from '../errors';

/** A diagonal entry of R below this fraction of its column's norm means rank deficiency. */
const RANK_TOLERANCE = 1e-10;

/**
 * QR factorisation X = QR accumulated one row at a time with Givens rotations, carrying
 * Q'y along, so that least-squares problems over DesignRows need O(p^2) memory and
 * O(n p^2) time and no n x p matrix (Golub & Van Loan, "Matrix Computations", 4th ed.
 * (2013), section 5.1.8; row-wise updating as in Gentleman (1973), "Least squares
 * computations by Givens transformations without square roots", J. Inst. Maths Applics 12).
 * Orthogonal rotations do not square the condition number, unlike the normal equations.
 *
 * After all rows: `r` holds the upper-triangular R (row-major p x p), `qty` the first p
 * entries of Q'y (so the fitted sum of squares is |qty|^2) and `residualSS` the residual
 * sum of squares of y.
 * Example: rows (1,0), (1,1), (1,2) with y = 1, 3, 5 give residualSS = 0.
 */
export class GivensQR {
  readonly p: number;
  readonly r: Float64Array;
  readonly qty: Float64Array;
  residualSS = 0;
  private readonly z: Float64Array;
  private readonly columnSS: Float64Array;

  constructor(p: number) {
    this.p = p;
    this.r = new Float64Array(p * p);
    this.qty = new Float64Array(p);
    this.z = new Float64Array(p);
    this.columnSS = new Float64Array(p);
  }

  /** Rotates one row (x, y) into the factorisation. `x` is not modified. O(p^2). */
  addRow(x: Float64Array, y: number): void {
    const { p, r, qty, z } = this;
    for (let j = 0; j < p; j++) {
      const v = x[j] as number;
      z[j] = v;
      this.columnSS[j] = (this.columnSS[j] as number) + v * v;
    }
    let yy = y;
    for (let j = 0; j < p; j++) {
      const zj = z[j] as number;
      if (zj === 0) continue;
      const rjj = r[j * p + j] as number;
      const h = Math.sqrt(rjj * rjj + zj * zj);
      const c = rjj / h;
      const s = zj / h;
      for (let k = j; k < p; k++) {
        const rk = r[j * p + k] as number;
        const zk = z[k] as number;
        r[j * p + k] = c * rk + s * zk;
        z[k] = c * zk - s * rk;
      }
      const qj = qty[j] as number;
      qty[j] = c * qj + s * yy;
      yy = c * yy - s * qj;
    }
    this.residualSS += yy * yy;
  }

  /** Throws FitError when some column is (numerically) a combination of the others. */
  checkRank(): void {
    const { p, r } = this;
    for (let j = 0; j < p; j++) {
      const norm = Math.sqrt(this.columnSS[j] as number);
      if (!(Math.abs(r[j * p + j] as number) > RANK_TOLERANCE * norm) || norm === 0) {
        throw new FitError(`the design is rank deficient: column ${j + 1} of ${p} is (nearly) a combination of the columns before it`);
      }
    }
  }

  /** Solves R' out = v (forward substitution), e.g. out = R^-T x_i for the rows of Q. O(p^2). */
  solveTransposed(v: Float64Array, out: Float64Array): void {
    const { p, r } = this;
    for (let j = 0; j < p; j++) {
      let s = v[j] as number;
      for (let k = 0; k < j; k++) s -= (r[k * p + j] as number) * (out[k] as number);
      out[j] = s / (r[j * p + j] as number);
    }
  }
}
