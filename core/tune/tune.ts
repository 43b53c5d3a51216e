import { CancelledError, FitError, InputError } from '../errors';
import { fitCurve } from '../fit/index';
import { fitNaturalSplineBatch } from '../fit/naturalSplineBatch';
import type { PreparedData } from '../fit/prepared';
import { isPlainModel, resolveModel } from '../fit/model';
import { checkShapedSmoothingSize } from '../fit/shapedSmoothing';
import type { Family, FitResult, ModelOptions } from '../types';
import { ERRORS_PER_CANDIDATE, ResampleEngine, type ResampleProblem } from './engine';
import { checkResampleSpec, orderByX, resampleCount } from './plan';
import { selectDf } from './rules';
import { summarise } from './summaries';
import type { CandidateResult, ErrorSummary, Metric, Progress, ResampleSpec, RuleSpec, TuneResult } from './types';

/**
 * What to tune. The ModelOptions fields (outcome, shape, robust) apply to every candidate;
 * such candidates are refitted on each resample through a trainer (core/tune/modelTrainer.ts),
 * the power-sum fast path serving plain least-squares natural splines only. A binomial
 * outcome with trials is passed as proportions with the trials as prior weights.
 */
export interface TuneOptions extends ModelOptions {
  readonly family: Family;
  readonly candidates?: readonly number[] | undefined;
  readonly resample: ResampleSpec;
  readonly rule: RuleSpec;
  readonly seed: number;
  /** Error the rules compare; default RMSE (mean deviance for Poisson/binomial outcomes; the GCV score with `gcv` resampling). */
  readonly metric?: Metric | undefined;
}

/** Runs resamples somewhere (inline, or in worker threads) and returns each resample's errors in order. */
export interface ResampleRunner {
  run(problem: ResampleProblem, count: number, progress?: Progress): Promise<Float64Array[]>;
}

/** A larger share of failed resamples than this skips the candidate. */
const MAX_FAILED_SHARE = 0.5;
/** Largest default df of the natural spline and the smoothing spline (DESIGN/issue: 2 .. min(12, distinct x)). */
const DEFAULT_MAX_DF = 12;
/** Largest default polynomial df (degree 7); higher degrees are rarely defensible. */
const DEFAULT_MAX_POLY_DF = 8;

/**
 * Default candidates: natural spline 2..min(12, distinct x); polynomial 1..min(8, distinct x);
 * smoothing spline 2..min(12, distinct x - 1) (its df must stay below the distinct count).
 */
export function defaultCandidates(family: Family, distinct: number): number[] {
  const range = (a: number, b: number): number[] => Array.from({ length: Math.max(0, b - a + 1) }, (_, i) => a + i);
  switch (family) {
    case 'natural':
      return range(2, Math.max(2, Math.min(DEFAULT_MAX_DF, distinct)));
    case 'poly':
      return range(1, Math.max(1, Math.min(DEFAULT_MAX_POLY_DF, distinct)));
    case 'smooth':
      return range(2, Math.max(2, Math.min(DEFAULT_MAX_DF, distinct - 1)));
  }
}

/** Runs every resample on this thread. */
export const inlineRunner: ResampleRunner = {
  async run(problem, count, progress) {
    const engine = new ResampleEngine(problem);
    const out: Float64Array[] = [];
    for (let r = 0; r < count; r++) {
      if (progress?.cancelled()) throw new CancelledError();
      const e = new Float64Array(engine.size * ERRORS_PER_CANDIDATE);
      engine.run(r, e);
      out.push(e);
      progress?.report(r + 1, count, `resample ${r + 1} of ${count}`);
      if (r % 8 === 7) await new Promise((res) => setImmediate(res));
    }
    return out;
  },
};

/**
 * Tunes the df of one curve family: fits every candidate to all tuning rows (giving AIC,
 * AICc, BIC, exact leave-one-out and GCV), estimates each candidate's error with the
 * chosen resampling (the same resamples for every candidate), and applies the rule.
 * Candidates the data cannot support are kept as skipped with the reason.
 * Returns the result and the fits by df. Cost: candidates x O(n) for the fits plus the
 * resampling cost (see ResampleEngine).
 */
export async function tuneCurve(
  prepared: PreparedData,
  options: TuneOptions,
  runner: ResampleRunner = inlineRunner,
  progress?: Progress,
): Promise<{ result: TuneResult; fits: Map<number, FitResult> }> {
  const { family, resample, rule, seed } = options;
  const n = prepared.data.x.length;
  checkResampleSpec(resample, n);
  const dfs = [...new Set(options.candidates ?? defaultCandidates(family, prepared.distinct))].sort((a, b) => a - b);
  if (dfs.length === 0) throw new InputError('no candidate df given');
  const model = resolveModel(family, options);
  // Refuse an oversized shape-constrained smoothing spline once, not once per candidate.
  if (family === 'smooth' && model.shape.length > 0) checkShapedSmoothingSize(prepared.distinct);
  const plain = isPlainModel(options);
  const glm = model.outcome !== 'gaussian';
  if (!plain && resample.kind === 'loo') {
    throw new InputError('exact leave-one-out needs a plain least-squares fit; with a Poisson or binomial outcome, shape constraints or robust fitting use boot:<B> or cv:<K> resampling');
  }
  const metric: Metric = options.metric ?? (resample.kind === 'gcv' ? 'gcv' : glm ? 'deviance' : 'rmse');
  if (metric === 'deviance' && !glm) throw new InputError('the mean deviance is the error of Poisson and binomial outcomes; use rmse, mae or maxAbs here');
  if (metric === 'gcv' && resample.kind !== 'gcv') throw new InputError('the GCV score is only available with --resample gcv');
  if (metric !== 'gcv' && resample.kind === 'gcv') throw new InputError(`with GCV the rules compare the GCV score, not ${metric}`);
  const fits = new Map<number, FitResult>();
  const skipped = new Map<number, string>();
  const modelSpec: ModelOptions = plain ? {} : { outcome: model.outcome, shape: model.shape, robust: model.robustK !== undefined ? { k: model.robustK } : undefined };
  if (family === 'natural' && plain) {
    // One pass of power sums serves every candidate (see fitNaturalSplineBatch).
    for (const [df, r] of fitNaturalSplineBatch(prepared, dfs)) {
      if (r instanceof FitError) skipped.set(df, r.message);
      else fits.set(df, r);
    }
  } else {
    for (const df of dfs) {
      if (progress?.cancelled()) throw new CancelledError();
      try {
        fits.set(df, fitCurve(prepared, { family, df, ...modelSpec }));
      } catch (e) {
        if (!(e instanceof FitError)) throw e;
        skipped.set(df, e.message);
      }
      progress?.report(0, 1, `fitted df ${df} to all rows`);
    }
  }
  const fitted = dfs.filter((df) => fits.has(df));
  const errors = new Map<number, CandidateResult['errors']>();
  const notes: string[] = [];
  const count = resampleCount(resample);
  if ((resample.kind === 'boot' || resample.kind === 'cv') && fitted.length > 0) {
    const problem: ResampleProblem = {
      x: prepared.data.x,
      y: prepared.data.y,
      w: prepared.data.w,
      family,
      dfs: fitted,
      lambdas: family === 'smooth' ? fitted.map((df) => (fits.get(df) as FitResult).lambda as number) : undefined,
      resample,
      seed,
      order: orderByX(prepared.data.x),
      ...(plain ? {} : { model: modelSpec }),
    };
    const perResample = await runner.run(problem, count, progress);
    const C = fitted.length;
    fitted.forEach((df, k) => {
      const pick = (offset: number): Float64Array => Float64Array.from(perResample, (e) => e[offset * C + k] as number);
      const rmse = summarise(pick(0));
      const failed = count - rmse.count;
      if (failed > MAX_FAILED_SHARE * count) {
        skipped.set(df, `the resampled training rows could not determine the curve in ${failed} of ${count} resamples (too few distinct x between knots)`);
        return;
      }
      if (failed > 0) notes.push(`df ${df}: ${failed} of ${count} resamples could not be fitted and were left out of its mean error.`);
      errors.set(df, { rmse: strip(rmse), mae: strip(summarise(pick(1))), maxAbs: strip(summarise(pick(2))), ...(glm ? { deviance: strip(summarise(pick(3))) } : {}) });
    });
  } else if (resample.kind === 'loo') {
    for (const df of fitted) errors.set(df, leaveOneOutErrors(prepared, fits.get(df) as FitResult));
  } else if (resample.kind === 'gcv') {
    for (const df of fitted) errors.set(df, { gcv: { mean: (fits.get(df) as FitResult).gcv, se: NaN, values: [] } });
  }
  const candidates: CandidateResult[] = dfs.map((df) => {
    const reason = skipped.get(df);
    const fit = fits.get(df);
    if (reason !== undefined || !fit) return { df, skipped: reason ?? 'not fitted', errors: {} };
    return { df, errors: errors.get(df) ?? {}, aic: fit.aic, aicc: fit.aicc, bic: fit.bic };
  });
  for (const df of skipped.keys()) fits.delete(df);
  const selected = selectDf(candidates, rule, metric);
  return { result: { family, resample, seed, metric, candidates, selected, notes }, fits };
}

function strip(s: ErrorSummary & { count: number }): ErrorSummary {
  return { mean: s.mean, se: s.se, values: s.values };
}

/**
 * Exact leave-one-out errors from the hat diagonal, e_i = r_i / (1 - h_i). RMSE mean is the
 * exact LOO RMSE; its SE follows from the SE of the mean squared error by the delta method,
 * se(sqrt(m)) = se(m) / (2 sqrt(m)); MAE has SD / sqrt(n); the maximum has no SE.
 */
function leaveOneOutErrors(prepared: PreparedData, fit: FitResult): CandidateResult['errors'] {
  const n = fit.n;
  const w = prepared.data.w;
  const sq = new Float64Array(n);
  const abs = new Float64Array(n);
  let sw = 0;
  let max = 0;
  for (let i = 0; i < n; i++) {
    const h = fit.leverage[i] as number;
    const e = (fit.residuals[i] as number) / (1 - h);
    const wi = w ? (w[i] as number) : 1;
    sw += wi;
    sq[i] = wi * e * e;
    abs[i] = wi * Math.abs(e);
    if (Math.abs(e) > max) max = Math.abs(e);
  }
  const scale = n / sw;
  const ms = summarise(sq, false);
  const ma = summarise(abs, false);
  const mse = ms.mean * scale;
  return {
    rmse: { mean: fit.looRmse, se: (ms.se * scale) / (2 * Math.sqrt(mse)), values: [] },
    mae: { mean: ma.mean * scale, se: ma.se * scale, values: [] },
    maxAbs: { mean: max, se: NaN, values: [] },
  };
}
