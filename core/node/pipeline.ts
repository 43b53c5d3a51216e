/**
 * One fit from a file: read the CSV, choose the columns, fit or tune, and build every
 * output's text. Shared by `knotwise fit` (which then writes them) and `knotwise check`
 * (which compares them with what is on disk), so both take exactly the same steps.
 */
import { readFileSync } from 'node:fs';
import { relative, resolve, sep, basename, extname, join } from 'node:path';
import { analyse } from '../analysis/analysis';
import type { Analysis, Diagnostics } from '../analysis/types';
import { buildDeliverables, type Deliverables } from '../outputs/deliver';
import { diagnose } from '../analysis/diagnose';
import { InputError, isAllocationFailure, outOfMemory } from '../errors';
import { fitCurve } from '../fit/index';
import { selectColumns, type Selection } from '../ingest/select';
import { selectTrials } from '../ingest/trials';
import type { FitPlan } from '../outputs/plan';
import type { Progress, ResampleSpec } from '../tune/types';
import type { FitResult, XYData } from '../types';
import { sha256 } from './outputs';
import { workerRunner } from './pool';
import { readCsvBytes, readCsvFile, type FileTable } from './readCsv';
import { DEFAULT_MEMORY_BUDGET, estimatedMiB } from '../stream/budget';
import { sampleFile } from './streamFile';
import { MAX_COLUMNS } from '../ingest/header';
import { streamPipeline } from './streamPipeline';

/**
 * The memory a whole read of `file` would take, in MiB, estimated from its size and its
 * first MiB (core/stream/budget.ts), or undefined when the file cannot be examined (the
 * whole read then says why).
 */
export function wholeReadMiB(file: string): number | undefined {
  try {
    const s = sampleFile(file);
    return estimatedMiB(s.size, s.sampleBytes, s.lines, s.fields);
  } catch {
    return undefined;
  }
}

/**
 * Whether the first MiB of `file` shows a table Knotwise can read whole: at most
 * MAX_COLUMNS fields on a line of it, within the memory budget. False when it cannot be
 * examined (the read then says why). The command line starts its workers early only then,
 * so a file refused at its header costs no worker threads.
 */
export function readableWhole(file: string, budgetMiB: number): boolean {
  try {
    const s = sampleFile(file);
    return s.fields <= MAX_COLUMNS && estimatedMiB(s.size, s.sampleBytes, s.lines, s.fields) <= budgetMiB;
  } catch {
    return false;
  }
}

/** Everything one run produced. */
export interface PipelineRun {
  readonly table: FileTable;
  readonly selection: Selection;
  /** The rows the fit used (without held-out rows). */
  readonly fitted: XYData;
  readonly analysis?: Analysis | undefined;
  readonly fit: FitResult;
  readonly diagnostics: Diagnostics;
  readonly deliverables: Deliverables;
  /** Rows the fit used (`fitted` holds none when the data were streamed). */
  readonly rowsUsed: number;
  /** Present when the data were streamed from the file in passes: how many, the scheme asked for and the one used. */
  readonly streamed?: { readonly passes: number; readonly asked: ResampleSpec; readonly resample: ResampleSpec } | undefined;
}

/**
 * Errors raised while fitting know the row but not the file, and name the columns by role
 * (x, y, weights): give them the file and the CSV's own column names.
 */
export function placed(e: unknown, file: string, labels: { readonly x: string; readonly y: string; readonly weights?: string }): unknown {
  if (!(e instanceof InputError) || e.place.file !== undefined) return e;
  const role = e.place.column;
  const column = role === 'x' ? labels.x : role === 'y' ? labels.y : role === 'weights' ? labels.weights : role;
  return new InputError(e.message, { file, line: e.place.line, column });
}

/** `target` relative to `folder`, with `/` separators (so records read the same on every system). */
export function portableRelative(folder: string, target: string): string {
  return relative(resolve(folder), resolve(target)).split(sep).join('/');
}

/** Where the data came from, as the outputs name it: the file's stem and name, its path from the output folder, its SHA-256 and rows read. */
export function dataSource(file: string, outFolder: string, table: FileTable): { stem: string; dataFile: string; dataPath: string; dataSha256: string; rowsRead: number } {
  return { stem: basename(file, extname(file)), dataFile: basename(file), dataPath: portableRelative(outFolder, file), dataSha256: table.sha256, rowsRead: table.rowCount };
}

/**
 * The fit record at `path` parsed, or undefined when there is none or it is not JSON: the
 * record a new run replaces, whose curve becomes the baseline of the drift.
 */
export function readPreviousRecord(path: string): unknown {
  try {
    return JSON.parse(readFileSync(path, 'utf8')) as unknown;
  } catch {
    return undefined;
  }
}

/**
 * Reads `file`, fits as `plan` says, and builds the outputs as they would be written into
 * `outFolder` (the data path in the record and the regenerate command is relative to it).
 * `names` renames the table and the record (as the editor's output name settings do;
 * default `<name>.curve.csv` and `<name>.fit.json`). `source.bytes` are the data when they
 * come from elsewhere than the file (standard input; `file` then only names them), and
 * `source.progress` hears of the tuning's progress. `source.previous` is the parsed record
 * the outputs replace; by default the record of that name in `outFolder` is read.
 * Throws InputError (with file, line and column where known) for bad input.
 * Example: const run = await runPipeline('cal.csv', plan, 'out'); run.deliverables.files.
 */
export async function runPipeline(
  file: string,
  plan: FitPlan,
  outFolder: string,
  names?: { readonly table: string; readonly record: string },
  source: { readonly bytes?: Uint8Array | undefined; readonly progress?: Progress | undefined; readonly previous?: unknown } = {},
): Promise<PipelineRun> {
  if (source.bytes === undefined) {
    // Above the memory budget the file is streamed in passes (docs/design.md, "Streaming").
    const budget = plan.memoryBudget ?? DEFAULT_MEMORY_BUDGET;
    const need = wholeReadMiB(file);
    if (need !== undefined && need > budget) return streamPipeline(file, plan, outFolder, names, source, budget, need);
  }
  const table = source.bytes !== undefined ? readCsvBytes(source.bytes, file) : await readCsvFile(file);
  // A binomial outcome with a trials column: proportions, with the trials as weights (core/ingest/trials.ts).
  const selection = plan.trials !== undefined ? selectTrials(table, plan.columns, plan.trials, file) : selectColumns(table, plan.columns, file);
  let fit: FitResult;
  let analysis: Analysis | undefined;
  try {
    if (plan.tune) {
      // The command line's thread resamples too instead of waiting for the workers, and a worker
      // stays to sum the residual checks' design tests beside it (core/node/pool.ts).
      const runner = workerRunner(undefined, { mainThreadShare: true, lend: true });
      analysis = await analyse(selection.data, plan.options, runner, source.progress, runner);
      fit = analysis.chosen;
    } else {
      const { outcome, shape, robust } = plan.options;
      fit = fitCurve(selection.data, { kind: plan.options.kind, df: plan.options.candidates?.[0] as number, outcome, shape, robust });
    }
  } catch (e) {
    if (isAllocationFailure(e)) throw outOfMemory(selection.data.x.length, 'fitting', { file });
    throw placed(e, file, selection.labels);
  }
  // The rows the fit used: those analyse tuned (without held-out rows), else all.
  const fitted = analysis ? analysis.data : selection.data;
  const diagnostics = analysis ? analysis.diagnostics : diagnose(selection.data, fit);
  const recordName = names?.record ?? `${basename(file, extname(file))}.fit.json`;
  const deliverables = buildDeliverables({
    previous: source.previous !== undefined ? source.previous : readPreviousRecord(join(outFolder, recordName)),
    plan,
    ...dataSource(file, outFolder, table),
    selection,
    fitted,
    analysis,
    fit,
    diagnostics,
    sha256,
    names,
  });
  return { table, selection, fitted, analysis, fit, diagnostics, deliverables, rowsUsed: fitted.x.length };
}
