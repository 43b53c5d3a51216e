/**
 * Tuning every group of a file: each group is analysed exactly as a file of its own would
 * be (same options, same seed, so a group's fit equals the fit of its rows alone), and the
 * df is either each group's own choice or one df shared by all, chosen by the rule from the
 * pooled resampled error: in resample b the squared errors of every group's scored rows
 * are added, pooled RMSE_b = sqrt(sum_g SSE_gb / sum_g n_gb), and the rule sees the mean
 * and standard error of pooled RMSE_b over the resamples (docs/design.md, "Errors").
 */
import { analyse, withRule } from '../analysis/analysis';
import type { Analysis, AnalysisOptions } from '../analysis/types';
import { CancelledError, InputError } from '../errors';
import { prepareData } from '../fit/prepared';
import { resamplingScheme } from '../registry/resampling/index';
import { defaultCandidates, type ResampleRunner } from '../tune/tune';
import { selectDf } from '../tune/rules';
import { summarise } from '../tune/summaries';
import type { CandidateResult, Progress, Selection } from '../tune/types';
import type { Group } from './split';

/** One group's analysis. */
export interface GroupResult {
  readonly name: string;
  /** The group's own analysis; with a shared df, its chosen fit is the shared df's. */
  readonly analysis: Analysis;
}

/** The df shared by every group, and the pooled errors it was chosen from. */
export interface SharedDf {
  readonly candidates: readonly CandidateResult[];
  readonly selection: Selection;
}

/** Every group tuned, and the shared df when one was asked for. */
export interface GroupAnalysis {
  readonly groups: readonly GroupResult[];
  readonly shared?: SharedDf | undefined;
}

/**
 * The pooled candidates: for each df every group evaluated, RMSE per resample from the
 * groups' squared-error sums and scored rows (TuneResult.scored), then mean and SE over
 * the resamples. A df skipped in any group is skipped. O(groups x candidates x resamples).
 */
export function pooledCandidates(analyses: readonly Analysis[]): CandidateResult[] {
  const first = analyses[0];
  if (!first) return [];
  return first.tune.candidates.map((c) => {
    const skippedIn = analyses.find((a) => a.tune.candidates.find((d) => d.df === c.df)?.skipped !== undefined);
    if (skippedIn) return { df: c.df, skipped: `skipped in a group: ${skippedIn.tune.candidates.find((d) => d.df === c.df)?.skipped}`, errors: {} };
    const count = c.errors.rmse?.values.length ?? 0;
    const pooled = new Float64Array(count);
    for (let b = 0; b < count; b++) {
      let sse = 0;
      let scored = 0;
      for (const a of analyses) {
        const rmse = a.tune.candidates.find((d) => d.df === c.df)?.errors.rmse?.values[b] ?? NaN;
        const n = a.tune.scored?.[b] ?? NaN;
        sse += rmse * rmse * n;
        scored += n;
      }
      pooled[b] = Math.sqrt(sse / scored);
    }
    const s = summarise(pooled);
    return { df: c.df, errors: { rmse: { mean: s.mean, se: s.se, values: s.values } } };
  });
}

/**
 * Tunes every group with `options` (the same candidates for all when the df is shared: the
 * given ones, else the curve's default for the group with the fewest distinct x). With
 * `shared`, the rule chooses one df from the pooled candidates and every group's chosen
 * fit becomes that df's (its reason says so). `concurrency` groups are analysed at once (a
 * runner with standing workers, core/node/pool.ts poolRunner, makes that pay). Throws InputError when a shared df is asked
 * for with a resampling that has no resamples (leave-one-out, GCV: nothing to pool) or
 * with counts or proportions (the pooled error is an RMSE). Groups run one after another,
 * each on `runner`. Cost: the sum of the groups' analyses.
 * Example: (await analyseGroups(split.groups, options, true)).shared?.selection.df.
 */
export async function analyseGroups(groups: readonly Group[], options: AnalysisOptions, shared: boolean, runner?: ResampleRunner, progress?: Progress, concurrency = 1): Promise<GroupAnalysis> {
  let opts = options;
  if (shared) {
    if (resamplingScheme(options.resample).method !== 'resamples') {
      throw new InputError('a df shared by the groups is chosen from their pooled resampled errors: use bootstrap:<resamples> or folds:<k> resampling');
    }
    if (options.outcome !== undefined && options.outcome !== 'continuous') throw new InputError('a df shared by the groups is chosen from their pooled RMSE, which needs continuous readings');
    if (options.holdout) throw new InputError('a df shared by the groups cannot be combined with held-out rows');
    if (options.candidates === undefined) {
      const fewest = Math.min(...groups.map((g) => prepareData(g.data).distinct));
      opts = { ...options, candidates: defaultCandidates(options.kind, fewest) };
    }
  }
  // Up to `concurrency` groups at once: their resamples run on the runner's workers while
  // this thread fits and checks the others. Results keep the groups' order.
  const results: GroupResult[] = new Array(groups.length);
  let next = 0;
  let finished = 0;
  const one = async (i: number): Promise<void> => {
    const g = groups[i] as Group;
    try {
      results[i] = { name: g.name, analysis: await analyse(g.data, opts, runner) };
    } catch (e) {
      if (e instanceof InputError) throw new InputError(`group "${g.name}": ${e.raw}`, e.place);
      throw e;
    }
    finished++;
    progress?.report(finished, groups.length, `group ${finished} of ${groups.length} tuned`);
  };
  const lane = async (): Promise<void> => {
    while (next < groups.length) {
      if (progress?.cancelled()) throw new CancelledError();
      await one(next++);
    }
  };
  await Promise.all(Array.from({ length: Math.max(1, Math.min(concurrency, groups.length)) }, lane));
  if (!shared) return { groups: results };
  const candidates = pooledCandidates(results.map((r) => r.analysis));
  const selection = selectDf(candidates, options.rule, 'rmse');
  const reason = `One df for all ${results.length} groups, from their pooled resampled RMSE: ${selection.reason}`;
  const chosen = results.map((r) => {
    const a = withRule(r.analysis, { kind: 'pick', df: selection.df });
    return { name: r.name, analysis: { ...a, tune: { ...a.tune, selected: { ...a.tune.selected, reason } } } };
  });
  return { groups: chosen, shared: { candidates, selection: { ...selection, reason } } };
}
