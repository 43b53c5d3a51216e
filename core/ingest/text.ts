/**
 * Characters that must not reach a message or a terminal as they are, and the limits on
 * how much of a name or cell a message quotes.
 *
 * Control characters are the Unicode general category Cc (The Unicode Standard, chapter 23,
 * "Control Codes"): C0 (U+0000-U+001F), DEL (U+007F) and C1 (U+0080-U+009F). A message
 * shows them, and the other characters a reader cannot see or that reorder the text
 * around them (no-break and other spaces, zero-width characters, bidirectional formatting
 * characters, line and paragraph separators), as \uXXXX escapes.
 */

/** Characters of a column name quoted in a message; longer names end in an ellipsis. */
export const MESSAGE_NAME_CHARS = 60;

/**
 * True for a control character (Unicode Cc: C0, DEL, C1). Tab, CR and LF are control
 * characters too; callers that allow them as white space or line breaks test them first.
 * Example: isControl(7) -> true, isControl(0x85) -> true, isControl(65) -> false.
 */
export function isControl(c: number): boolean {
  return c < 32 || (c >= 127 && c <= 159);
}

/**
 * Position of the first control character in s[start, end), or -1. Cost O(end - start).
 * Example: findControl('1\u00072', 0, 3) -> 1.
 */
export function findControl(s: string, start: number, end: number): number {
  for (let i = start; i < end; i++) if (isControl(s.charCodeAt(i))) return i;
  return -1;
}

/** The code point of a UTF-16 code unit as U+XXXX. */
export function codePoint(c: number): string {
  return `U+${c.toString(16).toUpperCase().padStart(4, '0')}`;
}

/**
 * Characters escaped for display: control characters, spaces other than U+0020 (Unicode
 * Zs), zero-width characters and the byte order mark, bidirectional marks, embeddings,
 * overrides and isolates (Unicode Standard Annex #9, section 2), and the line and
 * paragraph separators U+2028 and U+2029.
 */
// eslint-disable-next-line no-control-regex
const HIDDEN = /[\u0000-\u001f\u007f-\u00a0\u1680\u180e\u2000-\u200f\u2028-\u202f\u205f-\u2064\u2066-\u206f\u3000\ufeff]/g;

/**
 * The text with every control or invisible character written as a \uXXXX escape, so it
 * prints as one visible line. Example: escapeHidden('a\u0007b\u202e') -> 'a\\u0007b\\u202e'.
 */
export function escapeHidden(text: string): string {
  return text.replace(HIDDEN, (ch) => `\\u${ch.charCodeAt(0).toString(16).padStart(4, '0')}`);
}

/**
 * The first `limit` characters of the text and an ellipsis when it is longer; never
 * splits a surrogate pair. Example: shorten('abcdef', 3) -> 'abc…'.
 */
export function shorten(text: string, limit: number): string {
  if (text.length <= limit) return text;
  let cut = limit;
  const c = text.charCodeAt(cut - 1);
  if (c >= 0xd800 && c <= 0xdbff) cut--;
  return `${text.slice(0, cut)}\u2026`;
}

/**
 * A column name for a message: at most 60 characters (then "…"), hidden characters
 * escaped, in double quotes. Example: quoteName('flow') -> '"flow"'.
 */
export function quoteName(name: string): string {
  return `"${escapeHidden(shorten(name, MESSAGE_NAME_CHARS))}"`;
}
