import type { Analysis, AnalysisOptions } from './analysisTypes';
import { diagnose } from './diagnose';
import { prepareData } from './fit/prepared';
import { holdoutMask, orderByX } from './tune/plan';
import { sig } from './tune/format';
import { inlineRunner, type ResampleRunner, tuneCurve } from './tune/tune';
import type { HoldoutReport, Progress } from './tune/types';
import type { FitResult, XYData } from './types';

/** Held-out RMSE above this multiple of the resampled estimate gets a warning (a Knotwise default). */
export const HOLDOUT_WARN_RATIO = 1.25;

/**
 * One whole analysis: optional stratified held-out split, tuning of the df by resampling,
 * the chosen fit with its diagnostics, and the held-out check used once at the end.
 * `runner` decides where resamples run (inline, or worker threads from core/node/pool).
 * Example: await analyse({ x, y }, { family: 'natural', resample: { kind: 'cv', folds: 10, repeats: 1 }, rule: { kind: '1se' }, seed: 1 }).
 */
export async function analyse(data: XYData, options: AnalysisOptions, runner: ResampleRunner = inlineRunner, progress?: Progress): Promise<Analysis> {
  const split = options.holdout ? splitHoldout(data, options.holdout, options.seed) : undefined;
  const tuning = split ? split.train : data;
  const prepared = prepareData(tuning);
  const { result, fits } = await tuneCurve(
    prepared,
    { family: options.family, candidates: options.candidates, resample: options.resample, rule: options.rule, seed: options.seed, outcome: options.outcome, shape: options.shape, robust: options.robust },
    runner,
    progress,
  );
  const chosen = fits.get(result.selected.df) as FitResult;
  const diagnostics = diagnose(tuning, chosen);
  const holdout = split ? holdoutReport(chosen, split.test, options.holdout as number, result.candidates.find((c) => c.df === chosen.df)?.errors.rmse?.mean ?? chosen.looRmse) : undefined;
  return { options, n: prepared.data.x.length, data: tuning, tune: holdout ? { ...result, holdout } : result, fits, chosen, diagnostics };
}

function subset(data: XYData, keep: (i: number) => boolean): XYData {
  const idx: number[] = [];
  for (let i = 0; i < data.x.length; i++) if (keep(i)) idx.push(i);
  const pick = (a: Float64Array): Float64Array => Float64Array.from(idx, (i) => a[i] as number);
  return {
    x: pick(data.x),
    y: pick(data.y),
    w: data.w ? pick(data.w) : undefined,
    lines: data.lines ? Int32Array.from(idx, (i) => (data.lines as Int32Array)[i] as number) : undefined,
  };
}

function splitHoldout(data: XYData, fraction: number, seed: number): { train: XYData; test: XYData } {
  const mask = holdoutMask(orderByX(data.x), fraction, seed);
  return { train: subset(data, (i) => mask[i] === 0), test: subset(data, (i) => mask[i] === 1) };
}

function holdoutReport(fit: FitResult, test: XYData, fraction: number, resampledRmse: number): HoldoutReport {
  let sw = 0;
  let sse = 0;
  let sae = 0;
  let max = 0;
  for (let i = 0; i < test.x.length; i++) {
    const wi = test.w ? (test.w[i] as number) : 1;
    const e = (test.y[i] as number) - fit.curve.value(test.x[i] as number);
    sw += wi;
    sse += wi * e * e;
    sae += wi * Math.abs(e);
    max = Math.max(max, Math.abs(e));
  }
  const rmse = Math.sqrt(sse / sw);
  const report = { fraction, rows: test.x.length, rmse, mae: sae / sw, maxAbs: max, resampledRmse };
  return rmse > HOLDOUT_WARN_RATIO * resampledRmse
    ? { ...report, warning: `The held-out RMSE ${sig(rmse)} is more than ${HOLDOUT_WARN_RATIO}x the resampled estimate ${sig(resampledRmse)}: the tuning may be optimistic, or the held-out rows differ from the rest.` }
    : report;
}
