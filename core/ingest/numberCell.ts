/**
 * Reading one CSV cell as a number, a missing value or an invalid entry, straight from a
 * range of a string so that the hot path allocates nothing.
 */

/** Cell kinds set by `CellParser.parse`. Missing kinds are below CELL_NOT_NUMBER. */
export const CELL_NUMBER = 0;
/** Empty or only spaces. */
export const CELL_EMPTY = 1;
/** A missing-value token: NA, NaN, null, n/a or - (case-insensitive). */
export const CELL_MISSING = 2;
export const CELL_NOT_NUMBER = 3;
/** Inf, -Inf, Infinity or a number too large for a double (1e999). */
export const CELL_NOT_FINITE = 4;
/** A number written with the other decimal separator than the file uses. */
export const CELL_WRONG_DECIMAL = 5;

export type CellKind = 0 | 1 | 2 | 3 | 4 | 5;

const PLUS = 43;
const MINUS = 45;
const DOT = 46;
const COMMA = 44;
const SLASH = 47;
const ZERO = 48;
const E_LOWER = 101;
/** Largest integer up to which every integer is exactly representable (2^53). */
const EXACT_INTEGER_LIMIT = 9007199254740992;
/** 10^0 .. 10^22, the powers of ten a double holds exactly (Clinger 1990, section 3). */
const POW10 = new Float64Array(23);
for (let k = 0, p = 1; k <= 22; k++, p *= 10) POW10[k] = p;
/** Exponent digits beyond this magnitude cannot change the outcome (overflow or zero). */
const EXPONENT_CAP = 100000;

/** Lower-case code of an ASCII letter; any other code unchanged. */
function lower(c: number): number {
  return c >= 65 && c <= 90 ? c + 32 : c;
}

/** True when s[a, b) equals the lower-case ASCII word, ignoring case. */
function sameWord(s: string, a: number, b: number, word: string): boolean {
  if (b - a !== word.length) return false;
  for (let i = 0; i < word.length; i++) if (lower(s.charCodeAt(a + i)) !== word.charCodeAt(i)) return false;
  return true;
}

/**
 * True for the missing-value tokens NA, NaN, null, n/a and - in s[a, b) (already trimmed),
 * case-insensitive. Cost O(1) (at most 4 characters compared).
 * Example: isMissingToken('N/A', 0, 3) -> true.
 */
export function isMissingToken(s: string, a: number, b: number): boolean {
  const len = b - a;
  if (len === 1) return s.charCodeAt(a) === MINUS;
  if (len === 2) return sameWord(s, a, b, 'na');
  if (len === 3) return lower(s.charCodeAt(a)) === 110 && (sameWord(s, a, b, 'nan') || (s.charCodeAt(a + 1) === SLASH && lower(s.charCodeAt(a + 2)) === 97));
  if (len === 4) return sameWord(s, a, b, 'null');
  return false;
}

/** True for inf / infinity with an optional sign in s[a, b), case-insensitive. */
function isInfinityWord(s: string, a: number, b: number): boolean {
  const c = s.charCodeAt(a);
  if (c === PLUS || c === MINUS) a++;
  return sameWord(s, a, b, 'inf') || sameWord(s, a, b, 'infinity');
}

/**
 * Decimal number in s[a, b) (trimmed) with the decimal separator `sep`, or NaN when the
 * text is not of the form [+-](digits[sep digits] | sep digits)[(e|E)[+-]digits].
 * Hexadecimal, '_' separators and words are refused (unlike Number()). May return
 * +-Infinity for values beyond the double range.
 *
 * Method: Clinger's fast path (W. D. Clinger, "How to read floating point numbers
 * accurately", Proc. ACM SIGPLAN PLDI 1990, pp. 92-101, section 3): when the decimal
 * significand m is at most 2^53 and the power of ten |e| <= 22, both m and 10^|e| are
 * exact doubles and one IEEE 754 multiplication or division gives the correctly rounded
 * result. Every other case falls back to Number() on the text, which is also correctly
 * rounded (ECMA-262, StringToNumber), so the result never depends on the path.
 * Cost O(b - a), no allocation on the fast path.
 * Example: scanNumber('-1.5e2', 0, 6, 46) -> -150.
 */
export function scanNumber(s: string, a: number, b: number, sep: number): number {
  let i = a;
  let c = s.charCodeAt(i);
  let negative = false;
  if (c === PLUS || c === MINUS) {
    negative = c === MINUS;
    i++;
  }
  let m = 0;
  let digits = 0;
  let fractionDigits = 0;
  for (; i < b; i++) {
    const d = s.charCodeAt(i) - ZERO;
    if (d < 0 || d > 9) break;
    m = m * 10 + d;
    digits++;
  }
  if (i < b && s.charCodeAt(i) === sep) {
    i++;
    for (; i < b; i++) {
      const d = s.charCodeAt(i) - ZERO;
      if (d < 0 || d > 9) break;
      m = m * 10 + d;
      digits++;
      fractionDigits++;
    }
  }
  if (digits === 0) return NaN;
  let exponent = 0;
  if (i < b && lower(s.charCodeAt(i)) === E_LOWER) {
    i++;
    let expNegative = false;
    c = s.charCodeAt(i);
    if (c === PLUS || c === MINUS) {
      expNegative = c === MINUS;
      i++;
    }
    const start = i;
    for (; i < b; i++) {
      const d = s.charCodeAt(i) - ZERO;
      if (d < 0 || d > 9) break;
      if (exponent < EXPONENT_CAP) exponent = exponent * 10 + d;
    }
    if (i === start) return NaN;
    if (expNegative) exponent = -exponent;
  }
  if (i !== b) return NaN;
  if (m === 0) return negative ? -0 : 0;
  const e10 = exponent - fractionDigits;
  // m <= 2^53 at the end means every partial m was exact too (they are smaller).
  if (m <= EXACT_INTEGER_LIMIT && e10 >= -22 && e10 <= 22) {
    const v = e10 < 0 ? m / (POW10[-e10] as number) : m * (POW10[e10] as number);
    return negative ? -v : v;
  }
  const text = s.slice(a, b);
  return Number(sep === DOT ? text : text.replace(String.fromCharCode(sep), '.'));
}

/**
 * Classifies cells. After `parse`, `kind` says what the cell was; the returned value is
 * the finite number for CELL_NUMBER and NaN otherwise. Spaces and tabs around the text are
 * ignored. One parser per file (its decimal separator is fixed).
 */
export class CellParser {
  kind: CellKind = CELL_EMPTY;
  private readonly sep: number;
  private readonly otherSep: number;

  constructor(readonly decimalComma: boolean) {
    this.sep = decimalComma ? COMMA : DOT;
    this.otherSep = decimalComma ? DOT : COMMA;
  }

  /**
   * Reads s[start, end). Cost O(end - start), no allocation for plain numbers.
   * Example: new CellParser(true).parse('1,5', 0, 3) -> 1.5 with kind CELL_NUMBER.
   */
  parse(s: string, start: number, end: number): number {
    while (start < end && s.charCodeAt(start) <= 32) start++;
    while (end > start && s.charCodeAt(end - 1) <= 32) end--;
    if (start === end) {
      this.kind = CELL_EMPTY;
      return NaN;
    }
    if (end - start <= 4 && isMissingToken(s, start, end)) {
      this.kind = CELL_MISSING;
      return NaN;
    }
    const v = scanNumber(s, start, end, this.sep);
    if (v === v) {
      if (v - v === 0) {
        this.kind = CELL_NUMBER;
        return v;
      }
      this.kind = CELL_NOT_FINITE;
      return NaN;
    }
    if (isInfinityWord(s, start, end)) this.kind = CELL_NOT_FINITE;
    else if (scanNumber(s, start, end, this.otherSep) === scanNumber(s, start, end, this.otherSep)) this.kind = CELL_WRONG_DECIMAL;
    else this.kind = CELL_NOT_NUMBER;
    return NaN;
  }
}

/** Longest cell text quoted in a message. */
const QUOTE_LIMIT = 40;

/** The cell text as a JSON string literal, shortened to about 40 characters. */
export function quoteCell(text: string): string {
  const t = text.trim();
  return JSON.stringify(t.length > QUOTE_LIMIT ? `${t.slice(0, QUOTE_LIMIT - 1)}\u2026` : t);
}

/**
 * Reason for an invalid cell, quoting its text, e.g. `"abc" is not a number`.
 * `decimalComma` is the file's convention (used in the hint for CELL_WRONG_DECIMAL).
 */
export function cellReason(kind: CellKind, text: string, decimalComma: boolean): string {
  const q = quoteCell(text);
  if (kind === CELL_NOT_FINITE) return `${q} is not finite`;
  if (kind === CELL_WRONG_DECIMAL) return `${q} is not a number (this file uses a decimal ${decimalComma ? 'comma' : 'point'})`;
  if (kind === CELL_EMPTY || kind === CELL_MISSING) return 'missing value';
  return `${q} is not a number`;
}

/** Reason without the cell text (for cells beyond the per-column limit of quoted reasons). */
export function shortCellReason(kind: CellKind): string {
  if (kind === CELL_NOT_FINITE) return 'not finite';
  if (kind === CELL_WRONG_DECIMAL) return 'not a number (wrong decimal separator)';
  if (kind === CELL_EMPTY || kind === CELL_MISSING) return 'missing value';
  return 'not a number';
}
