/**
 * A fit plan: everything the command line was asked to do (columns, curve family, tuning,
 * table grid and format, emitters, report), and the command that does it again. The fit
 * record stores the plan, so `knotwise check` can rebuild the outputs from the data.
 */
import type { AnalysisOptions } from '../analysis/types';
import type { EmitKind } from '../emit/common';
import type { ColumnChoice } from '../ingest/select';
import { shellWord } from './shellWord';
import type { TableColumn } from '../table/curveTable';
import { DEFAULT_DIGITS } from '../table/formatCsv';
import { formatGrid, type GridSpec } from '../table/grid';
import { formatResampling } from '../registry/resampling/index';
import { formatRule } from '../registry/rules/index';
import { inverseFlags, type InverseSpec } from '../calibrate/spec';
import { groupFlags, type GroupSpec } from '../groups/spec';

/** What to write besides the fit: table grid and format, safety flags, emitters, report. */
export interface OutputOptions {
  /** Table grid; undefined: DEFAULT_GRID_COUNT points over the data range. */
  readonly grid?: GridSpec | undefined;
  readonly extrapolate: boolean;
  readonly digits: number;
  /** Table columns asked for; undefined: all. */
  readonly columns?: readonly TableColumn[] | undefined;
  /** The quantity cannot be negative: flag table rows where the curve is below zero. */
  readonly flagNegative: boolean;
  readonly emit: readonly EmitKind[];
  readonly report: boolean;
  /** Also write the inverse table (reading to quantity, with inverse-prediction intervals); undefined: not asked for. */
  readonly inverse?: InverseSpec | undefined;
}

/** Output options when nothing is asked for. */
export const DEFAULT_OUTPUT: OutputOptions = { extrapolate: false, digits: DEFAULT_DIGITS, flagNegative: false, emit: [], report: false };

/** One run of `knotwise fit`. */
export interface FitPlan {
  readonly columns: ColumnChoice;
  /** False: fit the single df in options.candidates as is; true: tune. */
  readonly tune: boolean;
  readonly options: AnalysisOptions;
  readonly output: OutputOptions;
  /** Binomial outcome: the column holding each row's number of trials (y holds the successes). */
  readonly trials?: string | undefined;
  /** Rows split into groups (by a column, or several reading columns), each tuned and fitted (core/groups/). */
  readonly groups?: GroupSpec | undefined;
  /** Memory in MiB the data may take held whole; above it the file is streamed in passes (core/stream/budget.ts). Undefined: the default. */
  readonly memoryBudget?: number | undefined;
}

/**
 * The `knotwise fit` command that carries out `plan` on the data at `dataPath` and writes
 * into the current folder (`--out .`): run it in the folder holding the outputs, with
 * `dataPath` relative to that folder. Options at their defaults are left out, except the
 * curve, resampling, rule and seed of a tuned fit, which are always spelled out.
 * Example: fitCommand(plan, '../data/cal.csv') -> "knotwise fit ../data/cal.csv --x rh --y volts --curve natural-spline --resampling folds:10 --rule one-se --seed 1 --out .".
 */
export function fitCommand(plan: FitPlan, dataPath: string): string {
  const o = plan.options;
  // A relative path that starts with '-' would read as an option: `./` keeps it a file.
  const file = dataPath.startsWith('-') ? `./${dataPath}` : dataPath;
  const w: string[] = ['knotwise', 'fit', shellWord(file), '--x', shellWord(plan.columns.x), ...(plan.groups?.channels ? [] : ['--y', shellWord(plan.columns.y)])];
  if (plan.columns.weights !== undefined) w.push('--weights', shellWord(plan.columns.weights));
  w.push('--curve', o.kind);
  // Outcome, trials, shapes, robust fitting (core/fit/model.ts).
  if (o.outcome !== undefined && o.outcome !== 'continuous') w.push('--outcome', o.outcome);
  if (plan.trials !== undefined) w.push('--trials', shellWord(plan.trials));
  if (o.shape !== undefined && o.shape.length > 0) w.push('--shape', o.shape.join(','));
  if (o.robust === true) w.push('--robust');
  else if (o.robust) w.push('--robust-k', String(o.robust.k));
  if (plan.tune) {
    if (o.candidates !== undefined) w.push('--df', o.candidates.join(','));
    w.push('--resampling', formatResampling(o.resample), '--rule', formatRule(o.rule), '--seed', String(o.seed));
    if (o.holdout) w.push('--holdout', String(o.holdout));
  } else {
    w.push('--df', String(o.candidates?.[0]));
  }
  const out = plan.output;
  if (out.grid !== undefined) w.push('--grid', shellWord(formatGrid(out.grid)));
  if (out.extrapolate) w.push('--extrapolate');
  if (out.digits !== DEFAULT_DIGITS) w.push('--digits', String(out.digits));
  if (out.columns !== undefined) w.push('--columns', out.columns.join(','));
  if (out.flagNegative) w.push('--flag-negative');
  if (out.emit.length) w.push('--emit', out.emit.join(','));
  if (out.report) w.push('--report');
  if (out.inverse !== undefined) w.push(...inverseFlags(out.inverse, shellWord));
  if (plan.groups !== undefined) w.push(...groupFlags(plan.groups, shellWord));
  if (plan.memoryBudget !== undefined) w.push('--memory-budget', String(plan.memoryBudget));
  w.push('--out', '.');
  return w.join(' ');
}
