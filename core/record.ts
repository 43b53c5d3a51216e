import type { Analysis } from './analysisTypes';
import type { Diagnostics } from './analysisTypes';
import type { RejectedRow } from './ingest/select';
import { formatResample } from './spec';
import type { GridSpec } from './table/grid';
import { ruleLabel } from './tune/format';
import type { FitResult } from './types';
import { VERSION } from './version';

/** Format name and version of the fit record (schema: schema/fit-record.schema.json). */
export const RECORD_FORMAT = 'knotwise-fit-record';
export const RECORD_VERSION = 1;

/** What the fit record is built from. */
export interface RecordInput {
  readonly dataFile: string;
  readonly dataSha256: string;
  readonly columns: { readonly x: string; readonly y: string; readonly weights?: string | undefined };
  readonly rowsRead: number;
  readonly rowsUsed: number;
  readonly rejected: readonly RejectedRow[];
  readonly family: string;
  readonly analysis?: Analysis | undefined;
  readonly fit: FitResult;
  readonly diagnostics: Diagnostics;
  readonly grid: GridSpec;
  readonly digits: number;
  readonly extrapolate: boolean;
  readonly tableFile: string;
  readonly tableSha256: string;
}

const num = (v: number): number | null => (Number.isFinite(v) ? v : null);

/**
 * The fit record: everything needed to rebuild and audit the curve table (data file and its
 * SHA-256, columns, rows used and rejected, the full spec, knots, coefficients, the chosen
 * df and why, candidate errors, diagnostics summary, tool version). Keys are emitted in a
 * fixed order, so the same inputs give the same bytes.
 */
export function fitRecord(input: RecordInput): Record<string, unknown> {
  const a = input.analysis;
  const f = input.fit;
  return {
    format: RECORD_FORMAT,
    version: RECORD_VERSION,
    tool: { name: 'knotwise', version: VERSION },
    data: {
      file: input.dataFile,
      sha256: input.dataSha256,
      columns: input.columns,
      rowsRead: input.rowsRead,
      rowsUsed: input.rowsUsed,
      rejected: input.rejected.map((r) => ({ line: r.line, column: r.column, reason: r.reason })),
    },
    spec: {
      family: input.family,
      candidates: a ? a.tune.candidates.map((c) => c.df) : [f.df],
      resample: a ? formatResample(a.tune.resample) : null,
      seed: a ? a.tune.seed : null,
      rule: a ? ruleLabel(a.tune.selected.rule) : `df:${f.df}`,
      holdout: a?.options.holdout ?? null,
      grid: input.grid,
      digits: input.digits,
      extrapolate: input.extrapolate,
    },
    fit: {
      family: f.family,
      df: f.df,
      knots: Array.from(f.knots),
      coefficients: Array.from(f.coefficients, num),
      lambda: f.lambda ?? null,
      sigma: num(f.sigma),
      r2: num(f.r2),
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
          rule: ruleLabel(a.tune.selected.rule),
          metric: a.tune.selected.metric,
          reason: a.tune.selected.reason,
          candidates: a.tune.candidates.map((c) =>
            c.skipped !== undefined
              ? { df: c.df, skipped: c.skipped }
              : { df: c.df, ...Object.fromEntries(Object.entries(c.errors).map(([k, e]) => [k, { mean: num(e.mean), se: num(e.se) }])) },
          ),
          holdout: a.tune.holdout ?? null,
        }
      : null,
    diagnostics: {
      shapiroWilk: input.diagnostics.shapiroWilk ?? null,
      durbinWatson: input.diagnostics.durbinWatson ?? null,
      breuschPagan: input.diagnostics.breuschPagan ?? null,
      lackOfFit: input.diagnostics.lackOfFit ?? null,
      influentialRows: input.diagnostics.influential.rows.map((r) => r.line),
      warnings: input.diagnostics.warnings,
    },
    table: { file: input.tableFile, sha256: input.tableSha256 },
    caution: CAUTION,
  };
}

/** The short caution every deliverable carries. */
export const CAUTION =
  'An empirical fit is not a certified calibration. Where this table feeds safety-related equipment or decisions, its use must follow the applicable standards and be reviewed by qualified people.';
