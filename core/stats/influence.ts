import { InputError } from '../errors';
import { qf, qnorm, qt } from './distributions';

/** How many of the flagged rows are shown by line; the rest are counted (and all are kept in the record). */
export const INFLUENCE_SHOWN = 10;
/** Family-wise level of the Bonferroni outlier test (common practice). */
export const OUTLIER_LEVEL = 0.05;
/** Leverage at or below this is never flagged, whatever n (Huber 1981, see influentialRows). */
export const LEVERAGE_FLOOR = 0.5;
/** Multiple of the mean leverage df / n a flagged leverage must also exceed (see influentialRows). */
export const LEVERAGE_MULTIPLE = 3;
/** Leverage this close to 1 leaves no residual to studentize: the studentized residual is NaN. */
const LEVERAGE_ONE = 1e-10;

/**
 * Which rule a row breaks: an outlier by the Bonferroni test on its studentized residual,
 * Cook's distance above the median of F(df, n - df), or leverage above
 * max(0.5, 3 df / n).
 */
export type InfluenceRule = 'outlier' | 'cooks' | 'leverage';

/** One threshold with the publication or practice it comes from. */
export interface InfluenceThreshold {
  readonly rule: InfluenceRule;
  /** What is compared: |studentized residual|, Cook's distance, or leverage. */
  readonly measure: 'studentized' | 'cooks' | 'leverage';
  readonly value: number;
  readonly source: string;
}

/** A row that exceeds at least one threshold. */
export interface InfluentialRow {
  /** 0-based row index in the fitted data. */
  readonly index: number;
  /** 1-based CSV line when lines were given, else the 1-based row number. */
  readonly line: number;
  readonly leverage: number;
  readonly cooksDistance: number;
  /** Externally studentized residual (likelihood residual for counts and proportions; NaN at leverage 1). */
  readonly studentized: number;
  readonly exceeds: readonly InfluenceRule[];
}

/** The thresholds, every flagged row (most influential first), how many there are, and how many are shown by line. */
export interface InfluenceReport {
  readonly thresholds: readonly InfluenceThreshold[];
  readonly rows: readonly InfluentialRow[];
  readonly total: number;
  /** The first `shown` rows are the ones to show by line (at most INFLUENCE_SHOWN); the others are counted. */
  readonly shown: number;
}

/** Reference distribution of the outlier test: Student's t on n - df - 1 df (least squares) or the normal (counts, proportions, robust fits). */
export type OutlierReference = 'student' | 'normal';

/**
 * Externally studentized residuals of a least-squares fit (R's rstudent):
 * r_i = e_i / (s sqrt(1 - h_i)) with s^2 = sum e^2 / (n - df), then
 * t_i = r_i sqrt((n - df - 1) / (n - df - r_i^2)), which is e_i over the residual SD with
 * row i left out (Cook & Weisberg 1982, Residuals and Influence in Regression, section
 * 2.2.2; Belsley, Kuh & Welsch 1980, Regression Diagnostics, section 2.1; section numbers
 * from memory). Pass sqrt(w)-scaled
 * residuals for weighted fits. NaN where h_i is 1 or n - df - 1 <= 0. O(n).
 * Example: with e = (1, -1, 2, -2), h = 0.5 each and df = 1, s^2 = 10 / 3.
 */
export function externallyStudentized(scaledResiduals: Float64Array, leverage: Float64Array, df: number): Float64Array {
  const n = scaledResiduals.length;
  let ss = 0;
  // Indexed loops over the rows: they run fast before the optimising compiler gets to them, which for-of loops do not.
  for (let i = 0; i < n; i++) ss += (scaledResiduals[i] as number) * (scaledResiduals[i] as number);
  const rdf = n - df;
  const s2 = ss / rdf;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const h = leverage[i] as number;
    if (!(rdf - 1 > 0) || !(1 - h > LEVERAGE_ONE) || !(s2 > 0)) {
      out[i] = NaN;
      continue;
    }
    const r = (scaledResiduals[i] as number) / Math.sqrt(s2 * (1 - h));
    const rest = rdf - r * r;
    // Rounding can push r^2 to n - df when one row carries all the residual variation.
    out[i] = rest > 0 ? r * Math.sqrt((rdf - 1) / rest) : r > 0 ? Infinity : -Infinity;
  }
  return out;
}

/**
 * Likelihood residuals of a Poisson or binomial fit, the one-step approximation to the
 * change in deviance when row i is left out: sign(d_i) sqrt(d_i^2 + h_i p_i^2 / (1 - h_i))
 * with d the deviance and p the Pearson residuals (Williams 1987, "Generalized linear model
 * diagnostics using the deviance and single case deletions", Applied Statistics 36(2),
 * 181-191; R's rstudent.glm for these families). Compared with the normal distribution.
 * NaN where h_i is 1. O(n).
 */
export function likelihoodResiduals(devianceResiduals: Float64Array, pearsonResiduals: Float64Array, leverage: Float64Array): Float64Array {
  const n = devianceResiduals.length;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const h = leverage[i] as number;
    const d = devianceResiduals[i] as number;
    const p = pearsonResiduals[i] as number;
    out[i] = 1 - h > LEVERAGE_ONE ? (d < 0 ? -1 : 1) * Math.sqrt(d * d + (h * p * p) / (1 - h)) : NaN;
  }
  return out;
}

/**
 * Standardized residuals e_i / (scale sqrt(1 - h_i)) with a given scale (a robust fit's
 * scale, which one wild row does not inflate, so no row needs leaving out); compared with
 * the normal distribution. NaN where h_i is 1 or the scale is not positive. O(n).
 */
export function standardizedResiduals(scaledResiduals: Float64Array, leverage: Float64Array, scale: number): Float64Array {
  const out = new Float64Array(scaledResiduals.length);
  for (let i = 0; i < out.length; i++) {
    const h = leverage[i] as number;
    out[i] = 1 - h > LEVERAGE_ONE && scale > 0 ? (scaledResiduals[i] as number) / (scale * Math.sqrt(1 - h)) : NaN;
  }
  return out;
}

/**
 * The thresholds of influentialRows for n rows and a fit with df (the trace of the hat
 * matrix, intercept included):
 * - outlier: |studentized residual| above the Bonferroni critical value at family-wise
 *   level 0.05, t_(1 - 0.05 / (2n)) on n - df - 1 df (Weisberg 2014, Applied Linear
 *   Regression, 4th ed., section 9.4; Cook & Weisberg 1982, section 2.2.2; both section
 *   numbers from memory), or the normal quantile for `reference` 'normal'. Clean data flag no row
 *   in 19 runs of 20, at any n;
 * - Cook's distance above the median of F(df, n - df) (Cook 1977, "Detection of influential
 *   observation in linear regression", Technometrics 19(1), 15-18; Cook & Weisberg 1982,
 *   section 3.5, from memory): removing such a row moves the coefficients past the 50 % confidence
 *   region. Near 1 at large n, so a handful of rows at most;
 * - leverage above both 0.5 and 3 df / n: common practice, joining Huber's (1981, Robust
 *   Statistics, section 7.9, from memory) "above 0.5: avoid" with the 3 df / n of Velleman &
 *   Welsch (1981), "Efficient computing of regression diagnostics", The American
 *   Statistician 35(4), 234-242. A multiple of df / n alone flags a fixed share of clean
 *   rows near the ends of x at any n (about 1.5 % at 3 df / n), while 0.5 flags only rows
 *   that carry at least half of their own fitted value.
 * Thresholds that need more rows than df (n - df <= 0, or n - df - 1 <= 0) are NaN and flag
 * nothing. O(1) plus a quantile each.
 * Example: influenceThresholds(1000, 8, 'student')[1].value is the median of F(8, 992), about 0.92.
 */
export function influenceThresholds(n: number, df: number, reference: OutlierReference): InfluenceThreshold[] {
  const tail = OUTLIER_LEVEL / (2 * n);
  const outlier = reference === 'normal' ? qnorm(tail, false) : n - df - 1 > 0 ? qt(tail, n - df - 1, false) : NaN;
  return [
    {
      rule: 'outlier',
      measure: 'studentized',
      value: outlier,
      source:
        reference === 'normal'
          ? 'Bonferroni outlier test at 5 % (Weisberg 2014, Applied Linear Regression, 4th ed., chapter 9), normal quantile for likelihood or robust residuals (Williams 1987)'
          : 'Bonferroni outlier test at 5 % (Weisberg 2014, Applied Linear Regression, 4th ed., chapter 9)',
    },
    {
      rule: 'cooks',
      measure: 'cooks',
      value: n - df > 0 ? qf(0.5, df, n - df) : NaN,
      source: 'median of F(df, n - df) (Cook 1977, Technometrics 19(1); Cook & Weisberg 1982, Residuals and Influence in Regression)',
    },
    {
      rule: 'leverage',
      measure: 'leverage',
      value: Math.max(LEVERAGE_FLOOR, (LEVERAGE_MULTIPLE * df) / n),
      source: 'common practice: above 0.5 (Huber 1981, Robust Statistics) and 3 df / n (Velleman & Welsch 1981, The American Statistician 35(4))',
    },
  ];
}

/** What influentialRows examines, one value per row in the fitted data's order. */
export interface InfluenceInput {
  readonly leverage: Float64Array;
  readonly cooksDistance: Float64Array;
  /** Studentized residuals: externallyStudentized, likelihoodResiduals or standardizedResiduals. */
  readonly studentized: Float64Array;
  /** Trace of the hat matrix, intercept included. */
  readonly df: number;
  readonly reference: OutlierReference;
  readonly lines?: Int32Array | undefined;
}

/**
 * Rows that stand out, by the three rules of influenceThresholds, most influential first:
 * by how far past its threshold the row goes (the largest of |t| / critical t,
 * D / median F and h / leverage limit), then by row order. Every flagged row is kept; the
 * first INFLUENCE_SHOWN are marked for display (`shown`). Non-finite measures never
 * exceed a threshold. Cost O(n + k log k) for k flagged rows.
 * Throws InputError for arrays of different lengths, n = 0 or df <= 0.
 * Example: a reading 10 residual SDs off among 1,000,000 clean rows is the first row listed.
 */
export function influentialRows(input: InfluenceInput): InfluenceReport {
  const { leverage, cooksDistance, studentized, df, lines } = input;
  const n = leverage.length;
  if (n === 0) throw new InputError('influence: there are no rows');
  if (cooksDistance.length !== n) throw new InputError(`influence: ${n} leverages but ${cooksDistance.length} Cook's distances`);
  if (studentized.length !== n) throw new InputError(`influence: ${n} leverages but ${studentized.length} studentized residuals`);
  if (lines && lines.length !== n) throw new InputError(`influence: ${n} rows but ${lines.length} line numbers`);
  if (!(df > 0)) throw new InputError(`influence: df must be > 0, got ${df}`);
  const thresholds = influenceThresholds(n, df, input.reference);
  const [tLimit, dLimit, hLimit] = thresholds.map((t) => t.value) as [number, number, number];
  const flagged: number[] = [];
  const score = new Map<number, number>();
  for (let i = 0; i < n; i++) {
    // NaN comparisons are false, so a NaN threshold or measure flags nothing.
    const t = Math.abs(studentized[i] as number) / tLimit;
    const d = (cooksDistance[i] as number) / dLimit;
    const h = (leverage[i] as number) / hLimit;
    if (t > 1 || d > 1 || h > 1) {
      flagged.push(i);
      score.set(i, Math.max(t > 1 ? t : 0, d > 1 ? d : 0, h > 1 ? h : 0));
    }
  }
  flagged.sort((a, b) => (score.get(b) as number) - (score.get(a) as number) || a - b);
  const rows: InfluentialRow[] = flagged.map((i) => {
    const h = leverage[i] as number;
    const d = cooksDistance[i] as number;
    const t = studentized[i] as number;
    const exceeds: InfluenceRule[] = [];
    if (Math.abs(t) > tLimit) exceeds.push('outlier');
    if (d > dLimit) exceeds.push('cooks');
    if (h > hLimit) exceeds.push('leverage');
    return { index: i, line: lines ? (lines[i] as number) : i + 1, leverage: h, cooksDistance: d, studentized: t, exceeds };
  });
  return { thresholds, rows, total: rows.length, shown: Math.min(INFLUENCE_SHOWN, rows.length) };
}
