import { activeSetCovariance, solveLsi } from '../linalg/lsi';
import { factorSpd, MAX_CONDITION, type SpdFailure } from '../linalg/spd';
import { congruence, congruenceT, times, transposeTimes } from './linearFit';
import type { ShapeRows } from './shape';

/** One weighted least-squares solve in a row basis, possibly constrained. */
export interface StepSolution {
  /** Coefficients in the row basis (theta = Z beta when restricted). */
  readonly theta: Float64Array;
  /** (Z'GZ)^-1, q x q. */
  readonly ginv: Float64Array;
  /** 1 for each active shape constraint. */
  readonly active: Uint8Array;
  readonly activeCount: number;
  readonly condition: number;
}

/**
 * Weighted least squares from a Gram matrix, min theta'G theta - 2 rhs'theta, with the
 * coefficients restricted to theta = Z beta (Z: p x q, orthonormal columns, e.g. the
 * natural boundary conditions; absent for q = p) and optionally subject to shape
 * inequalities A theta >= 0, transformed to (A Z) beta >= 0. The restricted Gram matrix
 * Z'GZ is factorised with the scaled Cholesky and condition check of core/linalg/spd.ts
 * (rank deficiency throws FitError naming `what`); inequalities go through Lawson &
 * Hanson's LSI -> LDP -> NNLS reduction (core/linalg/lsi.ts). Cost per solve O(p^2 q + q^3)
 * plus the NNLS; independent of n (G comes from CachedRows.gram in O(n)).
 * Example: new LinearSystem(p, z, shapeRows(knotVector, ['increasing'], true), 'natural spline with df 6').solve(g, rhs).theta.
 */
export class LinearSystem {
  readonly q: number;
  /** Number of inequality rows. */
  readonly rows: number;
  private readonly aq: Float64Array | undefined;
  private readonly zeros: Float64Array;

  constructor(
    readonly p: number,
    private readonly z: Float64Array | undefined,
    shape: ShapeRows | undefined,
    private readonly what: string,
  ) {
    const q = z ? z.length / p : p;
    this.q = q;
    this.rows = shape ? shape.rows : 0;
    this.zeros = new Float64Array(this.rows);
    if (shape && shape.rows > 0) {
      const r = shape.rows;
      const aq = new Float64Array(r * q);
      for (let i = 0; i < r; i++)
        for (let j = 0; j < q; j++) {
          let s = 0;
          if (z) for (let k = 0; k < p; k++) s += (shape.a[i * p + k] as number) * (z[k * q + j] as number);
          else s = shape.a[i * p + j] as number;
          aq[i * q + j] = s;
        }
      this.aq = aq;
    }
  }

  /** Solves the (constrained) weighted least-squares problem for Gram matrix g and right-hand side rhs. */
  solve(g: Float64Array, rhs: Float64Array): StepSolution {
    const { p, q, z, aq } = this;
    const gq = z ? congruence(g, z, p, q) : g;
    const rq = z ? transposeTimes(z, rhs, p, q) : rhs;
    const factor = factorSpd(gq, q, this.what, (failure) => explainGram(g, p, failure));
    let beta: Float64Array;
    let active: Uint8Array;
    let activeCount = 0;
    if (aq) {
      const sol = solveLsi(gq, rq, q, aq, this.zeros, this.rows, this.what);
      beta = sol.beta;
      active = sol.active;
      activeCount = sol.activeCount;
    } else {
      beta = factor.solve(rq);
      active = new Uint8Array(0);
    }
    const theta = z ? times(z, beta, p, q) : beta;
    return { theta, ginv: factor.inverse, active, activeCount, condition: factor.condition };
  }

  /**
   * Unscaled coefficient covariance in the row basis (p x p) at the solution's active set:
   * Z V Z' with V the covariance of the equality-constrained fit (active constraints held
   * as equalities; core/linalg/lsi.ts activeSetCovariance). Returns the number of
   * independent active constraints as `rank`.
   */
  covariance(sol: StepSolution): { cov: Float64Array; rank: number } {
    return this.covarianceAt(sol.ginv, sol);
  }

  /**
   * As `covariance`, for another Gram matrix g (p x p) at the active set of `sol`: used for
   * Huber standard errors, which take the Gram matrix of the prior weights.
   */
  covarianceFor(g: Float64Array, sol: StepSolution): { cov: Float64Array; rank: number } {
    const { p, q, z } = this;
    const gq = z ? congruence(g, z, p, q) : g;
    return this.covarianceAt(factorSpd(gq, q, this.what, (failure) => explainGram(g, p, failure)).inverse, sol);
  }

  private covarianceAt(ginv: Float64Array, sol: StepSolution): { cov: Float64Array; rank: number } {
    const { p, q, z } = this;
    const { cov, rank } = this.aq && sol.activeCount > 0 ? activeSetCovariance(ginv, q, this.aq, this.rows, sol.active) : { cov: ginv, rank: 0 };
    return { cov: z ? congruenceT(cov, z, p, q) : cov, rank };
  }
}

/**
 * What a rank-deficient Gram matrix G = B'WB (p x p, the basis functions' weighted sums of
 * squares on its diagonal) says about the data, for factorSpd's message: a basis function
 * no row with positive weight reaches, or one whose rows carry weights too small next to the
 * others' (in a reweighted fit, the working or Huber weights), else the x values. Cost O(p).
 * Example: explainGram(Float64Array.of(1, 0, 0, 0), 2, failure) -> 'no row with positive weight ... basis function 2 of 2 ...'.
 */
export function explainGram(g: Float64Array, p: number, failure: SpdFailure): string {
  let big = 0;
  for (let k = 0; k < p; k++) big = Math.max(big, g[k * p + k] as number);
  for (let k = 0; k < p; k++) {
    const d = g[k * p + k] as number;
    if (!(d > 0)) return `no row with positive weight where basis function ${k + 1} of ${p} is nonzero: the x values leave a gap the curve cannot bridge with this many coefficients`;
    if (!(d > big / MAX_CONDITION)) {
      return `weights too small: the rows where basis function ${k + 1} of ${p} is nonzero carry ${(d / big).toExponential(2)} of the weight of the best supported one, too little to determine its coefficient`;
    }
  }
  const how = failure.kind === 'condition' ? `condition number ${failure.condition.toExponential(2)}` : `pivot ${failure.index + 1} of ${failure.size} vanishes`;
  return `the x values cannot determine this many coefficients (rank deficient: ${how}): too few distinct x values overall, or between some knots, for this df`;
}
