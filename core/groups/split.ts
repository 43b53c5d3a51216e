/**
 * Splitting one file's rows into groups: by a column that names each row's device, lot or
 * channel (its cell texts, kept by the reader: CsvReaderOptions.keepText), or by several
 * reading columns against one x (each column a group named after it). Each group is an
 * ordinary XYData with the rows' CSV lines, so it is tuned and fitted exactly as a file of
 * its own would be.
 */
import { InputError } from '../errors';
import { selectColumns, type ColumnChoice, type RejectedRow, type Selection } from '../ingest/select';
import { selectTrials } from '../ingest/trials';
import type { ParsedTable } from '../ingest/types';
import type { XYData } from '../types';

/** One group of rows. */
export interface Group {
  /** The group's name: the cell text of the group column, or a reading column's label. */
  readonly name: string;
  readonly data: XYData;
}

/** The groups of a file and the rows left out. */
export interface GroupSplit {
  /** The groups in order of first appearance in the file (channels: in the order given). */
  readonly groups: readonly Group[];
  /** Rows left out: bad cells of the chosen columns, and rows whose group cell is empty. */
  readonly rejected: readonly RejectedRow[];
  /** Column labels: x, y (the first reading column for channels), weights. */
  readonly labels: Selection['labels'];
  /** The group column's label, or undefined for channels. */
  readonly groupLabel?: string | undefined;
}

/** Rows of `data` at `rows` (indices into it). */
function subset(data: XYData, rows: readonly number[]): XYData {
  const pick = (a: Float64Array): Float64Array => Float64Array.from(rows, (i) => a[i] as number);
  return {
    x: pick(data.x),
    y: pick(data.y),
    ...(data.w ? { w: pick(data.w) } : {}),
    ...(data.lines ? { lines: Int32Array.from(rows, (i) => (data.lines as Int32Array)[i] as number) } : {}),
  };
}

/**
 * Splits the rows selected by `choice` by the group column `by`, whose texts the reader kept
 * (`table.text`; read the file with keepText: by). A row whose group cell is empty is
 * rejected with its line, like any bad cell. Groups keep the file's row order. Throws
 * InputError when the column is missing, is one of x, y or weights, or gives fewer than 2
 * groups. With `trials`, the rows are selected as for a binomial outcome (core/ingest/trials.ts).
 * O(rows).
 * Example: splitByColumn(table, { x: 'temp', y: 'volts' }, 'device', 'rig.csv').groups.map((g) => g.name) -> ['A1', 'A2'].
 */
export function splitByColumn(table: ParsedTable, choice: ColumnChoice, by: string, file?: string, trials?: string): GroupSplit {
  // Successes out of trials (--trials): proportions with the trials as weights, as for one fit.
  const sel = trials !== undefined ? selectTrials(table, choice, trials, file) : selectColumns(table, choice, file);
  const text = table.text;
  const column = text ? table.columns[text.column] : undefined;
  if (!text || !column) {
    const names = table.columns.map((c) => `"${c.label}"`).join(', ');
    throw new InputError(`no column named "${by}" to split the rows by; the columns are ${names}`, { file });
  }
  for (const [role, name] of [
    ['x', sel.labels.x],
    ['y', sel.labels.y],
    ['weights', sel.labels.weights],
  ] as const) {
    if (name === column.label) throw new InputError(`the group column "${by}" is the ${role} column; name a column that says which device each row belongs to`, { file });
  }
  // Table row of each selected row: both run in file order, so one pass pairs them by line.
  const lines = sel.data.lines as Int32Array;
  const members = new Map<number, number[]>();
  const rejected: RejectedRow[] = [...sel.rejected];
  let r = 0;
  for (let i = 0; i < lines.length; i++) {
    const line = lines[i] as number;
    while ((table.lines[r] as number) < line) r++;
    const code = text.codes[r] as number;
    if (code < 0) {
      rejected.push({ line, column: column.label, reason: 'the group cell is empty' });
      continue;
    }
    let rows = members.get(code);
    if (!rows) members.set(code, (rows = []));
    rows.push(i);
  }
  rejected.sort((a, b) => a.line - b.line);
  if (members.size < 2)
    throw new InputError(`the column "${column.label}" names ${members.size === 0 ? 'no group' : `one group ("${text.names[[...members.keys()][0] as number]}")`}; splitting needs at least 2`, {
      file,
    });
  const groups = [...members.entries()].map(([code, rows]) => ({ name: text.names[code] as string, data: subset(sel.data, rows) }));
  return { groups, rejected, labels: sel.labels, groupLabel: column.label };
}

/**
 * One group per reading column against the same x (channels), each named by its column's
 * label; each channel rejects its own bad cells (the rejected rows name the column).
 * Throws InputError for fewer than 2 columns, a repeated column, or one that is x or the
 * weights. O(rows x channels).
 * Example: splitByChannels(table, 'time', ['ch1', 'ch2'], undefined, 'log.csv').groups[1].name -> 'ch2'.
 */
export function splitByChannels(table: ParsedTable, x: string, ys: readonly string[], weights: string | undefined, file?: string): GroupSplit {
  if (ys.length < 2) throw new InputError(`several reading columns need at least 2; got ${ys.length}`, { file });
  const groups: Group[] = [];
  const rejected: RejectedRow[] = [];
  let labels: Selection['labels'] | undefined;
  for (const y of ys) {
    const sel = selectColumns(table, { x, y, ...(weights !== undefined ? { weights } : {}) }, file);
    if (sel.labels.y === sel.labels.x || sel.labels.y === sel.labels.weights) throw new InputError(`the reading column "${y}" is also the x or weights column`, { file });
    if (groups.some((g) => g.name === sel.labels.y)) throw new InputError(`the reading column "${y}" is named twice`, { file });
    labels ??= sel.labels;
    groups.push({ name: sel.labels.y, data: sel.data });
    rejected.push(...sel.rejected.filter((row) => row.column !== sel.labels.x || !rejected.some((o) => o.line === row.line && o.column === row.column)));
  }
  rejected.sort((a, b) => a.line - b.line);
  return { groups, rejected, labels: labels as Selection['labels'] };
}
