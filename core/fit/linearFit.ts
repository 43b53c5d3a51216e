import type { BasisSpec, RowBasis } from '../basis/rowBasis';
import { FitError } from '../errors';
import { factorSpd, type SpdFailure } from '../linalg/spd';
import type { Curve, CurveKindId, XYData } from '../types';

/** Weighted least-squares fit in a row basis, optionally restricted to span(Z). */
export interface LinearFit {
  /** Coefficients in the row basis (theta = Z beta when constrained), the offset included. */
  readonly theta: Float64Array;
  /** Coefficients of y - offset: theta = centred + offset * (coefficients of the constant 1). */
  readonly centred: Float64Array;
  /** The weighted mean of y that was taken out before solving (0 when the basis cannot say how to add it back). */
  readonly offset: number;
  /** Unscaled coefficient covariance in the row basis: Z (Z'GZ)^-1 Z', size x size. */
  readonly cov: Float64Array;
  readonly fitted: Float64Array;
  /** (y - offset) - (fitted - offset): the residuals without the rounding of fitted to the offset's precision. */
  readonly residuals: Float64Array;
  readonly leverage: Float64Array;
  readonly condition: number;
  /** Number of free coefficients (= df). */
  readonly rank: number;
}

/**
 * Weighted least squares y ~ B theta with theta = Z beta (Z: size x q, orthonormal columns,
 * or undefined for q = size), solved from the Gram matrix G = B'WB accumulated from the
 * `width` nonzero entries of each row (O(n width^2)), scaled to unit diagonal and factorised
 * by Cholesky with a condition check (core/linalg/spd.ts). With a B-spline basis G is well
 * conditioned (de Boor 1976, "On local linear functionals which vanish at all B-splines but
 * one"), unlike a raw power basis.
 *
 * Scale. y is centred first at its weighted mean when the basis spans the constants
 * (`RowBasis.unitCoefficients`): the solve sees y - mean, and the mean is added back through
 * the exact coefficients of 1, so a small signal on a large offset (y = 1e14 + signal)
 * keeps its digits. The weights enter divided by a power of two near the largest weight,
 * which is exact and keeps G away from overflow and underflow at any scale of the weights.
 *
 * Leverage h_i = w_i b_i' Z (Z'GZ)^-1 Z' b_i, fitted values mean + B theta_centred; a
 * second O(n width^2) pass. Rank deficiency throws FitError naming `what` and what the data
 * lacks (too few rows or distinct x for the df, no rows where a basis function lives,
 * weights too small there; `explainDeficiency`).
 * Example: fitRowBasis({ x, y }, new OrthoPolyBasis(sorted, x, 2), undefined, 'parabola').fitted.
 */
export function fitRowBasis(data: XYData, basis: RowBasis, z: Float64Array | undefined, what: string): LinearFit {
  const { x, y, w } = data;
  const n = x.length;
  const p = basis.size;
  const width = basis.width;
  const buf = new Float64Array(width);
  const g = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  const unit = basis.unitCoefficients ? new Float64Array(p) : undefined;
  if (unit) basis.unitCoefficients?.(unit);
  let sw = 0;
  let swy = 0;
  let wMax = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    sw += wi;
    swy += wi * (y[i] as number);
    if (wi > wMax) wMax = wi;
  }
  const offset = unit && sw > 0 && Number.isFinite(swy / sw) ? swy / sw : 0;
  // An exact power of two near 1 / (largest weight): G = B'WB / 2^k, undone in the covariance.
  const wUnit = wMax > 0 ? 2 ** -Math.round(Math.log2(wMax)) : 1;
  for (let i = 0; i < n; i++) {
    const first = basis.row(x[i] as number, buf);
    const wi = w ? (w[i] as number) * wUnit : wUnit;
    const yi = (y[i] as number) - offset;
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
  const factor = factorSpd(gq, q, what, (failure) => explainDeficiency(data, basis, z, q, failure));
  const beta = factor.solve(rq);
  const centred = z ? times(z, beta, p, q) : beta;
  const cov = z ? congruenceT(factor.inverse, z, p, q) : factor.inverse;
  if (wUnit !== 1) for (let k = 0; k < cov.length; k++) cov[k] = (cov[k] as number) * wUnit;
  const fitted = new Float64Array(n);
  const residuals = new Float64Array(n);
  const leverage = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const first = basis.row(x[i] as number, buf);
    let f = 0;
    let h = 0;
    for (let a = 0; a < width; a++) {
      const ba = buf[a] as number;
      f += ba * (centred[first + a] as number);
      const rowOff = (first + a) * p + first;
      let s = 0;
      for (let b = 0; b < width; b++) s += (cov[rowOff + b] as number) * (buf[b] as number);
      h += ba * s;
    }
    fitted[i] = offset + f;
    residuals[i] = (y[i] as number) - offset - f;
    leverage[i] = (w ? (w[i] as number) : 1) * h;
  }
  const theta = withOffset(centred, offset, unit);
  return { theta, centred, offset, cov, fitted, residuals, leverage, condition: factor.condition, rank: q };
}

/**
 * Coefficients of a fit of y - offset turned into those of y: theta + offset * unit, unit
 * the exact coefficients of the constant 1 (`RowBasis.unitCoefficients`); a copy, or theta
 * itself when there is no offset. Cost O(p).
 * Example: withOffset(Float64Array.of(1, -1), 10, Float64Array.of(1, 1)) -> [11, 9].
 */
export function withOffset(theta: Float64Array, offset: number, unit: Float64Array | undefined): Float64Array {
  if (!unit || offset === 0) return theta;
  const out = new Float64Array(theta.length);
  for (let k = 0; k < theta.length; k++) out[k] = (theta[k] as number) + offset * (unit[k] as number);
  return out;
}

/**
 * What the data lacks when the Gram matrix of a row-basis fit is rank deficient, in words
 * for the message of factorSpd (core/linalg/spd.ts), tried in this order: too few rows or
 * too few distinct x for the df; no rows where some basis function is nonzero (with its x
 * range when the basis knows it); weights too small (the same rows with equal weights
 * determine every coefficient, so the spread of the weights is to blame; the message names
 * the smallest and the largest weight and where the smallest sits); otherwise x values too
 * crowded for this many coefficients, with the condition number. `z` is the fit's
 * restriction (or undefined) and q its number of free coefficients. Runs only on failure:
 * O(n log n) for the distinct count, O(n width^2 + p^3) for the equal-weight check.
 * Example: explainDeficiency({ x, y }, basis, undefined, 6, failure) -> 'too few rows for the df (n = 5, df = 6): ...'.
 */
export function explainDeficiency(data: XYData, basis: RowBasis, z: Float64Array | undefined, q: number, failure: SpdFailure): string {
  const { x, w } = data;
  const n = x.length;
  let used = 0;
  for (let i = 0; i < n; i++) if (!w || (w[i] as number) > 0) used++;
  if (used < q) return `too few rows for the df (n = ${used}, df = ${q}): a curve with ${q} coefficients needs at least ${q} rows`;
  const xs: number[] = [];
  for (let i = 0; i < n; i++) if (!w || (w[i] as number) > 0) xs.push(x[i] as number);
  xs.sort((a, b) => a - b);
  let distinct = xs.length > 0 ? 1 : 0;
  for (let i = 1; i < xs.length; i++) if (xs[i] !== xs[i - 1]) distinct++;
  if (distinct < q) return `too few distinct x values for the df (${distinct} distinct x, df = ${q}): a curve with ${q} coefficients needs at least ${q}`;
  // Rows under each basis function, and the Gram matrix of the same rows with equal weights.
  const p = basis.size;
  const rows = new Float64Array(p);
  const g = new Float64Array(p * p);
  const buf = new Float64Array(basis.width);
  let wMin = Infinity;
  let wMax = 0;
  let xAtMin = NaN;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    if (!(wi > 0)) continue;
    if (wi < wMin) {
      wMin = wi;
      xAtMin = x[i] as number;
    }
    wMax = Math.max(wMax, wi);
    const first = basis.row(x[i] as number, buf);
    for (let a = 0; a < basis.width; a++) {
      if ((buf[a] as number) !== 0) rows[first + a] = (rows[first + a] as number) + 1;
      for (let b = 0; b < basis.width; b++) g[(first + a) * p + first + b] = (g[(first + a) * p + first + b] as number) + (buf[a] as number) * (buf[b] as number);
    }
  }
  for (let k = 0; k < p; k++) {
    if (rows[k] !== 0) continue;
    const where = basis.supportOf ? ` (x from ${fmt(basis.supportOf(k)[0])} to ${fmt(basis.supportOf(k)[1])})` : '';
    return `no rows where basis function ${k + 1} of ${p} is nonzero${where}: the x values leave a gap the curve cannot bridge with this many coefficients`;
  }
  if (w && wMin < wMax) {
    let equalWeightsSuffice = true;
    try {
      factorSpd(z ? congruence(g, z, p, q) : g, q, 'equal weights');
    } catch (e) {
      if (!(e instanceof FitError)) throw e;
      equalWeightsSuffice = false;
    }
    if (equalWeightsSuffice) {
      return `weights too small: with equal weights these rows determine all ${q} coefficients, but the weights run from ${fmt(wMin)} (at x = ${fmt(xAtMin)}) to ${fmt(wMax)}, and where they are small the rows carry too little weight to determine the curve`;
    }
  }
  const base = failure.kind === 'condition' ? `condition number ${failure.condition.toExponential(2)}` : `pivot ${failure.index + 1} of ${failure.size} vanishes`;
  return `the ${distinct} distinct x values cannot determine ${q} coefficients (rank deficient: ${base}): too few distinct x values overall, or between some knots, for this df`;
}

function fmt(v: number): string {
  return Number.isFinite(v) ? String(Number(v.toPrecision(6))) : String(v);
}

/**
 * A p x q matrix kept by rows with only its nonzero entries. The natural-spline null space
 * (the Householder reflections of two boundary rows) is a unit matrix but for a few entries
 * near either end, so its products below touch about p entries instead of p x q.
 */
export interface SparseRows {
  readonly p: number;
  readonly q: number;
  /** Row i's entries are at start[i] .. start[i + 1] - 1 of col and val. */
  readonly start: Int32Array;
  readonly col: Int32Array;
  readonly val: Float64Array;
}

/** The nonzero entries of a dense p x q matrix, by rows. Example: sparseRows(Float64Array.of(1, 0, 0, 2), 2, 2).col is [0, 1]. */
export function sparseRows(z: Float64Array, p: number, q: number): SparseRows {
  const start = new Int32Array(p + 1);
  const col: number[] = [];
  const val: number[] = [];
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < q; j++) {
      const v = z[i * q + j] as number;
      if (v !== 0) {
        col.push(j);
        val.push(v);
      }
    }
    start[i + 1] = col.length;
  }
  return { p, q, start, col: Int32Array.from(col), val: Float64Array.from(val) };
}

/**
 * congruence() for a sparse Z, into `out` (q x q) with `gz` (p x q) as scratch: the same
 * sums in the same order with the zero terms left out, so the same bits (while the entries
 * are finite). The resampling hot path calls it for every candidate and resample.
 */
export function sparseCongruence(g: Float64Array, z: SparseRows, gz: Float64Array, out: Float64Array): Float64Array {
  const { p, q, start, col, val } = z;
  gz.fill(0);
  for (let i = 0; i < p; i++)
    for (let k = 0; k < p; k++) {
      const gik = g[i * p + k] as number;
      if (gik === 0) continue;
      for (let e = start[k] as number, end = start[k + 1] as number; e < end; e++) {
        const j = col[e] as number;
        gz[i * q + j] = (gz[i * q + j] as number) + gik * (val[e] as number);
      }
    }
  out.fill(0);
  for (let k = 0; k < p; k++)
    for (let e = start[k] as number, end = start[k + 1] as number; e < end; e++) {
      const i = col[e] as number;
      const zki = val[e] as number;
      for (let j = 0; j < q; j++) out[i * q + j] = (out[i * q + j] as number) + zki * (gz[k * q + j] as number);
    }
  return out;
}

/** transposeTimes() for a sparse Z into `out` (length q): Z' v, the same sums in the same order. */
export function sparseTransposeTimes(z: SparseRows, v: Float64Array, out: Float64Array): Float64Array {
  const { p, start, col, val } = z;
  out.fill(0);
  for (let k = 0; k < p; k++) {
    const vk = v[k] as number;
    for (let e = start[k] as number, end = start[k + 1] as number; e < end; e++) out[col[e] as number] = (out[col[e] as number] as number) + (val[e] as number) * vk;
  }
  return out;
}

/** times() for a sparse Z into `out` (length p): Z v, the same sums in the same order. */
export function sparseTimes(z: SparseRows, v: Float64Array, out: Float64Array): Float64Array {
  const { p, start, col, val } = z;
  for (let i = 0; i < p; i++) {
    let s = 0;
    for (let e = start[i] as number, end = start[i + 1] as number; e < end; e++) s += (val[e] as number) * (v[col[e] as number] as number);
    out[i] = s;
  }
  return out;
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

/** A Curve backed by a row basis, coefficients and their unscaled covariance (value = offset + b(x)' theta). */
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
    /** Added to b(x)' theta: the mean of y taken out before solving (theta are then the centred coefficients). */
    private readonly offset = 0,
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

  /**
   * The model matrix in sparse form: designRow(x) = E' b(x), b(x) the basis row with `width`
   * non-zeros from the index `row` returns, E the null-space map (absent without one);
   * `spec` rebuilds the basis on another thread, when it has one (RowBasis.spec).
   */
  sparseDesign(): {
    readonly size: number;
    readonly width: number;
    readonly expand: Float64Array | undefined;
    readonly spec: BasisSpec | undefined;
    row(x: number, out: Float64Array): number;
  } {
    const basis = this.basis;
    return { size: basis.size, width: basis.width, expand: this.z, spec: basis.spec?.(), row: (x, out) => basis.row(x, out) };
  }

  value(x: number): number {
    const first = this.basis.row(x, this.buf);
    let f = 0;
    for (let a = 0; a < this.basis.width; a++) f += (this.buf[a] as number) * (this.theta[first + a] as number);
    return this.offset + f;
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
