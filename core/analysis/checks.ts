/**
 * When a residual check matters: the significance level of its test and the size its
 * effect must reach. At large n every test finds departures too small to matter, so a
 * check warns only when its p-value is below CHECK_LEVEL and its effect size reaches the
 * threshold here.
 */

/** Significance level of the residual checks' tests (common practice). */
export const CHECK_LEVEL = 0.05;

/** |Lag-1 correlation| of residuals from which correlation between neighbours matters (common practice). */
export const LAG1_MATTERS = 0.1;

/**
 * Spread ratio (largest over smallest residual SD across thirds of x) from which a changing
 * spread matters (common practice): with one band width for all, a third whose SD is 1.5
 * times another's gets a 95 % band that covers about 89 % or 99 % of its readings.
 */
export const SPREAD_RATIO_MATTERS = 1.5;

/** |Skewness| of the residuals from which their asymmetry matters (common practice: "moderately skewed" from 0.5). */
export const SKEWNESS_MATTERS = 0.5;

/** |Excess kurtosis| of the residuals from which their tails matter (common practice). */
export const EXCESS_KURTOSIS_MATTERS = 1;

/**
 * RMS misfit of the replicate means over the pure-error SD from which a lack of fit
 * matters (a Knotwise default: the curve's systematic error is then a quarter of the
 * scatter of repeated readings or more).
 */
export const MISFIT_RATIO_MATTERS = 0.25;

/** The verdict of a test: its size matters, and it is flagged when the p-value is below CHECK_LEVEL too. */
export function verdict(pValue: number, sizeMatters: boolean): { sizeMatters: boolean; flagged: boolean } {
  return { sizeMatters, flagged: sizeMatters && pValue < CHECK_LEVEL };
}

/**
 * The RMS misfit of the replicate means over the pure-error SD, estimated from the lack-of-fit
 * F statistic: E SS_lof = df1 sigma^2 + sum_g n_g b_g^2 (b_g the curve's bias at replicate
 * group g; Weisberg 2014, Applied Linear Regression, 4th ed., section 5.3, from memory), so
 * sum n_g b_g^2 / n is about df1 (F - 1) sigma^2 / n and the ratio is sqrt(df1 (F - 1) / n),
 * 0 when F <= 1. O(1).
 * Example: misfitRatio(3, 10, 100) = sqrt(10 * 2 / 100) = 0.447.
 */
export function misfitRatio(F: number, df1: number, n: number): number {
  return Math.sqrt(Math.max(0, (df1 * (F - 1)) / n));
}
