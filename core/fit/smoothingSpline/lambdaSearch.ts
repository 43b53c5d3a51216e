/**
 * The smoothing parameter of the cubic smoothing spline for a target df: a root search on
 * log lambda of the hat-matrix trace, computed by the state-space smoother.
 */
import { FitError } from '../../errors';
import { brentZero } from './brentZero';
import type { SplineSmoother } from './smoother';

/** The lambda search stops once |trace - df| is below this. */
export const DF_TOLERANCE = 1e-9;
/** A search that ends farther than this from the asked df fails (docs/design.md, "Cubic smoothing spline": within 1e-6). */
export const DF_ACCEPTANCE = 1e-6;
/** Cap on trace evaluations of the root search on log lambda (bracketing included). */
export const MAX_LAMBDA_ITERATIONS = 100;
/** Cap on doubling steps when bracketing the root on log lambda. */
export const MAX_BRACKET_STEPS = 40;
/** Range searched for log lambda (x scaled to [0, 1]); beyond it the filter's variances overflow. */
const RHO_MIN = Math.log(1e-150);
const RHO_MAX = Math.log(1e150);
/** Value of the search function at an unreliable (too small) lambda: 'trace far too high'. */
const UNRELIABLE_G = 1e3;

/**
 * Root of log(trace(lambda) - 2) = log(df - 2) in rho = log lambda (lambda for x in [0, 1]):
 * a first guess from the trace of a uniform design (trace - 2 ~ (W / lambda)^(1/4) / (2 sqrt 2),
 * W the total weight), doubling steps to bracket the root, then Brent's method (Brent 1973,
 * chapter 4; brentZero.ts). Returns lambda; throws FitError when df cannot be reached within
 * DF_ACCEPTANCE in MAX_LAMBDA_ITERATIONS evaluations. Cost O(m) per evaluation, typically
 * 5-8 evaluations.
 * @example const lambdaT = searchLambda(new SplineSmoother(scaled.t, pooled.w), 5); // x in [0, 1]
 */
export function searchLambda(smoother: SplineSmoother, df: number): number {
  const m = smoother.m;
  const target = Math.log(df - 2) - Math.log(m - df);
  let evaluations = 0;
  let bestRho = NaN;
  let bestGap = Infinity;
  let tooSmall = false;
  const g = (rho: number): number => {
    evaluations++;
    const tr = smoother.run(Math.exp(rho), null);
    if (!smoother.reliable) {
      // Only very small lambda are unreliable: report "lambda too small" with a finite value
      // so the bracket and Brent's safeguards move up, never onto this point.
      tooSmall = true;
      return UNRELIABLE_G;
    }
    const gap = Math.abs(tr - df);
    if (gap < bestGap) {
      bestGap = gap;
      bestRho = rho;
    }
    return Math.log(Math.max(tr - 2, Number.MIN_VALUE)) - Math.log(Math.max(smoother.residualTrace, Number.MIN_VALUE)) - target;
  };
  const done = (): boolean => bestGap <= DF_TOLERANCE || evaluations >= MAX_LAMBDA_ITERATIONS;
  let a = Math.log(smoother.totalWeight) - 4 * Math.log(2 * Math.SQRT2 * (df - 2));
  a = Math.min(RHO_MAX, Math.max(RHO_MIN, a));
  let fa = g(a);
  let b = a;
  let fb = fa;
  // trace falls with rho: fa > 0 means lambda is too small. Slope of g is about -1 at both
  // ends (trace - 2 ~ 1 / lambda, m - trace ~ lambda) and about -1/4 in between.
  let step = Math.max(0.5, Math.min(8, 4 * Math.abs(fa))) * (fa > 0 ? 1 : -1);
  for (let k = 0; k < MAX_BRACKET_STEPS && !done(); k++) {
    if ((step > 0 && a >= RHO_MAX) || (step < 0 && a <= RHO_MIN)) break;
    b = Math.min(RHO_MAX, Math.max(RHO_MIN, a + step));
    fb = g(b);
    if (fa > 0 !== fb > 0 || fb === 0) break;
    a = b;
    fa = fb;
    step *= 2;
  }
  if (!done() && fa > 0 === fb > 0 && fb !== 0) {
    throw new FitError(`smoothing spline: no lambda gives df ${df} (the trace stays on one side of it)`);
  }
  brentZero(g, a, fa, b, fb, done);
  if (!(bestGap <= DF_ACCEPTANCE) && tooSmall) {
    throw new FitError(
      `smoothing spline with df ${df} is too close to interpolating the ${m} distinct x values to be computed accurately (the lambda it needs is below what double precision supports for this x spacing); ask for a smaller df`,
    );
  }
  if (!(bestGap <= DF_ACCEPTANCE)) {
    throw new FitError(`smoothing spline: lambda search did not reach df ${df} (closest trace ${(df + bestGap).toPrecision(10)} after ${evaluations} evaluations)`);
  }
  return Math.exp(bestRho);
}
