import type { RowBasis } from '../basis/rowBasis';
import { factorSpd } from '../linalg/spd';
import type { Curve, CurveKindId, XYData } from '../types';

/** Weighted least-squares fit in a row basis, optionally restricted to span(Z). */
export interface LinearFit {
  /** Coefficients in the row basis (theta = Z beta when constrained). */
  readonly theta: Float64Array;
  /** Unscaled coefficient covariance in the row basis: Z (Z'GZ)^-1 Z', size x size. */
  readonly cov: Float64Array;
  readonly fitted: Float64Array;
  readonly leverage: Float64Array;
  readonly condition: number;
  /** Number of free coefficients (= df). */
  readonly rank: number;
}

/**
 * Weighted least squares y ~ B theta with theta = Z beta (Z: size x q, orthonormal columns,
 * or undefined for q = size), solved from the Gram matrix G = B'WB accumulated from the
 * `width` nonzero entries of each row (O(n width^2)), scaled to unit diagonal and factorised
 * by Cholesky with a condition check (rank deficiency throws FitError naming `what`).
 * With a B-spline basis G is well conditioned (de Boor 1976, "On local linear functionals
 * which vanish at all B-splines but one"), unlike a raw power basis.
 * Leverage h_i = w_i b_i' Z (Z'GZ)^-1 Z' b_i, fitted values B theta; a second O(n width^2) pass.
 */
export function fitRowBasis(data: XYData, basis: RowBasis, z: Float64Array | undefined, what: string): LinearFit {
  const { x, y, w } = data;
  const n = x.length;
  const p = basis.size;
  const width = basis.width;
  const buf = new Float64Array(width);
  const g = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    const first = basis.row(x[i] as number, buf);
    const wi = w ? (w[i] as number) : 1;
    const yi = y[i] as number;
    for (let a = 0; a < width; a++) {
      const wa = wi * (buf[a] as number);
      rhs[first + a] = (rhs[first + a] as number) + wa * yi;
      const rowOff = (first + a) * p + first;
      for (let b = 0; b <= a; b++) g[rowOff + b] = (g[rowOff + b] as number) + wa * (buf[b] as number);
    }
  }
  for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) g[j * p + i] = g[i * p + j] as number;
  const q = z ? z.length / p : p;
  const gq = z ? congruence(g, z, p, q) : g;
  const rq = z ? transposeTimes(z, rhs, p, q) : rhs;
  const factor = factorSpd(gq, q, what);
  const beta = factor.solve(rq);
  const theta = z ? times(z, beta, p, q) : beta;
  const cov = z ? congruenceT(factor.inverse, z, p, q) : factor.inverse;
  const fitted = new Float64Array(n);
  const leverage = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const first = basis.row(x[i] as number, buf);
    let f = 0;
    let h = 0;
    for (let a = 0; a < width; a++) {
      const ba = buf[a] as number;
      f += ba * (theta[first + a] as number);
      const rowOff = (first + a) * p + first;
      let s = 0;
      for (let b = 0; b < width; b++) s += (cov[rowOff + b] as number) * (buf[b] as number);
      h += ba * s;
    }
    fitted[i] = f;
    leverage[i] = (w ? (w[i] as number) : 1) * h;
  }
  return { theta, cov, fitted, leverage, condition: factor.condition, rank: q };
}

/** Z' G Z for symmetric G (p x p) and Z (p x q). */
export function congruence(g: Float64Array, z: Float64Array, p: number, q: number): Float64Array {
  const gz = new Float64Array(p * q);
  for (let i = 0; i < p; i++)
    for (let k = 0; k < p; k++) {
      const gik = g[i * p + k] as number;
      if (gik === 0) continue;
      for (let j = 0; j < q; j++) gz[i * q + j] = (gz[i * q + j] as number) + gik * (z[k * q + j] as number);
    }
  const out = new Float64Array(q * q);
  for (let i = 0; i < q; i++)
    for (let j = 0; j < q; j++) {
      let s = 0;
      for (let k = 0; k < p; k++) s += (z[k * q + i] as number) * (gz[k * q + j] as number);
      out[i * q + j] = s;
    }
  return out;
}

/** Z V Z' for V (q x q) and Z (p x q). */
export function congruenceT(v: Float64Array, z: Float64Array, p: number, q: number): Float64Array {
  const zv = new Float64Array(p * q);
  for (let i = 0; i < p; i++)
    for (let j = 0; j < q; j++) {
      let s = 0;
      for (let k = 0; k < q; k++) s += (z[i * q + k] as number) * (v[k * q + j] as number);
      zv[i * q + j] = s;
    }
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++)
    for (let j = 0; j < p; j++) {
      let s = 0;
      for (let k = 0; k < q; k++) s += (zv[i * q + k] as number) * (z[j * q + k] as number);
      out[i * p + j] = s;
    }
  return out;
}

export function transposeTimes(z: Float64Array, v: Float64Array, p: number, q: number): Float64Array {
  const out = new Float64Array(q);
  for (let k = 0; k < p; k++) for (let j = 0; j < q; j++) out[j] = (out[j] as number) + (z[k * q + j] as number) * (v[k] as number);
  return out;
}

export function times(z: Float64Array, v: Float64Array, p: number, q: number): Float64Array {
  const out = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    let s = 0;
    for (let j = 0; j < q; j++) s += (z[i * q + j] as number) * (v[j] as number);
    out[i] = s;
  }
  return out;
}

/** A Curve backed by a row basis, coefficients and their unscaled covariance. */
export class RowBasisCurve implements Curve {
  private readonly buf: Float64Array;
  constructor(
    readonly kind: CurveKindId,
    readonly df: number,
    readonly lower: number,
    readonly upper: number,
    private readonly basis: RowBasis,
    private readonly theta: Float64Array,
    private readonly cov: Float64Array,
    private readonly z?: Float64Array,
  ) {
    this.buf = new Float64Array(basis.width);
    this.designSize = z ? z.length / basis.size : basis.size;
  }

  /** Number of columns of the model matrix (= df for regression bases). */
  readonly designSize: number;

  /** Model-matrix row at x (Z' b(x) for a constrained basis), for residual tests that need the design. */
  designRow(x: number, out: Float64Array): void {
    const { buf, basis, z } = this;
    const first = basis.row(x, buf);
    if (!z) {
      out.fill(0);
      for (let a = 0; a < basis.width; a++) out[first + a] = buf[a] as number;
      return;
    }
    const q = this.designSize;
    for (let j = 0; j < q; j++) {
      let s = 0;
      for (let a = 0; a < basis.width; a++) s += (buf[a] as number) * (z[(first + a) * q + j] as number);
      out[j] = s;
    }
  }

  value(x: number): number {
    const first = this.basis.row(x, this.buf);
    let f = 0;
    for (let a = 0; a < this.basis.width; a++) f += (this.buf[a] as number) * (this.theta[first + a] as number);
    return f;
  }

  varianceFactor(x: number): number {
    const { buf, basis, cov } = this;
    const p = basis.size;
    const first = basis.row(x, buf);
    let h = 0;
    for (let a = 0; a < basis.width; a++) {
      let s = 0;
      for (let b = 0; b < basis.width; b++) s += (cov[(first + a) * p + first + b] as number) * (buf[b] as number);
      h += (buf[a] as number) * s;
    }
    return h;
  }
}
