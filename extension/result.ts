/**
 * A finished run of one data file: the bytes it read, the columns, the options, the
 * analysis, and the residual checks and panel details computed for it (each once, on
 * demand). Also the run's summary for the commands and error texts for the person.
 */
import type { Analysis, AnalysisOptions, Diagnostics } from '../core/analysis/types';
import { diagnose } from '../core/analysis/diagnose';
import { InputError } from '../core/errors';
import type { Selection as ColumnSelection } from '../core/ingest/select';
import { resolveModel } from '../core/registry/curves/index';
import type { FitResult } from '../core/types';
import { fitDetail } from '../core/view/detail';
import type { FitDetail } from '../core/view/model';
import type { ModelSummary } from './api';
import type { ColumnChoice } from './columns';
import type { CsvSource } from './csvSource';
import type { CurveSample } from '../core/calibrate/drift';
import { recordSample } from '../core/calibrate/baseline';
import { calibrationView } from '../core/view/calibration';
import type { Settings } from './settings';
import type { GroupRunState } from './groupRun';

/** A finished run. */
export interface RunResult {
  readonly runId: number;
  readonly source: CsvSource;
  readonly choice: ColumnChoice;
  readonly columns: ColumnSelection;
  /** Binomial outcome: the trials column used. */
  readonly trials: string | undefined;
  readonly options: AnalysisOptions;
  readonly analysis: Analysis;
  /** Residual checks and panel details by df, computed once each. */
  readonly checks: Map<number, Diagnostics>;
  readonly details: Map<number, FitDetail>;
  /** The curve of the fit record beside the data when the run ended ('none': no record; 'unusable': a record without a usable curve sample). */
  recorded?: CurveSample | 'none' | 'unusable' | undefined;
  /** A grouped run: every group, and which one this result shows (its `analysis` and `columns` are that group's). */
  readonly groups?: GroupRunState | undefined;
}

/** The recorded curve of a parsed fit record, for the drift (undefined input: no record). */
export function recordedCurve(record: unknown): CurveSample | 'none' | 'unusable' {
  if (record === undefined) return 'none';
  return recordSample(record) ?? 'unusable';
}

/**
 * A df's panel details with the calibration section added (computed afresh: it follows the
 * inverse-table settings, which may change while the panel is open).
 */
export function withCalibration(r: RunResult, detail: FitDetail | undefined, settings: Settings): FitDetail | undefined {
  const fit = detail ? r.analysis.fits.get(detail.df) : undefined;
  if (!detail || !fit) return detail;
  try {
    return { ...detail, calibration: calibrationView(fit, settings.inverseOptions, settings.inverse !== undefined, r.recorded ?? 'none', r.columns.labels) };
  } catch {
    // A curve the inverse cannot handle is reported inside calibrationView; anything else leaves the details as they were.
    return detail;
  }
}

/** An error as one line for the person (an InputError in the editor's words). */
export function errorText(err: unknown): string {
  return err instanceof InputError ? err.describe('editor') : err instanceof Error ? err.message : String(err);
}

/** Residual checks of one df of a run, computed once (the chosen fit's are the analysis's own, run when first read). */
export function checksFor(r: RunResult, fit: FitResult): Diagnostics {
  let d = r.checks.get(fit.df);
  if (!d) {
    d = fit === r.analysis.chosen ? r.analysis.diagnostics : diagnose(r.analysis.data, fit);
    r.checks.set(fit.df, d);
  }
  return d;
}

/** The panel's residual details of one df of a run, computed once (undefined when df was not fitted). */
export function detailFor(r: RunResult, df: number): FitDetail | undefined {
  const cached = r.details.get(df);
  if (cached) return cached;
  const fit = r.analysis.fits.get(df);
  if (!fit) return undefined;
  const detail = fitDetail(fit, r.analysis.data, { diagnostics: checksFor(r, fit) });
  r.details.set(df, detail);
  return detail;
}

/** The model report of a fit as a RunSummary field. */
export function modelSummary(fit: FitResult, options: AnalysisOptions, trials: string | undefined): ModelSummary {
  const m = resolveModel(options.kind, options);
  const r = fit.model;
  return {
    outcome: m.outcome,
    shape: m.shape,
    ...(m.robustK !== undefined ? { robustK: m.robustK } : {}),
    ...(trials !== undefined ? { trials } : {}),
    converged: r?.converged ?? true,
    iterations: r?.iterations ?? 1,
    ...(r?.glm ? { deviance: r.glm.deviance, dispersion: r.glm.dispersion } : {}),
    ...(r?.robust ? { scale: r.robust.scale, downweightedLines: r.robust.downweighted.rows.map((d) => d.line) } : {}),
    ...(r?.constraints ? { activeConstraints: r.constraints.active } : {}),
  };
}
