/**
 * Shape-constrained cubic smoothing spline (family 'smoothing-spline' with `shape`).
 *
 * Problem. lambda is fixed where the unconstrained smoothing spline on the same rows has
 * hat-matrix trace df (core/fit/smoothingSpline/, `lambdaForDf`), so a candidate's df keeps
 * its meaning. Over the B-spline coefficients theta on the clamped knot vector with every
 * distinct x as a knot (m + 2 coefficients for m distinct x) it minimises
 *
 *     sum_i w_i (y_i - b(x_i)' theta)^2 + lambda theta' Omega theta   subject to   A theta >= 0,
 *
 * Omega_jl = integral B_j'' B_l'', A the shape rows of core/fit/shape.ts (differences for
 * monotone, the coefficients for non-negative, f'' at the knots for convex/concave), which
 * guarantee the shape everywhere in the data range. The unconstrained minimiser is the
 * smoothing spline of docs/design.md ("Cubic smoothing spline"), natural by itself (Green & Silverman 1994, "Nonparametric
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
 *
 * Modules: fit.ts (the entry points and the size limit), constrain.ts (from the unconstrained
 * fit to the constrained one, with its notes), feasibility.ts (step 1), bandSystem.ts,
 * penalisedSystem.ts, lineSystem.ts and bandAccumulator.ts (step 2), solveConstrained.ts
 * (step 3), activeSetBand.ts (bands and leverage), bandSolves.ts and vectors.ts (helpers).
 */
export { checkShapedSmoothingSize, fitShapedSmoothingSpline, MAX_SHAPED_SMOOTHING_DISTINCT, penalisedCoefficients, shapedSmoothingSplineAtLambda } from './fit';
