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
