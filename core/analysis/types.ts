import type { TuneOptions } from '../tune/tune';
import type { TuneResult } from '../tune/types';
import type { InfluenceReport } from '../stats/influence';
import type { FitResult, XYData } from '../types';

/**
 * Everything one analysis needs besides the data: what tuning takes (curve, candidates,
 * resampling, rule, seed, model options; core/tune/tune.ts) and a held-out fraction.
 */
export interface AnalysisOptions extends Omit<TuneOptions, 'metric'> {
  /** Fraction of rows held out (stratified by x) and used once at the end; 0 or absent for none. */
  readonly holdout?: number | undefined;
}

/**
 * A test's verdict by size as well as by p-value: `sizeMatters` when its effect size reaches
 * the threshold stated in core/analysis/checks.ts, `flagged` when the p-value is below
 * CHECK_LEVEL too (only then is there a warning).
 */
export interface SizedVerdict {
  readonly sizeMatters: boolean;
  readonly flagged: boolean;
}

/** Residual checks of the chosen fit (each absent when it does not apply). */
export interface Diagnostics {
  /**
   * Present when the curve passes through every reading, so there is no scatter to check:
   * 'rounding' when every residual is at the rounding level of the readings, 'no-residual-df'
   * when the fit has as many coefficients as rows. The residual tests, the influence rules
   * and the row-order check are then not run.
   */
  readonly exactFit?: { readonly reason: 'rounding' | 'no-residual-df'; readonly maxResidual: number };
  /** Shapiro-Wilk, with the skewness and excess kurtosis of all checked residuals as its size. */
  readonly shapiroWilk?: { readonly statistic: number; readonly pValue: number; readonly n: number; readonly note?: string; readonly skewness: number; readonly excessKurtosis: number } & SizedVerdict;
  /** Durbin-Watson in x order, with the lag-1 correlation of the residuals in x order as its size. */
  readonly durbinWatson?: { readonly statistic: number; readonly pValue: number; readonly method: 'exact' | 'normal' | 'asymptotic'; readonly lag1: number } & SizedVerdict;
  /** Breusch-Pagan (Koenker), with the spread ratio across thirds of x as its size. */
  readonly breuschPagan?: { readonly statistic: number; readonly df: number; readonly pValue: number; readonly spreadRatio: number } & SizedVerdict;
  /** Lack-of-fit F test, with the RMS misfit of the replicate means over the pure-error SD as its size. */
  readonly lackOfFit?: { readonly F: number; readonly df1: number; readonly df2: number; readonly pValue: number; readonly misfitRatio: number } & SizedVerdict;
  /**
   * Counts and proportions: Pearson chi-square over the residual df, about 1 when the scatter
   * follows the outcome's distribution. `verdict` by the thresholds of core/analysis/dispersion.ts;
   * 'binary' for 0/1 readings, whose dispersion says nothing.
   */
  readonly dispersion?: { readonly pearsonChi2: number; readonly residualDf: number; readonly ratio: number; readonly verdict: 'over' | 'under' | 'as-expected' | 'binary' };
  /** Residuals in row order (the order of the file, usually the order of measurement): a series to plot and a measure of drift. */
  readonly rowOrder?: RowOrderCheck;
  readonly influential: InfluenceReport;
  /** Normal-quantile plot data: theoretical quantiles and sorted standardized residuals (thinned for large n). */
  readonly normalQuantiles?: { readonly theoretical: readonly number[]; readonly sample: readonly number[] };
  /** Plain-language warnings (failed checks, heavy influence, ...). */
  readonly warnings: readonly string[];
}

/** Drift of the residuals in row order (core/analysis/rowOrder.ts). */
export interface RowOrderCheck {
  /** Lag-1 correlation of the checked residuals in row order. */
  readonly lag1: number;
  /** Wald-Wolfowitz runs test on their signs, one-sided against too few runs. */
  readonly runs: { readonly runs: number; readonly expected: number; readonly z: number; readonly pValue: number };
  /** True when the rows are in x order (or its reverse): the check is then the Durbin-Watson check again and never warns. */
  readonly sameAsX: boolean;
  /** lag1 reaches the threshold of core/analysis/checks.ts. */
  readonly sizeMatters: boolean;
  /** sizeMatters, the runs test below CHECK_LEVEL, and not sameAsX. */
  readonly flagged: boolean;
  /**
   * The residuals against row position for a plot: every row up to ROW_ORDER_POINTS rows,
   * else the means of consecutive blocks of `blockSize` rows (`row` is the first row of each
   * block, 1-based; `line` its CSV line, 0 when unknown).
   */
  readonly series: { readonly row: readonly number[]; readonly line: readonly number[]; readonly residual: readonly number[]; readonly blockSize: number };
}

/** The outcome of one analysis: tuning, every candidate's fit, and the chosen fit's diagnostics. */
export interface Analysis {
  readonly options: AnalysisOptions;
  /** Rows used for tuning and fitting (after the held-out split). */
  readonly n: number;
  /**
   * The rows tuned and fitted: all rows given to analyse, or those left after the held-out
   * split, in their input order (the order of every fit's per-row arrays).
   */
  readonly data: XYData;
  /** The rows held out for the final check (absent without a held-out split). */
  readonly heldOut?: XYData | undefined;
  readonly tune: TuneResult;
  /** Fits to all tuning rows, one per candidate df that was not skipped, by df. */
  readonly fits: ReadonlyMap<number, FitResult>;
  /** The chosen fit (fits.get(tune.selected.df)). */
  readonly chosen: FitResult;
  readonly diagnostics: Diagnostics;
}
