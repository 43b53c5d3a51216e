import type { Diagnostics } from './types';
import type { FitResult, XYData } from '../types';

/** Dispersion above this: more scatter than the outcome's distribution allows (common practice). */
export const OVERDISPERSED = 1.5;
/** Dispersion below this (1 / 1.5): less scatter than the distribution would give (common practice). */
export const UNDERDISPERSED = 1 / OVERDISPERSED;

/**
 * The dispersion of a Poisson or binomial fit: Pearson chi-square over the residual df,
 * about 1 when the readings scatter as the outcome's distribution says (McCullagh & Nelder
 * 1989, Generalized Linear Models, 2nd ed., section 4.5). Verdict: 'over' above
 * OVERDISPERSED (the bands are too narrow by about the square root), 'under' below
 * UNDERDISPERSED (too wide), else 'as-expected'; 'binary' for proportions read as 0/1 with
 * no trials (every prior weight 1), whose Pearson chi-square says nothing about the
 * dispersion (McCullagh & Nelder 1989, section 4.5, from memory). Undefined for other fits
 * or without residual df. O(n) for the binary check.
 * Example: Poisson counts give a ratio near 1 -> verdict 'as-expected'.
 */
export function dispersionOf(fit: FitResult, data: XYData): Diagnostics['dispersion'] {
  const glm = fit.model?.glm;
  if (!glm || !(fit.residualDf > 0)) return undefined;
  const ratio = glm.pearsonChi2 / fit.residualDf;
  const base = { pearsonChi2: glm.pearsonChi2, residualDf: fit.residualDf, ratio };
  if (fit.model?.outcome === 'proportions' && isBinary(data)) return { ...base, verdict: 'binary' };
  return { ...base, verdict: ratio > OVERDISPERSED ? 'over' : ratio < UNDERDISPERSED ? 'under' : 'as-expected' };
}

/** Every reading 0 or 1 with prior weight 1. */
function isBinary(data: XYData): boolean {
  for (let i = 0; i < data.y.length; i++) {
    const y = data.y[i] as number;
    if ((y !== 0 && y !== 1) || (data.w && data.w[i] !== 1)) return false;
  }
  return true;
}
