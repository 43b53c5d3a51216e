/**
 * Non-negative least squares: minimise ||E x - f||_2 subject to x >= 0.
 *
 * Method: algorithm NNLS of Lawson & Hanson, "Solving Least Squares Problems"
 * (Prentice-Hall 1974; SIAM reprint 1995), chapter 23, section 3 (Algorithm 23.10), an
 * active-set method. The variables are split into a passive set P (free, positive) and a
 * zero set; each outer step moves the zero variable with the largest dual value
 * w_j = e_j'(f - E x) into P, and the inner loop solves the unconstrained least-squares
 * problem on the columns of P, backing up along the segment towards it whenever a passive
 * variable would turn non-positive. The least-squares subproblem is solved by a Householder
 * QR of the passive columns (Lawson & Hanson chapter 11; Golub & Van Loan, Matrix
 * Computations, 4th ed., section 5.2), which keeps full accuracy when the columns are badly
 * scaled; the factorisation is kept between steps and redone only from the first passive
 * column that changed (results are identical to refactoring at every step). As in Lawson &
 * Hanson's own program, a candidate whose least-squares coefficient is not positive (its
 * column is numerically dependent on the passive ones) is rejected for that outer step, and
 * the outer iterations are capped at 3 n.
 *
 * The problems Knotwise hands to it are small (n = number of shape constraints, m = number
 * of spline coefficients + 1, up to a few thousand for the shape-constrained smoothing
 * spline); cost O(m n) per dual update and O(m |P|) per column added to the passive set,
 * typically O(n) outer steps.
 */

/** Machine epsilon of doubles. */
const EPS = 2.220446049250313e-16;
/** Outer iterations are capped at this multiple of the number of variables (Lawson & Hanson's ITMAX = 3 n). */
export const NNLS_ITERATION_FACTOR = 3;
/** Dual values below this multiple of eps * max(m, n) * (largest column norm) * ||f|| count as zero. */
export const NNLS_DUAL_TOLERANCE_FACTOR = 10;

/** Result of `nnls`. */
export interface NnlsResult {
  /** The solution, x >= 0. */
  readonly x: Float64Array;
  /** The dual vector w = E'(f - E x): w_j <= 0 (to tolerance) where x_j = 0, w_j = 0 where x_j > 0. */
  readonly dual: Float64Array;
  /** ||E x - f||_2. */
  readonly residualNorm: number;
  /** Outer iterations used. */
  readonly iterations: number;
  /** False when the iteration cap stopped the search (the returned x is feasible but may not be optimal). */
  readonly converged: boolean;
}

/**
 * Solves min ||E x - f||_2 subject to x >= 0 by Lawson & Hanson's NNLS (see the module
 * comment for the method and reference). E is m x n, row-major; neither E nor f is
 * modified. Scratch space is allocated once per call, O(m n). Cost: O(m n) per dual update
 * and O(m |P|^2) per passive least-squares solve.
 *
 * Example: nnls(Float64Array.of(1, 0, 0, 1), 2, 2, Float64Array.of(1, -1)).x = [1, 0].
 */
export function nnls(e: Float64Array, m: number, n: number, f: Float64Array): NnlsResult {
  if (e.length !== m * n || f.length !== m) throw new Error(`nnls: E must be ${m} x ${n} and f of length ${m}`);
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  const z = new Float64Array(n);
  const passive = new Uint8Array(n);
  const rejected = new Uint8Array(n);
  const order = new Int32Array(n);
  const resid = new Float64Array(m);
  const qr = new Float64Array(m * n);
  const rhs = new Float64Array(m);
  let np = 0;

  let maxColNorm = 0;
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < m; i++) s += (e[i * n + j] as number) ** 2;
    if (s > maxColNorm) maxColNorm = s;
  }
  maxColNorm = Math.sqrt(maxColNorm);
  let fNorm = 0;
  for (let i = 0; i < m; i++) fNorm += (f[i] as number) ** 2;
  fNorm = Math.sqrt(fNorm);
  const dualTol = NNLS_DUAL_TOLERANCE_FACTOR * EPS * Math.max(m, n) * maxColNorm * fNorm;

  const nonzero = new Int32Array(n);
  const updateDual = (): void => {
    // Terms with x_j = 0 add nothing, and w is accumulated row by row (E is row-major): the
    // same sums in the same order, without a strided pass over E for every column.
    let nz = 0;
    for (let j = 0; j < n; j++) if ((x[j] as number) !== 0) nonzero[nz++] = j;
    for (let i = 0; i < m; i++) {
      let s = f[i] as number;
      for (let k = 0; k < nz; k++) {
        const j = nonzero[k] as number;
        s -= (e[i * n + j] as number) * (x[j] as number);
      }
      resid[i] = s;
    }
    w.fill(0);
    for (let i = 0; i < m; i++) {
      const ri = resid[i] as number;
      const o = i * n;
      for (let j = 0; j < n; j++) w[j] = (w[j] as number) + (e[o + j] as number) * ri;
    }
  };

  // Householder QR of the passive columns, kept between steps: the reflections of the first
  // `factored` columns of `order` stay valid while those columns stay (a QR's leading columns
  // do not depend on later ones), so a step refactors only from the first changed position.
  // Each column and f meet the same reflections in the same order as in a fresh
  // factorisation, so the result is identical to refactoring from scratch.
  const vhead = new Float64Array(n);
  const vscale = new Float64Array(n);
  let factored = 0;
  for (let i = 0; i < m; i++) rhs[i] = f[i] as number;

  /** Applies reflection k (vhead[k] at row k, qr[k * m + i] below it, scale vscale[k]) to v[off..off + m). */
  const reflect = (k: number, v: Float64Array, off: number): void => {
    const head = vhead[k] as number;
    let s = head * (v[off + k] as number);
    for (let i = k + 1; i < m; i++) s += (qr[k * m + i] as number) * (v[off + i] as number);
    const t = s / (vscale[k] as number);
    v[off + k] = (v[off + k] as number) - t * head;
    for (let i = k + 1; i < m; i++) v[off + i] = (v[off + i] as number) - t * (qr[k * m + i] as number);
  };

  /** Keeps the reflections of the first `pos` passive columns only; rebuilds Q'f from f for them. */
  const truncate = (pos: number): void => {
    if (pos >= factored) return;
    factored = pos;
    for (let i = 0; i < m; i++) rhs[i] = f[i] as number;
    for (let k = 0; k < pos; k++) reflect(k, rhs, 0);
  };

  /** Least squares on the passive columns (in `order[0..np)`), result in z; false if a pivot vanishes. */
  const solvePassive = (): boolean => {
    // qr holds the passive columns column-major: column k at qr[k * m .. k * m + m).
    if (np > m) return false;
    for (let k = factored; k < np; k++) {
      const j = order[k] as number;
      for (let i = 0; i < m; i++) qr[k * m + i] = e[i * n + j] as number;
      for (let c = 0; c < k; c++) reflect(c, qr, k * m);
      let norm = 0;
      for (let i = k; i < m; i++) norm += (qr[k * m + i] as number) ** 2;
      norm = Math.sqrt(norm);
      if (!(norm > 0)) return false;
      const akk = qr[k * m + k] as number;
      const alpha = akk > 0 ? -norm : norm;
      // Householder vector v = a_k - alpha e_k, its head kept aside; v'v / 2 = alpha (alpha - akk).
      vhead[k] = akk - alpha;
      vscale[k] = alpha * (alpha - akk);
      reflect(k, rhs, 0);
      // The diagonal of R is alpha; the rest of the vector stays below it.
      qr[k * m + k] = alpha;
      factored = k + 1;
    }
    // Back substitution R z_P = (Q'f)[0..np); a pivot tiny against the largest means dependent columns.
    let maxDiag = 0;
    for (let k = 0; k < np; k++) maxDiag = Math.max(maxDiag, Math.abs(qr[k * m + k] as number));
    for (let k = np - 1; k >= 0; k--) {
      const d = qr[k * m + k] as number;
      if (!(Math.abs(d) > EPS * m * maxDiag)) return false;
      let s = rhs[k] as number;
      for (let c = k + 1; c < np; c++) s -= (qr[c * m + k] as number) * (z[order[c] as number] as number);
      z[order[k] as number] = s / d;
    }
    return true;
  };

  const maxIterations = NNLS_ITERATION_FACTOR * n;
  let iterations = 0;
  let converged = false;
  outer: for (;;) {
    updateDual();
    // Step 3-4: the zero variable with the largest dual value, skipping ones rejected in this round.
    let t = -1;
    let best = dualTol;
    for (let j = 0; j < n; j++) {
      if (passive[j] === 1 || rejected[j] === 1) continue;
      if ((w[j] as number) > best) {
        best = w[j] as number;
        t = j;
      }
    }
    if (t < 0) {
      converged = true;
      break;
    }
    if (iterations >= maxIterations) break;
    iterations++;
    // Step 5-6: move t into P and solve on P.
    passive[t] = 1;
    order[np++] = t;
    if (!solvePassive() || !((z[t] as number) > 0)) {
      // Lawson & Hanson's test: the new column does not help (numerically dependent); leave it at zero.
      passive[t] = 0;
      np--;
      truncate(np);
      rejected[t] = 1;
      continue;
    }
    rejected.fill(0);
    // Steps 7-11: back up while a passive variable would go non-positive.
    for (;;) {
      let alpha = Infinity;
      let hit = -1;
      for (let k = 0; k < np; k++) {
        const j = order[k] as number;
        const zj = z[j] as number;
        if (zj <= 0) {
          const xj = x[j] as number;
          const a = xj / (xj - zj);
          if (a < alpha) {
            alpha = a;
            hit = j;
          }
        }
      }
      if (hit < 0) {
        for (let k = 0; k < np; k++) {
          const j = order[k] as number;
          x[j] = z[j] as number;
        }
        continue outer;
      }
      for (let k = 0; k < np; k++) {
        const j = order[k] as number;
        x[j] = (x[j] as number) + alpha * ((z[j] as number) - (x[j] as number));
      }
      x[hit] = 0;
      // Move every passive variable that reached zero back to the zero set.
      let kept = 0;
      let firstRemoved = np;
      for (let k = 0; k < np; k++) {
        const j = order[k] as number;
        if (j === hit || (x[j] as number) <= 0) {
          x[j] = 0;
          passive[j] = 0;
          if (k < firstRemoved) firstRemoved = k;
        } else {
          order[kept++] = j;
        }
      }
      np = kept;
      truncate(firstRemoved);
      if (np === 0) continue outer;
      if (!solvePassive()) {
        // Cannot happen for columns that were independent before; stop with the feasible x.
        break outer;
      }
    }
  }
  updateDual();
  let rn = 0;
  for (let i = 0; i < m; i++) rn += (resid[i] as number) ** 2;
  return { x, dual: Float64Array.from(w), residualNorm: Math.sqrt(rn), iterations, converged };
}
