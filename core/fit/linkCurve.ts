/**
 * Curves of Poisson and binomial fits, and their bands computed on the link scale.
 */
import { qnorm } from '../stats/distributions';
import type { Curve } from '../types';
import type { Bands } from './emptyBands';
import { emptyBands } from './emptyBands';
import type { OutcomeFamily } from './glm';
import type { RowBasisCurve } from './linearFit';

/**
 * A fitted mean curve mu(x) = g^-1(eta(x)) over a linear predictor eta in a row basis.
 * varianceFactor is the delta-method factor (dmu/deta)^2 b'Vb (the dispersion, sigma^2, is
 * 1 for Poisson and binomial outcomes); bands use the link scale instead (`linkBandsAt`).
 * Example: new LinkCurve(etaCurve, poissonFamily).value(x) = exp(eta(x)).
 */
export class LinkCurve implements Curve {
  /**
   * @param trials binomial only: trials of a new reading for the prediction band (the
   *   median prior weight of the data, at least 1); 1 for Poisson.
   */
  constructor(
    readonly eta: RowBasisCurve,
    readonly fam: OutcomeFamily,
    readonly trials = 1,
  ) {}

  get kind(): RowBasisCurve['kind'] {
    return this.eta.kind;
  }
  get df(): number {
    return this.eta.df;
  }
  get lower(): number {
    return this.eta.lower;
  }
  get upper(): number {
    return this.eta.upper;
  }
  get link(): 'log' | 'logit' {
    return this.fam.link;
  }

  /** The linear predictor eta(x) (log or logit of the mean). */
  linearPredictor(x: number): number {
    return this.eta.value(x);
  }

  /** b(x)' V b(x) on the link scale, V = (B'WB)^-1 with the final IRLS weights. */
  linkVarianceFactor(x: number): number {
    return this.eta.varianceFactor(x);
  }

  value(x: number): number {
    return this.fam.linkinv(this.eta.value(x));
  }

  varianceFactor(x: number): number {
    const d = this.fam.muEta(this.eta.value(x));
    return d * d * this.eta.varianceFactor(x);
  }
}

/**
 * Bands of a Poisson or binomial fit (bandsAt calls this for a LinkCurve). Confidence band: eta +- z se_eta on the link scale,
 * z the normal (1 + level)/2 quantile (the dispersion is known, as in R's predict.glm with
 * se.fit), mapped through the inverse link, so it stays inside (0, Inf) or (0, 1) and is
 * asymmetric about the fit (McCullagh & Nelder 1989, section 2.5; Agresti, Categorical Data
 * Analysis, 3rd ed., 2013, section 4.5). `se` is the delta-method standard error of the
 * mean, |dmu/deta| se_eta. Prediction band for a new reading: the (1 - level)/2 quantile of
 * the outcome distribution at the lower confidence limit and the (1 + level)/2 quantile at
 * the upper one, a conservative approximation that covers both the estimation error and the
 * outcome's own scatter; for the binomial, a new reading of m trials with m the median prior
 * weight (number of trials) of the data, as a proportion. O(points).
 * Example: linkBandsAt(fit.curve as LinkCurve, [1, 2, 3], 0.95).ciLower (all > 0 for a Poisson fit).
 */
export function linkBandsAt(curve: LinkCurve, xs: ArrayLike<number>, level: number): Bands {
  const m = xs.length;
  const z = qnorm(0.5 + level / 2);
  const fam = curve.fam;
  const trials = curve.trials;
  const out = emptyBands(xs);
  const lowP = (1 - level) / 2;
  const highP = (1 + level) / 2;
  for (let i = 0; i < m; i++) {
    const x = xs[i] as number;
    const eta = curve.linearPredictor(x);
    const seEta = Math.sqrt(Math.max(0, curve.linkVarianceFactor(x)));
    const lo = fam.linkinv(eta - z * seEta);
    const hi = fam.linkinv(eta + z * seEta);
    out.fit[i] = fam.linkinv(eta);
    out.se[i] = fam.muEta(eta) * seEta;
    out.ciLower[i] = lo;
    out.ciUpper[i] = hi;
    {
      const [pl, pu] = fam.predictionLimits(lowP, highP, lo, hi, trials);
      out.piLower[i] = pl;
      out.piUpper[i] = pu;
    }
    out.extrapolated[i] = x < curve.lower || x > curve.upper ? 1 : 0;
  }
  return out;
}

export { qbinom, qpois } from '../stats/discreteQuantiles';

/** Lower band limits of a fit constrained non-negative are raised to 0 (the mean and the readings cannot be negative). */
export function clipNonnegative(b: Bands): void {
  for (let i = 0; i < b.x.length; i++) {
    if (b.extrapolated[i] === 1) continue;
    if ((b.ciLower[i] as number) < 0) b.ciLower[i] = 0;
    if ((b.piLower[i] as number) < 0) b.piLower[i] = 0;
  }
}
