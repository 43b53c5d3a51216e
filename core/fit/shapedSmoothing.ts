/**
 * Shape-constrained cubic smoothing spline (family 'smooth' with `shape`).
 *
 * Problem. lambda is fixed where the unconstrained smoothing spline on the same rows has
 * hat-matrix trace df (core/fit/smoothingSpline.ts, `lambdaForDf`), so a candidate's df keeps
 * its meaning. Over the B-spline coefficients theta on the clamped knot vector with every
 * distinct x as a knot (m + 2 coefficients for m distinct x) it minimises
 *
 *     sum_i w_i (y_i - b(x_i)' theta)^2 + lambda theta' Omega theta   subject to   A theta >= 0,
 *
 * Omega_jl = integral B_j'' B_l'', A the shape rows of core/fit/shape.ts (differences for
 * monotone, the coefficients for non-negative, f'' at the knots for convex/concave), which
 * guarantee the shape everywhere in the data range. The unconstrained minimiser is the
 * smoothing spline of DESIGN.md, natural by itself (Green & Silverman 1994, "Nonparametric
 * Regression and Generalized Linear Models", chapter 2); with active constraints the
 * minimiser over this spline space may keep some curvature at the ends of the data range,
 * so no natural boundary condition is imposed and the convexity rows at the boundary knots
 * stay (shapeRows with natural = false). Beyond the data the curve continues linearly with
 * its boundary slope, which keeps monotone and convex/concave shapes but not non-negativity.
 *
 * Method.
 * 1. If the unconstrained fit (computed in O(n) by the state-space smoother) satisfies every
 *    inequality, it is the constrained minimiser and is returned unchanged, with a note. A
 *    row counts as satisfied down to -FEASIBILITY_TOLERANCE times the largest coefficient:
 *    the smoothing spline is natural, so its convexity rows at the boundary knots are zero
 *    up to rounding and would otherwise look violated half of the time.
 * 2. Otherwise the penalised problem is one least-squares problem ||E theta - f||^2 with the
 *    rows sqrt(W_j) b(u_j)' (ties pooled: W_j summed weights, f_j = sqrt(W_j) mean y) and,
 *    for each knot interval of length h_j, on which f'' is linear between g0 = f''(u_j) and
 *    g1 = f''(u_{j+1}), the two rows sqrt(lambda h_j / 4) (g0 + g1) and
 *    sqrt(lambda h_j / 12) (g0 - g1), whose squares add up to
 *    lambda h_j (g0^2 + g0 g1 + g1^2) / 3 = lambda * integral f''^2 over the interval. Each row
 *    has 4 consecutive nonzeros, so the triangular factor R of E (R'R = X'WX + lambda Omega,
 *    half-bandwidth 3) is accumulated row by row with Givens rotations in O(m) (Lawson &
 *    Hanson 1974, "Solving Least Squares Problems", chapter 27, sequential processing of
 *    banded problems; rotations as Golub & Van Loan, "Matrix Computations", 4th ed. 2013,
 *    section 5.1). Forming X'WX + lambda Omega instead would lose the data part: at 2000 knots
 *    and df 5, lambda Omega exceeds X'WX by about 10^9, and its rounding would swamp the
 *    smooth directions that the data determine. (The factor reproduces the state-space
 *    smoother's coefficients to about 1e-12; `penalisedCoefficients`.)
 * 3. With z = R (theta - theta0), theta0 = R^-1 Q'f the unconstrained minimiser, the problem
 *    is the least-distance problem min ||z|| subject to (A R^-1) z >= -A theta0, solved by
 *    Lawson & Hanson's reduction to non-negative least squares (chapter 23;
 *    core/linalg/lsi.ts `solveLdp`). A R^-1 takes one banded substitution per row, O(m).
 *    The rows enter through a working set: first those the unconstrained fit violates, then
 *    any the solution still violates, until none is (at most MAX_GENERATION_ROUNDS rounds,
 *    then all rows). A solution of fewer constraints that satisfies them all is the optimum
 *    of the full problem; most rows never bind, and the NNLS costs O(m s) per step for s
 *    rows in the set instead of O(m r) for all r.
 *
 * Bands and leverage. As for the shape-constrained natural spline (core/fit/model.ts), the
 * active constraints are held as equalities: V = A^-1 - A^-1 A_a'(A_a A^-1 A_a')^-1 A_a A^-1
 * with A = X'WX + lambda Omega here, which is the smoothing spline's Bayesian posterior
 * covariance (Wahba 1983, JRSS B 45, 133-150) conditioned on A_a theta = 0. It is an
 * approximation that treats the active set as known. Computed as the band of R^-1 R^-T
 * (Hutchinson & de Hoog 1985, "Smoothing noisy data with spline functions", Numerische
 * Mathematik 47; core/linalg/banded.ts `bandInverse`) minus the band of T T',
 * T = R^-1 U', U an orthonormal basis of the active rows of A R^-1 (dependent rows dropped as
 * in core/linalg/lsi.ts). Leverage h_i = w_i b(x_i)' V b(x_i); their sum, the trace of the
 * hat matrix at the active set, is `model.constraints.effectiveDf`. df stays the unconstrained
 * trace (the candidate df), and sigma, AIC and the bands keep n - df residual df, the same
 * conservative choice as the natural spline's shape fits.
 *
 * df = 2 (lambda = infinity) is the straight line: the same steps on the two coefficients of
 * a line, theta_j = a + b (Greville abscissa_j - 1/2) with x scaled to [0, 1].
 *
 * Size. The NNLS is dense, O(m s) memory and about O(k m s) time per round for k active
 * rows, O(m^3) when a sizeable share of the curve rests on its constraints; the bands add
 * O(k^2 m). Measured on a 2-core laptop-class machine (noisy seeded data, increasing and
 * concave): 0.05-0.4 s at 200 distinct x, 0.2-8 s at 1000 (the most with about 550 active
 * rows), 45 s at 2000 with about 900, for each candidate and each resample. Problems above
 * MAX_SHAPED_SMOOTHING_DISTINCT distinct x are therefore refused, pointing to the
 * shape-constrained natural spline, whose df coefficients (instead of m + 2) let it handle
 * millions of rows.
 */
import { BSplineEvaluator, clampedKnots } from '../basis/bspline';
import { FitError } from '../errors';
import { bandInverse } from '../linalg/banded';
import { ACTIVE_RANK_TOLERANCE, solveLdp } from '../linalg/lsi';
import type { FitResult, ModelReport, Shape, XYData } from '../types';
import { checkShapes, shapeRows, shapeWords, type ShapeRows } from './shape';
import { fitSmoothingSpline, makeCurve, perRow, poolTies, smoothingSplineAtLambda, type Pooled } from './smoothingSpline';
import { summariseFit } from './summary';

/** Largest number of distinct x accepted with shape constraints (dense constrained solve; see the module comment). */
export const MAX_SHAPED_SMOOTHING_DISTINCT = 1000;
/** Half-bandwidth + 1 of the penalised factor: every row has 4 consecutive nonzero B-spline entries. */
const BAND = 4;
/** A diagonal entry of R below this fraction of the largest means the penalised problem is singular to working precision. */
const R_PIVOT_TOLERANCE = 1e-13;
/**
 * A constraint row (unit norm) counts as satisfied when its value is at least
 * -FEASIBILITY_TOLERANCE times the largest coefficient: smaller deficits are rounding. This
 * matters from the start: the unconstrained smoothing spline is natural, so its convexity
 * rows at the two boundary knots are zero up to rounding.
 */
const FEASIBILITY_TOLERANCE = 1e-12;
/** Rounds of adding violated rows to the working set before every row is used at once. */
const MAX_GENERATION_ROUNDS = 8;
/** Constraint rows whose restriction to straight lines is below this norm (of 1) vanish on lines and cannot bind at df = 2. */
const LINE_ROW_TOLERANCE = 1e-12;

/**
 * Refuses a shape-constrained smoothing spline on more than MAX_SHAPED_SMOOTHING_DISTINCT
 * distinct x, with the limit and the alternative in the message. Throws FitError.
 * Example: checkShapedSmoothingSize(5000) throws "... limited to 1000 distinct x values ...".
 */
export function checkShapedSmoothingSize(distinct: number): void {
  if (distinct > MAX_SHAPED_SMOOTHING_DISTINCT) {
    throw new FitError(
      `a shape-constrained smoothing spline is limited to ${MAX_SHAPED_SMOOTHING_DISTINCT} distinct x values (it has a knot at each, and its constrained solve is dense, with a cost growing as the cube of their number); the data has ${distinct}. ` +
        'Use the shape-constrained natural spline (--model natural), which handles millions of rows',
    );
  }
}

/**
 * Fits the cubic smoothing spline with df `df` (lambda from the unconstrained fit, see
 * `fitSmoothingSpline`) under the shape constraints `shapes`, by the method of the module
 * comment. Without shapes, or when no constraint binds, the result is the unconstrained
 * fit (plus the `model` report and a note). FitResult: df = the unconstrained trace,
 * lambda in x units, coefficients on `knots` (clamped, every distinct x a knot), leverage at
 * the active set, `model.constraints` = { total, active (independent), effectiveDf (trace at
 * the active set) }.
 *
 * Cost: O(n log n + m) for the unconstrained fit; with a binding constraint O(m) for the
 * factor, then the NNLS rounds of the module comment, O(m^3) when many rows bind
 * (m distinct x; about 8 s at m = 1000 in the worst case measured).
 * Throws InputError for bad data (naming the line), FitError for more than
 * MAX_SHAPED_SMOOTHING_DISTINCT distinct x, for a df the smoothing spline cannot reach, or
 * for constraints that cannot hold together.
 * @example
 *   const fit = fitShapedSmoothingSpline({ x, y }, 6, ['increasing']);
 *   fit.model?.constraints?.effectiveDf; // <= 6
 */
export function fitShapedSmoothingSpline(data: XYData, df: number, shapes: readonly Shape[]): FitResult {
  const list = checkShapes(shapes);
  const pooled = poolTies(data);
  if (list.length > 0) checkShapedSmoothingSize(pooled.m);
  return constrain(pooled, fitSmoothingSpline(data, df), list);
}

/**
 * As `fitShapedSmoothingSpline` at a fixed smoothing parameter `lambda` (x units, as reported
 * by `lambdaForDf`; Infinity = the straight line): the resampling engine refits each resample
 * at the lambda of all tuning rows this way. Same checks, cost and output; df is the
 * unconstrained trace at this lambda.
 * @example shapedSmoothingSplineAtLambda({ x, y }, lambdaForDf({ x, y }, 5), ['convex']).curve.value(2)
 */
export function shapedSmoothingSplineAtLambda(data: XYData, lambda: number, shapes: readonly Shape[]): FitResult {
  const list = checkShapes(shapes);
  const pooled = poolTies(data);
  if (list.length > 0) checkShapedSmoothingSize(pooled.m);
  return constrain(pooled, smoothingSplineAtLambda(data, lambda), list);
}

/**
 * The unconstrained penalised minimiser theta0 = R^-1 Q'f of step 2 (B-spline coefficients on
 * the clamped knot vector with every distinct x a knot), the starting point of the
 * constrained solve. It is the same minimiser the state-space smoother of
 * core/fit/smoothingSpline.ts computes by another route, which makes it a check of the
 * data and penalty rows. lambda in x units (finite). Cost O(n log n + m).
 * @example penalisedCoefficients({ x, y }, lambdaForDf({ x, y }, 5)) // ~ fitSmoothingSpline({ x, y }, 5).coefficients
 */
export function penalisedCoefficients(data: XYData, lambda: number): Float64Array {
  if (!(lambda > 0) || !Number.isFinite(lambda)) throw new FitError(`smoothing spline lambda must be a positive finite number; got ${lambda}`);
  const sys = penalisedSystem(poolTies(data), lambda);
  const theta = Float64Array.from(sys.d);
  backSolve(sys.r, sys.q, sys.w, theta);
  return theta;
}

/** The constrained fit from the unconstrained one (`base`, same rows), see the module comment. */
function constrain(pooled: Pooled, base: FitResult, shapes: readonly Shape[]): FitResult {
  const model: ModelReport = { outcome: 'gaussian', link: 'identity', shape: shapes, iterations: 1, converged: true };
  if (shapes.length === 0) return { ...base, model };
  const rows = shapeRows(base.knots, shapes, false);
  const unchanged = (): FitResult => ({
    ...base,
    notes: [...base.notes, ...shapeNotes(shapes, rows.rows, 0, 0, base.df, base.df)],
    model: { ...model, constraints: { total: rows.rows, active: 0, effectiveDf: base.df } },
  });
  if (satisfies(rows, base.coefficients, FEASIBILITY_TOLERANCE * maxAbs(base.coefficients))) return unchanged();
  const system = base.lambda === Infinity ? lineSystem(pooled) : penalisedSystem(pooled, base.lambda as number);
  const sol = solveConstrained(system, rows);
  if (sol.activeCount === 0) return unchanged();
  const { theta, band } = system.toSpline(sol.beta, sol.band);
  // Fitted values and hat diagonal at the pooled x, then per row.
  const { m, u, w: W } = pooled;
  const ev = new BSplineEvaluator(base.knots);
  const value = new Float64Array(m);
  const lev = new Float64Array(m);
  let trace = 0;
  for (let j = 0; j < m; j++) {
    const first = ev.eval(u[j] as number, 0);
    let f = 0;
    let h = 0;
    for (let a = 0; a < 4; a++) {
      const ba = ev.value[a] as number;
      f += ba * (theta[first + a] as number);
      h += ba * ba * (band[4 * (first + a)] as number);
      for (let b = a + 1; b < 4; b++) h += 2 * ba * (ev.value[b] as number) * (band[4 * (first + a) + (b - a)] as number);
    }
    value[j] = f;
    lev[j] = (W[j] as number) * h;
    trace += lev[j] as number;
  }
  const fitted = new Float64Array(pooled.n);
  const leverage = new Float64Array(pooled.n);
  perRow(pooled, value, lev, fitted, leverage);
  const notes = [...base.notes, ...shapeNotes(shapes, rows.rows, sol.activeCount, sol.rank, base.df, trace)];
  if (!sol.converged) notes.push('Shape constraints: the non-negative least-squares search stopped at its iteration cap, so the curve may miss the constrained optimum (and a constraint by a little); treat it with caution.');
  const fit = summariseFit(pooled.data, {
    family: 'smooth',
    df: base.df,
    curve: makeCurve(base.knots, theta, band, base.df),
    coefficients: theta,
    knots: base.knots,
    fitted,
    leverage,
    lambda: base.lambda as number,
    notes,
  });
  return { ...fit, model: { ...model, converged: sol.converged, constraints: { total: rows.rows, active: sol.rank, effectiveDf: trace } } };
}

/** True when every row of A theta is at least -tol. */
function satisfies(rows: ShapeRows, theta: Float64Array, tol: number): boolean {
  const p = theta.length;
  for (let i = 0; i < rows.rows; i++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += (rows.a[i * p + j] as number) * (theta[j] as number);
    if (!(s >= -tol)) return false;
  }
  return true;
}

function maxAbs(v: Float64Array): number {
  let s = 0;
  for (let j = 0; j < v.length; j++) s = Math.max(s, Math.abs(v[j] as number));
  return s;
}

function shapeNotes(shapes: readonly Shape[], total: number, active: number, rank: number, df: number, trace: number): string[] {
  const notes = [
    `Shape: ${shapeWords(shapes)}, guaranteed everywhere in the data range through ${total} linear inequalities on the smoothing spline's B-spline coefficients, at the lambda of the unconstrained fit; ` +
      (active === 0
        ? 'none is active, so the curve equals the unconstrained smoothing spline.'
        : `${active} active${rank < active ? ` (${rank} independent)` : ''}, which lowers the hat-matrix trace from ${df.toFixed(3)} to ${trace.toFixed(3)}. ` +
          'The bands treat the active constraints as fixed equalities, an approximation that ignores the chance of a different active set; with active constraints the curve need not have zero curvature at the ends of the data range.'),
  ];
  if (shapes.includes('nonnegative')) notes.push('Non-negativity is guaranteed within the data range only: beyond it the curve continues linearly and may cross zero.');
  return notes;
}

// ---------------------------------------------------------------------------------------
// The banded least-squares system

/**
 * The penalised problem as min ||R beta - d||^2 (+ constant) in q coefficients beta, R upper
 * triangular with bandwidth `w` (r[k * w + a] = R(k, k + a)); `constraints` maps the shape
 * rows to beta, `toSpline` maps beta and the band of its covariance to the spline's
 * coefficients theta and the band (half-bandwidth 3, core/linalg/banded.ts layout) of theirs.
 */
interface BandSystem {
  readonly q: number;
  readonly w: number;
  readonly r: Float64Array;
  readonly d: Float64Array;
  /** Shape rows (r x (m + 2)) as rows on beta (rows x q); null where a row vanishes identically. */
  constraints(rows: ShapeRows): (Float64Array | null)[];
  toSpline(beta: Float64Array, band: Float64Array): { theta: Float64Array; band: Float64Array };
  /** Largest |theta_j| for these beta: the scale of the feasibility tolerance. */
  scale(beta: Float64Array): number;
}

/** Accumulates rows into a band factor by Givens rotations (Lawson & Hanson 1974, chapter 27). */
class BandAccumulator {
  readonly r: Float64Array;
  readonly d: Float64Array;
  constructor(
    readonly q: number,
    readonly w: number,
  ) {
    this.r = new Float64Array(q * w);
    this.d = new Float64Array(q);
  }

  /**
   * Rotates the row with entries x[0..w) at columns first.. and right-hand side y into the
   * factor; x is overwritten. Any order gives the same factor up to signs; in non-decreasing
   * order of `first` a row meets an empty factor row after at most w rotations, O(w^2).
   */
  add(first: number, x: Float64Array, y: number): void {
    const { r, d, q, w } = this;
    let rhs = y;
    for (let k = first; k < q; k++) {
      const x0 = x[0] as number;
      if (x0 !== 0) {
        const o = k * w;
        const rkk = r[o] as number;
        if (rkk === 0) {
          // An empty factor row takes the rotated row as it is.
          for (let a = 0; a < w && k + a < q; a++) r[o + a] = x[a] as number;
          d[k] = rhs;
          return;
        }
        const h = Math.hypot(rkk, x0);
        const c = rkk / h;
        const s = x0 / h;
        for (let a = 0; a < w && k + a < q; a++) {
          const ra = r[o + a] as number;
          const xa = x[a] as number;
          r[o + a] = c * ra + s * xa;
          x[a] = c * xa - s * ra;
        }
        const dk = d[k] as number;
        d[k] = c * dk + s * rhs;
        rhs = c * rhs - s * dk;
      }
      let any = false;
      for (let a = 0; a + 1 < w; a++) {
        const v = x[a + 1] as number;
        x[a] = v;
        if (v !== 0) any = true;
      }
      x[w - 1] = 0;
      if (!any) return;
    }
  }

  /** Throws FitError when a diagonal entry of R is negligible against the largest. */
  check(): void {
    const { r, q, w } = this;
    let max = 0;
    for (let k = 0; k < q; k++) max = Math.max(max, Math.abs(r[k * w] as number));
    for (let k = 0; k < q; k++) {
      if (!(Math.abs(r[k * w] as number) > R_PIVOT_TOLERANCE * max)) {
        throw new FitError(`shape-constrained smoothing spline: the penalised problem is singular to working precision (coefficient ${k + 1} of ${q})`);
      }
    }
  }
}

/** x scaled to [0, 1] as the state-space smoother does (the rows of E do not depend on the scaling, their sizes do). */
function scaledKnots(pooled: Pooled): { t: Float64Array; knots: Float64Array } {
  const { u, m } = pooled;
  const lo = u[0] as number;
  const range = (u[m - 1] as number) - lo;
  const t = new Float64Array(m);
  for (let j = 0; j < m; j++) t[j] = ((u[j] as number) - lo) / range;
  t[m - 1] = 1;
  for (let j = 1; j < m; j++) {
    if (!((t[j] as number) > (t[j - 1] as number))) throw new FitError(`smoothing spline: the distinct x values ${u[j - 1]} and ${u[j]} are too close together, relative to the x range ${range}, to be separate knots`);
  }
  return { t, knots: clampedKnots(0, 1, t.subarray(1, m - 1)) };
}

/** Data and penalty rows of the smoothing spline at finite lambda (x units), q = m + 2 coefficients, bandwidth 4. */
function penalisedSystem(pooled: Pooled, lambda: number): BandSystem {
  const { m, w: W, y, u } = pooled;
  const range = (u[m - 1] as number) - (u[0] as number);
  const lambdaT = lambda / range / range / range;
  const { t, knots } = scaledKnots(pooled);
  const ev = new BSplineEvaluator(knots);
  const q = m + 2;
  const acc = new BandAccumulator(q, BAND);
  const x = new Float64Array(BAND);
  const g0 = new Float64Array(BAND);
  for (let j = 0; j < m; j++) {
    const tj = t[j] as number;
    const sw = Math.sqrt(W[j] as number);
    const first = ev.eval(tj, 0);
    for (let a = 0; a < BAND; a++) x[a] = sw * (ev.value[a] as number);
    acc.add(first, x, sw * (y[j] as number));
    if (j === m - 1) break;
    // f'' on [t_j, t_j+1] is linear in the 4 coefficients of this span: its end values from
    // the value at t_j and at the midpoint (the right end belongs to the next span).
    const h = (t[j + 1] as number) - tj;
    const span = ev.eval(tj, 2);
    g0.set(ev.d2);
    if (ev.eval(tj + 0.5 * h, 2) !== span) throw new Error('shapedSmoothing: knot span lookup disagrees');
    const s1 = Math.sqrt((lambdaT * h) / 4);
    const s2 = Math.sqrt((lambdaT * h) / 12);
    for (let a = 0; a < BAND; a++) x[a] = s1 * 2 * (ev.d2[a] as number); // g0 + g1 = 2 f''(mid)
    acc.add(span, x, 0);
    for (let a = 0; a < BAND; a++) x[a] = s2 * 2 * ((g0[a] as number) - (ev.d2[a] as number)); // g0 - g1 = 2 (g0 - f''(mid))
    acc.add(span, x, 0);
  }
  acc.check();
  return {
    q,
    w: BAND,
    r: acc.r,
    d: acc.d,
    constraints: (rows) => Array.from({ length: rows.rows }, (_, i) => rows.a.subarray(i * q, (i + 1) * q)),
    toSpline: (beta, band) => ({ theta: beta, band }),
    scale: maxAbs,
  };
}

/** The straight line (lambda = infinity): theta_j = beta_0 + beta_1 (xi_j - 1/2), xi the Greville abscissae on [0, 1]. */
function lineSystem(pooled: Pooled): BandSystem {
  const { m, w: W, y } = pooled;
  const { t, knots } = scaledKnots(pooled);
  const p = m + 2;
  const xi = new Float64Array(p);
  for (let i = 0; i < p; i++) xi[i] = ((knots[i + 1] as number) + (knots[i + 2] as number) + (knots[i + 3] as number)) / 3 - 0.5;
  const acc = new BandAccumulator(2, 2);
  const x = new Float64Array(2);
  for (let j = 0; j < m; j++) {
    const sw = Math.sqrt(W[j] as number);
    x[0] = sw;
    x[1] = sw * ((t[j] as number) - 0.5);
    acc.add(0, x, sw * (y[j] as number));
  }
  acc.check();
  return {
    q: 2,
    w: 2,
    r: acc.r,
    d: acc.d,
    constraints: (rows) =>
      Array.from({ length: rows.rows }, (_, i) => {
        let s0 = 0;
        let s1 = 0;
        for (let j = 0; j < p; j++) {
          const a = rows.a[i * p + j] as number;
          s0 += a;
          s1 += a * (xi[j] as number);
        }
        return Math.hypot(s0, s1) > LINE_ROW_TOLERANCE ? Float64Array.of(s0, s1) : null;
      }),
    toSpline: (beta, band2) => {
      const theta = new Float64Array(p);
      for (let i = 0; i < p; i++) theta[i] = (beta[0] as number) + (beta[1] as number) * (xi[i] as number);
      const v00 = band2[0] as number;
      const v01 = band2[1] as number;
      const v11 = band2[2] as number;
      const band = new Float64Array(4 * p);
      for (let i = 0; i < p; i++)
        for (let d = 0; d < 4 && i + d < p; d++) {
          const a = xi[i] as number;
          const b = xi[i + d] as number;
          band[4 * i + d] = v00 + v01 * (a + b) + v11 * a * b;
        }
      return { theta, band };
    },
    // A line's coefficients are largest in size at one of the two ends.
    scale: (beta) => Math.max(Math.abs((beta[0] as number) + (beta[1] as number) * (xi[0] as number)), Math.abs((beta[0] as number) + (beta[1] as number) * (xi[p - 1] as number))),
  };
}

// ---------------------------------------------------------------------------------------
// The constrained solve

interface ConstrainedSolution {
  readonly beta: Float64Array;
  /** Band of the active-set covariance of beta (q x w, core/linalg/banded.ts layout, half-bandwidth w - 1). */
  readonly band: Float64Array;
  readonly activeCount: number;
  /** Independent active constraints. */
  readonly rank: number;
  readonly converged: boolean;
}

/**
 * Step 3 and the bands of the module comment. The least-distance problem is solved on a
 * working set of rows, which starts with the rows the unconstrained fit violates; rows the
 * solution still violates are added and the problem solved again (at most
 * MAX_GENERATION_ROUNDS times, then with every row). A solution that satisfies every row
 * is the optimum of the full problem, since it is optimal with fewer constraints; the
 * working set keeps the NNLS at O(q s) per step for s rows instead of O(q r).
 * Cost per round: O(s q w) to transform the rows plus the NNLS; O(k^2 q) for the bands (k active rows).
 */
function solveConstrained(sys: BandSystem, rows: ShapeRows): ConstrainedSolution {
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

/** Fills `rows` in place with an orthonormal basis of their span (two passes of Gram-Schmidt, dependent rows dropped as in core/linalg/lsi.ts); returns the rank. O(k^2 q). */
function orthonormalise(rows: Float64Array[]): number {
  let k = 0;
  for (const row of rows) {
    const norm0 = Math.sqrt(dot(row, row));
    if (!(norm0 > 0)) continue;
    for (let pass = 0; pass < 2; pass++) {
      for (let b = 0; b < k; b++) {
        const base = rows[b] as Float64Array;
        const s = dot(base, row);
        for (let j = 0; j < row.length; j++) row[j] = (row[j] as number) - s * (base[j] as number);
      }
    }
    const norm = Math.sqrt(dot(row, row));
    if (norm <= ACTIVE_RANK_TOLERANCE * norm0) continue;
    for (let j = 0; j < row.length; j++) row[j] = (row[j] as number) / norm;
    rows[k] = row;
    k++;
  }
  rows.length = k;
  return k;
}
/**
 * Band (q x w) of V = R^-1 (I - U'U) R^-T, U the orthonormal rows of `basis` (q-vectors):
 * the band of (R'R)^-1 by Hutchinson & de Hoog's recursion on the LDL' form of R'R, minus
 * the band of T T', T = R^-1 U'. O(q w^2 + k q w) for k rows; `basis` is overwritten by T.
 */
function activeSetBand(r: Float64Array, q: number, w: number, basis: Float64Array[]): Float64Array {
  // R'R = L D L' with D = diag(R)^2, L(k + a, k) = R(k, k + a) / R(k, k).
  const ldl = new Float64Array(q * w);
  for (let k = 0; k < q; k++) {
    const rkk = r[k * w] as number;
    ldl[k * w] = rkk * rkk;
    for (let a = 1; a < w; a++) ldl[k * w + a] = (r[k * w + a] as number) / rkk;
  }
  const band = bandInverse(ldl, q, w - 1);
  for (const t of basis) {
    backSolve(r, q, w, t);
    for (let k = 0; k < q; k++) {
      const tk = t[k] as number;
      for (let a = 0; a < w && k + a < q; a++) band[k * w + a] = (band[k * w + a] as number) - tk * (t[k + a] as number);
    }
  }
  return band;
}

function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let j = 0; j < a.length; j++) s += (a[j] as number) * (b[j] as number);
  return s;
}

/** Solves R x = b in place, R upper triangular with bandwidth w (r[k * w + a] = R(k, k + a)). O(q w). */
function backSolve(r: Float64Array, q: number, w: number, b: Float64Array): void {
  for (let k = q - 1; k >= 0; k--) {
    let s = b[k] as number;
    for (let a = 1; a < w && k + a < q; a++) s -= (r[k * w + a] as number) * (b[k + a] as number);
    b[k] = s / (r[k * w] as number);
  }
}

/** Solves R' x = b in place (R' lower triangular with bandwidth w), skipping the leading zeros of b. O(q w). */
function forwardSolveT(r: Float64Array, q: number, w: number, b: Float64Array): void {
  let k0 = 0;
  while (k0 < q && b[k0] === 0) k0++;
  for (let k = k0; k < q; k++) {
    let s = b[k] as number;
    for (let a = 1; a < w && k - a >= k0; a++) s -= (r[(k - a) * w + a] as number) * (b[k - a] as number);
    b[k] = s / (r[k * w] as number);
  }
}
