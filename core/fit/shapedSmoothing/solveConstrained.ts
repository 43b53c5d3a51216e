/**
 * Step 3 of core/fit/shapedSmoothing/index.ts: the least-distance problem on a working set of
 * shape rows, and the band of the covariance at the active set.
 */
import { solveLdp } from '../../linalg/lsi';
import type { ShapeRows } from '../shape';
import { activeSetBand, orthonormalise } from './activeSetBand';
import { backSolve, forwardSolveT } from './bandSolves';
import type { BandSystem } from './bandSystem';
import { FEASIBILITY_TOLERANCE } from './feasibility';
import { dot } from './vectors';

/** Rounds of adding violated rows to the working set before every row is used at once. */
const MAX_GENERATION_ROUNDS = 8;

/** The constrained coefficients, the band of their covariance at the active set, and the active rows. */
export interface ConstrainedSolution {
  readonly beta: Float64Array;
  /** Band of the active-set covariance of beta (q x w, core/linalg/banded.ts layout, half-bandwidth w - 1). */
  readonly band: Float64Array;
  readonly activeCount: number;
  /** Independent active constraints. */
  readonly rank: number;
  readonly converged: boolean;
}

/**
 * Step 3 and the bands of the method (core/fit/shapedSmoothing/index.ts). The least-distance
 * problem (Lawson & Hanson 1974, "Solving Least Squares Problems", chapter 23;
 * core/linalg/lsi.ts `solveLdp`) is solved on a working set of rows, which starts with the
 * rows the unconstrained fit violates; rows the solution still violates are added and the
 * problem solved again (at most MAX_GENERATION_ROUNDS times, then with every row). A
 * solution that satisfies every row is the optimum of the full problem, since it is optimal
 * with fewer constraints; the working set keeps the NNLS at O(q s) per step for s rows
 * instead of O(q r).
 * Cost per round: O(s q w) to transform the rows plus the NNLS; O(k^2 q) for the bands (k active rows).
 * @example solveConstrained(penalisedSystem(pooled, lambda), shapeRows(knots, ['convex'], false)).activeCount
 */
export function solveConstrained(sys: BandSystem, rows: ShapeRows): ConstrainedSolution {
  const { q, w, r: R, d } = sys;
  const beta0 = Float64Array.from(d);
  backSolve(R, q, w, beta0);
  const onBeta = sys.constraints(rows);
  const all: number[] = [];
  onBeta.forEach((row, i) => {
    if (row) all.push(i);
  });
  const tol0 = FEASIBILITY_TOLERANCE * sys.scale(beta0);
  let set = all.filter((i) => !(dot(onBeta[i] as Float64Array, beta0) >= -tol0));
  const inactive: ConstrainedSolution = { beta: beta0, band: new Float64Array(0), activeCount: 0, rank: 0, converged: true };
  if (set.length === 0) return inactive;
  const v = new Float64Array(q);
  for (let round = 1; ; round++) {
    // E = [(A R^-1)' ; (-A beta0)'] on the working set, column by column.
    const nr = set.length;
    const e = new Float64Array((q + 1) * nr);
    for (let c = 0; c < nr; c++) {
      const a = onBeta[set[c] as number] as Float64Array;
      v.set(a);
      forwardSolveT(R, q, w, v);
      for (let j = 0; j < q; j++) e[j * nr + c] = v[j] as number;
      e[q * nr + c] = -dot(a, beta0);
    }
    const ldp = solveLdp(e, q, nr, 'shape-constrained smoothing spline');
    const z = ldp.z;
    backSolve(R, q, w, z);
    const beta = new Float64Array(q);
    for (let j = 0; j < q; j++) beta[j] = (beta0[j] as number) + (z[j] as number);
    const tol = FEASIBILITY_TOLERANCE * sys.scale(beta);
    const inSet = new Set(set);
    const extra = all.filter((i) => !inSet.has(i) && !(dot(onBeta[i] as Float64Array, beta) >= -tol));
    if (extra.length > 0) {
      set = round >= MAX_GENERATION_ROUNDS ? all : [...set, ...extra].sort((a, b) => a - b);
      continue;
    }
    if (ldp.activeCount === 0) return inactive;
    const active: Float64Array[] = [];
    for (let c = 0; c < nr; c++) {
      if (ldp.active[c] !== 1) continue;
      const row = new Float64Array(q);
      for (let j = 0; j < q; j++) row[j] = e[j * nr + c] as number;
      active.push(row);
    }
    const rank = orthonormalise(active);
    return { beta, band: activeSetBand(R, q, w, active), activeCount: ldp.activeCount, rank, converged: ldp.converged };
  }
}
