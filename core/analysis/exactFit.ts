import type { FitResult, XYData } from '../types';

/** A residual this small relative to the spread of the readings is rounding (doubles carry about 16 digits; fits lose a few). */
export const EXACT_FIT_RELATIVE = 1e-9;
/** Units in the last place of the largest |reading| still counted as rounding (readings on a large offset, e.g. y = 1e14 + v). */
const EXACT_FIT_ULPS = 64;

/**
 * Whether a fit passes through every reading, leaving no scatter to check: the largest
 * |reading - fit| is at most EXACT_FIT_RELATIVE times the spread of the readings (largest
 * minus smallest) or EXACT_FIT_ULPS units in the last place of the largest |reading|,
 * whichever is larger (so constant readings fitted by a constant count too). Returns the
 * largest residual, or undefined when the fit leaves real scatter. O(n).
 * Example: a cubic polynomial (df 4) through 20 readings of an exact cubic -> { maxResidual: about 1e-15 }.
 */
export function exactFitResidual(fit: FitResult, data: XYData): number | undefined {
  const { y } = data;
  // Read once: a fit's per-row arrays may be getters (core/fit/summary.ts summariseLazily).
  const residuals = fit.residuals;
  let lo = Infinity;
  let hi = -Infinity;
  let big = 0;
  let worst = 0;
  for (let i = 0; i < y.length; i++) {
    const v = y[i] as number;
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
    big = Math.max(big, Math.abs(v));
    const r = Math.abs(residuals[i] as number);
    // A NaN residual is no exact fit.
    worst = r > worst || Number.isNaN(r) ? r : worst;
  }
  const tolerance = Math.max(EXACT_FIT_RELATIVE * (hi - lo), EXACT_FIT_ULPS * Number.EPSILON * big);
  return worst <= tolerance ? worst : undefined;
}
