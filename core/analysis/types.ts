import type { TuneOptions } from '../tune/tune';
import type { TuneResult } from '../tune/types';
import type { FitResult, XYData } from '../types';

/**
 * Everything one analysis needs besides the data: what tuning takes (curve, candidates,
 * resampling, rule, seed, model options; core/tune/tune.ts) and a held-out fraction.
 */
export interface AnalysisOptions extends Omit<TuneOptions, 'metric'> {
  /** Fraction of rows held out (stratified by x) and used once at the end; 0 or absent for none. */
  readonly holdout?: number | undefined;
}

/** Residual checks of the chosen fit (each absent when it does not apply). */
export interface Diagnostics {
  readonly shapiroWilk?: { readonly statistic: number; readonly pValue: number; readonly n: number; readonly note?: string };
  readonly durbinWatson?: { readonly statistic: number; readonly pValue: number; readonly method: 'exact' | 'normal' | 'asymptotic' };
  readonly breuschPagan?: { readonly statistic: number; readonly df: number; readonly pValue: number };
  readonly lackOfFit?: { readonly F: number; readonly df1: number; readonly df2: number; readonly pValue: number };
  readonly influential: {
    readonly thresholds: readonly { readonly measure: 'leverage' | 'cooks'; readonly value: number; readonly source: string }[];
    readonly rows: readonly { readonly index: number; readonly line: number; readonly leverage: number; readonly cooksDistance: number; readonly exceeds: readonly string[] }[];
    readonly total: number;
  };
  /** Normal-quantile plot data: theoretical quantiles and sorted standardized residuals (thinned for large n). */
  readonly normalQuantiles?: { readonly theoretical: readonly number[]; readonly sample: readonly number[] };
  /** Plain-language warnings (failed checks, heavy influence, ...). */
  readonly warnings: readonly string[];
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
