/**
 * Cubic smoothing spline (family 'smooth').
 *
 * Definition (DESIGN.md): with df = k, the minimiser of
 *
 *     sum_i w_i (y_i - f(x_i))^2 + lambda * integral f''(x)^2 dx
 *
 * over natural cubic splines with knots at all distinct x (Reinsch 1967, "Smoothing by
 * spline functions", Numer. Math. 10, 177-183; Green & Silverman 1994, "Nonparametric
 * Regression and Generalized Linear Models", chapter 2), with lambda chosen so that the
 * trace of the hat matrix is k.
 *
 * Representation. f is a cubic spline in the B-spline basis on the clamped knot vector with
 * every distinct x as a knot (m + 2 functions for m distinct x); the penalised minimiser in
 * that space is natural. With A = X'WX + lambda Omega (Omega_jl = integral B_j'' B_l''),
 * the coefficients solve A c = X'Wy and the hat matrix is X A^-1 X'W.
 *
 * Computation. Solving A c = X'Wy directly is only accurate for small m: Omega scales like
 * 1 / (knot spacing)^3, so for 10^5..10^6 distinct x the entries of lambda Omega exceed those
 * of X'WX by more than 1 / machine epsilon at the lambda of a moderate df, and forming A
 * loses X'WX entirely (with 10^6 distinct x the band Cholesky of A fails outright). So the
 * same problem is solved in its equivalent Bayesian state-space form (Wahba 1978, "Improper
 * priors, spline smoothing and the problem of guarding against model errors in regression",
 * JRSS B 40, 364-372; Wecker & Ansley 1983, "The signal extraction approach to nonlinear
 * regression and spline smoothing", JASA 78, 81-89): the spline is parametrised by its value
 * and slope at the first knot (flat prior) and its second derivatives gamma_j at the knots,
 * whose penalty integral f''^2 = gamma' M gamma (M the tridiagonal Gram matrix of the hat
 * functions) is a Gaussian Markov chain prior with precision lambda M. The state
 * (f, f', f'') at the knots then follows a linear Gaussian state-space model, and the
 * Kalman filter with the fixed-interval smoother of de Jong (1989, "Smoothing and
 * interpolation with the state-space model", JASA 84, 1085-1088; Durbin & Koopman 2012,
 * "Time Series Analysis by State Space Methods", 2nd ed., chapter 4) gives, in O(m)
 * and without any entry of size 1/spacing^3, the posterior mean (the fit), the posterior
 * covariance (A^-1, Wahba 1983) and the hat diagonal. The flat prior on the line is handled
 * exactly by the augmented (diffuse) filter of de Jong (1991, "The diffuse Kalman filter",
 * Annals of Statistics 19, 1073-1083). The posterior mean and covariance are the
 * minimiser and A^-1 of the penalised problem above, not approximations of them.
 *
 * Ties are pooled first (weights summed, weighted mean y), which leaves the minimiser
 * unchanged; x is mapped to [0, 1] internally; lambda is reported in the units of x.
 */
import { BSplineEvaluator, clampedKnots } from '../basis/bspline';
import { FitError } from '../errors';
import type { Curve, FitResult, XYData } from '../types';
import { prepareData } from './prepared';
import { summariseFit } from './summary';

/** Minimum number of distinct x values for a smoothing spline. */
export const MIN_DISTINCT_X = 4;
/** The lambda search stops once |trace - df| is below this. */
export const DF_TOLERANCE = 1e-9;
/** A search that ends farther than this from the asked df fails (DESIGN.md: within 1e-6). */
export const DF_ACCEPTANCE = 1e-6;
/** Cap on trace evaluations of the root search on log lambda (bracketing included). */
export const MAX_LAMBDA_ITERATIONS = 100;
/** Cap on doubling steps when bracketing the root on log lambda. */
export const MAX_BRACKET_STEPS = 40;
/**
 * Largest accepted ratio of the filter's predicted variance of f to the observation
 * variance 1 / W_j. The covariance update subtracts terms of that relative size, so beyond
 * it (lambda so small that the fit all but interpolates widely spaced knots) fewer than
 * 6 significant digits would survive and the fit is refused.
 */
export const MAX_VARIANCE_RATIO = 1e10;
/** Range searched for log lambda (x scaled to [0, 1]); beyond it the filter's variances overflow. */
const RHO_MIN = Math.log(1e-150);
const RHO_MAX = Math.log(1e150);
/** Value of the search function at an unreliable (too small) lambda: 'trace far too high'. */
const UNRELIABLE_G = 1e3;

/**
 * Fits the cubic smoothing spline whose hat matrix has trace `df` (intercept included).
 *
 * df = 2 is the limit lambda -> infinity, the weighted least-squares straight line, which
 * is returned (with a note) rather than refused. Otherwise 2 < df < m (m distinct x).
 * lambda is found by a safeguarded root search (Brent 1973, "Algorithms for Minimization
 * without Derivatives", chapter 4) on log lambda of
 * log((trace - 2) / (m - trace)) = log((df - 2) / (m - df)), the trace falling monotonically
 * from m (interpolation) to 2 (the line); typically 5-8 trace evaluations, at most
 * MAX_LAMBDA_ITERATIONS.
 *
 * Output (FitResult via summariseFit): df = achieved trace; coefficients = the m + 2
 * B-spline coefficients on `knots` (clamped, every distinct x a knot); leverage of row i in
 * tied group j = w_i / W_j * S_jj; lambda in the units of x; the curve is linear beyond the
 * data range (value and slope at the boundary) and its varianceFactor is b(x)' A^-1 b(x)
 * (the Bayesian posterior covariance of Wahba 1983, "Bayesian confidence intervals for the
 * cross-validated smoothing spline", JRSS B 45, 133-150), evaluated from the stored band
 * of A^-1, also beyond the boundary with b(x) extended linearly.
 *
 * Cost: O(n log n) to check and sort the data, then O(m) per trace evaluation; about 2 s
 * in all for 10^6 rows with distinct x on a 2-core laptop-class machine. Memory about
 * 250 bytes per distinct x besides the per-row results.
 *
 * Throws InputError for non-finite values or non-positive weights (naming the line), and
 * FitError for fewer than 4 distinct x, a df outside [2, m), or a df so close to m that the
 * lambda it needs is below what double precision supports (MAX_VARIANCE_RATIO).
 * @example
 *   const fit = fitSmoothingSpline({ x, y }, 5); // fit.df ~ 5 (within 1e-9), fit.lambda > 0
 */
export function fitSmoothingSpline(data: XYData, df: number): FitResult {
  const pooled = poolTies(data);
  checkDf(df, pooled.m);
  if (df === 2) return straightLineFit(pooled, [LINE_NOTE]);
  const scaled = new ScaledKnots(pooled.u);
  const smoother = new SplineSmoother(scaled.t, pooled.w);
  const lambdaT = searchLambda(smoother, df);
  const lambda = lambdaT * scaled.cube;
  return splineFit(
    pooled,
    smoother,
    lambdaT,
    lambda,
    (trace) => `Cubic smoothing spline with a knot at each of the ${pooled.m} distinct x values; lambda = ${formatLambda(lambda)} (in units of x) gives hat-matrix trace ${trace.toFixed(9)} for the asked df ${df}.`,
  );
}

/**
 * Fits the cubic smoothing spline at a fixed smoothing parameter `lambda` (in the units of
 * x, as reported by `fitSmoothingSpline` and `lambdaForDf`); df of the result is the
 * achieved trace. Used by resampling, where the lambda found on all rows is reused on each
 * resample. lambda = Infinity gives the weighted least-squares line. Same method, checks
 * and output as `fitSmoothingSpline`; cost O(n log n) + one O(m) pass.
 * @example
 *   const lam = lambdaForDf({ x, y }, 6);
 *   const refit = smoothingSplineAtLambda({ x: x2, y: y2 }, lam);
 */
export function smoothingSplineAtLambda(data: XYData, lambda: number): FitResult {
  if (!(lambda > 0)) throw new FitError(`smoothing spline lambda must be a positive number; got ${lambda}`);
  const pooled = poolTies(data);
  if (lambda === Infinity) return straightLineFit(pooled, [LINE_NOTE_LAMBDA]);
  const scaled = new ScaledKnots(pooled.u);
  const lambdaT = lambda / scaled.range / scaled.range / scaled.range;
  checkLambdaT(lambdaT, lambda);
  const smoother = new SplineSmoother(scaled.t, pooled.w);
  return splineFit(
    pooled,
    smoother,
    lambdaT,
    lambda,
    (trace) => `Cubic smoothing spline with a knot at each of the ${pooled.m} distinct x values at the fixed lambda = ${formatLambda(lambda)} (in units of x): hat-matrix trace ${trace.toFixed(9)}.`,
  );
}

/**
 * The smoothing parameter (in the units of x) at which the cubic smoothing spline on `data`
 * has hat-matrix trace `df`: Infinity for df = 2, else the root found as in
 * `fitSmoothingSpline` (same checks, same cost without building the result).
 * @example lambdaForDf({ x, y }, 4) // -> e.g. 12.7; fitSmoothingSpline({ x, y }, 4).lambda is the same
 */
export function lambdaForDf(data: XYData, df: number): number {
  const pooled = poolTies(data);
  checkDf(df, pooled.m);
  if (df === 2) return Infinity;
  const scaled = new ScaledKnots(pooled.u);
  return searchLambda(new SplineSmoother(scaled.t, pooled.w), df) * scaled.cube;
}

const LINE_NOTE = 'df = 2 is the limit lambda -> infinity of the smoothing spline: the weighted least-squares straight line is returned.';
const LINE_NOTE_LAMBDA = 'lambda = infinity is the limit of the smoothing spline: the weighted least-squares straight line is returned.';

// ---------------------------------------------------------------------------------------
// Input: checks and pooling of tied x

/** Rows pooled by distinct x: u sorted distinct x, w summed weights, y weighted mean y. */
export interface Pooled {
  readonly data: XYData;
  readonly n: number;
  readonly m: number;
  readonly u: Float64Array;
  readonly w: Float64Array;
  readonly y: Float64Array;
  /** Index into u of each row. */
  readonly group: Int32Array;
}

/** Checks the data (via prepareData) and pools tied x. O(n log n). */
export function poolTies(data: XYData): Pooled {
  const prepared = prepareData(data);
  const m = prepared.distinct;
  if (m < MIN_DISTINCT_X) throw new FitError(`smoothing spline needs at least ${MIN_DISTINCT_X} distinct x values; the data has ${m}`);
  const n = data.x.length;
  const sorted = prepared.sortedX;
  const u = new Float64Array(m);
  let k = 0;
  for (let i = 0; i < n; i++) if (i === 0 || sorted[i] !== sorted[i - 1]) u[k++] = sorted[i] as number;
  const group = new Int32Array(n);
  const { x, y, w } = data;
  let ascending = true;
  for (let i = 1; i < n && ascending; i++) if ((x[i] as number) < (x[i - 1] as number)) ascending = false;
  if (ascending) {
    let j = 0;
    for (let i = 0; i < n; i++) {
      while ((u[j] as number) !== (x[i] as number)) j++;
      group[i] = j;
    }
  } else {
    for (let i = 0; i < n; i++) {
      const xi = x[i] as number;
      let lo = 0;
      let hi = m - 1;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if ((u[mid] as number) < xi) lo = mid + 1;
        else hi = mid;
      }
      group[i] = lo;
    }
  }
  const ws = new Float64Array(m);
  const ys = new Float64Array(m);
  for (let i = 0; i < n; i++) {
    const g = group[i] as number;
    const wi = w ? (w[i] as number) : 1;
    ws[g] = (ws[g] as number) + wi;
    ys[g] = (ys[g] as number) + wi * (y[i] as number);
  }
  for (let j = 0; j < m; j++) ys[j] = (ys[j] as number) / (ws[j] as number);
  return { data, n, m, u, w: ws, y: ys, group };
}

function checkDf(df: number, m: number): void {
  if (!Number.isFinite(df)) throw new FitError(`smoothing spline df must be a finite number; got ${df}`);
  if (df < 2) throw new FitError(`smoothing spline df must be at least 2 (df 2 is the straight line); got ${df}`);
  if (df >= m) throw new FitError(`smoothing spline with df ${df} needs more than ${df} distinct x values; the data has ${m}`);
}

function checkLambdaT(lambdaT: number, lambda: number): void {
  if (!(lambdaT > 0) || !Number.isFinite(lambdaT)) {
    throw new FitError(`smoothing spline lambda ${lambda} is out of the range this data can use (after scaling x to [0, 1] it becomes ${lambdaT})`);
  }
}

/** Distinct x mapped to t in [0, 1], with the scale to convert lambda back to x units. */
class ScaledKnots {
  readonly t: Float64Array;
  readonly range: number;
  /** range^3: lambda in x units = lambda for t times range^3. */
  readonly cube: number;
  constructor(readonly u: Float64Array) {
    const m = u.length;
    const lo = u[0] as number;
    this.range = (u[m - 1] as number) - lo;
    this.cube = this.range * this.range * this.range;
    this.t = new Float64Array(m);
    for (let j = 0; j < m; j++) this.t[j] = ((u[j] as number) - lo) / this.range;
    this.t[m - 1] = 1;
    for (let j = 1; j < m; j++) {
      if (!((this.t[j] as number) > (this.t[j - 1] as number))) {
        throw new FitError(
          `smoothing spline: the distinct x values ${u[j - 1]} and ${u[j]} are too close together, relative to the x range ${this.range}, to be separate knots`,
        );
      }
    }
  }
}

// ---------------------------------------------------------------------------------------
// The state-space smoother

/**
 * Kalman filter and fixed-interval smoother for the cubic smoothing spline on knots
 * t_0 = 0 < ... < t_{m-1} = 1 with pooled weights W_j (observation variance 1 / W_j).
 *
 * State at knot j: alpha_j = (f(t_j), f'(t_j), f''(t_j) = gamma_j). With f'' linear between
 * knots, over a step h = t_{j+1} - t_j
 *     f_{j+1}  = f_j + h f'_j + h^2 (2 gamma_j + gamma_{j+1}) / 6
 *     f'_{j+1} = f'_j + h (gamma_j + gamma_{j+1}) / 2.
 * The prior gamma ~ N(0, (lambda M)^-1) with M tridiagonal (M_jj = (h_{j-1} + h_j) / 3,
 * M_{j,j+1} = h_j / 6, so gamma' M gamma = integral f''^2) is written as a forward Markov
 * chain by eliminating gamma_{m-1}, gamma_{m-2}, ... in turn (backward Schur complements
 * D_j = M_jj - M_{j,j+1}^2 / D_{j+1}): gamma_0 ~ N(0, 1 / (lambda D_0)),
 * gamma_{j+1} = rho_j gamma_j + eta_j, rho_j = -M_{j,j+1} / D_{j+1},
 * eta_j ~ N(0, 1 / (lambda D_{j+1})). The transition is therefore
 *     T_j = [[1, h, h^2 (2 + rho) / 6], [0, 1, h (1 + rho) / 2], [0, 0, rho]],
 *     noise R_j eta_j with R_j = (h^2 / 6, h / 2, 1).
 * (f_0, f'_0) = beta has a flat prior, handled by de Jong's augmented filter: two extra
 * state columns A_j carry the effect of beta, and beta | y ~ N(S^-1 s, S^-1).
 *
 * Storage per knot: predicted covariance P (6), predicted means of the y column (3) and of
 * the two beta columns (6). Allocated once; `run` can be called for many lambda.
 */
class SplineSmoother {
  readonly m: number;
  private readonly h: Float64Array;
  private readonly rho: Float64Array;
  /** Reciprocals of the backward Schur complements of M (lambda-free): the variance of eta_{j-1} times lambda. */
  private readonly invSchur: Float64Array;
  /** Observation variances 1 / W_j. */
  private readonly obsVar: Float64Array;
  private readonly p: Float64Array;
  private readonly a: Float64Array;
  private readonly aa: Float64Array;
  /** Sum of the pooled weights. */
  readonly totalWeight: number;
  /** Hat diagonal of the pooled problem, S_jj. */
  readonly leverage: Float64Array;
  /** Trace of the hat matrix from the last run. */
  trace = NaN;
  /** m - trace, summed from 1 - S_jj computed without cancellation (last run). */
  residualTrace = NaN;
  /** False when the last run's lambda was too small to compute accurately (see MAX_VARIANCE_RATIO). */
  reliable = true;
  /** Posterior mean of f at the knots (last full run). */
  readonly value: Float64Array;
  /** B-spline coefficients (m + 2) from the last full run. */
  readonly coefficients: Float64Array;
  /** Band of A^-1 (half-bandwidth 3, layout of core/linalg/banded.ts) from the last full run. */
  readonly covarianceBand: Float64Array;

  constructor(
    private readonly t: Float64Array,
    private readonly wts: Float64Array,
  ) {
    const m = t.length;
    this.m = m;
    this.h = new Float64Array(m - 1);
    for (let j = 0; j < m - 1; j++) this.h[j] = (t[j + 1] as number) - (t[j] as number);
    const dm = new Float64Array(m);
    this.rho = new Float64Array(m - 1);
    const h = this.h;
    dm[m - 1] = (h[m - 2] as number) / 3;
    for (let j = m - 2; j >= 0; j--) {
      const off = (h[j] as number) / 6;
      const diag = ((j > 0 ? (h[j - 1] as number) : 0) + (h[j] as number)) / 3;
      dm[j] = diag - (off * off) / (dm[j + 1] as number);
      this.rho[j] = -off / (dm[j + 1] as number);
    }
    for (let j = 0; j < m; j++) dm[j] = 1 / (dm[j] as number);
    this.invSchur = dm;
    this.obsVar = new Float64Array(m);
    for (let j = 0; j < m; j++) this.obsVar[j] = 1 / (wts[j] as number);
    this.totalWeight = 0;
    for (let j = 0; j < m; j++) this.totalWeight += wts[j] as number;
    this.p = new Float64Array(6 * m);
    this.a = new Float64Array(3 * m);
    this.aa = new Float64Array(6 * m);
    this.leverage = new Float64Array(m);
    this.value = new Float64Array(m);
    this.coefficients = new Float64Array(m + 2);
    this.covarianceBand = new Float64Array(4 * (m + 2));
  }

  /**
   * One filter and smoother pass at smoothing parameter lambdaT (for x scaled to [0, 1]).
   * Always computes the hat diagonal and its trace; with `y` (pooled means) also the fit,
   * its B-spline coefficients and the band of A^-1. O(m).
   */
  run(lambdaT: number, y: Float64Array | null): number {
    const { m, h, rho, invSchur: dm, obsVar, p: P, a: AY, aa: AB, wts } = this;
    // ---- forward: augmented Kalman filter ----
    let p00 = 0;
    let p01 = 0;
    let p02 = 0;
    let p11 = 0;
    let p12 = 0;
    const iLambda = 1 / lambdaT;
    let p22 = iLambda * (dm[0] as number);
    let a0 = 0;
    let a1 = 0;
    let a2 = 0;
    let b00 = 1; // beta columns: b<state row><column>
    let b01 = 0;
    let b10 = 0;
    let b11 = 1;
    let b20 = 0;
    let b21 = 0;
    // beta | y has information matrix S = sum U_j U_j' / F_j and score sum U_j v_j / F_j
    // (U_j the predicted f of the beta columns); both are accumulated as a triangular
    // factor [R | z] (R'R = S) by Givens rotations, which stays accurate when S is nearly
    // singular (a tiny first spacing with almost no smoothing).
    let rq00 = 0;
    let rq01 = 0;
    let rq11 = 0;
    let z0 = 0;
    let z1 = 0;
    let worstRatio = 0;
    for (let j = 0; j < m; j++) {
      const o6 = 6 * j;
      P[o6] = p00;
      P[o6 + 1] = p01;
      P[o6 + 2] = p02;
      P[o6 + 3] = p11;
      P[o6 + 4] = p12;
      P[o6 + 5] = p22;
      AY[3 * j] = a0;
      AY[3 * j + 1] = a1;
      AY[3 * j + 2] = a2;
      AB[o6] = b00;
      AB[o6 + 1] = b01;
      AB[o6 + 2] = b10;
      AB[o6 + 3] = b11;
      AB[o6 + 4] = b20;
      AB[o6 + 5] = b21;
      const hObs = obsVar[j] as number;
      if (p00 > worstRatio * hObs) worstRatio = p00 / hObs;
      const iF = 1 / (p00 + hObs);
      const v = y ? (y[j] as number) - a0 : 0;
      {
        const sf = Math.sqrt(iF);
        const x0 = b00 * sf;
        let x1 = b01 * sf;
        let xv = v * sf;
        if (x0 !== 0) {
          const rr = Math.sqrt(rq00 * rq00 + x0 * x0);
          const irr = 1 / rr;
          const c = rq00 * irr;
          const sn = x0 * irr;
          rq00 = rr;
          const t1 = c * rq01 + sn * x1;
          x1 = c * x1 - sn * rq01;
          rq01 = t1;
          const tz = c * z0 + sn * xv;
          xv = c * xv - sn * z0;
          z0 = tz;
        }
        if (x1 !== 0) {
          const rr = Math.sqrt(rq11 * rq11 + x1 * x1);
          const irr = 1 / rr;
          const c = rq11 * irr;
          const sn = x1 * irr;
          rq11 = rr;
          z1 = c * z1 + sn * xv;
        }
      }
      if (j === m - 1) break;
      // measurement update (filtered = predicted + gain * innovation); the first row of the
      // filtered covariance is written as P_0. * hObs / F to avoid cancellation.
      const g0 = p00 * iF;
      const g1 = p01 * iF;
      const g2 = p02 * iF;
      const fa0 = a0 + g0 * v;
      const fa1 = a1 + g1 * v;
      const fa2 = a2 + g2 * v;
      const fb00 = b00 - g0 * b00;
      const fb01 = b01 - g0 * b01;
      const fb10 = b10 - g1 * b00;
      const fb11 = b11 - g1 * b01;
      const fb20 = b20 - g2 * b00;
      const fb21 = b21 - g2 * b01;
      const f00 = p00 * hObs * iF;
      const f01 = p01 * hObs * iF;
      const f02 = p02 * hObs * iF;
      const f11 = p11 - p01 * g1;
      const f12 = p12 - p01 * g2;
      const f22 = p22 - p02 * g2;
      // time update with T_j and noise R_j eta_j
      const hj = h[j] as number;
      const r = rho[j] as number;
      const c02 = (hj * hj * (2 + r)) / 6;
      const c12 = (hj * (1 + r)) / 2;
      a0 = fa0 + hj * fa1 + c02 * fa2;
      a1 = fa1 + c12 * fa2;
      a2 = r * fa2;
      b00 = fb00 + hj * fb10 + c02 * fb20;
      b01 = fb01 + hj * fb11 + c02 * fb21;
      b10 = fb10 + c12 * fb20;
      b11 = fb11 + c12 * fb21;
      b20 = r * fb20;
      b21 = r * fb21;
      // q_k = Pf * (row k of T)
      const q00 = f00 + hj * f01 + c02 * f02;
      const q01 = f01 + hj * f11 + c02 * f12;
      const q02 = f02 + hj * f12 + c02 * f22;
      const q10 = f01 + c12 * f02;
      const q11 = f11 + c12 * f12;
      const q12 = f12 + c12 * f22;
      const q20 = r * f02;
      const q21 = r * f12;
      const q22 = r * f22;
      const tau = iLambda * (dm[j + 1] as number);
      const r0 = (hj * hj) / 6;
      const r1 = hj / 2;
      p00 = q00 + hj * q01 + c02 * q02 + tau * r0 * r0;
      p01 = q10 + hj * q11 + c02 * q12 + tau * r0 * r1;
      p02 = q20 + hj * q21 + c02 * q22 + tau * r0;
      p11 = q11 + c12 * q12 + tau * r1 * r1;
      p12 = q21 + c12 * q22 + tau * r1;
      p22 = r * q22 + tau;
    }
    this.reliable = worstRatio <= MAX_VARIANCE_RATIO;
    // beta | y ~ N(R^-1 z, R^-1 R^-T); a' S^-1 b = (R^-T a) . (R^-T b)
    if (!(rq00 > 0) || !(rq11 > 0) || !Number.isFinite(rq01 / rq11)) {
      throw new FitError('smoothing spline: the straight-line part of the fit is not determined (the x values are too close together)');
    }
    const beta1 = z1 / rq11;
    const beta0 = (z0 - rq01 * beta1) / rq00;
    const iq00 = 1 / rq00;
    const iq11 = 1 / rq11;

    // ---- backward: fixed-interval smoother (r, N recursions) ----
    const full = y !== null;
    let r0 = 0; // y column
    let r1 = 0;
    let r2 = 0;
    let e00 = 0; // beta columns: e<state row><column>
    let e01 = 0;
    let e10 = 0;
    let e11 = 0;
    let e20 = 0;
    let e21 = 0;
    let n00 = 0;
    let n01 = 0;
    let n02 = 0;
    let n11 = 0;
    let n12 = 0;
    let n22 = 0;
    // quantities of knot j + 1 carried to knot j (full runs)
    let nextGammaMean = 0;
    let nextGammaVar = 0;
    let nextWg0 = 0; // R^-T times the smoothed beta columns' gamma row at j + 1
    let nextWg1 = 0;
    let trace = 0;
    let residualTrace = 0;
    const lev = this.leverage;
    for (let j = m - 1; j >= 0; j--) {
      const o6 = 6 * j;
      const p00j = P[o6] as number;
      const p01j = P[o6 + 1] as number;
      const p02j = P[o6 + 2] as number;
      const p11j = P[o6 + 3] as number;
      const p12j = P[o6 + 4] as number;
      const p22j = P[o6 + 5] as number;
      const wj = wts[j] as number;
      const hObs = obsVar[j] as number;
      const iF = 1 / (p00j + hObs);
      const v = y !== null ? (y[j] as number) - (AY[3 * j] as number) : 0;
      const u0 = AB[o6] as number;
      const u1 = AB[o6 + 1] as number;
      let dSmooth: number; // variance of the smoothing error u_j (disturbance smoothing, Durbin & Koopman 2012, chapter 4)
      // lag-one covariance Cov(alpha_j, gamma_{j+1} | y, beta), full runs only
      let x0 = 0;
      let x1 = 0;
      let x2 = 0;
      if (j === m - 1) {
        dSmooth = iF;
        r0 = v * iF;
        e00 = -u0 * iF;
        e01 = -u1 * iF;
        n00 = iF;
      } else {
        const hj = h[j] as number;
        const rr = rho[j] as number;
        const c02 = (hj * hj * (2 + rr)) / 6;
        const c12 = (hj * (1 + rr)) / 2;
        // gain K_j = T_j P_j e1 / F_j
        const k0 = (p00j + hj * p01j + c02 * p02j) * iF;
        const k1 = (p01j + c12 * p02j) * iF;
        const k2 = rr * p02j * iF;
        // N_j k and z = k' N_j k (N_j holds information from knots j+1..m-1)
        const nk0 = n00 * k0 + n01 * k1 + n02 * k2;
        const nk1 = n01 * k0 + n11 * k1 + n12 * k2;
        const nk2 = n02 * k0 + n12 * k1 + n22 * k2;
        const z = k0 * nk0 + k1 * nk1 + k2 * nk2;
        dSmooth = iF + z;
        if (full) {
          // Cov(alpha_j, alpha_{j+1} | y, beta) = P_j L_j' (I - N_j P_{j+1}) (Durbin & Koopman
          // 2012, chapter 4); only its gamma_{j+1} column is needed.
          const q = 6 * (j + 1);
          const c0 = P[q + 2] as number;
          const c1 = P[q + 4] as number;
          const c2 = P[q + 5] as number;
          const w0 = -(n00 * c0 + n01 * c1 + n02 * c2);
          const w1 = -(n01 * c0 + n11 * c1 + n12 * c2);
          const w2 = 1 - (n02 * c0 + n12 * c1 + n22 * c2);
          const kw = k0 * w0 + k1 * w1 + k2 * w2;
          const l0 = w0 - kw;
          const l1 = hj * w0 + w1;
          const l2 = c02 * w0 + c12 * w1 + rr * w2;
          x0 = p00j * l0 + p01j * l1 + p02j * l2;
          x1 = p01j * l0 + p11j * l1 + p12j * l2;
          x2 = p02j * l0 + p12j * l1 + p22j * l2;
        }
        // r_{j-1} = e1 v / F + L_j' r_j with L_j = T_j - K_j e1'
        const kr = k0 * r0 + k1 * r1 + k2 * r2;
        const nr0 = v * iF + r0 - kr;
        const nr1 = hj * r0 + r1;
        const nr2 = c02 * r0 + c12 * r1 + rr * r2;
        r0 = nr0;
        r1 = nr1;
        r2 = nr2;
        const ke0 = k0 * e00 + k1 * e10 + k2 * e20;
        const ke1 = k0 * e01 + k1 * e11 + k2 * e21;
        const ne00 = -u0 * iF + e00 - ke0;
        const ne01 = -u1 * iF + e01 - ke1;
        const ne10 = hj * e00 + e10;
        const ne11 = hj * e01 + e11;
        const ne20 = c02 * e00 + c12 * e10 + rr * e20;
        const ne21 = c02 * e01 + c12 * e11 + rr * e21;
        e00 = ne00;
        e01 = ne01;
        e10 = ne10;
        e11 = ne11;
        e20 = ne20;
        e21 = ne21;
        // N_{j-1} = e1 e1' / F + L' N L = e1 e1' / F + T'NT - y e1' - e1 y' + z e1 e1', y = T' N k
        const t00 = n00;
        const t01 = hj * n00 + n01;
        const t02 = c02 * n00 + c12 * n01 + rr * n02;
        const t10 = n01;
        const t11 = hj * n01 + n11;
        const t12 = c02 * n01 + c12 * n11 + rr * n12;
        const t20 = n02;
        const t21 = hj * n02 + n12;
        const t22 = c02 * n02 + c12 * n12 + rr * n22;
        // (N T)_{ab} = t<a><b>; T' (N T): row a of T' is column a of T
        const m00 = t00;
        const m01 = t01;
        const m02 = t02;
        const m11 = hj * t01 + t11;
        const m12 = hj * t02 + t12;
        const m22 = c02 * t02 + c12 * t12 + rr * t22;
        const y0 = nk0;
        const y1 = hj * nk0 + nk1;
        const y2 = c02 * nk0 + c12 * nk1 + rr * nk2;
        n00 = iF + m00 - 2 * y0 + z;
        n01 = m01 - y1;
        n02 = m02 - y2;
        n11 = m11;
        n12 = m12;
        n22 = m22;
      }
      // hat diagonal: W_j Var(f_j | y) = W_j (Var(f_j | y, beta) + a' S^-1 a), a the smoothed
      // beta columns. Var(f_j | y, beta) = P_00 - (P N P)_00 loses digits when the fit nearly
      // interpolates; then 1 - D_j / W_j (D_j the smoothing-error variance above) is used instead.
      const pn0 = p00j * n00 + p01j * n01 + p02j * n02;
      const pn1 = p00j * n01 + p01j * n11 + p02j * n12;
      const pn2 = p00j * n02 + p01j * n12 + p02j * n22;
      let hb = wj * (p00j - (pn0 * p00j + pn1 * p01j + pn2 * p02j));
      let oneMinusHb = 1 - hb;
      if (hb > 0.5) {
        oneMinusHb = dSmooth * hObs;
        hb = 1 - oneMinusHb;
      }
      const as0 = u0 + p00j * e00 + p01j * e10 + p02j * e20;
      const as1 = u1 + p00j * e01 + p01j * e11 + p02j * e21;
      const ws0 = as0 * iq00;
      const ws1 = (as1 - rq01 * ws0) * iq11;
      const hBeta = wj * (ws0 * ws0 + ws1 * ws1);
      const sjj = hb + hBeta;
      lev[j] = sjj;
      trace += sjj;
      residualTrace += oneMinusHb - hBeta;
      if (full) {
        // smoothed state mean and covariance, beta integrated out
        const ay = 3 * j;
        const mean0 = (AY[ay] as number) + p00j * r0 + p01j * r1 + p02j * r2 + as0 * beta0 + as1 * beta1;
        const ag0 = (AB[o6 + 4] as number) + p02j * e00 + p12j * e10 + p22j * e20;
        const ag1 = (AB[o6 + 5] as number) + p02j * e01 + p12j * e11 + p22j * e21;
        const ad0 = (AB[o6 + 2] as number) + p01j * e00 + p11j * e10 + p12j * e20;
        const ad1 = (AB[o6 + 3] as number) + p01j * e01 + p11j * e11 + p12j * e21;
        const mean1 = (AY[ay + 1] as number) + p01j * r0 + p11j * r1 + p12j * r2 + ad0 * beta0 + ad1 * beta1;
        const mean2 = (AY[ay + 2] as number) + p02j * r0 + p12j * r1 + p22j * r2 + ag0 * beta0 + ag1 * beta1;
        // V = P - P N P (beta known), then + Ahat S^-1 Ahat'
        const pn10 = p01j * n00 + p11j * n01 + p12j * n02;
        const pn11 = p01j * n01 + p11j * n11 + p12j * n12;
        const pn12 = p01j * n02 + p11j * n12 + p12j * n22;
        const pn20 = p02j * n00 + p12j * n01 + p22j * n02;
        const pn21 = p02j * n01 + p12j * n11 + p22j * n12;
        const pn22 = p02j * n02 + p12j * n12 + p22j * n22;
        const wd0 = ad0 * iq00;
        const wd1 = (ad1 - rq01 * wd0) * iq11;
        const wg0 = ag0 * iq00;
        const wg1 = (ag1 - rq01 * wg0) * iq11;
        const cov = this.scratch;
        cov[0] = hb * hObs + ws0 * ws0 + ws1 * ws1;
        cov[1] = p01j - (pn0 * p01j + pn1 * p11j + pn2 * p12j) + ws0 * wd0 + ws1 * wd1;
        cov[2] = p02j - (pn0 * p02j + pn1 * p12j + pn2 * p22j) + ws0 * wg0 + ws1 * wg1;
        cov[5] = p11j - (pn10 * p01j + pn11 * p11j + pn12 * p12j) + wd0 * wd0 + wd1 * wd1;
        cov[6] = p12j - (pn10 * p02j + pn11 * p12j + pn12 * p22j) + wd0 * wg0 + wd1 * wg1;
        cov[10] = p22j - (pn20 * p02j + pn21 * p12j + pn22 * p22j) + wg0 * wg0 + wg1 * wg1;
        this.value[j] = mean0;
        if (j < m - 1) {
          // xi = (f_j, f'_j, gamma_j, gamma_{j+1}); covariance in the 4 x 4 scratch (row-major, upper part)
          cov[3] = x0 + ws0 * nextWg0 + ws1 * nextWg1;
          cov[7] = x1 + wd0 * nextWg0 + wd1 * nextWg1;
          cov[11] = x2 + wg0 * nextWg0 + wg1 * nextWg1;
          cov[15] = nextGammaVar;
          this.spanToBSpline(j, mean0, mean1, mean2, nextGammaMean);
        }
        nextGammaMean = mean2;
        nextGammaVar = cov[10] as number;
        nextWg0 = wg0;
        nextWg1 = wg1;
      }
    }
    this.trace = trace;
    this.residualTrace = residualTrace;
    return trace;
  }

  /** 4 x 4 covariance of (f_j, f'_j, gamma_j, gamma_{j+1}), row-major, upper triangle used. */
  private readonly scratch = new Float64Array(16);
  /** Rows of the map from (f_j, f'_j, gamma_j, gamma_{j+1}) to the 4 B-spline coefficients active on span j. */
  private readonly gmap = new Float64Array(16);
  private readonly gc = new Float64Array(4);

  /**
   * B-spline coefficients and band of A^-1 from the posterior of the cubic on span j.
   * Coefficient i is the blossom of the span's cubic at its knots tau_{i+1..i+3} (de Boor
   * 2001, "A Practical Guide to Splines", rev. ed.; Ramshaw 1989, "Blossoms are
   * polar forms"), the same on every span in the support of B_i because the spline is C2.
   * Span j writes coefficient j and band row j (the last span also rows m-1..m+1).
   */
  private spanToBSpline(j: number, f: number, f1: number, g0: number, g1: number): void {
    const { t, m, gmap: G, gc, scratch: C, coefficients, covarianceBand: band } = this;
    // complete the symmetric 4 x 4 from its upper triangle
    C[4] = C[1] as number;
    C[8] = C[2] as number;
    C[12] = C[3] as number;
    C[9] = C[6] as number;
    C[13] = C[7] as number;
    C[14] = C[11] as number;
    const base = t[j] as number;
    const inv6h = 1 / (6 * ((t[j + 1] as number) - base));
    for (let a = 0; a < 4; a++) {
      // coefficient i = j + a: blossom at tau_{i+1..i+3} = t[j+a-2], t[j+a-1], t[j+a] (clamped)
      const k1 = j + a - 2;
      const k3 = j + a < m - 1 ? j + a : m - 1;
      const d1 = (t[k1 < 0 ? 0 : k1 > m - 1 ? m - 1 : k1] as number) - base;
      const d2 = (t[k1 + 1 < 0 ? 0 : k1 + 1 > m - 1 ? m - 1 : k1 + 1] as number) - base;
      const d3 = (t[k3] as number) - base;
      const sig3 = d1 * d2 * d3 * inv6h;
      G[4 * a] = 1;
      G[4 * a + 1] = (d1 + d2 + d3) / 3;
      G[4 * a + 2] = (d1 * d2 + d1 * d3 + d2 * d3) / 6 - sig3;
      G[4 * a + 3] = sig3;
    }
    const last = j === m - 2 ? 3 : 0;
    for (let a = 0; a <= last; a++) {
      const ga0 = G[4 * a] as number;
      const ga1 = G[4 * a + 1] as number;
      const ga2 = G[4 * a + 2] as number;
      const ga3 = G[4 * a + 3] as number;
      for (let b = 0; b < 4; b++) gc[b] = ga0 * (C[b] as number) + ga1 * (C[4 + b] as number) + ga2 * (C[8 + b] as number) + ga3 * (C[12 + b] as number);
      const i = j + a;
      coefficients[i] = ga0 * f + ga1 * f1 + ga2 * g0 + ga3 * g1;
      for (let b = a; b < 4; b++) {
        band[4 * i + (b - a)] =
          (gc[0] as number) * (G[4 * b] as number) + (gc[1] as number) * (G[4 * b + 1] as number) + (gc[2] as number) * (G[4 * b + 2] as number) + (gc[3] as number) * (G[4 * b + 3] as number);
      }
      for (let b = 4 - a; b < 4; b++) band[4 * i + b] = 0;
    }
  }
}


// ---------------------------------------------------------------------------------------
// lambda search

/**
 * Root of log(trace(lambda) - 2) = log(df - 2) in rho = log lambda (lambda for x in [0, 1]):
 * a first guess from the trace of a uniform design (trace - 2 ~ (W / lambda)^(1/4) / (2 sqrt 2),
 * W the total weight), doubling steps to bracket the root, then Brent's method (Brent 1973,
 * chapter 4). Returns lambda; throws FitError when df cannot be reached within
 * DF_ACCEPTANCE in MAX_LAMBDA_ITERATIONS evaluations.
 */
function searchLambda(smoother: SplineSmoother, df: number): number {
  const m = smoother.m;
  const target = Math.log(df - 2) - Math.log(m - df);
  let evaluations = 0;
  let bestRho = NaN;
  let bestGap = Infinity;
  let tooSmall = false;
  const g = (rho: number): number => {
    evaluations++;
    const tr = smoother.run(Math.exp(rho), null);
    if (!smoother.reliable) {
      // Only very small lambda are unreliable: report "lambda too small" with a finite value
      // so the bracket and Brent's safeguards move up, never onto this point.
      tooSmall = true;
      return UNRELIABLE_G;
    }
    const gap = Math.abs(tr - df);
    if (gap < bestGap) {
      bestGap = gap;
      bestRho = rho;
    }
    return Math.log(Math.max(tr - 2, Number.MIN_VALUE)) - Math.log(Math.max(smoother.residualTrace, Number.MIN_VALUE)) - target;
  };
  const done = (): boolean => bestGap <= DF_TOLERANCE || evaluations >= MAX_LAMBDA_ITERATIONS;
  let a = Math.log(smoother.totalWeight) - 4 * Math.log(2 * Math.SQRT2 * (df - 2));
  a = Math.min(RHO_MAX, Math.max(RHO_MIN, a));
  let fa = g(a);
  let b = a;
  let fb = fa;
  // trace falls with rho: fa > 0 means lambda is too small. Slope of g is about -1 at both
  // ends (trace - 2 ~ 1 / lambda, m - trace ~ lambda) and about -1/4 in between.
  let step = Math.max(0.5, Math.min(8, 4 * Math.abs(fa))) * (fa > 0 ? 1 : -1);
  for (let k = 0; k < MAX_BRACKET_STEPS && !done(); k++) {
    if ((step > 0 && a >= RHO_MAX) || (step < 0 && a <= RHO_MIN)) break;
    b = Math.min(RHO_MAX, Math.max(RHO_MIN, a + step));
    fb = g(b);
    if ((fa > 0) !== (fb > 0) || fb === 0) break;
    a = b;
    fa = fb;
    step *= 2;
  }
  if (!done() && (fa > 0) === (fb > 0) && fb !== 0) {
    throw new FitError(`smoothing spline: no lambda gives df ${df} (the trace stays on one side of it)`);
  }
  // Brent's method on [a, b] (zeroin; Brent 1973, chapter 4, procedure zero)
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  while (!done()) {
    if ((fb > 0) === (fc > 0)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + 1e-14;
    const mid = 0.5 * (c - b);
    if (Math.abs(mid) <= tol || fb === 0) break;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      let pp: number;
      let qq: number;
      const s = fb / fa;
      if (a === c) {
        pp = 2 * mid * s;
        qq = 1 - s;
      } else {
        const q0 = fa / fc;
        const r = fb / fc;
        pp = s * (2 * mid * q0 * (q0 - r) - (b - a) * (r - 1));
        qq = (q0 - 1) * (r - 1) * (s - 1);
      }
      if (pp > 0) qq = -qq;
      else pp = -pp;
      if (2 * pp < Math.min(3 * mid * qq - Math.abs(tol * qq), Math.abs(e * qq))) {
        e = d;
        d = pp / qq;
      } else {
        d = mid;
        e = d;
      }
    } else {
      d = mid;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : mid > 0 ? tol : -tol;
    fb = g(b);
  }
  if (!(bestGap <= DF_ACCEPTANCE) && tooSmall) {
    throw new FitError(
      `smoothing spline with df ${df} is too close to interpolating the ${m} distinct x values to be computed accurately (the lambda it needs is below what double precision supports for this x spacing); ask for a smaller df`,
    );
  }
  if (!(bestGap <= DF_ACCEPTANCE)) {
    throw new FitError(`smoothing spline: lambda search did not reach df ${df} (closest trace ${(df + bestGap).toPrecision(10)} after ${evaluations} evaluations)`);
  }
  return Math.exp(bestRho);
}

// ---------------------------------------------------------------------------------------
// Results

function splineFit(pooled: Pooled, smoother: SplineSmoother, lambdaT: number, lambda: number, note: (trace: number) => string): FitResult {
  smoother.run(lambdaT, pooled.y);
  if (!smoother.reliable) {
    throw new FitError(`smoothing spline lambda ${lambda} is too small to be computed accurately for these ${pooled.m} distinct x values (the fit would all but interpolate them)`);
  }
  const knots = clampedKnots(pooled.u[0] as number, pooled.u[pooled.m - 1] as number, pooled.u.subarray(1, pooled.m - 1));
  const curve = makeCurve(knots, smoother.coefficients, smoother.covarianceBand, smoother.trace);
  const fitted = new Float64Array(pooled.n);
  const leverage = new Float64Array(pooled.n);
  perRow(pooled, smoother.value, smoother.leverage, fitted, leverage);
  return summariseFit(pooled.data, {
    family: 'smooth',
    df: smoother.trace,
    curve,
    coefficients: curve.coefficients,
    knots,
    fitted,
    leverage,
    lambda,
    notes: [note(smoother.trace), ...tieNote(pooled)],
  });
}

/** Pooled values and hat diagonal back to rows: leverage_i = w_i / W_j S_jj. */
export function perRow(pooled: Pooled, value: Float64Array, lev: Float64Array, fitted: Float64Array, leverage: Float64Array): void {
  const w = pooled.data.w;
  for (let i = 0; i < pooled.n; i++) {
    const g = pooled.group[i] as number;
    fitted[i] = value[g] as number;
    leverage[i] = ((w ? (w[i] as number) : 1) / (pooled.w[g] as number)) * (lev[g] as number);
  }
}

/** The note on pooled ties, or none when every x is distinct. */
export function tieNote(pooled: Pooled): string[] {
  if (pooled.m === pooled.n) return [];
  return [`${pooled.n} rows have ${pooled.m} distinct x values; rows with equal x were pooled (weights summed, weighted mean of y) before smoothing, which does not change the fit.`];
}

/**
 * Weighted least-squares line as a spline on the same knots: B-spline coefficients
 * a + b * (Greville abscissa), and A^-1 band (1 / W + (xi_i - xbar)(xi_l - xbar) / Sxx),
 * the limit of the smoothing spline's posterior covariance as lambda -> infinity.
 */
function straightLineFit(pooled: Pooled, notes: string[]): FitResult {
  const { u, w: W, y, m } = pooled;
  let sw = 0;
  let swx = 0;
  let swy = 0;
  for (let j = 0; j < m; j++) {
    sw += W[j] as number;
    swx += (W[j] as number) * (u[j] as number);
    swy += (W[j] as number) * (y[j] as number);
  }
  const xbar = swx / sw;
  const ybar = swy / sw;
  let sxx = 0;
  let sxy = 0;
  for (let j = 0; j < m; j++) {
    const dx = (u[j] as number) - xbar;
    sxx += (W[j] as number) * dx * dx;
    sxy += (W[j] as number) * dx * ((y[j] as number) - ybar);
  }
  const slope = sxy / sxx;
  const knots = clampedKnots(u[0] as number, u[m - 1] as number, u.subarray(1, m - 1));
  const nb = m + 2;
  const coefficients = new Float64Array(nb);
  const band = new Float64Array(4 * nb);
  const greville = new Float64Array(nb);
  for (let i = 0; i < nb; i++) greville[i] = ((knots[i + 1] as number) + (knots[i + 2] as number) + (knots[i + 3] as number)) / 3 - xbar;
  for (let i = 0; i < nb; i++) {
    coefficients[i] = ybar + slope * (greville[i] as number);
    for (let d = 0; d < 4 && i + d < nb; d++) band[4 * i + d] = 1 / sw + ((greville[i] as number) * (greville[i + d] as number)) / sxx;
  }
  const curve = makeCurve(knots, coefficients, band, 2);
  const value = new Float64Array(m);
  const lev = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    const dx = (u[j] as number) - xbar;
    value[j] = ybar + slope * dx;
    lev[j] = (W[j] as number) * (1 / sw + (dx * dx) / sxx);
  }
  const fitted = new Float64Array(pooled.n);
  const leverage = new Float64Array(pooled.n);
  perRow(pooled, value, lev, fitted, leverage);
  return summariseFit(pooled.data, {
    family: 'smooth',
    df: 2,
    curve,
    coefficients,
    knots,
    fitted,
    leverage,
    lambda: Infinity,
    notes: [...notes, ...tieNote(pooled)],
  });
}

/** A smoothing-spline curve with its B-spline coefficients. */
export interface SplineCurve extends Curve {
  readonly coefficients: Float64Array;
}

/**
 * Curve from B-spline coefficients and the band of A^-1: value b(x)'c and variance factor
 * b(x)' A^-1 b(x) inside [lower, upper]; beyond, b(x) = b(edge) + (x - edge) b'(edge), so
 * the value continues linearly with the boundary slope and the variance factor is that of
 * the linear continuation.
 */
export function makeCurve(knots: Float64Array, coefficients: Float64Array, band: Float64Array, df: number): SplineCurve {
  const ev = new BSplineEvaluator(knots);
  const lower = knots[0] as number;
  const upper = knots[knots.length - 1] as number;
  const edge = (x: number): { first: number; b: Float64Array; d: Float64Array } => {
    const first = ev.eval(x, 1);
    return { first, b: Float64Array.from(ev.value), d: Float64Array.from(ev.d1) };
  };
  const lo = edge(lower);
  const hi = edge(upper);
  const basis = new Float64Array(4);
  /** Fills `basis` with b(x) (linearly continued outside) and returns the first index. */
  const load = (x: number): number => {
    if (x < lower || x > upper) {
      const e = x < lower ? lo : hi;
      const dx = x - (x < lower ? lower : upper);
      for (let a = 0; a < 4; a++) basis[a] = (e.b[a] as number) + dx * (e.d[a] as number);
      return e.first;
    }
    const first = ev.eval(x, 0);
    basis.set(ev.value);
    return first;
  };
  return {
    family: 'smooth',
    df,
    lower,
    upper,
    coefficients,
    value(x: number): number {
      const first = load(x);
      let s = 0;
      for (let a = 0; a < 4; a++) s += (basis[a] as number) * (coefficients[first + a] as number);
      return s;
    },
    varianceFactor(x: number): number {
      const first = load(x);
      let s = 0;
      for (let a = 0; a < 4; a++) {
        const ba = basis[a] as number;
        s += ba * ba * (band[4 * (first + a)] as number);
        for (let b = a + 1; b < 4; b++) s += 2 * ba * (basis[b] as number) * (band[4 * (first + a) + (b - a)] as number);
      }
      return s;
    },
  };
}

function formatLambda(lambda: number): string {
  return lambda.toPrecision(6);
}
