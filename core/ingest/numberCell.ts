/**
 * Reading one CSV cell as a number, a missing value or an invalid entry, straight from a
 * range of a string so that the hot path allocates nothing.
 */
import { codePoint, escapeHidden, findControl, shorten } from './text';

/** Cell kinds set by `CellParser.parse`. Missing kinds are below CELL_NOT_NUMBER. */
export const CELL_NUMBER = 0;
/** Empty or only spaces. */
export const CELL_EMPTY = 1;
/** A missing-value token: NA, NaN, null, n/a or - (case-insensitive). */
export const CELL_MISSING = 2;
export const CELL_NOT_NUMBER = 3;
/** The words Inf, -Inf, Infinity (any letter case). */
export const CELL_NOT_FINITE = 4;
/** A number written with the other decimal separator than its column uses. */
export const CELL_WRONG_DECIMAL = 5;
/** A decimal number beyond the largest double, which would read as infinity (1e309). */
export const CELL_OVERFLOW = 6;
/** A decimal number with a non-zero digit that would read as 0 (1e-400). */
export const CELL_UNDERFLOW = 7;
/** Text holding a control character (C0 other than tab at its ends, DEL, C1). */
export const CELL_CONTROL = 8;

export type CellKind = 0 | 1 | 2 | 3 | 4 | 5 | 6 | 7 | 8;

const PLUS = 43;
const MINUS = 45;
const DOT = 46;
const COMMA = 44;
const SLASH = 47;
const ZERO = 48;
const SPACE = 32;
const TAB = 9;
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

/** Space or tab: the only characters ignored around a cell. */
function isBlankCode(c: number): boolean {
  return c === SPACE || c === TAB;
}

/** True when every digit before the exponent of the trimmed text s[a, b) is 0. */
function zeroSignificand(s: string, a: number, b: number): boolean {
  for (let i = a; i < b; i++) {
    const c = s.charCodeAt(i);
    if (lower(c) === E_LOWER) return true;
    if (c > ZERO && c <= ZERO + 9) return false;
  }
  return true;
}

/**
 * Classifies cells. After `parse`, `kind` says what the cell was; the returned value is
 * the finite number for CELL_NUMBER and NaN otherwise. Spaces and tabs around the text are
 * ignored; any other control character makes the cell CELL_CONTROL (never stripped). One
 * parser per decimal convention (its separator is fixed).
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
   * A decimal number beyond the double range is CELL_OVERFLOW; one whose significand has
   * a non-zero digit but which rounds to 0 is CELL_UNDERFLOW (IEEE 754-2019, section 7.4
   * and 7.5: overflow to infinity, underflow to zero); subnormal results are numbers.
   * Example: new CellParser(true).parse('1,5', 0, 3) -> 1.5 with kind CELL_NUMBER.
   */
  parse(s: string, start: number, end: number): number {
    while (start < end && isBlankCode(s.charCodeAt(start))) start++;
    while (end > start && isBlankCode(s.charCodeAt(end - 1))) end--;
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
      if (v - v !== 0) {
        this.kind = CELL_OVERFLOW;
        return NaN;
      }
      if (v === 0 && !zeroSignificand(s, start, end)) {
        this.kind = CELL_UNDERFLOW;
        return NaN;
      }
      this.kind = CELL_NUMBER;
      return v;
    }
    if (findControl(s, start, end) >= 0) this.kind = CELL_CONTROL;
    else if (isInfinityWord(s, start, end)) this.kind = CELL_NOT_FINITE;
    else if (scanNumber(s, start, end, this.otherSep) === scanNumber(s, start, end, this.otherSep)) this.kind = CELL_WRONG_DECIMAL;
    else this.kind = CELL_NOT_NUMBER;
    return NaN;
  }
}

/** Longest cell text quoted in a message. */
const QUOTE_LIMIT = 40;

/** The text without the spaces and tabs at its ends (the parser's notion of blank). */
function trimBlanks(text: string): string {
  return text.replace(/^[ \t]+|[ \t]+$/g, '');
}

/**
 * The cell text as a JSON string literal, shortened to about 40 characters, with control
 * and invisible characters escaped (core/ingest/text.ts), so a message never carries them raw.
 * Example: quoteCell(' 1\u0007 ') -> '"1\\u0007"'.
 */
export function quoteCell(text: string): string {
  const t = trimBlanks(text);
  return escapeHidden(JSON.stringify(t.length > QUOTE_LIMIT ? shorten(t, QUOTE_LIMIT - 1) : t));
}

/** Non-ASCII decimal digits (Unicode Nd), such as Arabic-Indic or full-width digits. */
const OTHER_DIGITS = /(?![0-9])\p{Nd}/u;
/** Dashes that look like a minus sign but are not U+002D. */
const DASHES = /^[\u2010-\u2015\u2212\ufe58\ufe63\uff0d]/;
/** A separator between digits: grouping by space, apostrophe, underscore or thin spaces. */
const GROUPING = /\d[ '_\u00a0\u2009\u202f]\d/;

/** Why a text that is close to a number is not read as one, or '' (the hint of a reason). */
function notNumberHint(t: string): string {
  if (OTHER_DIGITS.test(t)) return 'only the digits 0-9 are read';
  if (DASHES.test(t)) return 'a minus sign must be the ASCII hyphen-minus "-"';
  if (/^[+-]?0[xXbBoO][0-9a-fA-F]/.test(t)) return 'only decimal numbers are read';
  if (/\d[.,]\d*[.,]\d/.test(t) && t.includes('.') && t.includes(',')) return 'thousands separators are not supported';
  if (GROUPING.test(t)) return 'digit group separators are not supported';
  return '';
}

/** True when the text may be a number with one thousands separator ("1,234", "12.500"). */
function mayBeGrouped(t: string): boolean {
  return /^[+-]?\d{1,3}[.,]\d{3}$/.test(t);
}

/**
 * Reason for an invalid cell, quoting its text, e.g. `"abc" is not a number`.
 * `decimalComma` is the convention of the cell's column (used in the hint for
 * CELL_WRONG_DECIMAL). Thousands separators are never read: `1,234` in a decimal-point
 * column is refused, not read as 1234.
 */
export function cellReason(kind: CellKind, text: string, decimalComma: boolean): string {
  const q = quoteCell(text);
  const t = trimBlanks(text);
  if (kind === CELL_NOT_FINITE) return `${q} is not finite`;
  if (kind === CELL_OVERFLOW) return `${q} is beyond the largest double, about 1.8e308 (it would overflow to infinity, IEEE 754)`;
  if (kind === CELL_UNDERFLOW) return `${q} is below the smallest double, about 4.9e-324 (it would underflow to 0, IEEE 754)`;
  if (kind === CELL_CONTROL) {
    const at = findControl(t, 0, t.length);
    const c = t.charCodeAt(at);
    const what = c === 10 || c === 13 ? 'a line break' : c === 9 ? 'a tab' : 'the control character';
    return `${q} holds ${what} ${codePoint(c)} at character ${at + 1}, which no number holds`;
  }
  if (kind === CELL_WRONG_DECIMAL) {
    const grouped = mayBeGrouped(t) ? '; thousands separators are not supported' : '';
    return `${q} is not a number (this column uses a decimal ${decimalComma ? 'comma' : 'point'}${grouped})`;
  }
  if (kind === CELL_EMPTY || kind === CELL_MISSING) return 'missing value';
  const hint = notNumberHint(t);
  return hint === '' ? `${q} is not a number` : `${q} is not a number (${hint})`;
}

/** Reason without the cell text (for cells beyond the per-column limit of quoted reasons). */
export function shortCellReason(kind: CellKind): string {
  if (kind === CELL_NOT_FINITE) return 'not finite';
  if (kind === CELL_OVERFLOW) return 'beyond the largest double (overflow)';
  if (kind === CELL_UNDERFLOW) return 'below the smallest double (underflow to 0)';
  if (kind === CELL_CONTROL) return 'holds a control character';
  if (kind === CELL_WRONG_DECIMAL) return 'not a number (wrong decimal separator)';
  if (kind === CELL_EMPTY || kind === CELL_MISSING) return 'missing value';
  return 'not a number';
}
