import type { Bands } from '../fit/emptyBands';
import type { RegressionOutput } from '../types';
import { congruence, congruenceT, times, transposeTimes } from '../fit/linearFit';
import { dataTotals, fitStatistics, rowStatistics } from '../fit/summary';
import { factorSpd, type SpdFailure } from '../linalg/spd';
import { qt } from '../stats/distributions';
import { axisBasis } from './axis';
import { SurfaceBasis } from './basis';
import { distinctPoints, prepareSurface, type PreparedSurface, type SurfaceData } from './data';

/** The df of each input: dfU x dfV coefficients, the surface's df. */
export interface SurfaceSpec {
  readonly dfU: number;
  readonly dfV: number;
}

/**
 * The fitted surface with pointwise bands at a set of (u, v) points: a curve's bands without
 * x, `extrapolated` 1 where the point lies outside the data's rectangle [min u, max u] x [min v, max v].
 */
export type SurfaceBands = Omit<Bands, 'x'>;

/** Complete regression output of one surface at one df pair (the counterpart of FitResult). */
export interface SurfaceFit extends RegressionOutput {
  readonly dfU: number;
  readonly dfV: number;
  /** dfU x dfV: the trace of the hat matrix, intercept included. */
  readonly df: number;
  /** Rows used. */
  readonly n: number;
  /** n - df. */
  readonly residualDf: number;
  /** Boundary and interior knots of each input (empty for df 1 in that input). */
  readonly knotsU: Float64Array;
  readonly knotsV: Float64Array;
  /** The data's range of each input. */
  readonly rangeU: readonly [number, number];
  readonly rangeV: readonly [number, number];
  /** Coefficients of the tensor B-spline products B_a(u) B_b(v) at index a * sizeV + b. */
  readonly coefficients: Float64Array;
  /** Condition number of the scaled Gram matrix. */
  readonly condition: number;
  readonly notes: readonly string[];
  /** Value of the fitted mean surface at (u, v) (linear beyond the data range in each input). */
  predict(u: number, v: number): number;
  /** b' V b at (u, v), V the unscaled coefficient covariance: times sigma^2 the variance of the fitted mean. */
  varianceFactor(u: number, v: number): number;
  /** Pointwise bands at the points (us[i], vs[i]) at `level` (default 0.95): docs/design.md, "Bands". */
  bands(us: ArrayLike<number>, vs: ArrayLike<number>, level?: number): SurfaceBands;
}

/**
 * Tensor-product natural cubic regression spline of y on two inputs (docs/design.md,
 * "Surfaces"): the row-wise product of the natural-spline bases of u (df dfU) and v (df
 * dfV), each exactly as for curves, fitted by weighted least squares. The space is the one
 * R spans with the row-wise product of cbind(1, splines::ns(u, ...)) and cbind(1,
 * splines::ns(v, ...)) at the same knots (test/reference/r/surface.R).
 *
 * Numbers as for curves (core/fit/linearFit.ts fitRowBasis): the Gram matrix of the tensor
 * B-splines accumulated from the 16 nonzero products of each row (O(n 16^2)), restricted by
 * Z = Zu ⊗ Zv, scaled to unit diagonal and factorised by Cholesky with a condition check
 * (core/linalg/spd.ts); y is centred at its weighted mean first and the mean added back
 * through the exact coefficients of 1 (all ones); weights enter divided by a power of two
 * near the largest. B-spline values depend only on ratios of differences of each input, so
 * a change of scale or offset of u or v leaves the fit unchanged. Leverage, Cook's
 * distance, residual SD, AIC/AICc/BIC, exact leave-one-out RMSE and GCV as for curves
 * (core/fit/summary.ts). Cost O(n 16^2 + (dfU+2)^2 (dfV+2)^2 dfU dfV).
 *
 * Throws FitError when an input has fewer distinct values than its df, or when the design
 * is rank deficient, saying what the data lack (too few readings or distinct points, an
 * empty corner of the (u, v) region, readings that do not spread over the plane).
 * Example: fitSurface({ u, v, y }, { dfU: 4, dfV: 3 }).predict(20, 0.5).
 */
export function fitSurface(data: SurfaceData | PreparedSurface, spec: SurfaceSpec): SurfaceFit {
  const prepared = isPrepared(data) ? data : prepareSurface(data);
  return fitSurfaceBasis(prepared, surfaceBasis(prepared, spec));
}

function isPrepared(data: SurfaceData | PreparedSurface): data is PreparedSurface {
  return !(data.u instanceof Float64Array);
}

/** The tensor basis of a df pair over prepared data (knots from all rows). Throws FitError naming the input. */
export function surfaceBasis(prepared: PreparedSurface, spec: SurfaceSpec): SurfaceBasis {
  return new SurfaceBasis(axisBasis(prepared.u, spec.dfU, prepared.names.u), axisBasis(prepared.v, spec.dfV, prepared.names.v));
}

/** Words for a df pair: 'df 5 × 4'. */
export function pairWords(dfU: number, dfV: number): string {
  return `df ${dfU} × ${dfV}`;
}

/**
 * The fit of fitSurface in a given tensor basis (its knots placed elsewhere: tuning places
 * them once from all rows). Same numbers, errors and cost as fitSurface.
 * Example: fitSurfaceBasis(prepared, surfaceBasis(prepared, { dfU: 4, dfV: 3 })).rss.
 */
export function fitSurfaceBasis(prepared: PreparedSurface, basis: SurfaceBasis): SurfaceFit {
  const { u, v, y, w } = prepared.data;
  const n = u.length;
  const P = basis.size;
  const W = basis.width;
  const Q = basis.df;
  const idx = new Int32Array(W);
  const val = new Float64Array(W);
  const g = new Float64Array(P * P);
  const rhs = new Float64Array(P);
  let sw = 0;
  let swy = 0;
  let wMax = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? (w[i] as number) : 1;
    sw += wi;
    swy += wi * (y[i] as number);
    if (wi > wMax) wMax = wi;
  }
  const offset = sw > 0 && Number.isFinite(swy / sw) ? swy / sw : 0;
  // An exact power of two near 1 / (largest weight), undone in the covariance (as fitRowBasis).
  const wUnit = wMax > 0 ? 2 ** -Math.round(Math.log2(wMax)) : 1;
  for (let i = 0; i < n; i++) {
    basis.row(u[i] as number, v[i] as number, idx, val);
    const wi = (w ? (w[i] as number) : 1) * wUnit;
    const yi = (y[i] as number) - offset;
    for (let r = 0; r < W; r++) {
      const wr = wi * (val[r] as number);
      const ir = idx[r] as number;
      rhs[ir] = (rhs[ir] as number) + wr * yi;
      const rowOff = ir * P;
      for (let s = 0; s <= r; s++) g[rowOff + (idx[s] as number)] = (g[rowOff + (idx[s] as number)] as number) + wr * (val[s] as number);
    }
  }
  for (let i = 0; i < P; i++) for (let j = 0; j < i; j++) g[j * P + i] = g[i * P + j] as number;
  const what = `surface with ${pairWords(basis.axisU.df, basis.axisV.df)}`;
  const factor = factorSpd(congruence(g, basis.z, P, Q), Q, what, (failure) => explainSurfaceDeficiency(prepared, basis, failure));
  const centred = times(basis.z, factor.solve(transposeTimes(basis.z, rhs, P, Q)), P, Q);
  const cov = congruenceT(factor.inverse, basis.z, P, Q);
  if (wUnit !== 1) for (let k = 0; k < cov.length; k++) cov[k] = (cov[k] as number) * wUnit;
  const fitted = new Float64Array(n);
  const residuals = new Float64Array(n);
  const leverage = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    basis.row(u[i] as number, v[i] as number, idx, val);
    let f = 0;
    let h = 0;
    for (let r = 0; r < W; r++) {
      const vr = val[r] as number;
      const ir = idx[r] as number;
      f += vr * (centred[ir] as number);
      const rowOff = ir * P;
      // b' V b over the lower triangle of the symmetric V: half the products.
      let s = 0.5 * (cov[rowOff + ir] as number) * vr;
      for (let c = 0; c < r; c++) s += (cov[rowOff + (idx[c] as number)] as number) * (val[c] as number);
      h += 2 * vr * s;
    }
    fitted[i] = offset + f;
    residuals[i] = (y[i] as number) - offset - f;
    leverage[i] = (w ? (w[i] as number) : 1) * h;
  }
  const xy = { x: u, y, w };
  let rss = 0;
  for (let i = 0; i < n; i++) rss += (w ? (w[i] as number) : 1) * (residuals[i] as number) ** 2;
  const stats = fitStatistics(n, Q, rss, dataTotals(xy));
  const rows = rowStatistics(xy, Q, stats.sigma * stats.sigma, residuals, leverage);
  const theta = new Float64Array(P);
  for (let k = 0; k < P; k++) theta[k] = (centred[k] as number) + offset;
  const notes = [...basis.axisU.notes, ...basis.axisV.notes];
  if (rows.looInfinite) notes.push('Some rows have leverage 1, so their leave-one-out error is undefined; the leave-one-out RMSE is reported as infinite.');
  const surface = new SurfaceFunction(basis, centred, offset, cov);
  const { sw: _sw, ...numbers } = stats;
  return {
    dfU: basis.axisU.df,
    dfV: basis.axisV.df,
    df: Q,
    n,
    ...numbers,
    knotsU: basis.axisU.knots,
    knotsV: basis.axisV.knots,
    rangeU: [basis.axisU.lower, basis.axisU.upper],
    rangeV: [basis.axisV.lower, basis.axisV.upper],
    coefficients: theta,
    fitted,
    residuals,
    leverage,
    cooksDistance: rows.cooks,
    looRmse: rows.looRmse,
    condition: factor.condition,
    notes,
    predict: (pu, pv) => surface.value(pu, pv),
    varianceFactor: (pu, pv) => surface.varianceFactor(pu, pv),
    bands(us, vs, level = 0.95) {
      return surface.bands(us, vs, level, stats.sigma, stats.residualDf);
    },
  };
}

/** A fitted surface that can be evaluated anywhere: offset + b(u, v)' theta and b' V b. */
export class SurfaceFunction {
  private readonly idx: Int32Array;
  private readonly val: Float64Array;
  constructor(
    private readonly basis: SurfaceBasis,
    private readonly centred: Float64Array,
    private readonly offset: number,
    private readonly cov: Float64Array,
  ) {
    this.idx = new Int32Array(basis.width);
    this.val = new Float64Array(basis.width);
  }

  value(u: number, v: number): number {
    const { idx, val, centred } = this;
    this.basis.row(u, v, idx, val);
    let f = 0;
    for (let r = 0; r < this.basis.width; r++) f += (val[r] as number) * (centred[idx[r] as number] as number);
    return this.offset + f;
  }

  varianceFactor(u: number, v: number): number {
    const { idx, val, cov } = this;
    const P = this.basis.size;
    const W = this.basis.width;
    this.basis.row(u, v, idx, val);
    let h = 0;
    for (let r = 0; r < W; r++) {
      const rowOff = (idx[r] as number) * P;
      let s = 0;
      for (let c = 0; c < W; c++) s += (cov[rowOff + (idx[c] as number)] as number) * (val[c] as number);
      h += (val[r] as number) * s;
    }
    return h;
  }

  /**
   * Pointwise confidence band fit ± t se and prediction band fit ± t sqrt(se^2 + sigma^2)
   * for a new reading of weight 1, t the (1 + level) / 2 quantile of Student's t on n - df
   * (docs/design.md, "Bands"; Weisberg 2014, Applied Linear Regression, 4th ed., section
   * 3.5); NaN bands when n - df <= 0. O(m) for m points.
   */
  bands(us: ArrayLike<number>, vs: ArrayLike<number>, level: number, sigma: number, residualDf: number): SurfaceBands {
    const m = us.length;
    if (vs.length !== m) throw new Error(`bands: ${m} values of u but ${vs.length} of v`);
    const t = residualDf > 0 ? qt(0.5 + level / 2, residualDf) : NaN;
    const s2 = sigma * sigma;
    const out = {
      fit: new Float64Array(m),
      se: new Float64Array(m),
      ciLower: new Float64Array(m),
      ciUpper: new Float64Array(m),
      piLower: new Float64Array(m),
      piUpper: new Float64Array(m),
      extrapolated: new Uint8Array(m),
    };
    const { axisU, axisV } = this.basis;
    for (let i = 0; i < m; i++) {
      const u = us[i] as number;
      const v = vs[i] as number;
      const f = this.value(u, v);
      const se = Math.sqrt(s2 * Math.max(0, this.varianceFactor(u, v)));
      const pe = Math.sqrt(se * se + s2);
      out.fit[i] = f;
      out.se[i] = se;
      out.ciLower[i] = f - t * se;
      out.ciUpper[i] = f + t * se;
      out.piLower[i] = f - t * pe;
      out.piUpper[i] = f + t * pe;
      out.extrapolated[i] = u < axisU.lower || u > axisU.upper || v < axisV.lower || v > axisV.upper ? 1 : 0;
    }
    return out;
  }
}

/**
 * What the data lack when the Gram matrix of a surface is rank deficient, tried in this
 * order: too few readings for the df; too few distinct (u, v) points; a tensor basis
 * function no reading reaches (an empty corner of the region, named by its ranges of u and
 * v); otherwise readings that do not spread over the plane (u and v moving together, or
 * too few distinct points between some knots), with the condition number. Runs only on
 * failure: O(n log n + n 16).
 */
function explainSurfaceDeficiency(prepared: PreparedSurface, basis: SurfaceBasis, failure: SpdFailure): string {
  const { u, v } = prepared.data;
  const { names } = prepared;
  const n = u.length;
  const q = basis.df;
  const pair = pairWords(basis.axisU.df, basis.axisV.df);
  if (n < q) return `too few readings for ${pair} (n = ${n}, df = ${q}): a surface with ${q} coefficients needs at least ${q} readings`;
  const points = distinctPoints(u, v);
  if (points < q) return `too few distinct (${names.u}, ${names.v}) points for ${pair} (${points} distinct points, df = ${q}): a surface with ${q} coefficients needs at least ${q}`;
  const reached = new Uint8Array(basis.size);
  const idx = new Int32Array(basis.width);
  const val = new Float64Array(basis.width);
  for (let i = 0; i < n; i++) {
    basis.row(u[i] as number, v[i] as number, idx, val);
    for (let r = 0; r < basis.width; r++) if ((val[r] as number) !== 0) reached[idx[r] as number] = 1;
  }
  for (let k = 0; k < basis.size; k++) {
    if (reached[k] === 1) continue;
    const s = basis.supportOf(k);
    return `no readings where ${names.u} is from ${fmt(s.u[0])} to ${fmt(s.u[1])} and ${names.v} from ${fmt(s.v[0])} to ${fmt(s.v[1])}: the readings leave an empty corner of the (${names.u}, ${names.v}) region that ${pair} cannot bridge; lower a df or add readings there`;
  }
  const base = failure.kind === 'condition' ? `condition number ${failure.condition.toExponential(2)}` : `pivot ${failure.index + 1} of ${failure.size} vanishes`;
  return `the ${points} distinct (${names.u}, ${names.v}) points cannot determine ${q} coefficients (rank deficient: ${base}): the readings do not spread over the plane enough for ${pair} (${names.u} and ${names.v} move together, or some region between knots holds too few distinct points)`;
}

function fmt(value: number): string {
  return Number.isFinite(value) ? String(Number(value.toPrecision(6))) : String(value);
}
