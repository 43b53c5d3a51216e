import type { Analysis, Diagnostics } from '../analysis/types';
import type { RejectedRow } from '../ingest/select';
import { DEFAULT_OUTPUT, fitCommand, type FitPlan } from './plan';
import type { TableColumn } from '../table/curveTable';
import type { GridSpec } from '../table/grid';
import type { FitResult } from '../types';
import { RESAMPLING_VERSION, VERSION } from '../version';
import { CAUTION } from '../words/caution';

export { CAUTION };
import { formatResampling } from '../registry/resampling/index';
import { formatRule } from '../registry/rules/index';
import type { InverseSpec } from '../calibrate/spec';
import type { InverseSummary } from '../calibrate/inverseOutput';
import { curveSample, driftJson, type CurveSample, type Drift } from '../calibrate/drift';
import type { Baseline } from '../calibrate/baseline';

/** spec.inverse: the inverse table as asked for, or null. */
export function inverseSpecRecord(spec: InverseSpec | undefined): Record<string, unknown> | null {
  if (!spec) return null;
  return { grid: spec.grid ?? null, readingsAveraged: spec.readingsAveraged, referenceUncertainty: spec.referenceUncertainty, maxIntervalWidth: spec.maxWidth ?? null };
}

/** The fit's curve sample, or null for a curve without an x range to sample. */
function sampleOrNull(f: FitResult): CurveSample | null {
  try {
    return curveSample(f);
  } catch {
    return null;
  }
}

/** Format name and version of the fit record (schema: schema/fit-record.schema.json). */
export const RECORD_FORMAT = 'knotwise-fit-record';
export const RECORD_VERSION = 3;

/** What the fit record is built from. */
export interface RecordInput {
  readonly dataFile: string;
  readonly dataSha256: string;
  readonly columns: { readonly x: string; readonly y: string; readonly weights?: string | undefined };
  readonly rowsRead: number;
  readonly rowsUsed: number;
  readonly rejected: readonly RejectedRow[];
  /** Curve kind id (core/registry/curves/). */
  readonly curve: string;
  readonly analysis?: Analysis | undefined;
  readonly fit: FitResult;
  readonly diagnostics: Diagnostics;
  readonly grid: GridSpec;
  readonly digits: number;
  readonly extrapolate: boolean;
  readonly tableFile: string;
  readonly tableSha256: string;
  /** Path of the data file relative to the record's folder, `/`-separated; default: dataFile (the record lies beside the data). */
  readonly dataPath?: string | undefined;
  /** The plan the outputs were made with (the command line passes it); default: derived from the other fields. */
  readonly plan?: FitPlan | undefined;
  /** What the table holds (the command line passes it). */
  readonly table?: TableSummary | undefined;
  /** Every other file written with the table (emitted code, report, figures). */
  readonly outputs?: readonly OutputEntry[] | undefined;
  /** Every warning shown for the run (table flags and residual checks). */
  readonly warnings?: readonly string[] | undefined;
  /** The inverse table, the curve sample, the baseline it replaced and the drift from it (core/calibrate/). */
  readonly calibration?: CalibrationRecord | undefined;
}

/** What the record keeps for calibration use. */
export interface CalibrationRecord {
  readonly inverse: { readonly file: string; readonly sha256: string; readonly summary: InverseSummary } | null;
  readonly sample: CurveSample;
  readonly baseline: Baseline | null;
  readonly drift: Drift | null;
}

/** What a written curve table holds, for the record. */
export interface TableSummary {
  readonly columns: readonly TableColumn[];
  readonly points: number;
  /** The grid evaluated (an automatic step resolved to a count grid). */
  readonly grid: GridSpec;
  /** First and last x. */
  readonly range: readonly [number, number];
  /** Largest gap between the curve and linear interpolation of the printed table, with the automatic step's tolerance and step. */
  readonly interpolation: { readonly maxError: number; readonly at: number; readonly tolerance: number | null; readonly step: number | null } | null;
  /** x of the rows outside the data range. */
  readonly extrapolated: readonly number[];
  /** x of the rows where the fit is below zero, when the quantity is declared non-negative; else null. */
  readonly negative: readonly number[] | null;
}

/** Kinds of files written beside the table and the record. */
export type OutputKind = 'c' | 'ts' | 'json' | 'report' | 'figure' | 'inverse';

/** One written file and the SHA-256 of its bytes. */
export interface OutputEntry {
  readonly kind: OutputKind;
  readonly file: string;
  readonly sha256: string;
}

/** Level of the table's confidence and prediction bands (docs/design.md, "Bands"). */
export const BAND_LEVEL = 0.95;

/** The plan of a record made without one (the editor's save): what the fields say. */
function derivedPlan(input: RecordInput): FitPlan {
  const a = input.analysis;
  const output = { ...DEFAULT_OUTPUT, grid: input.grid, digits: input.digits, extrapolate: input.extrapolate };
  if (a) return { columns: input.columns, tune: true, options: { ...a.options, candidates: a.tune.candidates.map((c) => c.df), rule: a.tune.selected.rule }, output };
  return { columns: input.columns, tune: false, options: { kind: input.fit.kind, candidates: [input.fit.df], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0 }, output };
}

const num = (v: number): number | null => (Number.isFinite(v) ? v : null);

/** An object's numbers with non-finite values as null (JSON has no NaN), other values as they are. */
function finiteFields<T extends object>(o: T | undefined): Record<string, unknown> | null {
  if (!o) return null;
  return Object.fromEntries(Object.entries(o).map(([k, v]) => [k, typeof v === 'number' ? num(v) : v]));
}

/**
 * The record's diagnostics: each test with its effect size and verdict, the dispersion of
 * counts and proportions, the drift in row order (its measure; the plot series stays in the
 * panel), whether the curve passes through every reading, every influential row with the
 * rules it breaks (the first `shown` are the ones the report and the panel list by line),
 * their CSV lines, and the warnings.
 */
function diagnosticsRecord(d: Diagnostics): Record<string, unknown> {
  const inf = d.influential;
  const row = d.rowOrder;
  return {
    shapiroWilk: finiteFields(d.shapiroWilk),
    durbinWatson: finiteFields(d.durbinWatson),
    breuschPagan: finiteFields(d.breuschPagan),
    lackOfFit: finiteFields(d.lackOfFit),
    dispersion: finiteFields(d.dispersion),
    rowOrder: row ? { lag1: num(row.lag1), runs: finiteFields(row.runs), sameAsX: row.sameAsX, sizeMatters: row.sizeMatters, flagged: row.flagged } : null,
    exactFit: finiteFields(d.exactFit),
    influence: {
      thresholds: inf.thresholds.map((t) => ({ rule: t.rule, measure: t.measure, value: num(t.value), source: t.source })),
      total: inf.total,
      shown: inf.shown,
      rows: inf.rows.map((r) => ({ line: r.line, leverage: num(r.leverage), cooksDistance: num(r.cooksDistance), studentized: num(r.studentized), exceeds: r.exceeds })),
    },
    influentialRows: inf.rows.map((r) => r.line),
    warnings: d.warnings,
  };
}

/**
 * The fit record: everything needed to rebuild and audit the curve table (data file and its
 * SHA-256, columns, rows used and rejected, the full spec, knots, coefficients, the chosen
 * df and why, candidate errors, diagnostics summary, tool version). Keys are emitted in a
 * fixed order, so the same inputs give the same bytes.
 */
export function fitRecord(input: RecordInput): Record<string, unknown> {
  const a = input.analysis;
  const f = input.fit;
  const plan = input.plan ?? derivedPlan(input);
  const dataPath = input.dataPath ?? input.dataFile;
  const rule = a ? a.tune.selected.rule : undefined;
  const t = input.table;
  // The df asked for (a smoothing spline's achieved trace differs from it in the last digits).
  const askedDf = a ? f.df : (plan.options.candidates?.[0] ?? f.df);
  const c = input.calibration;
  return {
    format: RECORD_FORMAT,
    version: RECORD_VERSION,
    tool: { name: 'knotwise', version: VERSION, resampling: RESAMPLING_VERSION },
    data: {
      file: input.dataFile,
      path: dataPath,
      sha256: input.dataSha256,
      columns: input.columns,
      rowsRead: input.rowsRead,
      rowsUsed: input.rowsUsed,
      rejected: input.rejected.map((r) => ({ line: r.line, column: r.column, reason: r.reason })),
    },
    spec: {
      curve: input.curve,
      tuned: a !== undefined,
      candidates: a ? a.tune.candidates.map((c) => c.df) : [askedDf],
      candidatesDefault: a !== undefined && plan.options.candidates === undefined,
      resampling: a ? formatResampling(a.tune.resample) : null,
      seed: a ? a.tune.seed : null,
      rule: rule ? formatRule(rule) : `pick:${askedDf}`,
      tolerancePercent: rule?.kind === 'simplest-within' ? rule.percent : null,
      holdout: a?.options.holdout ?? null,
      grid: plan.output.grid ?? input.grid,
      gridDefault: plan.output.grid === undefined,
      digits: input.digits,
      extrapolate: input.extrapolate,
      columns: plan.output.columns ?? null,
      flagNegative: plan.output.flagNegative,
      emit: plan.output.emit,
      report: plan.output.report,
      inverse: inverseSpecRecord(plan.output.inverse),
      level: BAND_LEVEL,
      // Outcome family, shapes, robust fitting and trials column exactly as asked (read back by core/outputs/recordPlan.ts).
      model: {
        outcome: plan.options.outcome ?? null,
        shape: plan.options.shape ?? [],
        robust: plan.options.robust === true ? true : plan.options.robust ? { k: plan.options.robust.k } : null,
        trials: plan.trials ?? null,
      },
      // Only when a budget was given: records of runs at the default keep their bytes.
      ...(plan.memoryBudget !== undefined ? { memoryBudget: plan.memoryBudget } : {}),
    },
    fit: {
      curve: f.kind,
      df: f.df,
      knots: Array.from(f.knots),
      coefficients: Array.from(f.coefficients, num),
      lambda: f.lambda ?? null,
      residualSd: num(f.sigma),
      r2: f.model?.glm ? null : num(f.r2),
      devianceExplained: f.model?.glm ? num(f.r2) : null,
      aic: num(f.aic),
      bic: num(f.bic),
      looRmse: num(f.looRmse),
      gcv: num(f.gcv),
      range: [f.curve.lower, f.curve.upper],
      notes: f.notes,
    },
    selection: a
      ? {
          df: a.tune.selected.df,
          rule: formatRule(a.tune.selected.rule),
          metric: a.tune.selected.metric,
          reason: a.tune.selected.reason,
          candidates: a.tune.candidates.map((c) =>
            c.skipped !== undefined ? { df: c.df, skipped: c.skipped } : { df: c.df, ...Object.fromEntries(Object.entries(c.errors).map(([k, e]) => [k, { mean: num(e.mean), se: num(e.se) }])) },
          ),
          holdout: a.tune.holdout ?? null,
          edge: a.tune.selected.edge ?? null,
        }
      : null,
    diagnostics: diagnosticsRecord(input.diagnostics),
    table: {
      file: input.tableFile,
      sha256: input.tableSha256,
      columns: t ? t.columns : null,
      points: t ? t.points : null,
      grid: t ? t.grid : null,
      range: t ? t.range : null,
      interpolation: t ? t.interpolation : null,
      extrapolated: t ? t.extrapolated : null,
      negative: t ? t.negative : null,
    },
    inverse: c?.inverse ? { file: c.inverse.file, sha256: c.inverse.sha256, ...finiteFields(c.inverse.summary) } : null,
    curveSample: c ? c.sample : sampleOrNull(f),
    baseline: c?.baseline ?? null,
    drift: c?.drift ? driftJson(c.drift) : null,
    outputs: input.outputs ?? [],
    warnings: input.warnings ?? input.diagnostics.warnings,
    regenerate: fitCommand(plan, dataPath),
    caution: CAUTION,
  };
}
