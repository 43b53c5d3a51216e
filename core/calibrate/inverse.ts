/**
 * Inverse tables: for each reading, the quantity the fitted calibration curve gives back and
 * its inverse prediction (calibration) interval.
 */
import { InputError } from '../errors';
import { qt } from '../stats/distributions';
import type { FitResult } from '../types';
import { sig } from '../words/numbers';
import { BandHull } from './bandHull';
import { inverseOf, type InverseCurve } from './inverseCurve';

export { InverseCurve, inverseOf, inverseValue, readingRange } from './inverseCurve';

/** How the intervals of an inverse table are formed; every field optional. */
export interface InverseOptions {
  /** Coverage of the interval, between 0 and 1; default 0.95. */
  readonly level?: number | undefined;
  /** Number of readings averaged into each reading of the table (a whole number >= 1); default 1. */
  readonly readingsAveraged?: number | undefined;
  /** Standard uncertainty of the reference standard, in units of the quantity (>= 0); default 0. */
  readonly referenceUncertainty?: number | undefined;
  /** Rows whose interval is wider than this (units of the quantity, > 0) are flagged `wide`; default none. */
  readonly widthTolerance?: number | undefined;
}

/**
 * Columns of an inverse table. reading: the reading y0; quantity: x with f(x) = y0 (NaN when
 * outside); lower, upper: the interval's ends (NaN where open); open: 1 when either end is
 * open (the band does not cross the reading within the data range on that side); wide: 1
 * when the width exceeds the tolerance or is unbounded (an open end); outside: 1 when the
 * reading lies outside the curve's values over the data range.
 */
export const INVERSE_COLUMNS = ['reading', 'quantity', 'lower', 'upper', 'open', 'wide', 'outside'] as const;

/** An inverse table: one row per reading, in the order given. */
export interface InverseTable {
  readonly columns: readonly (typeof INVERSE_COLUMNS)[number][];
  readonly rows: readonly (readonly number[])[];
  readonly direction: 'increasing' | 'decreasing';
  /** Lowest and highest curve value over the data range. */
  readonly readingRange: readonly [number, number];
  readonly level: number;
  /** Student t quantile (1 + level) / 2 on the fit's residual degrees of freedom. */
  readonly t: number;
  readonly readingsAveraged: number;
  readonly referenceUncertainty: number;
  /** The width tolerance, when one was given. */
  readonly widthTolerance?: number;
  /** One sentence naming the method and its sources. */
  readonly method: string;
  /** Plain-language notes: where the curve is level or its slope touches zero. */
  readonly notes: readonly string[];
}

const DEFAULT_LEVEL = 0.95;

/**
 * The inverse table of a calibration curve fitted as reading y = f(quantity x): for each
 * reading y0, the quantity x^ with f(x^) = y0 and the inverse prediction interval, found by
 * inverting the prediction band (the classical method: Brown, P. J. (1993), Measurement,
 * Regression, and Calibration, Oxford, chapters 1-2; Draper, N. R. & Smith, H. (1998),
 * Applied Regression Analysis, 3rd ed., Wiley, section 3.2, "Inverse regression (straight
 * line case)"). The interval is the hull (lowest and highest x) of
 *
 *   { x in [lower, upper] : |y0 - f(x)| <= t sqrt(s^2 / m + se(x)^2 + (f'(x) u)^2) }
 *
 * with s = fit.sigma, se(x) = s sqrt(varianceFactor(x)), t the Student t quantile
 * (1 + level) / 2 on fit.residualDf, m readings averaged, and u the reference standard's
 * standard uncertainty in units of x. The last term is the first-order propagation of an
 * uncertainty of the quantity into the reading (the law of propagation of uncertainty,
 * JCGM 100:2008, Evaluation of measurement data: Guide to the expression of uncertainty in
 * measurement, section 5.1.2). A reading of weight 1 is assumed (the band of bandsAt). For a
 * straight line this is the interval between the roots of
 * (y0 - a - b x0)^2 = t^2 s^2 (1/m + 1/n + (x0 - xbar)^2 / Sxx).
 *
 * Where the set reaches an end of the data range, the interval is not closed there within
 * the data: that end is NaN and `open` is 1, never a number the data do not support. A
 * reading outside the curve's values over the data range has quantity NaN and `outside` 1;
 * its interval ends are still reported where the band reaches it. The table is exact: the
 * band is a polynomial on each piece of the curve (core/calibrate/bandHull.ts) and x^ is
 * bisected to the last bit (core/calibrate/inverseCurve.ts).
 *
 * Cost: O(P) for P pieces to check (once per fit object, shared with inverseValue and
 * readingRange) and to bound the curve, then about 55 curve
 * evaluations plus O(log P) and a few pieces per reading. A smoothing spline with a million
 * knots takes about 5 s on a 2-core laptop-class machine (11 curve evaluations per piece,
 * each O(log P)); a regression spline or a polynomial, well under a millisecond.
 *
 * Throws InputError for a curve that turns within the data range (naming where, and
 * suggesting a shape constraint), a constant curve, a curve on a link scale (counts or
 * proportions), a fit without residual degrees of freedom, options out of range, or a
 * reading that is not a finite number.
 * @example
 *   const fit = fitCurve({ x: speed, y: dist }, { kind: 'polynomial', df: 2 }); // datasets::cars
 *   const table = inverseTable(fit, [30, 50], { readingsAveraged: 3 });
 *   table.rows[0]; // [30, 12.1, lower, upper, 0, 0, 0]
 */
export function inverseTable(fit: FitResult, readings: ArrayLike<number>, options: InverseOptions = {}): InverseTable {
  const o = checkOptions(options);
  for (let i = 0; i < readings.length; i++) {
    const v = readings[i] as number;
    if (!Number.isFinite(v)) throw new InputError(`reading ${i + 1} of the inverse table is ${v}; readings must be finite numbers`);
  }
  const inverse = inverseOf(fit);
  if (!(fit.residualDf > 0) || !Number.isFinite(fit.sigma)) {
    throw new InputError(`an inverse interval needs residual degrees of freedom to estimate the scatter of readings; this fit has n - df = ${sig(fit.residualDf)} (it passes through every point)`);
  }
  const t = qt(0.5 + o.level / 2, fit.residualDf);
  const hull = new BandHull(fit.curve, inverse.pieces, inverse.sign, { t, sigma: fit.sigma, readingsAveraged: o.readingsAveraged, referenceUncertainty: o.referenceUncertainty });
  const { lower, upper } = fit.curve;
  const rows: number[][] = [];
  for (let i = 0; i < readings.length; i++) {
    const y0 = readings[i] as number;
    const quantity = inverse.quantity(y0);
    let low = hull.lowest(y0);
    let high = hull.highest(y0);
    // x^ is in the set by construction; this keeps a zero-width set (no scatter at all) from reading as empty.
    if (!Number.isNaN(quantity)) {
      low = Number.isNaN(low) ? quantity : Math.min(low, quantity);
      high = Number.isNaN(high) ? quantity : Math.max(high, quantity);
    }
    if (!(low > lower)) low = NaN;
    if (!(high < upper)) high = NaN;
    const open = Number.isNaN(low) || Number.isNaN(high) ? 1 : 0;
    const wide = o.widthTolerance === undefined ? 0 : open === 1 || high - low > o.widthTolerance ? 1 : 0;
    rows.push([y0, quantity, low, high, open, wide, Number.isNaN(quantity) ? 1 : 0]);
  }
  return {
    columns: INVERSE_COLUMNS,
    rows,
    direction: inverse.direction,
    readingRange: inverse.readingRange,
    level: o.level,
    t,
    readingsAveraged: o.readingsAveraged,
    referenceUncertainty: o.referenceUncertainty,
    ...(o.widthTolerance === undefined ? {} : { widthTolerance: o.widthTolerance }),
    method: methodSentence(o),
    notes: shapeNotes(inverse),
  };
}

interface CheckedOptions {
  readonly level: number;
  readonly readingsAveraged: number;
  readonly referenceUncertainty: number;
  readonly widthTolerance: number | undefined;
}

function checkOptions(options: InverseOptions): CheckedOptions {
  const level = options.level ?? DEFAULT_LEVEL;
  if (!(level > 0 && level < 1)) throw new InputError(`the interval level must be between 0 and 1 (0.95 for 95 %); got ${level}`);
  const m = options.readingsAveraged ?? 1;
  if (!(m >= 1) || !Number.isInteger(m)) throw new InputError(`the number of readings averaged must be a whole number of at least 1; got ${m}`);
  const u = options.referenceUncertainty ?? 0;
  if (!(u >= 0) || !Number.isFinite(u)) throw new InputError(`the reference standard's uncertainty must be a finite number of at least 0 (in units of the quantity); got ${u}`);
  const tol = options.widthTolerance;
  if (tol !== undefined && (!(tol > 0) || !Number.isFinite(tol))) throw new InputError(`the interval width tolerance must be a positive finite number (in units of the quantity); got ${tol}`);
  return { level, readingsAveraged: m, referenceUncertainty: u, widthTolerance: tol };
}

/** One sentence: what the interval is and where the method comes from. */
function methodSentence(o: CheckedOptions): string {
  const what = o.readingsAveraged === 1 ? 'one reading' : `the mean of ${o.readingsAveraged} readings`;
  const reference =
    o.referenceUncertainty > 0 ? `, widened by the reference standard's standard uncertainty ${sig(o.referenceUncertainty)} carried through the curve's slope (JCGM 100:2008, section 5.1.2),` : '';
  return `Inverse prediction interval: the lowest and highest quantity in the data range whose ${sig(100 * o.level)} % prediction band for ${what}${reference} contains the reading (Brown 1993, Measurement, Regression, and Calibration, chapters 1-2; Draper & Smith 1998, Applied Regression Analysis, 3rd ed., section 3.2).`;
}

/** Notes on level stretches and zero slopes, where readings tell the quantity poorly. */
function shapeNotes(inverse: InverseCurve): string[] {
  const notes: string[] = [];
  const { plateaus, stalls } = inverse.shape;
  for (const [from, to] of plateaus) {
    notes.push(
      `The curve is level from x = ${sig(from)} to ${sig(to)} (value ${sig(inverse.fit.curve.value(0.5 * (from + to)))}): a reading at that level fits every x there; the table gives the lowest.`,
    );
  }
  if (stalls.length > 0) {
    notes.push(
      `The curve's slope touches zero at x = ${stalls.map((v) => sig(v)).join(', ')}: readings near ${stalls.length === 1 ? 'that point' : 'those points'} tell the quantity poorly, and their intervals are wide.`,
    );
  }
  return notes;
}
