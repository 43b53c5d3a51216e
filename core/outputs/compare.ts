/**
 * Where two texts differ, in words a person can act on: the first differing line and, for a
 * CSV table, the column and both values.
 */

/** The first difference between a file and its rebuilt text. */
export interface TextDifference {
  /** 1-based line of the first difference. */
  readonly line: number;
  /** That line in the file and in the rebuilt text (undefined past the end). */
  readonly found: string | undefined;
  readonly rebuilt: string | undefined;
  /** Length of the changed block: lines between the common beginning and the common end (the longer side). */
  readonly lines: number;
}

/** Splits on LF, keeping a CR as part of its line (so CRLF against LF shows as a difference). */
function linesOf(text: string): string[] {
  const l = text.split('\n');
  if (l[l.length - 1] === '') l.pop();
  return l;
}

/**
 * The first differing line of `found` against `rebuilt`, or undefined when they are equal.
 * O(length). Example: textDifference('a\nb\n', 'a\nc\n') -> { line: 2, found: 'b', rebuilt: 'c', lines: 1 }.
 */
export function textDifference(found: string, rebuilt: string): TextDifference | undefined {
  if (found === rebuilt) return undefined;
  const a = linesOf(found);
  const b = linesOf(rebuilt);
  let first = 0;
  while (first < a.length && first < b.length && a[first] === b[first]) first++;
  // Equal lines but different texts: only the final newline differs.
  if (first === a.length && first === b.length) return { line: Math.max(a.length, 1), found: a[a.length - 1], rebuilt: b[b.length - 1], lines: 0 };
  let tail = 0;
  while (tail < a.length - first && tail < b.length - first && a[a.length - 1 - tail] === b[b.length - 1 - tail]) tail++;
  return { line: first + 1, found: a[first], rebuilt: b[first], lines: Math.max(a.length - first - tail, b.length - first - tail) };
}

/** A line or value quoted for a message, or "(no line)" past the end. */
function quoted(text: string | undefined, limit = 80): string {
  if (text === undefined) return '(no line)';
  const t = text.length > limit ? `${text.slice(0, limit)}...` : text;
  return JSON.stringify(t);
}

/** A CSV value for a message: as is when printable, else quoted with escapes. */
function value(v: string | undefined): string {
  if (v === undefined) return '(missing)';
  return /^[\x20-\x7e]*$/.test(v) && v !== '' ? v : JSON.stringify(v);
}

/**
 * The difference described in one sentence. For a CSV table (`csvHeader` given: the rebuilt
 * header's column names) it names the row's x, the first differing column and both values.
 * Example: describeDifference('t.csv', d, ['x', 'fit']) -> 't.csv differs from the rebuilt table at line 3 (x = 2), column fit: 1.5 in the file, 1.25 rebuilt; 1 line differs.'
 */
export function describeDifference(name: string, d: TextDifference, csvHeader?: readonly string[]): string {
  const tail = d.lines === 0 ? 'only the line ends or the final newline differ' : `${d.lines} line${d.lines === 1 ? '' : 's'} differ${d.lines === 1 ? 's' : ''}`;
  if (csvHeader && d.line > 1 && d.found !== undefined && d.rebuilt !== undefined) {
    const a = d.found.split(',');
    const b = d.rebuilt.split(',');
    const j = a.findIndex((v, k) => v !== b[k]);
    const col = j >= 0 ? j : a.length;
    const column = csvHeader[col] ?? `#${col + 1}`;
    return `${name} differs from the rebuilt table at line ${d.line} (x = ${b[0] ?? '?'}), column ${column}: ${value(a[col])} in the file, ${value(b[col])} rebuilt; ${tail}.`;
  }
  return `${name} differs from the rebuilt one at line ${d.line}: ${quoted(d.found)} in the file, ${quoted(d.rebuilt)} rebuilt; ${tail}.`;
}
