/**
 * Everything a surface fit writes, as text: the surface table (CSV, long form), the code
 * (--emit), the review report and its heat figure (--report), and the surface record that
 * lists them with their SHA-256. Pure; the command line writes the files and `knotwise
 * check` rebuilds them to compare, both through this function.
 */
import type { RejectedRow } from '../ingest/select';
import { printedValue } from '../emit/common';
import { surfaceEmitName, surfaceEmitText, type SurfaceEmitInput } from '../emit/surface';
import { surfaceHeatSvg } from '../plots/surfaceHeat';
import { formatResampling } from '../registry/resampling/index';
import { standaloneSvg } from '../report/figureStyle';
import { formatNumber } from '../table/formatCsv';
import { formatGrid } from '../table/grid';
import { RESAMPLING_VERSION, VERSION } from '../version';
import { SURFACE_CAUTION } from '../words/caution';
import { sig } from '../words/numbers';
import { coverageOf } from './coverage';
import type { PreparedSurface } from './data';
import type { SurfaceFit } from './fit';
import { surfaceReport } from './report';
import { dfListText, formatSurfaceRule, SURFACE_RECORD_FORMAT, SURFACE_RECORD_VERSION, SURFACE_SUFFIX, surfaceCommand, type SurfacePlan } from './spec';
import { SURFACE_FLAGS, surfaceTable, type SurfaceTable } from './table';
import { resolveSurfaceGrid, type SurfaceGrid } from './tableGrid';
import type { SurfaceTuneResult } from './tune';

/** One file to write. */
export interface SurfaceOutputFile {
  readonly kind: 'table' | 'c' | 'ts' | 'json' | 'report' | 'figure' | 'record';
  readonly name: string;
  readonly text: string;
}

/** What buildSurfaceDeliverables needs. */
export interface SurfaceDeliverInput {
  readonly plan: SurfacePlan;
  readonly stem: string;
  readonly dataFile: string;
  readonly dataPath: string;
  readonly dataSha256: string;
  readonly rowsRead: number;
  readonly labels: { readonly u: string; readonly v: string; readonly y: string; readonly weights?: string };
  readonly units: { readonly u: string | undefined; readonly v: string | undefined; readonly y: string | undefined };
  readonly rejected: readonly RejectedRow[];
  readonly prepared: PreparedSurface;
  readonly tune?: SurfaceTuneResult | undefined;
  readonly fit: SurfaceFit;
  readonly sha256: (text: string) => string;
}

/** The outputs of a surface fit. */
export interface SurfaceDeliverables {
  /** The table first, the record last. */
  readonly files: readonly SurfaceOutputFile[];
  readonly record: Record<string, unknown>;
  readonly regenerate: string;
  readonly table: SurfaceTable;
  readonly grid: SurfaceGrid;
  readonly warnings: readonly string[];
}

/** The surface table as CSV: header `x,x2,fit,se,ciLower,ciUpper,piLower,piUpper,outside,far`, one line per node, x outermost; flags as 0/1. */
export function surfaceTableCsv(table: SurfaceTable, digits: number): string {
  const flag = table.columns.map((c) => SURFACE_FLAGS.includes(c));
  const lines = [table.columns.join(',')];
  for (const row of table.rows) lines.push(row.map((v, j) => (flag[j] ? String(v) : formatNumber(v, digits))).join(','));
  return lines.join('\n') + '\n';
}

const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);

/**
 * Builds every output of a surface fit: the grids (core/surface/tableGrid.ts, automatic
 * steps checked against the fit as printed), the coverage of the readings
 * (core/surface/coverage.ts), the table `<stem>.surface.csv`, the code
 * `<stem>.surface.{h,ts,json}`, the report `<stem>.surface.report.md` with its figure
 * `<stem>.surface.heat.svg`, and the record `<stem>.surface.fit.json`. Same inputs, same
 * bytes. Throws InputError for grids the readings do not reach without --extrapolate, and
 * for grid problems. Cost: O(n) for the coverage plus O(nodes x df^2).
 */
export function buildSurfaceDeliverables(input: SurfaceDeliverInput): SurfaceDeliverables {
  // Columns by their labels, as the record stores them, so a plan read back is the same however the names were typed.
  const plan: SurfacePlan = { ...input.plan, columns: { ...input.plan.columns, ...input.labels } };
  const { fit, prepared } = input;
  const round = (v: number): number => printedValue(v, plan.digits);
  const names = { u: input.labels.u, v: input.labels.v };
  const data = { u: prepared.data.u, v: prepared.data.v, rangeU: fit.rangeU, rangeV: fit.rangeV };
  const grid = resolveSurfaceGrid(plan.gridU, plan.gridV, data, (u, v) => fit.predict(u, v), round);
  const coverage = coverageOf(prepared.data.u, prepared.data.v, plan.reach);
  const table = surfaceTable(fit, grid, coverage, plan.extrapolate, names);
  const regenerate = surfaceCommand(plan, input.dataPath);
  const recordName = `${input.stem}${SURFACE_SUFFIX.record}`;
  const tableName = `${input.stem}${SURFACE_SUFFIX.table}`;
  const files: SurfaceOutputFile[] = [{ kind: 'table', name: tableName, text: surfaceTableCsv(table, plan.digits) }];
  const words = `tensor-product natural cubic regression spline, df ${fit.dfU} × ${fit.dfV}`;
  const col = (j: number): Float64Array => Float64Array.from(table.rows, (r) => r[j] as number);
  const flagCol = (j: number): Uint8Array => Uint8Array.from(table.rows, (r) => r[j] as number);
  const emitInput: SurfaceEmitInput = {
    stem: input.stem,
    us: grid.us,
    vs: grid.vs,
    values: { fit: col(2), se: col(3), ciLower: col(4), ciUpper: col(5), piLower: col(6), piUpper: col(7) },
    flags: { outside: flagCol(8), far: flagCol(9) },
    digits: plan.digits,
    source: { file: input.dataFile, sha256: input.dataSha256 },
    surface: words,
    labels: { u: input.labels.u, v: input.labels.v, y: input.labels.y },
    rangeU: fit.rangeU,
    rangeV: fit.rangeV,
    recordFile: recordName,
    regenerate,
    caution: SURFACE_CAUTION,
  };
  const emitted: string[] = [];
  for (const kind of plan.emit) {
    const name = surfaceEmitName(kind, input.stem);
    emitted.push(name);
    files.push({ kind, name, text: surfaceEmitText(kind, emitInput) });
  }
  const warnings: string[] = [];
  const flagged = table.outside + table.far;
  if (flagged > 0) warnings.push(`${flagged} of ${table.rows.length} table nodes lie where the readings do not reach (flagged in the columns outside and far); do not rely on them.`);
  if (input.tune)
    for (const axis of input.tune.selected.edge) warnings.push(`The choice sits at the largest candidate df of ${axis === 'u' ? names.u : names.v}: the best df may lie beyond the candidates.`);
  const gridWords = gridText(grid, names);
  if (plan.report) {
    const figureName = `${input.stem}${SURFACE_SUFFIX.figure}`;
    const uncovered = table.rows.map((r) => ((r[8] as number) || (r[9] as number) ? 1 : 0));
    const svg = surfaceHeatSvg({
      id: 'surface-heat',
      us: grid.us,
      vs: grid.vs,
      fit: emitInput.values.fit as Float64Array,
      uncovered,
      readingsU: prepared.data.u,
      readingsV: prepared.data.v,
      labels: { u: names.u, v: names.v, y: input.labels.y },
    });
    const report = surfaceReport({
      dataFile: input.dataFile,
      dataSha256: input.dataSha256,
      labels: input.labels,
      rowsRead: input.rowsRead,
      rejected: input.rejected,
      fit,
      tune: input.tune,
      table: { file: tableName, nodesU: grid.us.length, nodesV: grid.vs.length, outside: table.outside, far: table.far, reach: plan.reach, gridWords },
      figure: { file: figureName, alt: `Heat figure of the fitted ${input.labels.y} with uncovered nodes shaded grey and the readings marked` },
      warnings,
      recordFile: recordName,
      regenerate,
      emitted,
      caution: SURFACE_CAUTION,
    });
    files.push({ kind: 'report', name: `${input.stem}${SURFACE_SUFFIX.report}`, text: report }, { kind: 'figure', name: figureName, text: standaloneSvg(svg) });
  }
  const t = input.tune;
  const record = {
    format: SURFACE_RECORD_FORMAT,
    version: SURFACE_RECORD_VERSION,
    tool: { name: 'knotwise', version: VERSION, resampling: RESAMPLING_VERSION },
    data: {
      file: input.dataFile,
      path: input.dataPath,
      sha256: input.dataSha256,
      columns: { x: input.labels.u, x2: input.labels.v, y: input.labels.y, weights: input.labels.weights ?? null },
      units: { x: input.units.u ?? null, x2: input.units.v ?? null, y: input.units.y ?? null },
      rowsRead: input.rowsRead,
      rowsUsed: fit.n,
      rejected: input.rejected.map((r) => ({ line: r.line, column: r.column, reason: r.reason })),
    },
    spec: {
      tune: plan.tune,
      candidates: { x: plan.candidatesU ? dfListText(plan.candidatesU) : null, x2: plan.candidatesV ? dfListText(plan.candidatesV) : null },
      resampling: formatResampling(plan.resample),
      rule: formatSurfaceRule(plan.rule),
      seed: plan.seed,
      grid: { x: plan.gridU ? formatGrid(plan.gridU) : null, x2: plan.gridV ? formatGrid(plan.gridV) : null },
      reach: plan.reach,
      extrapolate: plan.extrapolate,
      digits: plan.digits,
      emit: plan.emit,
      report: plan.report,
    },
    choice: t
      ? {
          df: { x: t.selected.dfU, x2: t.selected.dfV },
          metric: t.metric,
          reason: t.selected.reason,
          threshold: t.selected.threshold ?? null,
          alternatives: t.selected.alternatives.map((a) => ({ rule: formatSurfaceRule(a.rule), df: { x: a.dfU, x2: a.dfV } })),
          landscape: { dfX: t.landscape.dfU, dfX2: t.landscape.dfV, mean: Array.from(t.landscape.mean, finite), se: Array.from(t.landscape.se, finite) },
          candidates: t.candidates.map((c) =>
            c.skipped !== undefined
              ? { df: { x: c.dfU, x2: c.dfV }, skipped: c.skipped }
              : { df: { x: c.dfU, x2: c.dfV }, mean: finite(c.errors[t.metric]?.mean ?? NaN), se: finite(c.errors[t.metric]?.se ?? NaN) },
          ),
          notes: t.notes,
        }
      : null,
    fit: {
      df: { x: fit.dfU, x2: fit.dfV, total: fit.df },
      n: fit.n,
      knots: { x: Array.from(fit.knotsU), x2: Array.from(fit.knotsV) },
      range: { x: fit.rangeU, x2: fit.rangeV },
      coefficients: Array.from(fit.coefficients, finite),
      residualSd: finite(fit.sigma),
      r2: finite(fit.r2),
      looRmse: finite(fit.looRmse),
      gcv: finite(fit.gcv),
      aic: finite(fit.aic),
      bic: finite(fit.bic),
      notes: fit.notes,
    },
    table: {
      file: tableName,
      nodes: { x: grid.us.length, x2: grid.vs.length },
      grid: { x: formatGrid(grid.specU), x2: formatGrid(grid.specV) },
      interpolation: grid.auto ? { tolerance: grid.auto.tolerance, stepX: grid.auto.stepU, stepX2: grid.auto.stepV, maxError: grid.auto.maxError, at: grid.auto.at } : null,
      outside: table.outside,
      far: table.far,
      hull: { x: Array.from(coverage.hull.u, (s) => fit.rangeU[0] + s * (fit.rangeU[1] - fit.rangeU[0])), x2: Array.from(coverage.hull.v, (s) => fit.rangeV[0] + s * (fit.rangeV[1] - fit.rangeV[0])) },
    },
    warnings,
    outputs: files.map((f) => ({ kind: f.kind, file: f.name, sha256: input.sha256(f.text) })),
    regenerate,
    caution: SURFACE_CAUTION,
  };
  files.push({ kind: 'record', name: recordName, text: JSON.stringify(record, null, 2) + '\n' });
  return { files, record, regenerate, table, grid, warnings };
}

/** The grids in words for the report and the summary. */
export function gridText(grid: SurfaceGrid, names: { readonly u: string; readonly v: string }): string {
  const a = grid.auto;
  const base = `${names.u} ${formatGrid(grid.specU)}, ${names.v} ${formatGrid(grid.specV)}`;
  return a
    ? `${base}; automatic step: bilinear interpolation between the printed nodes stays within ${sig(a.maxError)} of the surface (tolerance ${sig(a.tolerance)}) on a dense check of every cell`
    : base;
}
