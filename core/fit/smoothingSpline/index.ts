/**
 * Cubic smoothing spline (family 'smoothing-spline').
 *
 * Definition (docs/design.md, "Cubic smoothing spline"): with df = k, the minimiser of
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
 *
 * Modules: ties.ts (pooling), scaledKnots.ts (x to [0, 1]), smootherState.ts (the model
 * and its storage), kalmanFilter.ts and fixedIntervalSmoother.ts (the two passes),
 * spanToBSpline.ts (coefficients and band of A^-1), smoother.ts (one run), lambdaSearch.ts
 * and brentZero.ts (lambda for a df), fit.ts (the entry points), straightLine.ts (df 2),
 * curve.ts (evaluation).
 */
export { makeCurve, type SplineCurve } from './curve';
export { fitSmoothingSpline, lambdaForDf, smoothingSplineAtLambda } from './fit';
export { MAX_VARIANCE_RATIO } from './kalmanFilter';
export { DF_ACCEPTANCE, DF_TOLERANCE, MAX_BRACKET_STEPS, MAX_LAMBDA_ITERATIONS } from './lambdaSearch';
export { MIN_DISTINCT_X, perRow, poolTies, tieNote, type Pooled } from './ties';
