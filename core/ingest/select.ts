/**
 * Picks the x, y and optional weight columns of a parsed table as XYData, leaving out
 * (and listing) every row that cannot be used.
 */
import { InputError } from '../errors';
import type { XYData } from '../types';
import { splitUnit } from './header';
import { MESSAGE_NAME_CHARS, quoteName, shorten } from './text';
import type { ColumnInfo, ParsedTable } from './types';

/** Columns listed by name when a column is not found; the rest are counted. */
const LISTED_COLUMNS = 20;

/** Which columns to use, by label or header text. */
export interface ColumnChoice {
  readonly x: string;
  readonly y: string;
  readonly weights?: string | undefined;
}

/** A row left out: its line, the column at fault ('' for the whole row) and why. */
export interface RejectedRow {
  readonly line: number;
  readonly column: string;
  readonly reason: string;
}

/** Result of `selectColumns`. */
export interface Selection {
  readonly data: XYData;
  /** Rows left out, by line: cells of the chosen columns and rows the table could not read. */
  readonly rejected: RejectedRow[];
  readonly labels: { readonly x: string; readonly y: string; readonly weights?: string };
  readonly units: { readonly x: string | undefined; readonly y: string | undefined; readonly weights?: string | undefined };
}

/** A column for a message: its label, and its header text when that differs; names shortened. */
function describeColumn(c: ColumnInfo): string {
  return c.header !== '' && c.header.trim() !== c.label ? `${quoteName(c.label)} (header ${quoteName(c.header)})` : quoteName(c.label);
}

/**
 * Finds a column by label or header text: exact match first, then ignoring case. Throws
 * InputError listing the available columns (the first 20, names shortened to 60
 * characters) when none matches.
 */
export function findColumn(table: ParsedTable, name: string, file?: string): ColumnInfo {
  const cols = table.columns;
  const exact = cols.find((c) => c.label === name) ?? cols.find((c) => c.header !== '' && c.header === name);
  if (exact !== undefined) return exact;
  const lower = name.toLowerCase();
  const loose = cols.find((c) => c.label.toLowerCase() === lower) ?? cols.find((c) => c.header !== '' && c.header.toLowerCase() === lower);
  if (loose !== undefined) return loose;
  const listed = cols.slice(0, LISTED_COLUMNS).map(describeColumn).join(', ');
  const more = cols.length > LISTED_COLUMNS ? ` and ${cols.length - LISTED_COLUMNS} more` : '';
  const shown = JSON.stringify(shorten(name, MESSAGE_NAME_CHARS));
  throw new InputError(`no column named ${shown}; the columns are ${listed}${more}`, { file, column: shorten(name, MESSAGE_NAME_CHARS) });
}

/** Other columns whose header gives the same name as this one's (they got " (2)", " (3)", ... as labels). */
function sameNamed(table: ParsedTable, col: ColumnInfo): ColumnInfo[] {
  if (col.header === '') return [];
  const name = splitUnit(col.header).name;
  return table.columns.filter((c) => c !== col && c.header !== '' && splitUnit(c.header).name === name);
}

/** Throws InputError when the column holds text rather than numbers (by its counts over the rows of `table`). */
export function requireNumeric(table: ParsedTable, col: ColumnInfo, file: string | undefined): void {
  if (col.numeric || col.invalidCount === 0) return;
  const row = col.problems.rows[0] as number;
  const line = table.lines[row] as number;
  const filled = col.numericCount + col.invalidCount;
  const twins = sameNamed(table, col);
  const twin =
    twins.length > 0
      ? `; the header names ${twins.length + 1} columns ${quoteName(splitUnit(col.header).name)}, and this is the first (the others are ${twins.map((c) => quoteName(c.label)).join(', ')})`
      : '';
  throw new InputError(
    `column ${quoteName(col.label)} is not numeric: ${col.invalidCount} of its ${filled} filled cells are not numbers, e.g. line ${line}: ${col.problems.reasons[0] as string}${twin}`,
    { file, line, column: shorten(col.label, MESSAGE_NAME_CHARS) },
  );
}

/** Walks a column's sparse problem list alongside increasing row indices. */
class ReasonCursor {
  private next = 0;
  constructor(private readonly col: ColumnInfo) {}
  /** Reason for the NaN cell at `row` (rows must be asked in increasing order). */
  reason(row: number): string {
    const rows = this.col.problems.rows;
    while (this.next < rows.length && (rows[this.next] as number) < row) this.next++;
    return this.next < rows.length && rows[this.next] === row ? (this.col.problems.reasons[this.next] as string) : 'missing value';
  }
}

/**
 * Chooses x, y and weight columns. A row is rejected, with the first reason in the order
 * x, y, weights, when a chosen cell is missing or invalid, or a weight is not > 0. Rows the
 * table itself could not read (wrong field count) are listed too, with column ''.
 * Throws InputError for an unknown column, a non-numeric chosen column (naming a bad cell
 * and its line), or when no row is left. Cost O(rows).
 * Example: selectColumns(parseCsvText('t,v\n1,2\n3,NA\n'), { x: 't', y: 'v' }) -> data
 * { x: [1], y: [2], lines: [2] }, rejected [{ line: 3, column: 'v', reason: 'missing value' }].
 */
export function selectColumns(table: ParsedTable, choice: ColumnChoice, file?: string): Selection {
  const chosen = chosenColumns(table, choice, file);
  for (const col of chosen) requireNumeric(table, col, file);
  const { data, rejected } = pickRows(table, chosen);
  if (data.x.length === 0) throw noUsableRows(chosen, rejected[0], file);
  const [cx, cy, cw] = chosen as [ColumnInfo, ColumnInfo, ColumnInfo | undefined];
  const labels = cw !== undefined ? { x: cx.label, y: cy.label, weights: cw.label } : { x: cx.label, y: cy.label };
  const units = cw !== undefined ? { x: cx.unit, y: cy.unit, weights: cw.unit } : { x: cx.unit, y: cy.unit };
  return { data, rejected, labels, units };
}

/** The InputError of a table none of whose rows has usable values in the `chosen` columns; `first` is the first row left out. */
export function noUsableRows(chosen: readonly ColumnInfo[], first: RejectedRow | undefined, file: string | undefined): InputError {
  const names = chosen.map((c) => quoteName(c.label)).join(', ');
  const detail = first !== undefined ? ` (the first: line ${first.line}${first.column !== '' ? `, column "${first.column}"` : ''}: ${first.reason})` : '';
  return new InputError(`no usable rows: every row has a missing or invalid value in ${names}${detail}`, { file });
}

/** The x, y and (when chosen) weight columns of `table`, in that order. Throws InputError for an unknown column. */
export function chosenColumns(table: ParsedTable, choice: ColumnChoice, file?: string): ColumnInfo[] {
  const chosen: ColumnInfo[] = [findColumn(table, choice.x, file), findColumn(table, choice.y, file)];
  if (choice.weights !== undefined) chosen.push(findColumn(table, choice.weights, file));
  return chosen;
}

/**
 * The usable rows of `table` in the columns `chosen` (x, y and optional weights, from
 * chosenColumns) and the rejected ones, by the rules of selectColumns, without its checks
 * of the whole table (numeric columns, at least one row): a part of a file read in passes
 * (core/node/streamFile.ts) is checked as a whole at the end. Rows come in table order.
 * When every row is kept the table's own columns serve. Cost O(rows).
 */
export function pickRows(table: ParsedTable, chosen: readonly ColumnInfo[]): { data: XYData; rejected: RejectedRow[] } {
  const n = table.rowCount;
  const cursors = chosen.map((c) => new ReasonCursor(c));
  const columns = chosen.map((c) => table.values[c.index] as Float64Array);
  const hasWeights = chosen.length === 3;
  const xs = columns[0] as Float64Array;
  const ys = columns[1] as Float64Array;
  const ws = hasWeights ? (columns[2] as Float64Array) : undefined;
  const keep = new Uint8Array(n);
  let kept = 0;
  const rejected: RejectedRow[] = [];
  for (let r = 0; r < n; r++) {
    let reason: string | undefined;
    let at = 0;
    for (; at < columns.length; at++) {
      const v = (columns[at] as Float64Array)[r] as number;
      if (v - v !== 0) {
        reason = (cursors[at] as ReasonCursor).reason(r);
        break;
      }
    }
    if (reason === undefined && ws !== undefined && !((ws[r] as number) > 0)) {
      reason = `weight ${ws[r] as number} is not positive`;
      at = 2;
    }
    if (reason === undefined) {
      keep[r] = 1;
      kept++;
    } else {
      rejected.push({ line: table.lines[r] as number, column: (chosen[at] as ColumnInfo).label, reason });
    }
  }
  for (const p of table.problems) if (p.column === undefined) rejected.push({ line: p.line, column: '', reason: p.reason });
  rejected.sort((a, b) => a.line - b.line);
  if (kept === n && xs.length === n && ys.length === n && table.lines.length === n) {
    // Every row kept: the table's own columns serve (neither is changed after reading), so a large file is not held twice.
    return { data: { x: xs, y: ys, w: ws, lines: table.lines }, rejected };
  }
  const x = new Float64Array(kept);
  const y = new Float64Array(kept);
  const w = ws !== undefined ? new Float64Array(kept) : undefined;
  const lines = new Int32Array(kept);
  for (let r = 0, i = 0; r < n; r++) {
    if (keep[r] === 0) continue;
    x[i] = xs[r] as number;
    y[i] = ys[r] as number;
    if (w !== undefined) w[i] = (ws as Float64Array)[r] as number;
    lines[i] = table.lines[r] as number;
    i++;
  }
  return { data: { x, y, w, lines }, rejected };
}
