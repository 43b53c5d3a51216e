/**
 * Least squares with linear inequality constraints (problem LSI), in Gram form:
 *
 *     minimise 1/2 b'G b - g'b   subject to   A b >= h,
 *
 * G (q x q) symmetric positive definite, A (r x q). This is ||E b - f||^2 / 2 up to a
 * constant for any E with E'E = G and E'f = g, so a weighted least-squares problem enters
 * through its Gram matrix, which Knotwise accumulates from the 4 nonzero B-spline values of
 * each row in O(n).
 *
 * Method: Lawson & Hanson, "Solving Least Squares Problems" (1974), chapter 23: LSI is
 * reduced to a least-distance problem (LDP, section 23.4) with the Cholesky factor
 * G = R'R: z = R (b - b0), b0 = G^-1 g, gives min ||z|| subject to (A R^-1) z >= h - A b0;
 * LDP is solved through the non-negative least-squares problem (Algorithm 23.27)
 *
 *     min || [ (A R^-1)' ; (h - A b0)' ] u - e_{q+1} ||,  u >= 0,
 *
 * with residual rho: z = -rho_{1..q} / rho_{q+1}; rho = 0 means the constraints are
 * inconsistent. The Lagrange multipliers of the constraints are u / (-rho_{q+1}) >= 0, and a
 * constraint with a positive multiplier is active (A_i b = h_i).
 */
import { FitError } from '../errors';
import { nnls } from './nnls';

/** A residual of the least-distance problem below this norm means the constraints cannot all hold. */
export const LDP_INFEASIBLE_TOLERANCE = 1e-10;
/** Active constraint rows whose orthogonalised norm falls below this fraction are dependent on the others and dropped. */
export const ACTIVE_RANK_TOLERANCE = 1e-9;

/** Result of `solveLsi`. */
export interface LsiResult {
  readonly beta: Float64Array;
  /** Lagrange multipliers (>= 0), one per constraint. */
  readonly multipliers: Float64Array;
  /** 1 where the constraint is active (positive multiplier). */
  readonly active: Uint8Array;
  readonly activeCount: number;
  /** NNLS outer iterations (0 when the unconstrained minimiser already satisfies every constraint). */
  readonly iterations: number;
  readonly converged: boolean;
}

/**
 * Solves min 1/2 b'Gb - g'b subject to A b >= h (see the module comment: Lawson & Hanson
 * 1974, chapter 23, LSI -> LDP -> NNLS). G is q x q SPD (row-major; scaled to unit diagonal
 * before its Cholesky factorisation, van der Sluis 1969), A is r x q row-major, h has r
 * entries. When the unconstrained minimiser G^-1 g satisfies every constraint it is
 * returned unchanged (no constraint active). Throws FitError naming `what` when G is not
 * positive definite or the constraints are inconsistent. Cost O(q^3 + r q^2) plus the NNLS
 * on r variables with q + 1 equations.
 *
 * Example: solveLsi(Float64Array.of(1), Float64Array.of(-2), 1, Float64Array.of(1), Float64Array.of(0), 1, 'x').beta = [0].
 */
export function solveLsi(g: Float64Array, rhs: Float64Array, q: number, a: Float64Array, h: Float64Array, r: number, what: string): LsiResult {
  const { l, d } = scaledCholesky(g, q, what);
  // b0 = G^-1 g = D (L L')^-1 D g.
  const y = new Float64Array(q);
  for (let i = 0; i < q; i++) y[i] = (d[i] as number) * (rhs[i] as number);
  forward(l, q, y);
  backward(l, q, y);
  const beta0 = new Float64Array(q);
  for (let i = 0; i < q; i++) beta0[i] = (d[i] as number) * (y[i] as number);
  const slack = new Float64Array(r);
  let feasible = true;
  for (let i = 0; i < r; i++) {
    let s = -(h[i] as number);
    for (let j = 0; j < q; j++) s += (a[i * q + j] as number) * (beta0[j] as number);
    slack[i] = s;
    if (!(s >= 0)) feasible = false;
  }
  if (feasible) return { beta: beta0, multipliers: new Float64Array(r), active: new Uint8Array(r), activeCount: 0, iterations: 0, converged: true };
  // E is (q + 1) x r: column i holds (A_i R^-1)' = L^-1 D A_i' over h_i - A_i b0.
  const e = new Float64Array((q + 1) * r);
  const col = new Float64Array(q);
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < q; j++) col[j] = (d[j] as number) * (a[i * q + j] as number);
    forward(l, q, col);
    for (let j = 0; j < q; j++) e[j * r + i] = col[j] as number;
    e[q * r + i] = -(slack[i] as number);
  }
  const ldp = solveLdp(e, q, r, what);
  // b = b0 + R^-1 z with R^-1 = D L^-T.
  const z = ldp.z;
  backward(l, q, z);
  const beta = new Float64Array(q);
  for (let j = 0; j < q; j++) beta[j] = (beta0[j] as number) + (d[j] as number) * (z[j] as number);
  return { beta, multipliers: ldp.multipliers, active: ldp.active, activeCount: ldp.activeCount, iterations: ldp.iterations, converged: ldp.converged };
}

/** Result of `solveLdp`: as LsiResult, with the minimum-norm point z in place of beta. */
export interface LdpResult extends Omit<LsiResult, 'beta'> {
  readonly z: Float64Array;
}

/**
 * Least-distance problem (LDP): minimise ||z|| subject to F z >= f, F r x q, by Lawson &
 * Hanson (1974), section 23.4, Algorithm 23.27 (see the module comment): the NNLS problem
 * min ||E u - e_{q+1}||, u >= 0, with E = [F' ; f'] ((q + 1) x r), has residual rho, and
 * z = -rho_{1..q} / rho_{q+1}; the multipliers are u / (-rho_{q+1}). `e` holds E row-major
 * (e[j * r + i] = F_ij for j < q, e[q * r + i] = f_i) and is not modified. Callers that
 * already have a triangular factor (solveLsi, core/fit/shapedSmoothing/) pass F = A R^-1.
 * Throws FitError naming `what` when the constraints are inconsistent. Cost: the NNLS on
 * r variables with q + 1 equations, O((q + 1) r) per dual update.
 * Example: solveLdp(Float64Array.of(1, 1), 1, 1, 'x').z = [1] (min |z| subject to z >= 1).
 */
export function solveLdp(e: Float64Array, q: number, r: number, what: string): LdpResult {
  const m = q + 1;
  const f = new Float64Array(m);
  f[q] = 1;
  const sol = nnls(e, m, r, f);
  const rho = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    let s = -(f[k] as number);
    for (let i = 0; i < r; i++) s += (e[k * r + i] as number) * (sol.x[i] as number);
    rho[k] = s;
  }
  let rhoNorm = 0;
  for (let k = 0; k < m; k++) rhoNorm += (rho[k] as number) ** 2;
  const last = rho[q] as number;
  if (!(Math.sqrt(rhoNorm) > LDP_INFEASIBLE_TOLERANCE) || !(last < 0)) {
    throw new FitError(`${what}: the shape constraints cannot all hold at once`);
  }
  const z = new Float64Array(q);
  for (let j = 0; j < q; j++) z[j] = -(rho[j] as number) / last;
  const multipliers = new Float64Array(r);
  const active = new Uint8Array(r);
  let activeCount = 0;
  for (let i = 0; i < r; i++) {
    const u = sol.x[i] as number;
    multipliers[i] = u / -last;
    if (u > 0) {
      active[i] = 1;
      activeCount++;
    }
  }
  return { z, multipliers, active, activeCount, iterations: sol.iterations, converged: sol.converged };
}

/**
 * Unscaled covariance of the least-squares coefficients when the active constraints hold as
 * equalities: V = G^-1 - G^-1 Q'(Q G^-1 Q')^-1 Q G^-1, with Q an orthonormal basis of the
 * active rows of A (modified Gram-Schmidt, dependent rows dropped). This is the covariance
 * of the equality-constrained estimator (Theil & Goldberger 1961, "On pure and mixed
 * statistical estimation in economics", International Economic Review 2; Searle, Linear
 * Models, 1971, section 3.6) and the usual approximation for an inequality-constrained fit
 * at its active set: it treats the active set as known. Cost O(q^2 a + a^3) for a active rows.
 * Returns G^-1 itself when no row is active; `rank` is the number of independent active rows.
 * Example: activeSetCovariance(I2, 2, Float64Array.of(1, 0), 1, Uint8Array.of(1)).cov = [[0, 0], [0, 1]].
 */
export function activeSetCovariance(ginv: Float64Array, q: number, a: Float64Array, r: number, active: Uint8Array): { cov: Float64Array; rank: number } {
  const rows: Float64Array[] = [];
  for (let i = 0; i < r; i++) {
    if (active[i] !== 1) continue;
    const v = Float64Array.from(a.subarray(i * q, (i + 1) * q));
    let norm0 = 0;
    for (let j = 0; j < q; j++) norm0 += (v[j] as number) ** 2;
    norm0 = Math.sqrt(norm0);
    if (!(norm0 > 0)) continue;
    // Two passes of Gram-Schmidt keep the basis orthogonal to working precision.
    for (let pass = 0; pass < 2; pass++) {
      for (const u of rows) {
        let s = 0;
        for (let j = 0; j < q; j++) s += (u[j] as number) * (v[j] as number);
        for (let j = 0; j < q; j++) v[j] = (v[j] as number) - s * (u[j] as number);
      }
    }
    let norm = 0;
    for (let j = 0; j < q; j++) norm += (v[j] as number) ** 2;
    norm = Math.sqrt(norm);
    if (norm <= ACTIVE_RANK_TOLERANCE * norm0) continue;
    for (let j = 0; j < q; j++) v[j] = (v[j] as number) / norm;
    rows.push(v);
  }
  const k = rows.length;
  if (k === 0) return { cov: Float64Array.from(ginv), rank: 0 };
  // P = G^-1 Q' (q x k), S = Q P (k x k).
  const pm = new Float64Array(q * k);
  for (let i = 0; i < q; i++)
    for (let c = 0; c < k; c++) {
      const u = rows[c] as Float64Array;
      let s = 0;
      for (let j = 0; j < q; j++) s += (ginv[i * q + j] as number) * (u[j] as number);
      pm[i * k + c] = s;
    }
  const sm = new Float64Array(k * k);
  for (let c1 = 0; c1 < k; c1++) {
    const u = rows[c1] as Float64Array;
    for (let c2 = 0; c2 < k; c2++) {
      let s = 0;
      for (let j = 0; j < q; j++) s += (u[j] as number) * (pm[j * k + c2] as number);
      sm[c1 * k + c2] = s;
    }
  }
  const { l, d } = scaledCholesky(sm, k, 'active-set covariance');
  const cov = Float64Array.from(ginv);
  const t = new Float64Array(k);
  // cov -= P S^-1 P': for each row i of P solve S t = P_i', then subtract P_j . t.
  const sinvP = new Float64Array(q * k);
  for (let i = 0; i < q; i++) {
    for (let c = 0; c < k; c++) t[c] = (d[c] as number) * (pm[i * k + c] as number);
    forward(l, k, t);
    backward(l, k, t);
    for (let c = 0; c < k; c++) sinvP[i * k + c] = (d[c] as number) * (t[c] as number);
  }
  for (let i = 0; i < q; i++)
    for (let j = 0; j < q; j++) {
      let s = 0;
      for (let c = 0; c < k; c++) s += (pm[j * k + c] as number) * (sinvP[i * k + c] as number);
      cov[i * q + j] = (cov[i * q + j] as number) - s;
    }
  // Symmetrise the roundoff.
  for (let i = 0; i < q; i++)
    for (let j = 0; j < i; j++) {
      const v = 0.5 * ((cov[i * q + j] as number) + (cov[j * q + i] as number));
      cov[i * q + j] = v;
      cov[j * q + i] = v;
    }
  return { cov, rank: k };
}

/** Cholesky factor L of D G D (D = diag(1 / sqrt(G_ii))), lower triangle row-major. */
function scaledCholesky(g: Float64Array, q: number, what: string): { l: Float64Array; d: Float64Array } {
  const d = new Float64Array(q);
  for (let i = 0; i < q; i++) {
    const gii = g[i * q + i] as number;
    if (!(gii > 0) || !Number.isFinite(gii)) throw new FitError(`${what}: coefficient ${i + 1} is not determined by the data (rank deficient)`);
    d[i] = 1 / Math.sqrt(gii);
  }
  const l = new Float64Array(q * q);
  for (let j = 0; j < q; j++) {
    let s = (g[j * q + j] as number) * (d[j] as number) * (d[j] as number);
    for (let k = 0; k < j; k++) s -= (l[j * q + k] as number) ** 2;
    if (!(s > 1e-14)) throw new FitError(`${what}: the design is rank deficient (pivot ${j + 1} of ${q} vanishes)`);
    const ljj = Math.sqrt(s);
    l[j * q + j] = ljj;
    for (let i = j + 1; i < q; i++) {
      let t = (g[i * q + j] as number) * (d[i] as number) * (d[j] as number);
      for (let k = 0; k < j; k++) t -= (l[i * q + k] as number) * (l[j * q + k] as number);
      l[i * q + j] = t / ljj;
    }
  }
  return { l, d };
}

/** Solves L v = b in place (L lower triangular). */
function forward(l: Float64Array, q: number, v: Float64Array): void {
  for (let i = 0; i < q; i++) {
    let s = v[i] as number;
    for (let k = 0; k < i; k++) s -= (l[i * q + k] as number) * (v[k] as number);
    v[i] = s / (l[i * q + i] as number);
  }
}

/** Solves L' v = b in place. */
function backward(l: Float64Array, q: number, v: Float64Array): void {
  for (let i = q - 1; i >= 0; i--) {
    let s = v[i] as number;
    for (let k = i + 1; k < q; k++) s -= (l[k * q + i] as number) * (v[k] as number);
    v[i] = s / (l[i * q + i] as number);
  }
}
