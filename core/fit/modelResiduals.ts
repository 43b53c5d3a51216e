import type { FitResult } from '../types';

/** Residuals for the residual checks of a fit, and whether the Gaussian checks apply. */
export interface CheckResiduals {
  /** One per row used, in input order. */
  readonly residuals: Float64Array;
  /** 'weighted': r sqrt(w) of a least-squares or robust fit; 'deviance': deviance residuals of a Poisson or binomial fit. */
  readonly kind: 'weighted' | 'deviance';
  /**
   * False for Poisson and binomial fits: Shapiro-Wilk, Breusch-Pagan and the lack-of-fit F
   * test assume Gaussian errors of constant variance, which counts and proportions do not
   * have; Durbin-Watson on rows ordered by x and the influence measures still apply.
   */
  readonly gaussianChecks: boolean;
  /** Scale that standardises them: sigma (the robust scale for a Huber fit), 1 for Poisson and binomial. */
  readonly scale: number;
}

/**
 * The residuals the diagnostics should examine: sqrt(w) (y - fit) for least-squares,
 * shape-constrained and robust fits; for Poisson and binomial fits the deviance residuals
 * sign(y - mu) sqrt(d_i) (McCullagh & Nelder, Generalized Linear Models, 2nd ed., 1989,
 * section 2.4.3), which include the prior weights and are closer to normal than Pearson
 * residuals; standardised by sqrt(1 - h_i) they have variance about 1. O(n).
 * Example: checkResiduals(fit, data.w).gaussianChecks is false for fit.model.outcome 'counts'.
 */
export function checkResiduals(fit: FitResult, w: Float64Array | undefined): CheckResiduals {
  const glm = fit.model?.glm;
  if (glm) return { residuals: glm.devianceResiduals, kind: 'deviance', gaussianChecks: false, scale: 1 };
  // Unweighted fits examine the residuals as they are; a plain loop scales weighted ones
  // (Float64Array.from with a mapping function is several times slower at a million rows).
  let r = fit.residuals;
  if (w) {
    const raw = r;
    r = new Float64Array(raw.length);
    for (let i = 0; i < r.length; i++) r[i] = (raw[i] as number) * Math.sqrt(w[i] as number);
  }
  return { residuals: r, kind: 'weighted', gaussianChecks: true, scale: fit.sigma };
}

/** checkResiduals(fit, w).gaussianChecks, known before the fit's residuals are built: false for Poisson and binomial fits. */
export function gaussianChecksApply(fit: FitResult): boolean {
  return !fit.model?.glm;
}
