/**
 * The state-space form of the cubic smoothing spline: its model, its lambda-free
 * quantities, and the storage shared by its filter and smoother passes (kalmanFilter.ts,
 * fixedIntervalSmoother.ts, spanToBSpline.ts; SplineSmoother in smoother.ts runs them).
 */

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
 * the two beta columns (6). Allocated once; `run` of SplineSmoother (smoother.ts) can be
 * called for many lambda. The constructor costs O(m) time; about 250 bytes per knot in all.
 * @example const s = new SmootherState(new ScaledKnots(pooled.u).t, pooled.w); s.m === pooled.m
 */
export class SmootherState {
  readonly m: number;
  readonly h: Float64Array;
  readonly rho: Float64Array;
  /** Reciprocals of the backward Schur complements of M (lambda-free): the variance of eta_{j-1} times lambda. */
  readonly invSchur: Float64Array;
  /** Observation variances 1 / W_j. */
  readonly obsVar: Float64Array;
  readonly p: Float64Array;
  readonly a: Float64Array;
  readonly aa: Float64Array;
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
    readonly t: Float64Array,
    readonly wts: Float64Array,
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

  /** 4 x 4 covariance of (f_j, f'_j, gamma_j, gamma_{j+1}), row-major, upper triangle used. */
  readonly scratch = new Float64Array(16);
  /** Rows of the map from (f_j, f'_j, gamma_j, gamma_{j+1}) to the 4 B-spline coefficients active on span j. */
  readonly gmap = new Float64Array(16);
  readonly gc = new Float64Array(4);
}
