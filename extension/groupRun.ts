/**
 * A grouped run in the editor: the file's rows split by the group column the person chose
 * (read again keeping that column's cell texts, as `knotwise fit --per` reads the file),
 * every group tuned, the one-curve-for-all test, and the overview the panel shows. A
 * session keeps one group on show as an ordinary run result (extension/result.ts), so the
 * panel, its details, following the data and saving work for it as for a file of its own.
 */
import type { AnalysisOptions } from '../core/analysis/types';
import { InputError } from '../core/errors';
import type { GroupAnalysis } from '../core/groups/analyse';
import type { CommonCurveJson } from '../core/groups/commonJson';
import { splitByColumn, type GroupSplit } from '../core/groups/split';
import { parseCsvText } from '../core/ingest/reader';
import type { ParsedTable } from '../core/ingest/types';
import type { GroupsView } from '../core/view/groups';
import type { ColumnChoice } from './columns';
import type { CsvSource } from './csvSource';
import type { RunResult } from './result';

/** Everything a grouped run produced, and the group on show. */
export interface GroupRunState {
  /** The run id of the whole set (the panel names the set by it). */
  readonly setId: number;
  /** The group column as chosen. */
  readonly per: string;
  /** The file read keeping the group column's texts (its row count is the record's rowsRead). */
  readonly table: ParsedTable;
  readonly split: GroupSplit;
  readonly analysis: GroupAnalysis;
  /** Does one curve serve all groups (core/groups/commonRun.ts); null when the test does not apply. */
  readonly common: CommonCurveJson | null;
  readonly view: GroupsView;
  /** The group on show: an index into `analysis.groups`. */
  readonly index: number;
}

/**
 * Splits the rows of `source` by `per` as the command line does (throws InputError for a
 * column that is missing, one of x, y or weights, or that names fewer than 2 groups).
 * A trials column or held-out rows are refused in the command line's words.
 */
export function splitRows(source: CsvSource, choice: ColumnChoice, per: string, options: AnalysisOptions, trials: string | undefined): { table: ParsedTable; split: GroupSplit } {
  if (trials !== undefined) throw new InputError('groups cannot be combined with a trials column yet');
  if (options.holdout) throw new InputError('held-out rows (knotwise.holdoutFraction) are not available with groups yet; set it to 0, or fit one group on its own for it');
  const table = parseCsvText(source.text, { file: source.fileName, keepText: per });
  const split = splitByColumn(table, { x: choice.x, y: choice.y, weights: choice.weights }, per, source.fileName);
  return { table, split };
}

/** The run result showing group `index` of `state` under run id `runId` (a new view of the same grouped run). */
export function groupRunResult(base: Pick<RunResult, 'source' | 'choice' | 'options'>, state: GroupRunState, index: number, runId: number): RunResult {
  const g = state.analysis.groups[index];
  const data = state.split.groups[index];
  if (!g || !data) throw new Error(`no group ${index} in this run`);
  const unit = (label: string | undefined): string | undefined => (label === undefined ? undefined : state.table.columns.find((c) => c.label === label)?.unit);
  const labels = state.split.labels;
  return {
    runId,
    source: base.source,
    choice: base.choice,
    columns: { data: data.data, rejected: [...state.split.rejected], labels, units: { x: unit(labels.x), y: unit(labels.y), weights: unit(labels.weights) } },
    trials: undefined,
    options: base.options,
    analysis: g.analysis,
    checks: new Map([[g.analysis.chosen.df, g.analysis.diagnostics]]),
    details: new Map(),
    recorded: 'none',
    groups: { ...state, index },
  };
}
