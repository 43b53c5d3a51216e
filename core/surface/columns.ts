/**
 * Picks the two input columns, the reading column and the optional weight column of a
 * parsed table as surface data, leaving out (and listing) every row that cannot be used:
 * the surface counterpart of core/ingest/select.ts selectColumns, with the same rules.
 */
import type { RejectedRow } from '../ingest/select';
import { findColumn, noUsableRows, requireNumeric } from '../ingest/select';
import type { ColumnInfo, ParsedTable } from '../ingest/types';
import type { SurfaceData } from './data';

/** Which columns to use, by label or header text: the first input u, the second input v, the readings y. */
export interface SurfaceColumns {
  readonly u: string;
  readonly v: string;
  readonly y: string;
  readonly weights?: string | undefined;
}

/** Result of selectSurfaceColumns. */
export interface SurfaceSelection {
  readonly data: SurfaceData & { readonly lines: Int32Array };
  readonly rejected: RejectedRow[];
  /** The columns' labels as the table names them. */
  readonly labels: { readonly u: string; readonly v: string; readonly y: string; readonly weights?: string };
  readonly units: { readonly u: string | undefined; readonly v: string | undefined; readonly y: string | undefined };
}

/**
 * Chooses u, v, y and weight columns. A row is rejected, with the first reason in the order
 * u, v, y, weights, when a chosen cell is missing or invalid, or a weight is not above zero;
 * rows the table could not read are listed with column ''. Throws InputError for an unknown
 * or non-numeric column, or when no row is left. Cost O(rows).
 * Example: selectSurfaceColumns(parseCsvText('t,p,r\n1,2,3\n'), { u: 't', v: 'p', y: 'r' }).data.u -> [1].
 */
export function selectSurfaceColumns(table: ParsedTable, choice: SurfaceColumns, file?: string): SurfaceSelection {
  const chosen: ColumnInfo[] = [findColumn(table, choice.u, file), findColumn(table, choice.v, file), findColumn(table, choice.y, file)];
  if (choice.weights !== undefined) chosen.push(findColumn(table, choice.weights, file));
  for (const col of chosen) requireNumeric(table, col, file);
  const n = table.rowCount;
  const columns = chosen.map((c) => table.values[c.index] as Float64Array);
  // Each column's problem list is sorted by row and rows are asked in increasing order: one cursor per column.
  const cursors = chosen.map(() => 0);
  const reasonOf = (c: number, row: number): string => {
    const { rows, reasons } = (chosen[c] as ColumnInfo).problems;
    let k = cursors[c] as number;
    while (k < rows.length && (rows[k] as number) < row) k++;
    cursors[c] = k;
    return k < rows.length && rows[k] === row ? (reasons[k] as string) : 'missing value';
  };
  const keep = new Uint8Array(n);
  let kept = 0;
  const rejected: RejectedRow[] = [];
  for (let r = 0; r < n; r++) {
    let at = -1;
    let reason = '';
    for (let c = 0; c < columns.length; c++) {
      const v = (columns[c] as Float64Array)[r] as number;
      if (v - v !== 0) {
        at = c;
        reason = reasonOf(c, r);
        break;
      }
    }
    if (at < 0 && columns.length === 4 && !(((columns[3] as Float64Array)[r] as number) > 0)) {
      at = 3;
      reason = `weight ${(columns[3] as Float64Array)[r] as number} is not positive`;
    }
    if (at < 0) {
      keep[r] = 1;
      kept++;
    } else rejected.push({ line: table.lines[r] as number, column: (chosen[at] as ColumnInfo).label, reason });
  }
  for (const p of table.problems) if (p.column === undefined) rejected.push({ line: p.line, column: '', reason: p.reason });
  rejected.sort((a, b) => a.line - b.line);
  if (kept === 0) throw noUsableRows(chosen, rejected[0], file);
  const out = columns.map(() => new Float64Array(kept));
  const lines = new Int32Array(kept);
  for (let r = 0, i = 0; r < n; r++) {
    if (keep[r] === 0) continue;
    for (let c = 0; c < columns.length; c++) (out[c] as Float64Array)[i] = (columns[c] as Float64Array)[r] as number;
    lines[i] = table.lines[r] as number;
    i++;
  }
  const [cu, cv, cy, cw] = chosen as [ColumnInfo, ColumnInfo, ColumnInfo, ColumnInfo | undefined];
  const labels = { u: cu.label, v: cv.label, y: cy.label, ...(cw ? { weights: cw.label } : {}) };
  return {
    data: { u: out[0] as Float64Array, v: out[1] as Float64Array, y: out[2] as Float64Array, w: out[3], lines, names: { u: cu.label, v: cv.label, y: cy.label, w: cw?.label ?? 'weights' } },
    rejected,
    labels,
    units: { u: cu.unit, v: cv.unit, y: cy.unit },
  };
}
