/**
 * Knotwise's house style for numbers and test statistics, used by the command line's
 * summary, the panel, the report and every warning, so the same quantity reads the same
 * everywhere:
 *
 * - numbers carry significant digits (3 unless a caller needs more), without trailing
 *   zeros, in plain notation from 1e-4 up to 1e6 and in exponent notation outside;
 * - a p-value reads "p = 0.034", or "p < 0.0001" below that;
 * - a test reads "NAME(df) = value, p = ...": "F(7, 45) = 1.77, p = 0.12",
 *   "BP χ²(3) = 4.21, p = 0.24", "DW = 0.949, p < 0.0001", "W = 0.981, p = 0.34".
 */

/** Smallest magnitude printed in plain notation. */
const PLAIN_LOW = 1e-4;
/** Magnitudes from here on are printed with an exponent. */
const PLAIN_HIGH = 1e6;

/**
 * A number with `digits` significant digits and no trailing zeros: 0.301, 12.5, 1.23e-7,
 * 4.5e+6. Non-finite values read "n/a", "∞" or "−∞".
 * Example: sig(0.30149) -> '0.301'; sig(1234567, 4) -> '1.235e+6'.
 */
export function sig(v: number, digits = 3): string {
  if (!Number.isFinite(v)) return Number.isNaN(v) ? 'n/a' : v > 0 ? '∞' : '−∞';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= PLAIN_LOW && a < PLAIN_HIGH) return String(Number(v.toPrecision(digits)));
  return v.toExponential(digits - 1).replace(/\.?0+e/, 'e');
}

/** Below this a p-value is printed as a bound. */
const P_FLOOR = 1e-4;

/** A p-value: "p = 0.034", or "p < 0.0001". Example: pText(0.0342) -> 'p = 0.034'. */
export function pText(p: number): string {
  return p < P_FLOOR ? `p < ${P_FLOOR}` : `p = ${sig(p, 2)}`;
}

/**
 * A test statistic in the house style: name, degrees of freedom in brackets where the
 * statistic has them, value, p-value.
 * Example: testText('F', [7, 45], 1.7724, 0.1203) -> 'F(7, 45) = 1.77, p = 0.12'.
 */
export function testText(name: string, df: readonly number[], value: number, p: number, digits = 3): string {
  const dfText = df.length ? `(${df.map((d) => sig(d, 4)).join(', ')})` : '';
  return `${name}${dfText} = ${sig(value, digits)}, ${pText(p)}`;
}

/** A share as a percentage with 3 significant digits: percent(0.93141) -> '93.1 %'. Non-finite: 'n/a'. */
export function percent(share: number): string {
  return Number.isFinite(share) ? `${sig(100 * share)} %` : 'n/a';
}

/** Most significant digits any rule asks for: IEEE 754 doubles carry 15 decimal digits reliably. */
export const MAX_SIG_DIGITS = 15;

/** Fewest significant digits a compared number is printed with (the house default of sig). */
export const LEAST_SIG_DIGITS = 3;

/** Power of ten of the leading digit of v (v finite and not 0). */
function leadOf(v: number): number {
  return Math.floor(Math.log10(Math.abs(v)));
}

/**
 * `v` printed down to the decimal place 10^place, in the house style of sig: its
 * significant digits are those from its leading digit down to that place (at least 1, at
 * most MAX_SIG_DIGITS), so numbers compared with one another all end at the same place.
 * Example: atPlace(0.978, -3) -> '0.978'; atPlace(1.0011, -3) -> '1.001'; atPlace(12.5, -3) -> '12.5'.
 */
export function atPlace(v: number, place: number): string {
  if (!Number.isFinite(v) || v === 0) return sig(v);
  return sig(v, Math.min(MAX_SIG_DIGITS, Math.max(1, leadOf(v) - place + 1)));
}

/**
 * The decimal place to print an estimate and the numbers compared with it: down to the
 * second significant digit of its standard error `se` (the uncertainty is quoted with two
 * significant digits and the estimate to the same decimal place: JCGM 100:2008, Evaluation of
 * measurement data: Guide to the expression of uncertainty in measurement, section 7.2.6),
 * and at least `least` significant digits of `value`; never finer than MAX_SIG_DIGITS digits
 * of `value`. Without a positive finite SE, `least` digits of `value`.
 * Example: placeForSe(0.300123, 4.1e-5) -> -6 ('0.300123'); placeForSe(0.978, 0.023) -> -3.
 */
export function placeForSe(value: number, se: number, least = LEAST_SIG_DIGITS): number {
  if (!(Number.isFinite(value) && value !== 0)) return Number.isFinite(se) && se > 0 ? leadOf(se) - 1 : 0;
  const byDigits = leadOf(value) - least + 1;
  const place = Number.isFinite(se) && se > 0 ? Math.min(leadOf(se) - 1, byDigits) : byDigits;
  return Math.max(place, leadOf(value) - MAX_SIG_DIGITS + 1);
}

/**
 * The coarsest decimal place, from `start` down, at which every two of `values` that differ
 * also print as different numbers with atPlace. Rounding to a common place keeps their
 * order, so the printed values then show the true order of the compared ones: a threshold
 * and the means compared with it never read alike when they differ. Stops where the largest
 * magnitude would need more than MAX_SIG_DIGITS digits (values differing only there may
 * print alike). Non-finite values are ignored. O(k log k · places) for k values.
 * Example: placeToTell([0.30012, 0.30016], -3) -> -4 ('0.3001', '0.3002').
 */
export function placeToTell(values: readonly number[], start: number): number {
  const sorted = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  const big = sorted.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
  const finest = big > 0 ? leadOf(big) - MAX_SIG_DIGITS + 1 : start;
  let place = start;
  // Only neighbours in sorted order can print alike first: rounding is monotone.
  for (let i = 1; i < sorted.length; i++) {
    const a = sorted[i - 1] as number;
    const b = sorted[i] as number;
    if (a === b) continue;
    while (place > finest && Number(atPlace(a, place)) === Number(atPlace(b, place))) place--;
  }
  return place;
}

/**
 * The fewest significant digits, from `least` up to MAX_SIG_DIGITS, at which every two of
 * `values` that differ also print as different numbers with sig (for numbers printed each
 * with the same count of digits, such as effect sizes beside their thresholds).
 * Example: digitsToTell([0.30012, 0.30016]) -> 4 ('0.3001', '0.3002'); digitsToTell([0.301, 0.52]) -> 3.
 */
export function digitsToTell(values: readonly number[], least = LEAST_SIG_DIGITS): number {
  const sorted = values.filter((v) => Number.isFinite(v)).sort((a, b) => a - b);
  let digits = Math.max(1, Math.min(least, MAX_SIG_DIGITS));
  for (let i = 1; i < sorted.length; i++) {
    const a = sorted[i - 1] as number;
    const b = sorted[i] as number;
    if (a === b) continue;
    while (digits < MAX_SIG_DIGITS && Number(sig(a, digits)) === Number(sig(b, digits))) digits++;
  }
  return digits;
}

/**
 * An effect size beside the threshold it is judged by: at least 2 significant digits, and
 * more when needed so that a size just under the threshold never reads as the threshold
 * (digitsToTell on |value| and the threshold).
 * Example: sizeText(0.0162, 0.1) -> '0.016'; sizeText(0.0996, 0.1) -> '0.0996'.
 */
export function sizeText(value: number, threshold: number): string {
  return sig(value, digitsToTell([Math.abs(value), threshold], 2));
}
