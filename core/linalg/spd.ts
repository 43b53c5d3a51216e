import { FitError } from '../errors';

/** Largest condition number (after unit-diagonal scaling) accepted before a system is called rank deficient. */
export const MAX_CONDITION = 1e12;

/** Why a matrix was refused, for a caller that can say what the data lacks (see factorSpd's `explain`). */
export interface SpdFailure {
  /** 'empty': a zero (or non-finite) diagonal entry; 'pivot': a vanishing Cholesky pivot; 'condition': the condition number above MAX_CONDITION. */
  readonly kind: 'empty' | 'pivot' | 'condition';
  /** 0-based row of the diagonal entry or pivot (-1 for 'condition'). */
  readonly index: number;
  readonly size: number;
  /** The condition estimate ('condition' only; NaN otherwise). */
  readonly condition: number;
}

/** Result of factorising a small symmetric positive definite matrix. */
export interface SpdFactor {
  readonly size: number;
  /** Inverse of the matrix, row-major size x size. */
  readonly inverse: Float64Array;
  /**
   * Estimated 2-norm condition number of the unit-diagonal-scaled matrix; with `boundOnly`,
   * an upper bound whenever that bound already passes the check.
   */
  readonly condition: number;
  /** Solves A x = b. */
  solve(b: Float64Array): Float64Array;
}

/**
 * Cholesky factorisation A = L L' of a small dense symmetric positive definite matrix
 * (row-major, only the lower triangle is read), with symmetric unit-diagonal scaling
 * (Jacobi preconditioning; van der Sluis 1969, "Condition numbers and equilibration of
 * matrices", Numer. Math. 14) and a condition check: the 2-norm condition number of the
 * scaled matrix is estimated from its extreme eigenvalues by power iteration on A and A^-1
 * (Golub & Van Loan, Matrix Computations, 4th ed., section 7.3).
 * Throws FitError naming `what` when the matrix is singular or its condition exceeds
 * MAX_CONDITION (rank deficiency: the data cannot determine every coefficient); the reason
 * in the message comes from `explain` when given (a caller that knows the data says what
 * it lacks: too few rows for the df, weights too small, ...), else it describes the matrix.
 * With `boundOnly` (the resampling hot path, which only needs the check), the product of the
 * Frobenius norms of the scaled matrix and its inverse, an upper bound of the 2-norm
 * condition number, is tried first: when it passes, the power iterations are skipped (the
 * decision is the same, since the estimate lies below the bound); else they run as usual.
 * Cost O(p^3). Example: factorSpd(Float64Array.of(4, 2, 2, 3), 2, 'x').solve(Float64Array.of(2, 1)).
 */
export function factorSpd(a: Float64Array, p: number, what: string, explain?: (failure: SpdFailure) => string, boundOnly = false): SpdFactor {
  const fail = (failure: SpdFailure, plain: string): FitError => new FitError(`${what}: ${explain ? explain(failure) : plain}`);
  // Scratch kept between calls of the same size (the resampling hot path factors thousands of
  // small matrices); every entry read below is written first, so the results do not depend on it.
  const { scale, l, linv } = scratchOf(p);
  for (let i = 0; i < p; i++) {
    const d = a[i * p + i] as number;
    if (!(d > 0) || !Number.isFinite(d)) {
      throw fail(
        { kind: 'empty', index: i, size: p, condition: NaN },
        Number.isFinite(d)
          ? `coefficient ${i + 1} of ${p} is not determined: no row with positive weight reaches its basis function (rank deficient)`
          : `coefficient ${i + 1} of ${p}: its sums of squares are not finite (values or weights too large)`,
      );
    }
    scale[i] = 1 / Math.sqrt(d);
  }
  for (let j = 0; j < p; j++) {
    let s = (a[j * p + j] as number) * (scale[j] as number) * (scale[j] as number);
    for (let k = 0; k < j; k++) s -= (l[j * p + k] as number) ** 2;
    if (!(s > 1 / MAX_CONDITION)) {
      throw fail({ kind: 'pivot', index: j, size: p, condition: NaN }, `the design is rank deficient (pivot ${j + 1} of ${p} vanishes); the data cannot determine this many coefficients`);
    }
    const ljj = Math.sqrt(s);
    l[j * p + j] = ljj;
    for (let i = j + 1; i < p; i++) {
      let t = (a[i * p + j] as number) * (scale[i] as number) * (scale[j] as number);
      for (let k = 0; k < j; k++) t -= (l[i * p + k] as number) * (l[j * p + k] as number);
      l[i * p + j] = t / ljj;
    }
  }
  // Inverse of the scaled matrix: (L L')^-1 = L^-T L^-1.
  for (let j = 0; j < p; j++) {
    linv[j * p + j] = 1 / (l[j * p + j] as number);
    for (let i = j + 1; i < p; i++) {
      let s = 0;
      for (let k = j; k < i; k++) s += (l[i * p + k] as number) * (linv[k * p + j] as number);
      linv[i * p + j] = -s / (l[i * p + i] as number);
    }
  }
  const inverse = new Float64Array(p * p);
  // Squared Frobenius norms of the scaled matrix and of its inverse (for the bound).
  let normA = 0;
  let normInv = 0;
  for (let i = 0; i < p; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = i; k < p; k++) s += (linv[k * p + i] as number) * (linv[k * p + j] as number);
      const v = s * (scale[i] as number) * (scale[j] as number);
      inverse[i * p + j] = v;
      inverse[j * p + i] = v;
      const aij = (a[i * p + j] as number) * (scale[i] as number) * (scale[j] as number);
      const both = i === j ? 1 : 2;
      normInv += both * s * s;
      normA += both * aij * aij;
    }
  }
  const bound = Math.sqrt(normA * normInv);
  const condition = boundOnly && bound < MAX_CONDITION ? bound : estimateCondition(l, linv, p);
  if (!(condition < MAX_CONDITION)) {
    throw fail({ kind: 'condition', index: -1, size: p, condition }, `the design is rank deficient (condition number ${condition.toExponential(2)}); the data cannot determine this many coefficients`);
  }
  return {
    size: p,
    inverse,
    condition,
    solve(b: Float64Array): Float64Array {
      const out = new Float64Array(p);
      for (let i = 0; i < p; i++) {
        let s = 0;
        for (let j = 0; j < p; j++) s += (inverse[i * p + j] as number) * (b[j] as number);
        out[i] = s;
      }
      return out;
    },
  };
}

/** Scratch of factorSpd by size: the scaling, the Cholesky factor and its inverse. */
const scratch = new Map<number, { scale: Float64Array; l: Float64Array; linv: Float64Array }>();

function scratchOf(p: number): { scale: Float64Array; l: Float64Array; linv: Float64Array } {
  let s = scratch.get(p);
  if (!s) {
    s = { scale: new Float64Array(p), l: new Float64Array(p * p), linv: new Float64Array(p * p) };
    if (p <= 64) scratch.set(p, s);
  }
  return s;
}

const POWER_ITERATIONS = 30;

/** Condition estimate of S = L L' from power iterations on S and on S^-1 = L^-T L^-1. */
function estimateCondition(l: Float64Array, linv: Float64Array, p: number): number {
  const largest = powerIteration(l, p, false);
  const smallestInv = powerIteration(linv, p, true);
  return largest * smallestInv;
}

/** Largest eigenvalue of F F' (lower=false: F = L) or F' F (lower=true: F = L^-1). */
function powerIteration(f: Float64Array, p: number, transposeFirst: boolean): number {
  let v = new Float64Array(p).fill(1 / Math.sqrt(p));
  let u = new Float64Array(p);
  const tmp = new Float64Array(p);
  let lambda = 0;
  for (let it = 0; it < POWER_ITERATIONS; it++) {
    // tmp = F' v (or F v), then u = F tmp (or F' tmp): one application of F F' (or F' F).
    for (let i = 0; i < p; i++) {
      let s = 0;
      for (let k = 0; k < p; k++) s += (transposeFirst ? (f[i * p + k] as number) : (f[k * p + i] as number)) * (v[k] as number);
      tmp[i] = s;
    }
    for (let i = 0; i < p; i++) {
      let s = 0;
      for (let k = 0; k < p; k++) s += (transposeFirst ? (f[k * p + i] as number) : (f[i * p + k] as number)) * (tmp[k] as number);
      u[i] = s;
    }
    let norm = 0;
    for (let i = 0; i < p; i++) norm += (u[i] as number) ** 2;
    norm = Math.sqrt(norm);
    if (!(norm > 0)) return 0;
    lambda = norm;
    const swap = v;
    v = u;
    u = swap;
    for (let i = 0; i < p; i++) v[i] = (v[i] as number) / norm;
  }
  return lambda;
}
