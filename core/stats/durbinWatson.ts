import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { InputError } from '../errors';
import { ScaledCholesky } from './crossProducts';
import type { DesignRows } from './design';
import { designCrossProducts, type DesignCrossProducts } from './designCrossProducts';
import { pnorm } from './distributions';
import { GivensQR } from './givensQR';
import { quadraticFormLowerTail } from './imhof';

/** Below this many rows (with a design) the p-value is exact, as in R's lmtest::dwtest. */
export const DW_EXACT_LIMIT = 100;
/** Eigenvalues of M A M at or below this are the structural zeros of the projection. */
const EIGEN_TOLERANCE = 1e-10;

/** Result of the Durbin-Watson test against positive autocorrelation. */
export interface DurbinWatsonResult {
  /** d = sum (e_t - e_{t-1})^2 / sum e_t^2, between 0 and 4; about 2 without autocorrelation. */
  readonly statistic: number;
  /** P(D <= d) under independent normal errors: small when neighbours are positively correlated. */
  readonly pValue: number;
  /**
   * 'exact': Imhof inversion of the null distribution given the design (n < 100);
   * 'normal': normal approximation with the exact null mean and variance given the design;
   * 'asymptotic': normal approximation with mean 2 and variance 4 / n (no design).
   */
  readonly method: 'exact' | 'normal' | 'asymptotic';
}

/**
 * Durbin-Watson test of the residuals, in x order, for positive first-order
 * autocorrelation (alternative rho > 0): Durbin & Watson (1950, 1951), "Testing for serial
 * correlation in least squares regression I, II", Biometrika 37, 409-428 and 38, 159-178.
 *
 * Under independent normal errors d = e'Ae / e'e with e = M y, M = I - X (X'X)^-1 X' and A
 * the first-difference matrix (diagonal 1, 2, ..., 2, 1, off-diagonals -1), so
 * P(D < d) = P(sum_j (nu_j - d) z_j^2 < 0) over the n - p nonzero eigenvalues nu_j of MAM.
 * - design and n < 100: nu_j from the symmetric eigen-decomposition of MAM, the tail by
 *   Imhof's (1961) inversion (`quadraticFormLowerTail`); O(n^3).
 * - design and n >= 100: normal approximation with the exact moments (Durbin & Watson
 *   1971, "Testing for serial correlation in least squares regression III", Biometrika
 *   58, 1-19): E d = P / (n - p), Var d = 2 (Q - P E d) / ((n - p)(n - p + 2)) with
 *   P = tr(MA) and Q = tr((MA)^2). The traces tr(HA), tr(HA^2), tr(HAHA) come from X'X,
 *   X'AX and X'A^2X gathered in one pass over the rows (`designCrossProducts`) and the
 *   scaled Cholesky factor of X'X (`ScaledCholesky`); when X'X is too ill-conditioned for
 *   that (GRAM_CONDITION_LIMIT), from the rows q_i of Q = X R^-1 by Givens QR in two
 *   passes. O(n p^2) either way.
 * - no design: mean 2, variance 4 / n; O(n).
 * This is what R's lmtest::dwtest reports (exact below 100 rows, normal approximation
 * above). For weighted fits pass sqrt(w)-scaled residuals and design rows.
 *
 * Throws InputError for fewer than 3 residuals, non-finite values, all-zero residuals or
 * a design with p >= n (too few rows for the df, said in those words); FitError for a
 * rank-deficient design.
 * Example: durbinWatson(Float64Array.of(1, 1, -1, -1, 1, 1, -1, -1)).statistic = 12 / 8 = 1.5.
 */
export function durbinWatson(residualsInXOrder: Float64Array, design?: DesignRows): DurbinWatsonResult {
  return durbinWatsonWith(residualsInXOrder, design, undefined);
}

/**
 * `durbinWatson`, taking the normal-approximation moments from cross products already
 * gathered for this design (`designCrossProducts` with `differences`) when given, so that
 * one pass over the rows can serve several tests (`durbinWatsonAndBreuschPagan`).
 */
export function durbinWatsonWith(residualsInXOrder: Float64Array, design: DesignRows | undefined, sums: DesignCrossProducts | undefined): DurbinWatsonResult {
  const e = residualsInXOrder;
  const n = e.length;
  if (n < 3) throw new InputError(`the Durbin-Watson test needs at least 3 residuals; got ${n}`);
  let ss = 0;
  let diffSS = 0;
  for (let i = 0; i < n; i++) {
    const v = e[i] as number;
    if (!Number.isFinite(v)) throw new InputError(`Durbin-Watson: residual ${i + 1} is not a finite number (${v})`);
    ss += v * v;
    if (i > 0) {
      const d = v - (e[i - 1] as number);
      diffSS += d * d;
    }
  }
  if (ss === 0) throw new InputError('Durbin-Watson: all residuals are zero, so the statistic is undefined');
  const statistic = diffSS / ss;
  if (!design) {
    return { statistic, pValue: pnorm((statistic - 2) / Math.sqrt(4 / n)), method: 'asymptotic' };
  }
  const p = design.p;
  if (p >= n) {
    throw new InputError(
      `Durbin-Watson: too few rows for the df (n = ${n}, df = ${p}): the test needs more rows (${n}) than design columns (${p}); with as many coefficients as rows the curve passes through every reading and leaves no residual variation to test`,
    );
  }
  if (sums && (sums.p !== p || sums.n !== n)) throw new Error(`Durbin-Watson: cross products of ${sums.n} x ${sums.p} given for ${n} rows and ${p} columns`);
  if (n >= DW_EXACT_LIMIT) {
    const moments = momentsFromCrossProducts(sums?.differences ? sums : designCrossProducts(design, n, { differences: true }));
    if (moments) return { statistic, pValue: pnorm((statistic - moments.mean) / Math.sqrt(moments.variance)), method: 'normal' };
  }
  const qr = new GivensQR(p);
  const row = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    design.row(i, row);
    qr.addRow(row, 0);
  }
  qr.checkRank();
  if (n < DW_EXACT_LIMIT) {
    return { statistic, pValue: exactPValue(statistic, design, qr, n), method: 'exact' };
  }
  const { mean, variance } = nullMoments(design, qr, n);
  return { statistic, pValue: pnorm((statistic - mean) / Math.sqrt(variance)), method: 'normal' };
}

/** Rows of Q = X R^-1 (orthonormal basis of the column space), as an n x p array. */
function orthonormalRows(design: DesignRows, qr: GivensQR, n: number): Float64Array {
  const p = design.p;
  const q = new Float64Array(n * p);
  const row = new Float64Array(p);
  const out = new Float64Array(p);
  for (let i = 0; i < n; i++) {
    design.row(i, row);
    qr.solveTransposed(row, out);
    q.set(out, i * p);
  }
  return q;
}

/** P(D <= d) from the eigenvalues of M A M and Imhof's inversion. */
function exactPValue(d: number, design: DesignRows, qr: GivensQR, n: number): number {
  const p = design.p;
  const q = orthonormalRows(design, qr, n);
  // M = I - Q Q'.
  const m = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = 0; k < p; k++) s += (q[i * p + k] as number) * (q[j * p + k] as number);
      const v = (i === j ? 1 : 0) - s;
      m[i * n + j] = v;
      m[j * n + i] = v;
    }
  }
  // AM, using the tridiagonal A: (AM)_ij = A_ii M_ij - M_(i-1)j - M_(i+1)j.
  const am = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const diag = i === 0 || i === n - 1 ? 1 : 2;
    for (let j = 0; j < n; j++) {
      let v = diag * (m[i * n + j] as number);
      if (i > 0) v -= m[(i - 1) * n + j] as number;
      if (i < n - 1) v -= m[(i + 1) * n + j] as number;
      am[i * n + j] = v;
    }
  }
  // MAM, symmetrised against rounding.
  const mam = new Matrix(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s1 = 0;
      let s2 = 0;
      for (let k = 0; k < n; k++) {
        s1 += (m[i * n + k] as number) * (am[k * n + j] as number);
        s2 += (m[j * n + k] as number) * (am[k * n + i] as number);
      }
      const v = 0.5 * (s1 + s2);
      mam.set(i, j, v);
      mam.set(j, i, v);
    }
  }
  const eigenvalues = Float64Array.from(new EigenvalueDecomposition(mam, { assumeSymmetric: true }).realEigenvalues);
  eigenvalues.sort();
  // The p structural zeros of the projection are the smallest; keep the n - p others.
  const lambda = new Float64Array(n - p);
  let count = 0;
  for (let j = n - 1; j >= p; j--) {
    const nu = eigenvalues[j] as number;
    if (nu > EIGEN_TOLERANCE) lambda[count++] = nu - d;
  }
  if (count === 0) throw new InputError(`Durbin-Watson: too few rows for the df (n = ${n}, df = ${p}): the design leaves no residual variation to test`);
  return quadraticFormLowerTail(lambda.subarray(0, count));
}

/** Mean and variance of d under the null from P = tr(MA) and Q = tr((MA)^2) (Durbin & Watson 1971). */
function momentsFromTraces(n: number, p: number, trHA: number, trHA2: number, trHAHA: number): { mean: number; variance: number } {
  // tr A = 2(n - 1) and tr A^2 = 6n - 8 for the first-difference matrix A; with M = I - H,
  // tr(MA) = tr A - tr(HA) and tr((MA)^2) = tr A^2 - 2 tr(HA^2) + tr(HAHA).
  const bigP = 2 * (n - 1) - trHA;
  const bigQ = 2 * (3 * n - 4) - 2 * trHA2 + trHAHA;
  const mean = bigP / (n - p);
  const variance = (2 * (bigQ - bigP * mean)) / ((n - p) * (n - p + 2));
  return { mean, variance };
}

/**
 * Null mean and variance of d from the design's cross products (`designCrossProducts` with
 * `differences`): with G = X'X factored by `ScaledCholesky`, tr(HA) = tr W,
 * tr(HAHA) = |W|_F^2 and tr(HA^2) = tr V, W and V being the whitened X'AX and X'A^2X.
 * Undefined when G is too ill-conditioned for this route (GRAM_CONDITION_LIMIT). O(p^3).
 */
function momentsFromCrossProducts(sums: DesignCrossProducts): { mean: number; variance: number } | undefined {
  const { p, n, gram, differences } = sums;
  if (!differences) throw new Error('Durbin-Watson moments need the cross products of the differences');
  const factor = ScaledCholesky.of(gram, p);
  if (!factor) return undefined;
  const w = factor.whiten(differences.xax);
  const v = factor.whiten(differences.xa2x);
  let trHA = 0;
  let trHA2 = 0;
  let trHAHA = 0;
  for (let a = 0; a < p; a++) {
    trHA += w[a * p + a] as number;
    trHA2 += v[a * p + a] as number;
    for (let b = 0; b < p; b++) trHAHA += (w[a * p + b] as number) ** 2;
  }
  return momentsFromTraces(n, p, trHA, trHA2, trHAHA);
}

/** Exact null mean and variance of d given the design (Durbin & Watson 1971), by Givens QR. O(n p^2). */
function nullMoments(design: DesignRows, qr: GivensQR, n: number): { mean: number; variance: number } {
  const p = design.p;
  const row = new Float64Array(p);
  const qPrev = new Float64Array(p);
  const qCur = new Float64Array(p);
  const dPrev = new Float64Array(p); // q_i - q_(i-1)
  const dCur = new Float64Array(p);
  const g = new Float64Array(p * p); // Q'AQ = sum of dq dq'
  let trHA = 0; // tr(H A) = tr(Q'AQ)
  let trHA2 = 0; // tr(H A^2) = |AQ|_F^2
  design.row(0, row);
  qr.solveTransposed(row, qPrev);
  for (let i = 1; i < n; i++) {
    design.row(i, row);
    qr.solveTransposed(row, qCur);
    let dd = 0;
    let aq = 0;
    for (let k = 0; k < p; k++) {
      const dk = (qCur[k] as number) - (qPrev[k] as number);
      dCur[k] = dk;
      dd += dk * dk;
      // Row i-1 of AQ: -dq_1 for the first row, dq_(i-2) - dq_(i-1) in the middle.
      const a = i === 1 ? -dk : (dPrev[k] as number) - dk;
      aq += a * a;
    }
    trHA += dd;
    trHA2 += aq;
    for (let a = 0; a < p; a++) {
      const da = dCur[a] as number;
      for (let b = 0; b < p; b++) g[a * p + b] = (g[a * p + b] as number) + da * (dCur[b] as number);
    }
    qPrev.set(qCur);
    dPrev.set(dCur);
  }
  // Last row of AQ is dq_(n-1).
  for (let k = 0; k < p; k++) trHA2 += (dPrev[k] as number) * (dPrev[k] as number);
  let trHAHA = 0;
  for (let k = 0; k < p * p; k++) trHAHA += (g[k] as number) * (g[k] as number);
  return momentsFromTraces(n, p, trHA, trHA2, trHAHA);
}
