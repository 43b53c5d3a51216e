import type { Analysis, AnalysisOptions, Diagnostics } from './types';
import { diagnose, diagnoseAside } from './diagnose';
import type { ChecksAside } from './designSums';
import { InputError } from '../errors';
import { prepareData } from '../fit/prepared';
import { holdoutMask, orderByX } from '../tune/plan';
import { sig } from '../tune/format';
import { selectDf } from '../tune/rules';
import { inlineRunner, type ResampleRunner, tuneCurve } from '../tune/tune';
import type { HoldoutReport, Progress, RuleSpec } from '../tune/types';
import type { FitResult, XYData } from '../types';

/** Held-out RMSE above this multiple of the resampled estimate gets a warning (a Knotwise default). */
export const HOLDOUT_WARN_RATIO = 1.25;

/**
 * One whole analysis: optional stratified held-out split, tuning of the df by resampling,
 * the chosen fit with its diagnostics, and the held-out check used once at the end.
 * `runner` decides where resamples run (inline, or worker threads from core/node/pool).
 * `checks`: 'when-read' leaves the chosen fit's residual checks (diagnostics, O(n log n))
 * until `diagnostics` is first read, so that the editor can show the curve before them; a
 * ChecksAside runs them now with the design tests' sums on the thread it lends
 * (diagnoseAside: the same checks, sooner on two threads).
 * Example: await analyse({ x, y }, { family: 'natural-spline', resample: { kind: 'folds', folds: 10, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1 }).
 */
export async function analyse(
  data: XYData,
  options: AnalysisOptions,
  runner: ResampleRunner = inlineRunner,
  progress?: Progress,
  checks: 'now' | 'when-read' | ChecksAside = 'now',
): Promise<Analysis> {
  const split = options.holdout ? splitHoldout(data, options.holdout, options.seed) : undefined;
  const tuning = split ? split.train : data;
  const prepared = prepareData(tuning);
  const { result, fits } = await tuneCurve(
    prepared,
    {
      kind: options.kind,
      candidates: options.candidates,
      resample: options.resample,
      rule: options.rule,
      seed: options.seed,
      outcome: options.outcome,
      shape: options.shape,
      robust: options.robust,
      squaredOnly: options.squaredOnly,
    },
    runner,
    progress,
  );
  const chosen = fits.get(result.selected.df) as FitResult;
  const holdout = split ? holdoutReport(chosen, split.test, options.holdout as number, resampledRmse(result.candidates, chosen)) : undefined;
  const tuned = { options, n: prepared.data.x.length, data: tuning, ...(split ? { heldOut: split.test } : {}), tune: holdout ? { ...result, holdout } : result, fits, chosen };
  if (checks === 'now') return { ...tuned, diagnostics: diagnose(tuning, chosen) };
  if (checks !== 'when-read') return { ...tuned, diagnostics: await diagnoseAside(tuning, chosen, checks) };
  // Run on first read, once: whoever reads them first (the panel's details, a save) waits for them.
  let diagnostics: Diagnostics | undefined;
  return Object.defineProperty(tuned as Omit<Analysis, 'diagnostics'> & { diagnostics?: Diagnostics }, 'diagnostics', {
    enumerable: true,
    get: () => (diagnostics ??= diagnose(tuning, chosen)),
  }) as Analysis;
}

/** The resampled RMSE of a fit's candidate, else its exact leave-one-out RMSE. */
function resampledRmse(candidates: Analysis['tune']['candidates'], fit: FitResult): number {
  return candidates.find((c) => c.df === fit.df)?.errors.rmse?.mean ?? fit.looRmse;
}

/**
 * The analysis as analyse would have returned it with `rule` instead of options.rule: the
 * rule's selection among the same candidates, its fit as `chosen`, that fit's residual
 * checks (`diagnostics` when given, e.g. from a cache, else diagnose) and the held-out
 * check redone for it. Returns `analysis` itself when the rule chooses as before. Throws
 * InputError when the rule cannot choose (e.g. a df by hand that is no candidate).
 * Cost: none when the df is unchanged, else diagnose's O(n log n) and the held-out rows.
 * Example: withRule(analysis, { kind: 'least-error' }).chosen.df.
 */
export function withRule(analysis: Analysis, rule: RuleSpec, diagnostics?: Diagnostics): Analysis {
  const selected = selectDf(analysis.tune.candidates, rule, analysis.tune.metric);
  const options = { ...analysis.options, rule };
  if (selected.df === analysis.chosen.df) {
    if (JSON.stringify(rule) === JSON.stringify(analysis.tune.selected.rule)) return analysis;
    return { ...analysis, options, tune: { ...analysis.tune, selected } };
  }
  const chosen = analysis.fits.get(selected.df);
  if (!chosen) throw new InputError(`df ${selected.df} has no fitted curve`);
  const checks = diagnostics ?? diagnose(analysis.data, chosen);
  const { holdout: _old, ...tune } = analysis.tune;
  const fraction = analysis.options.holdout;
  const holdout = analysis.heldOut && fraction ? holdoutReport(chosen, analysis.heldOut, fraction, resampledRmse(tune.candidates, chosen)) : undefined;
  return { ...analysis, options, tune: { ...tune, selected, ...(holdout ? { holdout } : {}) }, chosen, diagnostics: checks };
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
    ? {
        ...report,
        warning: `The held-out RMSE ${sig(rmse)} is more than ${HOLDOUT_WARN_RATIO}x the resampled estimate ${sig(resampledRmse)}: the tuning may be optimistic, or the held-out rows differ from the rest.`,
      }
    : report;
}
