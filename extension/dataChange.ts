/**
 * How the data changed between two texts of one CSV, cheaply: the data rows (non-blank
 * lines after the header) are compared as a multiset of lines in O(rows), so an edited
 * value is a changed row, a new line an added row and a deleted line a removed row; rows
 * that only moved do not count. No vscode import, so the tests run it anywhere.
 */

/** Rows added, removed and changed, and whether the header line changed. */
export interface RowChange {
  readonly added: number;
  readonly removed: number;
  readonly changed: number;
  readonly header: boolean;
}

/** The header line and data rows of a CSV text (blank lines and a byte order mark left out). */
function split(text: string): { header: string | undefined; rows: string[] } {
  const lines = text.replace(/^\uFEFF/, '').split(/\r\n|\r|\n/);
  const rows: string[] = [];
  let header: string | undefined;
  for (const line of lines) {
    if (line.trim() === '') continue;
    if (header === undefined) header = line;
    else rows.push(line);
  }
  return { header, rows };
}

/**
 * Compares the data rows of `before` and `after`. Unmatched rows on both sides pair up as
 * changed rows; the rest are added (only in `after`) or removed (only in `before`).
 * Example: compareRows('x,y\n1,2\n3,4\n', 'x,y\n1,2\n3,5\n6,7\n') -> { added: 1, removed: 0, changed: 1, header: false }.
 */
export function compareRows(before: string, after: string): RowChange {
  if (before === after) return { added: 0, removed: 0, changed: 0, header: false };
  const a = split(before);
  const b = split(after);
  const counts = new Map<string, number>();
  for (const row of a.rows) counts.set(row, (counts.get(row) ?? 0) + 1);
  let onlyAfter = 0;
  for (const row of b.rows) {
    const n = counts.get(row) ?? 0;
    if (n > 0) counts.set(row, n - 1);
    else onlyAfter++;
  }
  let onlyBefore = 0;
  for (const n of counts.values()) onlyBefore += n;
  const changed = Math.min(onlyBefore, onlyAfter);
  return { added: onlyAfter - changed, removed: onlyBefore - changed, changed, header: a.header !== b.header };
}

/** Number of data rows (non-blank lines after the first non-blank one) of a CSV text, in one pass. */
export function dataRowCount(text: string): number {
  let rows = 0;
  let header = false;
  let blank = true;
  for (let i = 0; i <= text.length; i++) {
    const c = i < text.length ? text.charCodeAt(i) : 10;
    if (c === 10 || c === 13) {
      if (!blank) {
        if (header) rows++;
        else header = true;
      }
      blank = true;
    } else if (c !== 32 && c !== 9 && c !== 0xfeff) {
      blank = false;
    }
  }
  return rows;
}
