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

/** Text of bytes as UTF-8, keeping a byte order mark (so it shows as a difference); invalid bytes become U+FFFD. */
function utf8(bytes: Uint8Array): string {
  return new TextDecoder('utf-8', { ignoreBOM: true }).decode(bytes);
}

/**
 * A file's bytes against the text rebuilt for it, compared byte for byte (the rebuilt
 * text as UTF-8): undefined when equal, else one sentence saying where they differ (as
 * describeDifference; the first differing byte when the texts read the same but the bytes
 * do not, as with bytes that are not UTF-8). O(length).
 * Example: compareFile('t.h', bytes, text) -> 't.h differs from the rebuilt one at line 2: ...'.
 */
export function compareFile(name: string, found: Uint8Array, rebuilt: string, csvHeader?: readonly string[]): string | undefined {
  const want = new TextEncoder().encode(rebuilt);
  if (found.length === want.length && found.every((b, i) => b === want[i])) return undefined;
  const d = textDifference(utf8(found), rebuilt);
  if (d) return describeDifference(name, d, csvHeader);
  let at = 0;
  while (at < found.length && at < want.length && found[at] === want[at]) at++;
  return `${name} differs from the rebuilt one in its bytes from byte ${at + 1} on (it is not valid UTF-8 there).`;
}

/** One place where two JSON values differ. */
export interface JsonDifference {
  /** Key path: `fit.coefficients[3]`, `tool.version`; empty for the whole value. */
  readonly path: string;
  /** What the file holds there and what the rebuilt value holds, in words ("missing", "3 items", or the JSON value). */
  readonly found: string;
  readonly rebuilt: string;
}

/** A JSON value for a message: its JSON text, cut at 80 characters (a quoted SHA-256 shows whole). */
function jsonShown(v: unknown): string {
  const t = JSON.stringify(v) ?? 'undefined';
  return t.length > 80 ? `${t.slice(0, 80)}...` : t;
}

/** A key path joined with a key or an index. */
function keyPath(path: string, key: string | number): string {
  if (typeof key === 'number') return `${path}[${key}]`;
  const k = /^[A-Za-z_$][\w$]*$/.test(key) ? key : JSON.stringify(key);
  return path ? `${path}.${k}` : k;
}

/**
 * Every place where the parsed JSON `found` differs from `rebuilt`, in the rebuilt value's
 * key order (keys only in `found` after): values of another type or value, keys missing on
 * either side, arrays of another length (compared item by item over the shorter). Numbers
 * compare by value. O(size of both).
 * Example: jsonDifferences({ a: [1, 2] }, { a: [1, 3] }) -> [{ path: 'a[1]', found: '2', rebuilt: '3' }].
 */
export function jsonDifferences(found: unknown, rebuilt: unknown, path = ''): JsonDifference[] {
  const out: JsonDifference[] = [];
  const walk = (a: unknown, b: unknown, p: string): void => {
    const aObj = a !== null && typeof a === 'object';
    const bObj = b !== null && typeof b === 'object';
    if (Array.isArray(a) && Array.isArray(b)) {
      for (let i = 0; i < Math.min(a.length, b.length); i++) walk(a[i], b[i], keyPath(p, i));
      if (a.length !== b.length) out.push({ path: p, found: `${a.length} item(s)`, rebuilt: `${b.length} item(s)` });
      return;
    }
    if (aObj && bObj && !Array.isArray(a) && !Array.isArray(b)) {
      const ao = a as Record<string, unknown>;
      const bo = b as Record<string, unknown>;
      const has = (o: object, k: string): boolean => Object.prototype.hasOwnProperty.call(o, k);
      for (const k of Object.keys(bo)) {
        if (has(ao, k)) walk(ao[k], bo[k], keyPath(p, k));
        else out.push({ path: keyPath(p, k), found: 'missing', rebuilt: jsonShown(bo[k]) });
      }
      for (const k of Object.keys(ao)) if (!has(bo, k)) out.push({ path: keyPath(p, k), found: jsonShown(ao[k]), rebuilt: 'missing' });
      return;
    }
    if (aObj || bObj || a !== b) out.push({ path: p, found: jsonShown(a), rebuilt: jsonShown(b) });
  };
  walk(found, rebuilt, path);
  return out;
}

/**
 * `text` safe to print on a terminal: control and format characters (escape sequences,
 * direction overrides) written as \u{...}. Example: printable('a\u001b[2J') -> 'a\\u{1b}[2J'.
 */
export function printable(text: string): string {
  return text.replace(/[\p{Cc}\p{Cf}]/gu, (c) => `\\u{${(c.codePointAt(0) as number).toString(16)}}`);
}
