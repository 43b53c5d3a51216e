/**
 * Everything a grouped fit writes, as text: one curve table per group (or one long table
 * with a group column), the summary CSV of every group, and the group record that lists
 * them with each group's rows, df, reason, curve and hashes. Pure; the command line writes
 * the files and `knotwise check` rebuilds them to compare, both through this function.
 */
import { InputError } from '../errors';
import type { Selection } from '../ingest/select';
import type { RejectedRow } from '../ingest/select';
import { CAUTION } from '../words/caution';
import { printedValue } from '../emit/common';
import { fitCommand, type FitPlan } from '../outputs/plan';
import { codeAndInverseFiles, uniformStep } from '../outputs/deliver';
import { inverseSpecRecord } from '../outputs/record';
import type { InverseSummary } from '../calibrate/inverseOutput';
import { curveWords } from '../registry/curves/index';
import { sig } from '../tune/format';
import { resolveGrid } from '../table/autoStep';
import { shapeTable } from '../table/columns';
import { curveTable, type CurveTable } from '../table/curveTable';
import { curveTableCsv, formatNumber } from '../table/formatCsv';
import { checkInRange } from '../table/grid';
import { RESAMPLING_VERSION, VERSION } from '../version';
import { formatResampling } from '../registry/resampling/index';
import { formatRule } from '../registry/rules/index';
import type { GroupAnalysis } from './analyse';
import type { CommonCurveJson } from './commonJson';
import { groupReport } from './report';
import type { GroupSpec } from './spec';

export type { GroupSpec } from './spec';

/** Format name and version of the group record. */
import { GROUP_RECORD_FORMAT, GROUP_RECORD_VERSION } from './spec';

export { GROUP_RECORD_FORMAT, GROUP_RECORD_VERSION };

/** One file to write. */
export interface GroupOutputFile {
  readonly kind: 'table' | 'summary' | 'record' | 'c' | 'ts' | 'json' | 'inverse' | 'report' | 'figure';
  readonly name: string;
  readonly text: string;
}

/** What buildGroupDeliverables needs. */
export interface GroupDeliverInput {
  readonly plan: FitPlan & { readonly groups: GroupSpec };
  readonly stem: string;
  readonly dataFile: string;
  readonly dataPath: string;
  readonly dataSha256: string;
  readonly rowsRead: number;
  readonly labels: Selection['labels'];
  readonly groupLabel?: string | undefined;
  readonly rejected: readonly RejectedRow[];
  readonly analysis: GroupAnalysis;
  /** Does one curve serve all (core/groups/common.ts), as JSON with its words; null when not tested. */
  readonly common: CommonCurveJson | null;
  readonly sha256: (text: string) => string;
}

/** The outputs of a grouped fit. */
export interface GroupDeliverables {
  /** Tables first, then the summary, the record last. */
  readonly files: readonly GroupOutputFile[];
  readonly record: Record<string, unknown>;
  readonly regenerate: string;
}

/** A group name as part of a file name: letters, digits, '.', '_' and '-' kept, runs of anything else as one '_'; unique within the run. */
export function groupSlugs(names: readonly string[]): string[] {
  const used = new Set<string>();
  return names.map((name) => {
    const base =
      name
        .replace(/[^A-Za-z0-9._-]+/g, '_')
        .replace(/^[._]+|_+$/g, '')
        .slice(0, 60) || 'group';
    let slug = base;
    for (let k = 2; used.has(slug.toLowerCase()); k++) slug = `${base}-${k}`;
    used.add(slug.toLowerCase());
    return slug;
  });
}

/** Runs `build` for one group; an InputError from it names the group first ("plant Qn1: ..."). */
function forGroup<T>(groupLabel: string | undefined, name: string, build: () => T): T {
  try {
    return build();
  } catch (e) {
    if (e instanceof InputError) throw new InputError(`${groupLabel ?? 'channel'} ${name}: ${e.raw}`, e.place);
    throw e;
  }
}

/** A CSV field: quoted when it holds a comma, quote or line break (RFC 4180). */
function csvField(text: string): string {
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * Builds every output of a grouped fit: each group's table on the plan's grid (the
 * default: 101 points over the group's own data range), as a file per group
 * `<stem>.<group>.curve.csv` or one `<stem>.groups.curve.csv` with a leading group column;
 * the summary `<stem>.groups.csv` (group, rows, df, residual SD, resampled RMSE and its SE,
 * table file); and the record `<stem>.groups.fit.json`. Same inputs, same bytes. Throws
 * InputError for grid problems (a grid beyond a group's data range without extrapolation).
 * Cost: O(groups x table rows).
 */
export function buildGroupDeliverables(input: GroupDeliverInput): GroupDeliverables {
  // Columns by their labels, as the record stores them (data.columns, data.groupBy): the plan
  // read back from the record, and every command in the outputs, is the same however the
  // names were typed (column names match case-blind).
  const asked = input.plan;
  const plan: typeof asked = {
    ...asked,
    // With a trials column the selection's weights label names the trials (core/ingest/trials.ts): not weights as well.
    columns: { ...asked.columns, ...input.labels, ...(asked.trials !== undefined ? { weights: undefined } : {}) },
    groups: { ...asked.groups, ...(asked.groups.by !== undefined && input.groupLabel !== undefined ? { by: input.groupLabel } : {}) },
  };
  const out = plan.output;
  const round = (v: number): number => printedValue(v, out.digits);
  const names = input.analysis.groups.map((g) => g.name);
  const slugs = groupSlugs(names);
  const regenerate = fitCommand(plan, input.dataPath);
  const recordName = `${input.stem}.groups.fit.json`;
  // Each group's table, and after it (--emit, --inverse) its code and inverse table, named by the group.
  const inverseOf = new Map<string, { file: string; summary: InverseSummary }>();
  const tables: { name: string; slug: string; table: CurveTable; code: GroupOutputFile[] }[] = input.analysis.groups.map((g, i) => {
    const fit = g.analysis.chosen;
    const sorted = Float64Array.from(g.analysis.data.x).sort();
    const grid = resolveGrid(out.grid, sorted, fit.curve, round);
    checkInRange(grid.points, fit.curve.lower, fit.curve.upper, out.extrapolate);
    const slug = slugs[i] as string;
    const table = shapeTable(curveTable(fit, grid.points), out.columns, out.flagNegative).table;
    const code = forGroup(input.groupLabel, g.name, () =>
      codeAndInverseFiles(
        fit,
        {
          stem: `${input.stem}.${slug}`,
          table,
          digits: out.digits,
          source: { file: input.dataFile, sha256: input.dataSha256 },
          curve: `${curveWords(fit.kind)}, df ${sig(fit.df, 4)}, ${input.groupLabel ?? 'channel'} ${g.name}`,
          labels: { x: input.labels.x, y: plan.groups.channels ? g.name : input.labels.y },
          dataRange: [fit.curve.lower, fit.curve.upper],
          step: grid.auto ? grid.auto.step : uniformStep(grid.spec, grid.points),
          recordFile: recordName,
          regenerate,
          caution: CAUTION,
        },
        out,
        round,
      ),
    );
    if (code.inverse) inverseOf.set(g.name, { file: code.inverseName, summary: code.inverse.summary });
    return { name: g.name, slug, table, code: code.files as GroupOutputFile[] };
  });
  const files: GroupOutputFile[] = [];
  const tableFile = new Map<string, string>();
  if (plan.groups.longTable) {
    const columns = tables[0]?.table.columns ?? [];
    const lines = [['group', ...columns].join(',')];
    for (const t of tables) {
      const body = curveTableCsv({ columns, rows: t.table.rows }, out.digits).split('\n').slice(1, -1);
      for (const row of body) lines.push(`${csvField(t.name)},${row}`);
    }
    const name = `${input.stem}.groups.curve.csv`;
    files.push({ kind: 'table', name, text: lines.join('\n') + '\n' });
    for (const t of tables) tableFile.set(t.name, name);
    for (const t of tables) files.push(...t.code);
  } else {
    for (const t of tables) {
      const name = `${input.stem}.${t.slug}.curve.csv`;
      files.push({ kind: 'table', name, text: curveTableCsv(t.table, out.digits) }, ...t.code);
      tableFile.set(t.name, name);
    }
  }
  const num = (v: number | undefined): string => (v === undefined || !Number.isFinite(v) ? 'NaN' : formatNumber(v, out.digits));
  // With held-out rows (--holdout), each group's held-out rows and their RMSE as two more columns.
  const heldOut = plan.options.holdout !== undefined;
  const summaryLines = [`group,rows,df,residualSd,rmse,rmseSe,${heldOut ? 'heldOutRows,heldOutRmse,' : ''}table`];
  for (const g of input.analysis.groups) {
    const a = g.analysis;
    const e = a.tune.candidates.find((c) => c.df === a.chosen.df)?.errors.rmse;
    const h = a.tune.holdout;
    const held = heldOut ? [h ? String(h.rows) : '0', num(h?.rmse)] : [];
    summaryLines.push([csvField(g.name), String(a.n), formatNumber(a.chosen.df, 6), num(a.chosen.sigma), num(e?.mean), num(e?.se), ...held, csvField(tableFile.get(g.name) ?? '')].join(','));
  }
  const summaryName = `${input.stem}.groups.csv`;
  files.push({ kind: 'summary', name: summaryName, text: summaryLines.join('\n') + '\n' });
  if (out.report) {
    const rmse = new Map<string, { mean: number; se: number }>();
    for (const g of input.analysis.groups) {
      const e = g.analysis.tune.candidates.find((c) => c.df === g.analysis.chosen.df)?.errors.rmse;
      if (e) rmse.set(g.name, { mean: e.mean, se: e.se });
    }
    const o = plan.options;
    files.push(
      ...groupReport({
        stem: input.stem,
        dataFile: input.dataFile,
        dataSha256: input.dataSha256,
        rowsRead: input.rowsRead,
        split: { rejected: input.rejected, labels: input.labels, groupLabel: input.groupLabel },
        analysis: input.analysis,
        common: input.common,
        method: `Curve: ${curveWords(o.kind)}; the df chosen ${input.analysis.shared ? 'for all groups together' : 'for each group'} by the ${formatRule(o.rule)} rule from ${formatResampling(o.resample)} resampling, seed ${o.seed}.`,
        rmse,
        warnings: new Map(input.analysis.groups.map((g) => [g.name, [...g.analysis.diagnostics.warnings, ...(g.analysis.tune.holdout?.warning ? [g.analysis.tune.holdout.warning] : [])]])),
        tables: tableFile,
        summaryFile: summaryName,
        recordFile: recordName,
        regenerate,
        caution: CAUTION,
      }),
    );
  }
  const o = plan.options;
  const shared = input.analysis.shared;
  const record = {
    format: GROUP_RECORD_FORMAT,
    version: GROUP_RECORD_VERSION,
    tool: { name: 'knotwise', version: VERSION, resampling: RESAMPLING_VERSION },
    data: {
      file: input.dataFile,
      path: input.dataPath,
      sha256: input.dataSha256,
      columns: input.labels,
      groupBy: input.groupLabel ?? null,
      channels: plan.groups.channels ?? null,
      rowsRead: input.rowsRead,
      rejected: input.rejected.map((r) => ({ line: r.line, column: r.column, reason: r.reason })),
    },
    spec: {
      curve: o.kind,
      candidates: o.candidates ?? null,
      resampling: formatResampling(o.resample),
      seed: o.seed,
      rule: formatRule(o.rule),
      sharedDf: plan.groups.sharedDf,
      holdout: o.holdout ?? null,
      longTable: plan.groups.longTable,
      grid: out.grid ?? null,
      digits: out.digits,
      extrapolate: out.extrapolate,
      columns: out.columns ?? null,
      flagNegative: out.flagNegative,
      emit: out.emit,
      report: out.report,
      inverse: inverseSpecRecord(out.inverse),
      model: { outcome: o.outcome ?? null, shape: o.shape ?? [], robust: o.robust === true ? true : o.robust ? { k: o.robust.k } : null, trials: plan.trials ?? null },
    },
    shared: shared
      ? {
          df: shared.selection.df,
          reason: shared.selection.reason,
          candidates: shared.candidates.map((c) =>
            c.skipped !== undefined ? { df: c.df, skipped: c.skipped } : { df: c.df, rmse: { mean: c.errors.rmse?.mean ?? null, se: c.errors.rmse?.se ?? null } },
          ),
        }
      : null,
    common: input.common,
    groups: input.analysis.groups.map((g) => {
      const a = g.analysis;
      const f = a.chosen;
      const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);
      return {
        name: g.name,
        rowsUsed: a.n,
        df: f.df,
        reason: a.tune.selected.reason,
        residualSd: finite(f.sigma),
        knots: Array.from(f.knots),
        coefficients: Array.from(f.coefficients, finite),
        range: [f.curve.lower, f.curve.upper],
        table: tableFile.get(g.name) ?? null,
        inverse: inverseOf.get(g.name) ?? null,
        holdout: a.tune.holdout ?? null,
        warnings: [...a.diagnostics.warnings, ...(a.tune.holdout?.warning ? [a.tune.holdout.warning] : [])],
      };
    }),
    outputs: files.map((f) => ({ kind: f.kind, file: f.name, sha256: input.sha256(f.text) })),
    regenerate,
    caution: CAUTION,
  };
  files.push({ kind: 'record', name: recordName, text: JSON.stringify(record, null, 2) + '\n' });
  return { files, record, regenerate };
}
