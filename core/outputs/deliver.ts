/**
 * Everything a fit writes, as text: the curve table, the emitted code, the review report
 * with its figures, and the fit record that lists them all. Pure (file names and texts
 * only); the command line writes them (core/node/outputs.ts) and `knotwise check` rebuilds
 * them to compare (core/node/check.ts), so both go through this one function.
 */
import type { Analysis, Diagnostics } from '../analysis/types';
import { emitName, emitText, type EmitInput } from '../emit/index';
import { printedValue } from '../emit/common';
import type { Selection } from '../ingest/select';
import { fitCommand, type FitPlan, type OutputOptions } from './plan';
import { CAUTION, fitRecord, type OutputEntry, type OutputKind, type TableSummary } from './record';
import { reportFigures } from '../report/figures';
import { reportMarkdown } from '../report/markdown';
import { resolveGrid, type ResolvedGrid } from '../table/autoStep';
import { shapeTable } from '../table/columns';
import { curveTable, type CurveTable } from '../table/curveTable';
import { curveTableCsv } from '../table/formatCsv';
import { checkInRange, formatGrid, type GridSpec } from '../table/grid';
import { interpolationError } from '../table/interpolation';
import { sig } from '../tune/format';
import { sortedCopy } from '../stats/orderByX';
import type { FitResult, XYData } from '../types';
import { curveWords } from '../registry/curves/index';
import { buildInverse, inverseWords, type InverseOutput } from '../calibrate/inverseOutput';
import { inverseTableCsv } from '../calibrate/inverseCsv';
import { curveSample, driftFromRecord, type Drift } from '../calibrate/drift';
import { baselineWords, chooseBaseline } from '../calibrate/baseline';
import { reportDriftFigure } from '../report/figures';

/** Above this many rows the interpolation error of a given (not automatic) grid is not computed. */
export const INTERPOLATION_CHECK_LIMIT = 200_000;
/** x values listed in a warning before "...". */
const WARN_LIST = 5;

/** What buildDeliverables needs. */
export interface DeliverInput {
  readonly plan: FitPlan;
  /** Base of the output names: the data file's name without its extension. */
  readonly stem: string;
  /** The data file's name (no folder). */
  readonly dataFile: string;
  /** The data file relative to the output folder, `/`-separated. */
  readonly dataPath: string;
  readonly dataSha256: string;
  readonly rowsRead: number;
  /** All usable rows of the CSV and the rejected ones. */
  readonly selection: Pick<Selection, 'data' | 'rejected' | 'labels'>;
  /** The rows the fit used (all of selection.data unless rows were held out). */
  readonly fitted: XYData;
  readonly analysis?: Analysis | undefined;
  readonly fit: FitResult;
  readonly diagnostics: Diagnostics;
  /** SHA-256 (hex) of a text's UTF-8 bytes. */
  readonly sha256: (text: string) => string;
  /**
   * File names of the table and the record; default `<stem>.curve.csv` and `<stem>.fit.json`,
   * the command line's (the editor lets them be renamed). The record lists the table by this name.
   */
  readonly names?: { readonly table: string; readonly record: string } | undefined;
  /**
   * The fit record this run replaces, parsed (the record of the same name in the output
   * folder), or undefined. Its curve sample becomes the new record's baseline, against which
   * the drift is measured (core/calibrate/baseline.ts).
   */
  readonly previous?: unknown;
  /**
   * For data streamed from the file in passes (core/node/streamPipeline.ts), whose
   * `selection.data` and `fitted` hold no rows: the rows used, the x range [min, max] (what
   * the grids other than the data's x read), and the readings below zero (count, first line).
   */
  readonly rows?: { readonly used: number; readonly range: Float64Array; readonly negative: { readonly count: number; readonly line: number } } | undefined;
}

/** One file to write. */
export interface OutputFile {
  readonly kind: OutputKind | 'table' | 'record';
  readonly name: string;
  readonly text: string;
}

/** The outputs of one fit. */
export interface Deliverables {
  /** The table as written (its column set). */
  readonly table: CurveTable;
  readonly grid: ResolvedGrid;
  readonly summary: TableSummary;
  /** Table first, record last, the rest between. */
  readonly files: readonly OutputFile[];
  readonly record: Record<string, unknown>;
  /** Warnings about the table (extrapolated rows, negative values, added columns), then the residual checks'. */
  readonly warnings: readonly string[];
  readonly regenerate: string;
  /** The inverse table, when asked for. */
  readonly inverse?: InverseOutput | undefined;
  /** The drift against the baseline (the curve the record replaced), when there is one. */
  readonly drift: Drift | null;
}

/** Step of a uniform grid, else undefined. */
export function uniformStep(spec: GridSpec, points: Float64Array): number | undefined {
  if (spec.kind === 'step') return spec.step;
  if (spec.kind === 'count' && points.length > 1) return (spec.stop - spec.start) / (spec.count - 1);
  return undefined;
}

/** What codeAndInverseFiles gives: the files in writing order, and the inverse table when asked for. */
export interface CodeAndInverse {
  readonly files: OutputFile[];
  readonly inverse: InverseOutput | undefined;
  /** The inverse table's file name (`<stem>.inverse.csv`), written only with `inverse`. */
  readonly inverseName: string;
}

/**
 * The files after a curve table: its emitted code (`--emit`), then, when asked for, the
 * inverse table (reading to quantity) and its code, all named from `emitInput.stem`. One
 * fit's outputs and each group's of a grouped fit are built by it. Throws InputError as
 * buildInverse does (a turning curve, readings beyond the curve).
 * Example: codeAndInverseFiles(fit, emitInput, { ...out, emit: ['c'] }, round).files[0].name -> 'cal.curve.h'.
 */
export function codeAndInverseFiles(fit: FitResult, emitInput: EmitInput, out: OutputOptions, round: (v: number) => number): CodeAndInverse {
  const stem = emitInput.stem;
  const files: OutputFile[] = out.emit.map((kind) => ({ kind, name: emitName(kind, stem), text: emitText(kind, emitInput) }));
  const inverse = out.inverse !== undefined ? buildInverse(fit, out.inverse, round) : undefined;
  const inverseName = `${stem}.inverse.csv`;
  if (inverse) {
    files.push({ kind: 'inverse', name: inverseName, text: inverseTableCsv(inverse.table, out.digits) });
    const inverseInput: EmitInput = {
      ...emitInput,
      part: 'inverse',
      table: inverse.table,
      step: inverse.grid.auto ? inverse.grid.auto.step : uniformStep(inverse.grid.spec, inverse.grid.points),
      readingRange: inverse.summary.readingRange,
      method: inverse.summary.method,
    };
    for (const kind of out.emit) files.push({ kind, name: emitName(kind, stem, 'inverse'), text: emitText(kind, inverseInput) });
  }
  return { files, inverse, inverseName };
}

/** "x = 1, 2, 3, ..." for warnings. */
function xList(xs: readonly number[]): string {
  return `x = ${xs
    .slice(0, WARN_LIST)
    .map((v) => sig(v, 6))
    .join(', ')}${xs.length > WARN_LIST ? ', ...' : ''}`;
}

/** Warnings about the table and the declared sign of the quantity. */
function tableWarnings(input: DeliverInput, summary: TableSummary, added: readonly string[]): string[] {
  const out: string[] = [];
  const { lower, upper } = input.fit.curve;
  if (summary.extrapolated.length) {
    out.push(
      `${summary.extrapolated.length} table row(s) lie outside the data range [${sig(lower, 6)}, ${sig(upper, 6)}] and are extrapolated (${xList(summary.extrapolated)}); they are flagged in the extrapolated column.`,
    );
  }
  if (summary.negative?.length) {
    out.push(
      `The curve is below zero at ${summary.negative.length} table row(s) (${xList(summary.negative)}) although the quantity was declared non-negative; they are flagged in the negative column.`,
    );
  }
  if (input.plan.output.flagNegative) {
    const { y, lines } = input.selection.data;
    let count = 0;
    let first = -1;
    for (let i = 0; i < y.length; i++) {
      if ((y[i] as number) < 0) {
        count++;
        if (first < 0) first = i;
      }
    }
    let line = lines ? lines[first] : first + 1;
    if (input.rows) ({ count, line } = input.rows.negative);
    if (count) out.push(`${count} reading(s) are below zero although the quantity was declared non-negative (the first on line ${line}).`);
  }
  for (const c of added) out.push(`The table column ${c} was added to the columns asked for, because it flags rows.`);
  return out;
}

/**
 * Builds every output of a fit: resolves the grid (an automatic step against the fitted
 * curve), refuses points outside the data range unless extrapolation was asked for, shapes
 * the table's columns and flags, measures the linear-interpolation error of the printed
 * table, emits code, builds the report, and last the fit record with every file's SHA-256.
 * Same inputs, same bytes. Throws InputError for grid and column problems.
 * Cost: O(table rows) plus the automatic step's search and the report's O(n log n); x comes
 * sorted from the order the fit already has (sortedCopy).
 * Example: buildDeliverables(input).files.map((f) => f.name) -> ['cal.curve.csv', 'cal.curve.h', 'cal.fit.json'].
 */
export function buildDeliverables(input: DeliverInput): Deliverables {
  const { fit } = input;
  // Columns by their labels, as the record stores them (data.columns), so the plan read back
  // from the record, and every command in the outputs, is the same whichever name chose them.
  const plan: FitPlan = { ...input.plan, columns: input.selection.labels };
  const out = plan.output;
  const round = (v: number): number => printedValue(v, out.digits);
  const sorted = input.rows ? input.rows.range : sortedCopy(input.selection.data.x);
  const grid = resolveGrid(out.grid, sorted, fit.curve, round);
  const points = grid.points;
  checkInRange(points, fit.curve.lower, fit.curve.upper, out.extrapolate);
  const full = curveTable(fit, points);
  const shaped = shapeTable(full, out.columns, out.flagNegative);
  const step = grid.auto ? grid.auto.step : uniformStep(grid.spec, points);
  let interpolation: TableSummary['interpolation'] = null;
  if (grid.auto) interpolation = { maxError: grid.auto.maxError, at: grid.auto.at, tolerance: grid.auto.tolerance, step: grid.auto.step };
  else if (points.length >= 2 && points.length <= INTERPOLATION_CHECK_LIMIT) {
    const fitAt = full.columns.indexOf('fit');
    const nx = Float64Array.from(points, round);
    const ny = Float64Array.from(full.rows, (r) => round(r[fitAt] as number));
    const e = interpolationError((x) => fit.curve.value(x), nx, ny);
    interpolation = { ...e, tolerance: null, step: step ?? null };
  }
  const extAt = full.columns.indexOf('extrapolated');
  const fitAt = full.columns.indexOf('fit');
  const summary: TableSummary = {
    columns: shaped.table.columns,
    points: points.length,
    grid: grid.spec,
    range: [points[0] as number, points[points.length - 1] as number],
    interpolation,
    extrapolated: full.rows.filter((r) => r[extAt] === 1).map((r) => r[0] as number),
    negative: out.flagNegative ? full.rows.filter((r) => (r[fitAt] as number) < 0).map((r) => r[0] as number) : null,
  };
  const warnings = [...tableWarnings(input, summary, shaped.added), ...input.diagnostics.warnings, ...(input.analysis?.tune.holdout?.warning ? [input.analysis.tune.holdout.warning] : [])];
  const regenerate = fitCommand(plan, input.dataPath);
  const names = { table: input.names?.table ?? `${input.stem}.curve.csv`, record: input.names?.record ?? `${input.stem}.fit.json`, report: `${input.stem}.report.md` };
  const files: OutputFile[] = [{ kind: 'table', name: names.table, text: curveTableCsv(shaped.table, out.digits) }];
  const code = codeAndInverseFiles(
    fit,
    {
      stem: input.stem,
      table: shaped.table,
      digits: out.digits,
      source: { file: input.dataFile, sha256: input.dataSha256 },
      curve: `${curveWords(fit.kind)}, df ${sig(fit.df, 4)}`,
      labels: input.selection.labels,
      dataRange: [fit.curve.lower, fit.curve.upper],
      step,
      recordFile: names.record,
      regenerate,
      caution: CAUTION,
    },
    out,
    round,
  );
  files.push(...code.files);
  const { inverse, inverseName } = code;
  // The curve this record replaces, and how far the new one moved from it.
  const sample = curveSample(fit);
  const baseline = chooseBaseline(input.previous, sample);
  const drift = baseline ? driftFromRecord(baseline.sample, fit) : null;
  if (out.report) {
    const driftFigure = drift && baseline ? reportDriftFigure(input.stem, baseline.sample, sample, drift, input.selection.labels) : undefined;
    const figures = reportFigures({
      stem: input.stem,
      fitted: input.fitted,
      fit,
      analysis: input.analysis,
      diagnostics: input.diagnostics,
      xLabel: input.selection.labels.x,
      yLabel: input.selection.labels.y,
      tableRange: summary.range,
    });
    const markdown = reportMarkdown({
      dataFile: input.dataFile,
      dataSha256: input.dataSha256,
      labels: input.selection.labels,
      rowsRead: input.rowsRead,
      rowsUsed: input.rows?.used ?? input.selection.data.x.length,
      rejected: input.selection.rejected,
      fit,
      analysis: input.analysis,
      diagnostics: input.diagnostics,
      table: { ...summary, file: names.table, digits: out.digits, gridText: out.grid ? formatGrid(out.grid) : `${formatGrid(grid.spec)} (default)` },
      figures,
      warnings,
      recordFile: names.record,
      regenerate,
      emitted: [...out.emit.map((k) => emitName(k, input.stem)), ...(inverse ? out.emit.map((k) => emitName(k, input.stem, 'inverse')) : [])],
      caution: CAUTION,
      calibration: {
        inverse: inverse ? { file: inverseName, summary: inverse.summary, words: inverseWords(inverse.summary) } : undefined,
        drift: drift && baseline ? { words: drift.words, baseline: baselineWords(baseline), figure: driftFigure } : undefined,
      },
    });
    files.push({ kind: 'report', name: names.report, text: markdown }, ...figures.map((f) => ({ kind: 'figure' as const, name: f.name, text: f.svg })));
    if (driftFigure) files.push({ kind: 'figure', name: driftFigure.name, text: driftFigure.svg });
  }
  const outputs: OutputEntry[] = files
    .filter((f): f is OutputFile & { kind: OutputKind } => f.kind !== 'table' && f.kind !== 'record')
    .map((f) => ({ kind: f.kind, file: f.name, sha256: input.sha256(f.text) }));
  const record = fitRecord({
    dataFile: input.dataFile,
    dataPath: input.dataPath,
    dataSha256: input.dataSha256,
    columns: input.selection.labels,
    rowsRead: input.rowsRead,
    rowsUsed: input.rows?.used ?? input.selection.data.x.length,
    rejected: input.selection.rejected,
    curve: plan.options.kind,
    analysis: input.analysis,
    fit,
    diagnostics: input.diagnostics,
    grid: out.grid ?? grid.spec,
    digits: out.digits,
    extrapolate: out.extrapolate,
    tableFile: names.table,
    tableSha256: input.sha256((files[0] as OutputFile).text),
    plan,
    table: summary,
    outputs,
    warnings,
    calibration: {
      inverse: inverse ? { file: inverseName, sha256: input.sha256(files.find((f) => f.name === inverseName)?.text ?? ''), summary: inverse.summary } : null,
      sample,
      baseline,
      drift,
    },
  });
  files.push({ kind: 'record', name: names.record, text: JSON.stringify(record, null, 2) + '\n' });
  return { table: shaped.table, grid, summary, files, record, warnings, regenerate, inverse, drift };
}
