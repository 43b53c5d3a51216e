/**
 * Saving a grouped run from the editor: every group's table (or one long table), the
 * summary of every group and the group record, built by core's buildGroupDeliverables from
 * the plan `knotwise fit <file> --x .. --y .. --per <column>` would carry out (so the bytes
 * are the command line's for the same inputs) and written as one set through workspace.fs
 * by the same commit protocol as a single curve table (extension/save.ts), asking before
 * replacing files Knotwise did not write.
 */
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import type { AnalysisOptions } from '../core/analysis/types';
import type { GroupAnalysis } from '../core/groups/analyse';
import type { CommonCurveJson } from '../core/groups/commonJson';
import { buildGroupDeliverables, type GroupDeliverables, type GroupSpec } from '../core/groups/deliver';
import type { GroupSplit } from '../core/groups/split';
import { DEFAULT_OUTPUT, type FitPlan } from '../core/outputs/plan';
import { outputFolder, relativeDataPath, writeOutputSet, type OverwriteAnswer } from './save';
import type { Settings } from './settings';

/** Everything a grouped save needs from a finished grouped run. */
export interface GroupSaveInput {
  readonly dataUri: vscode.Uri;
  readonly fileName: string;
  readonly dataSha256: string;
  readonly rowsRead: number;
  /** The columns as asked for (the command line's --x, --y, --weights) and the group column (--per). */
  readonly columns: { readonly x: string; readonly y: string; readonly weights?: string | undefined };
  readonly per: string;
  readonly split: GroupSplit;
  readonly analysis: GroupAnalysis;
  readonly common: CommonCurveJson | null;
  /** The options the groups were tuned with (as asked: the shared df's candidates are filled in by the analysis itself). */
  readonly options: AnalysisOptions;
  readonly settings: Settings;
}

/** SHA-256 (FIPS 180-4) of a text's UTF-8 bytes, as hex. */
function sha256(text: string): string {
  return createHash('sha256').update(text).digest('hex');
}

/**
 * The plan the command line would carry out for this save: the run's options, the table
 * settings, the group column, the df shared when the run shared it, one long table when
 * knotwise.groups.longTable says so, and each group's inverse table when knotwise.inverse.write
 * is on (as `fit --per ... --inverse` writes them). No code (the editor emits none) and
 * no report (not available with groups).
 */
export function groupPlan(input: GroupSaveInput): FitPlan & { readonly groups: GroupSpec } {
  const { settings } = input;
  const { x, y, weights } = input.columns;
  return {
    columns: { x, y, weights },
    tune: true,
    options: input.options,
    output: { ...DEFAULT_OUTPUT, grid: settings.grid, extrapolate: settings.extrapolate, flagNegative: settings.flagNegative, digits: settings.digits, inverse: settings.inverse },
    groups: { by: input.per, channels: undefined, sharedDf: input.analysis.shared !== undefined, longTable: settings.groups.longTable },
  };
}

/** Builds every output's text as the command line would write it into `folder` (throws InputError for grid problems). */
export function groupDeliverables(input: GroupSaveInput, folder: vscode.Uri): GroupDeliverables {
  const dot = input.fileName.lastIndexOf('.');
  return buildGroupDeliverables({
    plan: groupPlan(input),
    stem: dot > 0 ? input.fileName.slice(0, dot) : input.fileName,
    dataFile: input.fileName,
    dataPath: relativeDataPath(folder, input.dataUri),
    dataSha256: input.dataSha256,
    rowsRead: input.rowsRead,
    labels: input.split.labels,
    groupLabel: input.split.groupLabel,
    rejected: input.split.rejected,
    analysis: input.analysis,
    common: input.common,
    sha256,
  });
}

/** What a grouped save wrote. */
export interface GroupSaved {
  /** Every written file: the tables, the summary, the group record last. */
  readonly uris: readonly vscode.Uri[];
  /** The summary and the record (what the panel names), and a line about the tables. */
  readonly named: readonly vscode.Uri[];
  readonly note: string;
}

/**
 * Saves every group's outputs at once. Resolves to what was written, or undefined when the
 * person declined to replace a file Knotwise did not write (then nothing is written).
 */
export async function saveGroupDeliverables(input: GroupSaveInput, answer: OverwriteAnswer): Promise<GroupSaved | undefined> {
  const folder = outputFolder(input.dataUri, input.settings.outputFolder);
  const out = groupDeliverables(input, folder);
  const record = out.files.find((f) => f.kind === 'record');
  if (!record) throw new Error('buildGroupDeliverables returned no group record');
  const uris = await writeOutputSet(folder, input.dataUri, out.files, record.name, answer, 'the new group tables, summary and group record');
  if (!uris) return undefined;
  const tables = out.files.filter((f) => f.kind === 'table').map((f) => f.name);
  const named = uris.filter((u) => out.files.some((f) => (f.kind === 'summary' || f.kind === 'record') && u.path.endsWith(`/${f.name}`)));
  const groups = input.analysis.groups.length;
  const note =
    (tables.length === 1 ? `The ${groups} groups' curves are in one table, ${tables[0]}.` : `Each of the ${groups} groups has its table beside them (${tables[0]} … ${tables[tables.length - 1]}).`) +
    (out.files.some((f) => f.kind === 'inverse') ? " Each group's inverse table (reading to quantity) is beside them too." : '');
  return { uris, named, note };
}
