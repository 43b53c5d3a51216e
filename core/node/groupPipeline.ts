/**
 * One grouped fit from a file: read the CSV (keeping the group column's texts), split the
 * rows into groups, tune each (or one shared df), test whether one curve serves all, and
 * build every output's text. Shared by `knotwise fit --per/--channels` and `knotwise
 * check` of a group record, so both take exactly the same steps.
 */
import { InputError } from '../errors';
import { analyseGroups, type GroupAnalysis } from '../groups/analyse';
import { commonCurveFor } from '../groups/commonRun';
import { buildGroupDeliverables, type GroupDeliverables, type GroupSpec } from '../groups/deliver';
import { splitByChannels, splitByColumn, type GroupSplit } from '../groups/split';
import type { FitPlan } from '../outputs/plan';
import type { Progress } from '../tune/types';
import { sha256 } from './outputs';
import { dataSource } from './pipeline';
import { availableParallelism } from 'node:os';
import { poolRunner } from './pool';
import { readCsvFile, type FileTable } from './readCsv';

/** Everything one grouped run produced. */
export interface GroupRun {
  readonly table: FileTable;
  readonly split: GroupSplit;
  readonly analysis: GroupAnalysis;
  readonly deliverables: GroupDeliverables;
}

/**
 * Reads `file`, splits and fits as `plan` says (plan.groups set), and builds the outputs as
 * they would be written into `outFolder`. Throws InputError (with file, line and column
 * where known) for bad input. Example: (await runGroupPipeline('rig.csv', plan, 'out')).deliverables.files.
 */
export async function runGroupPipeline(file: string, plan: FitPlan & { readonly groups: GroupSpec }, outFolder: string, progress?: Progress): Promise<GroupRun> {
  const g = plan.groups;
  if (plan.trials !== undefined && g.channels !== undefined) throw new InputError('several reading columns cannot share one trials column; split the rows by a column (--per) instead');
  const table = await readCsvFile(file, g.by !== undefined ? { keepText: g.by } : {});
  const split = g.by !== undefined ? splitByColumn(table, plan.columns, g.by, file, plan.trials) : splitByChannels(table, plan.columns.x, g.channels ?? [], plan.columns.weights, file);
  // Many small groups: standing workers take one group's resamples each, while this thread
  // fits and checks the others (two groups in flight per worker keeps both busy).
  const threads = availableParallelism();
  const runner = poolRunner(threads);
  let analysis: GroupAnalysis;
  try {
    // A grouped run's outputs show each group's RMSE only: the resamples measure the squared
    // error alone (with an RMSE rule), not the mean absolute and largest errors.
    analysis = await analyseGroups(split.groups, { ...plan.options, squaredOnly: true }, g.sharedDf, runner, progress, 2 * threads);
  } finally {
    runner.close();
  }
  const common = commonCurveFor(split, analysis);
  const deliverables = buildGroupDeliverables({
    plan,
    ...dataSource(file, outFolder, table),
    labels: split.labels,
    groupLabel: split.groupLabel,
    rejected: split.rejected,
    analysis,
    common,
    sha256,
  });
  return { table, split, analysis, deliverables };
}
