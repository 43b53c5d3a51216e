/**
 * The column set of a curve table: which columns the person asked for, plus the flag
 * columns that safety requires whenever they flag a row.
 */
import { InputError } from '../errors';
import { opt } from '../words/options';
import { OPTIONAL_COLUMNS, TABLE_COLUMNS, type CurveTable, type TableColumn } from './curveTable';

const KNOWN: readonly TableColumn[] = [...TABLE_COLUMNS, ...OPTIONAL_COLUMNS];

/**
 * Parses a column list such as `x,fit,se`: known names (TABLE_COLUMNS and `negative`), no
 * repeats, `x` included; the order given is the order written. Throws InputError naming
 * the bad entry. Example: parseColumns('x, fit') -> ['x', 'fit'].
 */
export function parseColumns(text: string): TableColumn[] {
  const names = text.split(',').map((s) => s.trim());
  const out: TableColumn[] = [];
  for (const n of names) {
    const c = KNOWN.find((k) => k === n);
    if (c === undefined) throw new InputError(`table column "${n}" in "${text}" is not known; the columns are ${KNOWN.join(', ')}`);
    if (out.includes(c)) throw new InputError(`table column "${n}" is listed twice in "${text}"`);
    out.push(c);
  }
  if (!out.includes('x')) throw new InputError(`the table columns "${text}" must include x`);
  return out;
}

/** The table's columns after shaping, and the flag columns added although not asked for. */
export interface ShapedTable {
  readonly table: CurveTable;
  readonly added: readonly TableColumn[];
}

/**
 * Reduces a full curve table (curveTable's columns) to `requested` (all of TABLE_COLUMNS
 * when undefined, plus `negative` when `nonnegative`), in that order. The `negative` column
 * (1 where fit < 0) exists only for a quantity declared non-negative. A flag column that
 * flags at least one row is appended when the request left it out, so an extrapolated or
 * negative row is never written unmarked. O(rows x columns).
 * Example: shapeTable(curveTable(fit, pts), ['x', 'fit'], false).table.columns -> ['x', 'fit'] (inside the data range).
 */
export function shapeTable(full: CurveTable, requested: readonly TableColumn[] | undefined, nonnegative: boolean): ShapedTable {
  const fitAt = full.columns.indexOf('fit');
  const extAt = full.columns.indexOf('extrapolated');
  if (requested?.includes('negative') && !nonnegative) throw new InputError(`the table column "negative" needs the quantity declared non-negative (${opt('flagNegative')})`);
  const columns: TableColumn[] = requested ? [...requested] : [...TABLE_COLUMNS, ...(nonnegative ? (['negative'] as const) : [])];
  const added: TableColumn[] = [];
  if (!columns.includes('extrapolated') && full.rows.some((r) => r[extAt] === 1)) added.push('extrapolated');
  if (nonnegative && !columns.includes('negative') && full.rows.some((r) => (r[fitAt] as number) < 0)) added.push('negative');
  columns.push(...added);
  // -1 marks the computed `negative` flag.
  const from = columns.map((c) => (c === 'negative' ? -1 : full.columns.indexOf(c)));
  const rows = full.rows.map((r) => from.map((j) => (j < 0 ? ((r[fitAt] as number) < 0 ? 1 : 0) : (r[j] as number))));
  return { table: { columns, rows }, added };
}
