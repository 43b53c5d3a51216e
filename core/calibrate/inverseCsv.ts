/**
 * The inverse table as CSV text: header, one line per reading, LF line ends, final newline;
 * numbers with the table's significant digits, flags as 0/1, an open end as NaN.
 */
import { isFlag } from '../emit/common';
import { formatNumber } from '../table/formatCsv';
import type { InverseTable } from './inverse';

/** Example: inverseTableCsv(table, 8) starts with "reading,quantity,lower,upper,open,wide,outside\n". */
export function inverseTableCsv(table: Pick<InverseTable, 'columns' | 'rows'>, digits: number): string {
  const flags = table.columns.map((c) => isFlag(c));
  const lines = [table.columns.join(',')];
  for (const row of table.rows) lines.push(row.map((v, j) => (flags[j] ? String(v) : formatNumber(v, digits))).join(','));
  return lines.join('\n') + '\n';
}
