import { CancelledError, FitError, InputError } from '../errors';
import { dataTotals, fitStatistics } from '../fit/summary';
import { resamplingScheme } from '../registry/resampling/index';
import { leaveOneOutErrors, summarise } from '../tune/summaries';
import type { ErrorSummary, Progress, ResampleSpec } from '../tune/types';
import { axisBasis, type AxisBasis } from './axis';
import { SurfaceBasis } from './basis';
import { prepareSurface, type PreparedSurface, type SurfaceData } from './data';
import { fitSurfaceBasis, pairWords, type SurfaceFit } from './fit';
import { SurfaceResampler, type SurfaceEngine } from './resample';
import { selectPair, simplerFirst, type SurfaceCandidate, type SurfaceMetric, type SurfaceRule, type SurfaceSelection } from './select';

/** What to tune: candidate df of each input (every pair of them is a candidate), resampling, rule. */
export interface SurfaceTuneOptions {
  /** Candidate df of u; default 1 to min(9, distinct values of u). */
  readonly candidatesU?: readonly number[] | undefined;
  /** Candidate df of v; default 1 to min(9, distinct values of v). */
  readonly candidatesV?: readonly number[] | undefined;
  readonly resample: ResampleSpec;
  readonly rule: SurfaceRule;
  readonly seed: number;
  /** Error the rules compare; default RMSE (the GCV score with gcv). */
  readonly metric?: SurfaceMetric | undefined;
  /** 'sums' (default): per-cell sums serve every candidate; 'rows': refit from the rows (the reference). */
  readonly engine?: SurfaceEngine | undefined;
  /**
   * MAE and the largest absolute error of each resample need a pass over the held-out rows
   * per candidate on the sums path; default: computed when the metric needs them or when
   * rows x candidates is at most ROW_ERROR_BUDGET.
   */
  readonly rowErrors?: boolean | undefined;
}

/** Mean and SE of each pair's error over the grid of candidate df: mean[i * dfV.length + j] is at (dfU[i], dfV[j]); NaN where skipped. */
export interface ErrorLandscape {
  readonly metric: SurfaceMetric;
  readonly dfU: readonly number[];
  readonly dfV: readonly number[];
  readonly mean: Float64Array;
  readonly se: Float64Array;
}

/** The outcome of tuning a surface. */
export interface SurfaceTuneResult {
  readonly resample: ResampleSpec;
  readonly seed: number;
  readonly metric: SurfaceMetric;
  /** Every candidate pair, simplest first (core/surface/select.ts simplerFirst). */
  readonly candidates: readonly SurfaceCandidate[];
  readonly selected: SurfaceSelection;
  readonly landscape: ErrorLandscape;
  readonly engine: SurfaceEngine;
  readonly notes: readonly string[];
}

/** Default largest candidate df of each input (9 x 9 pairs). */
export const DEFAULT_MAX_SURFACE_DF = 9;
/** Largest number of candidate pairs in one tuning. */
export const MAX_SURFACE_PAIRS = 400;
/** Rows x candidates up to which MAE and the largest error are computed on the sums path by default. */
export const ROW_ERROR_BUDGET = 20_000_000;
/** A larger share of failed resamples than this skips the candidate (as for curves). */
const MAX_FAILED_SHARE = 0.5;

/**
 * Tunes the df pair of a surface (docs/design.md, "Surfaces"): every pair of the candidate
 * df of u and v is fitted to all rows (AIC, AICc, BIC, GCV), its error estimated with the
 * resampling scheme (the same resamples for every pair; exact leave-one-out from the hat
 * diagonal; GCV from the fit), and the rule chooses among them, simplest pair first
 * (selectPair). Pairs the data cannot support are kept as skipped with the reason. The
 * chosen pair is refitted row by row for its complete output.
 * Cost with the sums engine: O(n) per resample for the sums plus O(cells x 16^2 x 7 +
 * p^2 q) per pair and resample; exact leave-one-out fits every pair row by row.
 * Example: (await tuneSurface(data, { resample: { kind: 'bootstrap', resamples: 20 }, rule: { kind: 'one-se' }, seed: 1 })).result.selected.reason.
 */
export async function tuneSurface(data: SurfaceData | PreparedSurface, options: SurfaceTuneOptions, progress?: Progress): Promise<{ result: SurfaceTuneResult; fit: SurfaceFit }> {
  const prepared = data.u instanceof Float64Array ? prepareSurface(data as SurfaceData) : (data as PreparedSurface);
  const n = prepared.data.u.length;
  const { resample, rule, seed } = options;
  const scheme = resamplingScheme(resample);
  scheme.check(resample, n);
  const metric: SurfaceMetric = options.metric ?? (scheme.method === 'fit' ? 'gcv' : 'rmse');
  if (metric === 'gcv' && scheme.method !== 'fit') throw new InputError('the GCV score is only available with gcv resampling');
  if (metric !== 'gcv' && scheme.method === 'fit') throw new InputError(`with GCV the rules compare the GCV score, not ${metric}`);
  const listU = candidateList(options.candidatesU, prepared.u.distinct, prepared.names.u);
  const listV = candidateList(options.candidatesV, prepared.v.distinct, prepared.names.v);
  const pairs = listU.flatMap((dfU) => listV.map((dfV) => ({ dfU, dfV }))).sort(simplerFirst);
  if (pairs.length > MAX_SURFACE_PAIRS)
    throw new InputError(`${listU.length} x ${listV.length} = ${pairs.length} candidate df pairs is more than ${MAX_SURFACE_PAIRS}; give fewer candidate df per input`);
  const engine: SurfaceEngine = options.engine ?? 'sums';
  const skipped = new Map<number, string>();
  // Each input's basis is placed once per df and shared by every pair that uses it.
  const axes = new Map<string, AxisBasis | FitError>();
  const axisOf = (input: 'u' | 'v', df: number): AxisBasis => {
    const key = `${input}${df}`;
    let a = axes.get(key);
    if (!a) {
      try {
        a = axisBasis(prepared[input], df, prepared.names[input]);
      } catch (e) {
        if (!(e instanceof FitError)) throw e;
        a = e;
      }
      axes.set(key, a);
    }
    if (a instanceof FitError) throw a;
    return a;
  };
  const bases: (SurfaceBasis | undefined)[] = pairs.map((p, k) => {
    try {
      return new SurfaceBasis(axisOf('u', p.dfU), axisOf('v', p.dfV));
    } catch (e) {
      if (!(e instanceof FitError)) throw e;
      skipped.set(k, e.message);
      return undefined;
    }
  });
  const live = pairs.map((_, k) => k).filter((k) => bases[k] !== undefined);
  const liveBases = live.map((k) => bases[k] as SurfaceBasis);
  const rowErrors = options.rowErrors ?? (metric === 'mae' || metric === 'maxAbs' || n * live.length <= ROW_ERROR_BUDGET);
  // The sums also give every pair's fit to all rows (GCV included); exact leave-one-out needs each pair's leverage, row by row.
  const useSums = engine === 'sums' && scheme.method !== 'leverage';
  const resampler = live.length > 0 && (scheme.method === 'resamples' || useSums) ? new SurfaceResampler(prepared, liveBases, resample, seed, engine, rowErrors) : undefined;

  // All-rows fits: from one pass of sums, or row by row (exact leave-one-out needs the leverage of every pair).
  const totals = dataTotals({ x: prepared.data.u, y: prepared.data.y, w: prepared.data.w });
  const stats = new Map<number, ReturnType<typeof fitStatistics>>();
  const fullFits = new Map<number, SurfaceFit>();
  const rowFit = (k: number): SurfaceFit | undefined => {
    try {
      const f = fitSurfaceBasis(prepared, bases[k] as SurfaceBasis);
      fullFits.set(k, f);
      return f;
    } catch (e) {
      if (!(e instanceof FitError)) throw e;
      skipped.set(k, e.message);
      return undefined;
    }
  };
  if (resampler && useSums) {
    const all = resampler.allRows();
    live.forEach((k, j) => {
      if (all.failed[j] !== undefined) rowFit(k); // the row fit says what the data lack
      if (!skipped.has(k)) stats.set(k, fitStatistics(n, (bases[k] as SurfaceBasis).df, all.rss[j] as number, totals));
    });
  } else {
    for (const k of live) {
      if (progress?.cancelled()) throw new CancelledError();
      const f = rowFit(k);
      if (f) stats.set(k, fitStatistics(n, f.df, f.rss, totals));
    }
  }

  const errors = new Map<number, SurfaceCandidate['errors']>();
  const notes: string[] = [];
  if (resampler && scheme.method === 'resamples') {
    const count = scheme.count(resample);
    const C = live.length;
    const rmse = Array.from({ length: C }, () => new Float64Array(count));
    const mae = Array.from({ length: C }, () => new Float64Array(count));
    const maxAbs = Array.from({ length: C }, () => new Float64Array(count));
    for (let r = 0; r < count; r++) {
      if (progress?.cancelled()) throw new CancelledError();
      const e = resampler.run(r);
      for (let j = 0; j < C; j++) {
        (rmse[j] as Float64Array)[r] = e.rmse[j] as number;
        (mae[j] as Float64Array)[r] = e.mae[j] as number;
        (maxAbs[j] as Float64Array)[r] = e.maxAbs[j] as number;
      }
      progress?.report(r + 1, count, `resample ${r + 1} of ${count}`);
      if (r % 4 === 3) await new Promise((res) => setTimeout(res, 0));
    }
    live.forEach((k, j) => {
      if (skipped.has(k)) return;
      const s = summarise(rmse[j] as Float64Array);
      const failed = count - s.count;
      if (failed > MAX_FAILED_SHARE * count) {
        skipped.set(k, `the resampled rows could not determine the surface in ${failed} of ${count} resamples (too few distinct points between knots)`);
        return;
      }
      const p = pairs[k] as { dfU: number; dfV: number };
      if (failed > 0) notes.push(`${pairWords(p.dfU, p.dfV)}: ${failed} of ${count} resamples could not be fitted and were left out of its mean error.`);
      errors.set(k, {
        rmse: strip(s),
        ...(rowErrors ? { mae: strip(summarise(mae[j] as Float64Array)), maxAbs: strip(summarise(maxAbs[j] as Float64Array)) } : {}),
      });
    });
    if (!rowErrors) notes.push('MAE and the largest absolute error of the resamples were not computed (they need a pass over the held-out rows for every pair); the rules compare RMSE.');
  } else if (scheme.method === 'leverage') {
    for (const [k, f] of fullFits) errors.set(k, leaveOneOutErrors(prepared, f));
  } else if (scheme.method === 'fit') {
    for (const [k, s] of stats) errors.set(k, { gcv: { mean: s.gcv, se: NaN, values: [] } });
  }

  const candidates: SurfaceCandidate[] = pairs.map((p, k) => {
    const base = { dfU: p.dfU, dfV: p.dfV, df: p.dfU * p.dfV };
    const reason = skipped.get(k);
    const s = stats.get(k);
    if (reason !== undefined || !s) return { ...base, skipped: reason ?? 'not fitted', errors: {} };
    return { ...base, errors: errors.get(k) ?? {}, aic: s.aic, aicc: s.aicc, bic: s.bic };
  });
  const selected = selectPair(candidates, rule, metric, prepared.names);
  const chosen = pairs.findIndex((p) => p.dfU === selected.dfU && p.dfV === selected.dfV);
  const fit = fullFits.get(chosen) ?? fitSurfaceBasis(prepared, bases[chosen] as SurfaceBasis);
  return {
    result: { resample, seed, metric, candidates, selected, landscape: landscapeOf(candidates, listU, listV, metric), engine, notes },
    fit,
  };
}

function candidateList(given: readonly number[] | undefined, distinct: number, name: string): number[] {
  const list = [...new Set(given ?? Array.from({ length: Math.max(1, Math.min(DEFAULT_MAX_SURFACE_DF, distinct)) }, (_, i) => i + 1))].sort((a, b) => a - b);
  if (list.length === 0) throw new InputError(`no candidate df given for ${name}`);
  for (const df of list) if (!Number.isInteger(df) || df < 1) throw new InputError(`candidate df ${df} of ${name} is not a whole number of at least 1`);
  return list;
}

function strip(s: ErrorSummary): ErrorSummary {
  return { mean: s.mean, se: s.se, values: s.values };
}

/** The error landscape over the grid of candidate df (NaN where a pair was skipped or has no such error). */
function landscapeOf(candidates: readonly SurfaceCandidate[], listU: readonly number[], listV: readonly number[], metric: SurfaceMetric): ErrorLandscape {
  const mean = new Float64Array(listU.length * listV.length).fill(NaN);
  const se = new Float64Array(listU.length * listV.length).fill(NaN);
  for (const c of candidates) {
    const e = c.errors[metric];
    if (!e) continue;
    const k = listU.indexOf(c.dfU) * listV.length + listV.indexOf(c.dfV);
    mean[k] = e.mean;
    se[k] = e.se;
  }
  return { metric, dfU: listU, dfV: listV, mean, se };
}
