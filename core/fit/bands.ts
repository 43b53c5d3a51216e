import { qt } from '../stats/distributions';
import type { FitResult } from '../types';
import { emptyBands, type Bands } from './emptyBands';
import { clipNonnegative, LinkCurve, linkBandsAt } from './linkCurve';

export type { Bands } from './emptyBands';

/**
 * Pointwise confidence band for the mean curve, fit +- t se, and prediction band for a
 * new reading of weight 1, fit +- t sqrt(se^2 + sigma^2), with t the (1 + level)/2
 * quantile of Student's t on n - df residual degrees of freedom (docs/design.md, "Bands";
 * Weisberg, Applied Linear Regression, 4th ed., 2014, section 3.5). se = sigma
 * sqrt(b(x)' V b(x)). O(m) for m points. Points outside the data range are computed
 * (splines extend linearly) and flagged in `extrapolated`.
 * Example: bandsAt(fit, [1, 2, 3]).ciUpper.
 */
export function bandsAt(fit: FitResult, xs: ArrayLike<number>, level = 0.95): Bands {
  // Poisson and binomial fits: bands on the link scale, mapped back (core/fit/linkCurve.ts).
  if (fit.curve instanceof LinkCurve) return linkBandsAt(fit.curve, xs, level);
  const m = xs.length;
  const t = fit.residualDf > 0 ? qt(0.5 + level / 2, fit.residualDf) : NaN;
  const out = emptyBands(xs);
  const s2 = fit.sigma * fit.sigma;
  for (let i = 0; i < m; i++) {
    const x = xs[i] as number;
    const f = fit.curve.value(x);
    const se = Math.sqrt(s2 * Math.max(0, fit.curve.varianceFactor(x)));
    const pe = Math.sqrt(se * se + s2);
    out.fit[i] = f;
    out.se[i] = se;
    out.ciLower[i] = f - t * se;
    out.ciUpper[i] = f + t * se;
    out.piLower[i] = f - t * pe;
    out.piUpper[i] = f + t * pe;
    out.extrapolated[i] = x < fit.curve.lower || x > fit.curve.upper ? 1 : 0;
  }
  // A curve constrained non-negative: lower limits below 0 are raised to 0 within the data range.
  if (fit.model?.shape.includes('nonnegative')) clipNonnegative(out);
  return out;
}
