import { FLAG_COLUMNS, type CurveTable } from './curveTable';

/** Default significant digits of a curve table. */
export const DEFAULT_DIGITS = 8;

/**
 * A number with `digits` significant digits and no trailing zeros. Uses
 * Number.prototype.toPrecision, which ECMAScript specifies exactly, so the text is the
 * same on every platform. Flag columns (FLAG_COLUMNS) print as integers in curveTableCsv.
 */
export function formatNumber(v: number, digits: number): string {
  if (!Number.isFinite(v)) return Number.isNaN(v) ? 'NaN' : v > 0 ? 'Inf' : '-Inf';
  if (v === 0) return '0';
  const s = v.toPrecision(digits);
  if (s.includes('e')) {
    const [m, e] = s.split('e') as [string, string];
    return `${m.includes('.') ? m.replace(/\.?0+$/, '') : m}e${e}`;
  }
  return s.includes('.') ? s.replace(/\.?0+$/, '') : s;
}

/** The curve table as CSV text: header, one line per grid point, LF line ends, final newline. */
export function curveTableCsv(table: CurveTable, digits = DEFAULT_DIGITS): string {
  const lines = [table.columns.join(',')];
  const flags = table.columns.map((c) => FLAG_COLUMNS.includes(c));
  for (const row of table.rows) lines.push(row.map((v, j) => (flags[j] ? String(v) : formatNumber(v, digits))).join(','));
  return lines.join('\n') + '\n';
}
