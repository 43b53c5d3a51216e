/**
 * The optional last column pick: "Split the rows into groups by…". It lists the columns not
 * chosen yet, text columns first (a column naming devices, lots or channels is usually
 * text), each with its first distinct values and how many there are; the first entry
 * keeps all rows as one data set.
 */
import * as vscode from 'vscode';
import { parseCsvText } from '../core/ingest/reader';
import type { ColumnInfo, ParsedTable } from '../core/ingest/types';
import { sig } from '../core/tune/format';
import { pickOne, type ColumnItem, type GroupPick } from './columns';

/** Distinct values named in a preview. */
const PREVIEW_VALUES = 6;
/** Text columns whose distinct values are counted (each costs one pass over the text). */
const COUNTED_TEXT_COLUMNS = 8;

/** The entry that keeps the rows together. */
export const NO_GROUPS = { label: 'One data set', description: 'do not split the rows' } as const;

/** The distinct values of a column, in order of first appearance, and how many there are. */
export interface DistinctValues {
  readonly first: readonly string[];
  readonly count: number;
}

/** Distinct numbers of a numeric column (missing and bad cells left out). O(rows). */
function distinctNumbers(table: ParsedTable, column: ColumnInfo): DistinctValues {
  const seen = new Set<number>();
  const first: string[] = [];
  const values = table.values[column.index];
  for (let i = 0; values && i < values.length; i++) {
    const v = values[i] as number;
    if (Number.isNaN(v) || seen.has(v)) continue;
    seen.add(v);
    if (first.length < PREVIEW_VALUES) first.push(sig(v, 5));
  }
  return { first, count: seen.size };
}

/** Distinct cell texts of a column, read again from the CSV text keeping that column's texts (as the grouped run reads it). O(text). */
function distinctTexts(text: string, fileName: string, column: ColumnInfo): DistinctValues | undefined {
  const kept = parseCsvText(text, { file: fileName, keepText: column.label }).text;
  if (!kept) return undefined;
  return { first: kept.names.slice(0, PREVIEW_VALUES), count: kept.names.length };
}

/** A preview line: the first distinct values and how many. */
function previewLine(d: DistinctValues | undefined): string {
  if (!d) return 'distinct values not counted';
  if (d.count === 0) return 'no values';
  return `${d.first.join(', ')}${d.count > d.first.length ? ', …' : ''}  (${d.count} distinct value${d.count === 1 ? '' : 's'})`;
}

/** The entries of the group pick for the columns not in `exclude`. */
export function groupItems(table: ParsedTable, text: string, fileName: string, exclude: readonly string[]): ColumnItem[] {
  const cols = table.columns.filter((c) => !exclude.includes(c.label));
  const textCols = cols.filter((c) => !c.numeric);
  const numeric = cols.filter((c) => c.numeric);
  const out: ColumnItem[] = [{ label: NO_GROUPS.label, description: NO_GROUPS.description }];
  if (textCols.length) out.push({ label: 'Text columns', kind: vscode.QuickPickItemKind.Separator });
  for (const [i, c] of textCols.entries()) {
    const d = i < COUNTED_TEXT_COLUMNS ? distinctTexts(text, fileName, c) : undefined;
    out.push({ label: c.label, description: d ? `${d.count} groups` : '', detail: previewLine(d), column: c });
  }
  if (numeric.length) out.push({ label: 'Numeric columns', kind: vscode.QuickPickItemKind.Separator });
  for (const c of numeric) {
    const d = distinctNumbers(table, c);
    out.push({ label: c.label, description: `${d.count} groups`, detail: previewLine(d), column: c });
  }
  return out;
}

/** The group pick of `table` (from `text`, the CSV the table was read from) for pickColumns. */
export function groupPick(table: ParsedTable, text: string, fileName: string, token: vscode.CancellationToken): GroupPick {
  return async (exclude, remembered, step, totalSteps) => {
    const list = groupItems(table, text, fileName, exclude);
    const picked = await pickOne(`Knotwise: split the rows of ${fileName} into groups by… (optional; each group gets its own curve)`, step, list, remembered ?? NO_GROUPS.label, token, totalSteps);
    if (!picked) return undefined;
    return picked.column ? picked.label : null;
  };
}
