/**
 * Column names and units from the header row, unique labels for every column, and the
 * limits on the header: how many columns and how long a name.
 */
import { isControl } from './text';

/**
 * Most columns a table may have. A header row (or, without one, a first record) with more
 * fields is refused as soon as its field number MAX_COLUMNS + 1 is read, before any
 * per-column storage exists. A measurement log has tens of columns; 10,000 leaves room for
 * wide exports while keeping the per-column arrays of a table within tens of megabytes.
 */
export const MAX_COLUMNS = 10_000;

/** Characters of a header cell kept as its header text and label; longer cells are cut and end in "…". */
export const MAX_NAME_CHARS = 200;

/**
 * A header cell as kept: every run of tabs, CRs and LFs (a quoted name may span lines)
 * becomes one space, and the text is cut after MAX_NAME_CHARS characters with "…". Other
 * control characters are left for `headerControl` to refuse. Cost O(min(length, 201)).
 * Example: headerText('flow\r\n[L/min]') -> 'flow [L/min]'.
 */
export function headerText(raw: string): string {
  const head = raw.length > MAX_NAME_CHARS + 1 ? raw.slice(0, MAX_NAME_CHARS + 1) : raw;
  const text = head.replace(/[\t\r\n]+/g, ' ');
  if (text.length <= MAX_NAME_CHARS && head.length === raw.length) return text;
  const cut = text.charCodeAt(MAX_NAME_CHARS - 1) >= 0xd800 && text.charCodeAt(MAX_NAME_CHARS - 1) <= 0xdbff ? MAX_NAME_CHARS - 1 : MAX_NAME_CHARS;
  return `${text.slice(0, cut)}\u2026`;
}

/**
 * Position of the first control character in a kept header text (tabs and line breaks
 * are already spaces), or -1. A name with one is refused: it could change what a
 * terminal shows, or break a line of a generated file that names the column.
 * Example: headerControl('temp\u0007') -> 4.
 */
export function headerControl(text: string): number {
  for (let i = 0; i < text.length; i++) if (isControl(text.charCodeAt(i))) return i;
  return -1;
}

/** A header cell split into its name and the unit at its end. */
export interface HeaderName {
  readonly name: string;
  readonly unit: string | undefined;
}

/** Name, then a unit in [..] or (..) at the very end: `flow [L/min]`, `T(degC)`. */
const UNIT_PATTERN = /^(.*?)\s*(?:\[\s*([^[\]]*?)\s*\]|\(\s*([^()]*?)\s*\))$/s;

/**
 * Splits a header cell into name and unit: `flow [L/min]` -> { name: 'flow', unit:
 * 'L/min' }, `temperature (degC)` -> { name: 'temperature', unit: 'degC' }. Text without
 * a trailing bracket, or with an empty name or unit, or a unit of digits only (`flow (2)`,
 * the form of generated labels), is all name.
 */
export function splitUnit(header: string): HeaderName {
  const text = header.trim();
  const m = UNIT_PATTERN.exec(text);
  const name = m?.[1];
  const unit = m?.[2] ?? m?.[3];
  // A bare number in brackets is a copy marker ("flow (2)"), not a unit.
  if (name === undefined || unit === undefined || name === '' || unit === '' || /^\d+$/.test(unit)) return { name: text, unit: undefined };
  return { name, unit };
}

/** Label, name and unit of one column. */
export interface ColumnName {
  readonly label: string;
  readonly header: string;
  readonly unit: string | undefined;
}

/**
 * Unique labels for `count` columns. With header texts, a column's label is its name
 * without the unit; empty names become "column k" (k 1-based) and repeats get " (2)",
 * " (3)", ... in order, skipping any label another column already has. Without a header
 * every column is "column k". Example: columnNames(['x', 'x', '']) -> labels x, x (2),
 * column 3.
 */
export function columnNames(headers: readonly string[] | undefined, count: number): ColumnName[] {
  const parts: HeaderName[] = [];
  const wanted: string[] = [];
  for (let k = 0; k < count; k++) {
    const part = headers === undefined ? { name: '', unit: undefined } : splitUnit(headers[k] ?? '');
    parts.push(part);
    wanted.push(part.name === '' ? `column ${k + 1}` : part.name);
  }
  const taken = new Set<string>();
  const labels: (string | undefined)[] = wanted.map((w) => {
    if (taken.has(w)) return undefined;
    taken.add(w);
    return w;
  });
  const allWanted = new Set(wanted);
  return parts.map((part, k) => {
    let label = labels[k];
    if (label === undefined) {
      const base = wanted[k] as string;
      let n = 2;
      while (taken.has(`${base} (${n})`) || allWanted.has(`${base} (${n})`)) n++;
      label = `${base} (${n})`;
      taken.add(label);
    }
    return { label, header: headers?.[k] ?? '', unit: part.unit };
  });
}
