import { CancelledError, FitError, InputError } from '../errors';
import { fitCurve } from '../fit/index';
import type { PreparedData } from '../fit/prepared';
import { isPlainModel } from '../fit/model';
import type { CurveKindId, FitResult, ModelOptions } from '../types';
import { ERRORS_PER_CANDIDATE, ResampleEngine, type ResampleProblem } from './engine';
import { orderByX } from './plan';
import { selectDf } from './rules';
import { leaveOneOutErrors, summarise } from './summaries';
import type { CandidateResult, ErrorSummary, Metric, Progress, ResampleSpec, RuleSpec, TuneResult } from './types';
import { curveKind, resolveModel } from '../registry/curves/index';
import { resamplingScheme } from '../registry/resampling/index';

/**
 * What to tune. The ModelOptions fields (outcome, shape, robust) apply to every candidate;
 * such candidates are refitted on each resample through a trainer (core/tune/modelTrainer.ts),
 * the power-sum fast path serving plain least-squares natural splines only. A binomial
 * outcome with trials is passed as proportions with the trials as prior weights.
 */
export interface TuneOptions extends ModelOptions {
  readonly kind: CurveKindId;
  readonly candidates?: readonly number[] | undefined;
  readonly resample: ResampleSpec;
  readonly rule: RuleSpec;
  readonly seed: number;
  /** Error the rules compare; default RMSE (mean deviance for Poisson/binomial outcomes; the GCV score with `gcv` resampling). */
  readonly metric?: Metric | undefined;
  /**
   * Only the squared error of the resamples is wanted (RMSE and deviance): with an RMSE rule
   * nothing else is read (a grouped run's outputs show RMSE only), so the natural spline's
   * resamples skip the pass over the held-out rows that MAE and the largest error need, and
   * those are left out (NaN).
   */
  readonly squaredOnly?: boolean | undefined;
}

/** Runs resamples somewhere (inline, or in worker threads) and returns each resample's errors in order. */
export interface ResampleRunner {
  run(problem: ResampleProblem, count: number, progress?: Progress): Promise<Float64Array[]>;
  /** Gets ready for a large run about to come (a runner with threads starts them now); optional. */
  warm?(): void;
}

/** A larger share of failed resamples than this skips the candidate. */
const MAX_FAILED_SHARE = 0.5;
/** Default candidates of a curve kind for data with `distinct` distinct x (from the kind's registry entry). */
export function defaultCandidates(kind: CurveKindId, distinct: number): number[] {
  return curveKind(kind).defaultCandidates(distinct);
}

/** Runs every resample on this thread. */
export const inlineRunner: ResampleRunner = {
  async run(problem, count, progress) {
    const engine = new ResampleEngine(problem);
    const out: Float64Array[] = [];
    for (let r = 0; r < count; r++) {
      if (progress?.cancelled()) throw new CancelledError();
      const e = new Float64Array(engine.outputLength);
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
  const { kind, resample, rule, seed } = options;
  const n = prepared.data.x.length;
  resamplingScheme(resample).check(resample, n);
  const dfs = [...new Set(options.candidates ?? defaultCandidates(kind, prepared.distinct))].sort((a, b) => a - b);
  if (dfs.length === 0) throw new InputError('no candidate df given');
  const def = curveKind(kind);
  const model = resolveModel(kind, options);
  // Limits of a kind's model options are checked once, not once per candidate.
  def.checkModel?.(model, prepared.distinct);
  const plain = isPlainModel(options);
  const glm = model.outcome !== 'continuous';
  const scheme = resamplingScheme(resample);
  if (!plain && scheme.method === 'leverage') {
    throw new InputError('exact leave-one-out needs a plain least-squares fit; with counts or proportions, shape constraints or robust fitting use bootstrap:<resamples> or folds:<k> resampling');
  }
  const metric: Metric = options.metric ?? (scheme.method === 'fit' ? 'gcv' : glm ? 'deviance' : 'rmse');
  if (metric === 'deviance' && !glm) throw new InputError('the mean deviance is the error of counts and proportions; use rmse, mae or maxAbs here');
  if (metric === 'gcv' && scheme.method !== 'fit') throw new InputError('the GCV score is only available with gcv resampling');
  if (metric !== 'gcv' && scheme.method === 'fit') throw new InputError(`with GCV the rules compare the GCV score, not ${metric}`);
  const fits = new Map<number, FitResult>();
  const skipped = new Map<number, string>();
  const modelSpec: ModelOptions = plain ? {} : { outcome: model.outcome, shape: model.shape, robust: model.robustK !== undefined ? { k: model.robustK } : undefined };
  const count = scheme.count(resample);
  const squaredOnly = options.squaredOnly && metric === 'rmse' ? { squaredOnly: true } : {};
  const problemOf = (candidates: readonly number[], extra: Partial<ResampleProblem>): ResampleProblem => ({
    x: prepared.data.x,
    y: prepared.data.y,
    w: prepared.data.w,
    kind,
    dfs: candidates,
    resample,
    seed,
    order: orderByX(prepared.data.x),
    ...(plain ? {} : { model: modelSpec }),
    ...squaredOnly,
    ...extra,
  });
  // A kind whose resamples need only each candidate's knots starts resampling now, while
  // this thread fits every candidate to all rows (the workers would otherwise wait for it).
  const early = plain && scheme.method === 'resamples' && def.resampleKnots ? startEarly(def.resampleKnots(prepared, dfs), problemOf, runner, count, progress) : undefined;
  try {
    if (def.fitAll && plain) {
      // The kind shares work across candidates (the natural spline's power sums).
      for (const [df, r] of def.fitAll(prepared, dfs)) {
        if (r instanceof FitError) skipped.set(df, r.message);
        else fits.set(df, r);
      }
    } else {
      for (const df of dfs) {
        if (progress?.cancelled()) throw new CancelledError();
        try {
          fits.set(df, fitCurve(prepared, { kind, df, ...modelSpec }));
        } catch (e) {
          if (!(e instanceof FitError)) throw e;
          skipped.set(df, e.message);
        }
        progress?.report(0, 1, `fitted df ${df} to all rows`);
      }
    }
  } catch (e) {
    early?.abandon();
    throw e;
  }
  const fitted = dfs.filter((df) => fits.has(df));
  const errors = new Map<number, CandidateResult['errors']>();
  const notes: string[] = [];
  let scored: number[] | undefined;
  // No candidate could be fitted to all rows: nothing to wait for.
  if (fitted.length === 0) early?.abandon();
  if (scheme.method === 'resamples' && fitted.length > 0) {
    const problem = early?.problem ?? problemOf(fitted, { params: def.resampleParams?.(fitted.map((df) => fits.get(df) as FitResult)) });
    const perResample = await (early?.results ?? runner.run(problem, count, progress));
    // Columns of the candidates resampled (those started early may include one the all-row fit skipped).
    const C = problem.dfs.length;
    scored = perResample.map((e) => (e.length > ERRORS_PER_CANDIDATE * C ? (e[ERRORS_PER_CANDIDATE * C] as number) : NaN));
    fitted.forEach((df) => {
      const k = problem.dfs.indexOf(df);
      const pick = (offset: number): Float64Array => Float64Array.from(perResample, (e) => e[offset * C + k] as number);
      const rmse = summarise(pick(0));
      const failed = count - rmse.count;
      if (failed > MAX_FAILED_SHARE * count) {
        skipped.set(df, `the resampled training rows could not determine the curve in ${failed} of ${count} resamples (too few distinct x between knots)`);
        return;
      }
      if (failed > 0) notes.push(`df ${df}: ${failed} of ${count} resamples could not be fitted and were left out of its mean error.`);
      const absolute = problem.squaredOnly ? {} : { mae: strip(summarise(pick(1))), maxAbs: strip(summarise(pick(2))) };
      errors.set(df, { rmse: strip(rmse), ...absolute, ...(glm ? { deviance: strip(summarise(pick(3))) } : {}) });
    });
  } else if (scheme.method === 'leverage') {
    for (const df of fitted) errors.set(df, leaveOneOutErrors(prepared, fits.get(df) as FitResult));
  } else if (scheme.method === 'fit') {
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
  return { result: { kind, resample, seed, metric, candidates, selected, notes, ...(scored ? { scored } : {}) }, fits };
}

/**
 * Starts the resamples of the candidates whose knots can be placed (the others are left
 * out, as the all-row fit will skip them), before the all-row fits. `abandon` stops them
 * when the fits fail: the workers end at the next cancellation poll and the result is
 * dropped. Returns undefined when no candidate has knots.
 */
function startEarly(
  knots: Map<number, Float64Array | FitError>,
  problemOf: (candidates: readonly number[], extra: Partial<ResampleProblem>) => ResampleProblem,
  runner: ResampleRunner,
  count: number,
  progress: Progress | undefined,
): { problem: ResampleProblem; results: Promise<Float64Array[]>; abandon(): void } | undefined {
  const dfs = [...knots.keys()].filter((df) => !(knots.get(df) instanceof FitError));
  if (dfs.length === 0) return undefined;
  const problem = problemOf(dfs, { knots: dfs.map((df) => knots.get(df) as Float64Array) });
  let abandoned = false;
  const guarded: Progress = {
    report: (done, total, message) => progress?.report(done, total, message),
    cancelled: () => abandoned || progress?.cancelled() === true,
  };
  const results = runner.run(problem, count, guarded);
  // Awaited after the fits; when they fail it is abandoned, and its rejection is no news.
  results.catch(() => undefined);
  return {
    problem,
    results,
    abandon() {
      abandoned = true;
    },
  };
}

function strip(s: ErrorSummary & { count: number }): ErrorSummary {
  return { mean: s.mean, se: s.se, values: s.values };
}
