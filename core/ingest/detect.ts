/**
 * Format detection on the start of a CSV text: binary check, line ending, delimiter,
 * decimal convention per column and header row. The sample is parsed with papaparse once
 * per candidate delimiter; the candidate whose records have the most consistent field
 * count and the most numeric cells wins.
 */
import Papa from 'papaparse';
import { InputError } from '../errors';
import { MAX_COLUMNS } from './header';
import { CELL_EMPTY, CELL_MISSING, CELL_NUMBER, CELL_OVERFLOW, CELL_UNDERFLOW, CellParser } from './numberCell';
import { unterminatedQuote } from './tableBuilder';
import { CsvTokenizer } from './tokenizer';
import type { CsvReaderOptions, Delimiter, LineEnding } from './types';

/** Characters of the text start used for detection (64 K), at least. */
export const DETECT_CHARS = 65536;
/**
 * Line breaks the detection sample reaches: past DETECT_CHARS when the first lines are
 * long (a wide header), so that it holds two complete records after its last, possibly
 * partial, one is dropped.
 */
export const DETECT_BREAKS = 3;
/**
 * Characters of the longest detection sample (2 M): room for a header of MAX_COLUMNS
 * names of MAX_NAME_CHARS characters (core/ingest/header.ts). A first line longer than
 * this with no field break at all is refused.
 */
export const MAX_DETECT_CHARS = 1 << 21;

const LF_CODE = 10;
const CR_CODE = 13;

/**
 * Length of the detection sample of a text: DETECT_CHARS characters, or up to the end of
 * its DETECT_BREAKS-th line break (CRLF counts once) when that is later, at most
 * MAX_DETECT_CHARS; the whole text when it is shorter. The sample depends only on the
 * text, never on how it arrived in chunks. Cost O(sample length).
 * Example: sampleLength('x,y\n1,2\n') -> 8.
 */
export function sampleLength(text: string): number {
  if (text.length <= DETECT_CHARS) return text.length;
  const end = breakEnd(text, 0, Math.min(text.length, MAX_DETECT_CHARS), { breaks: 0, afterCR: false });
  return Math.min(text.length, end === undefined ? MAX_DETECT_CHARS : Math.max(DETECT_CHARS, end));
}

/** Line breaks counted so far by `breakEnd`, carried from one piece of text to the next. */
export interface BreakCount {
  breaks: number;
  afterCR: boolean;
}

/**
 * Scans s[from, to) counting line breaks into `count` (a CR, and an LF not right after a
 * CR, each end a line) and returns the position just after the DETECT_BREAKS-th, or
 * undefined when it is not in this range.
 */
export function breakEnd(s: string, from: number, to: number, count: BreakCount): number | undefined {
  for (let i = from; i < to; i++) {
    const c = s.charCodeAt(i);
    if (c === CR_CODE || (c === LF_CODE && !count.afterCR)) {
      count.breaks++;
      if (count.breaks >= DETECT_BREAKS) {
        count.afterCR = c === CR_CODE;
        return i + 1;
      }
    }
    count.afterCR = c === CR_CODE;
  }
  return undefined;
}
/** Characters checked for binary content. */
export const BINARY_CHECK_CHARS = 1024;
/** Largest share of control or undecodable characters still taken as text. */
const MAX_NON_TEXT_SHARE = 0.1;
/** Records parsed per candidate delimiter. */
const DETECT_RECORDS = 2000;
const CANDIDATES: readonly Delimiter[] = [',', ';', '\t'];

/** Result of `detectFormat`. */
export interface Detection {
  readonly delimiter: Delimiter;
  /** Convention of columns without evidence in the sample (the sample's majority). */
  readonly decimalComma: boolean;
  /** Convention of each column of the sample's widest record (index k). */
  readonly columnDecimalComma: readonly boolean[];
  readonly header: boolean;
  readonly lineEnding: LineEnding;
  /** Most common number of fields per record in the sample. */
  readonly fieldCount: number;
}

/** Share of NULs among the characters checked above which the text may be UTF-16. */
const UTF16_NUL_SHARE = 0.3;
/** Share of those NULs that must sit at one parity (odd for little-endian, even for big-endian). */
const UTF16_PARITY_SHARE = 0.9;

/**
 * The byte order of UTF-16 text read as UTF-8, or undefined. Text of Latin letters and
 * digits in UTF-16 without a byte order mark has a zero byte beside every character
 * (The Unicode Standard, section 3.10, UTF-16BE and UTF-16LE), which UTF-8 decoding turns
 * into a NUL at every other position: odd positions for little-endian, even ones for
 * big-endian. Cost O(n).
 */
function utf16Order(text: string, n: number): 'little-endian' | 'big-endian' | undefined {
  let even = 0;
  let odd = 0;
  for (let i = 0; i < n; i++) {
    if (text.charCodeAt(i) !== 0) continue;
    if (i % 2 === 0) even++;
    else odd++;
  }
  const nul = even + odd;
  if (n < 4 || nul < UTF16_NUL_SHARE * n) return undefined;
  if (odd >= UTF16_PARITY_SHARE * nul) return 'little-endian';
  if (even >= UTF16_PARITY_SHARE * nul) return 'big-endian';
  return undefined;
}

/**
 * Throws InputError when the first 1024 characters are not CSV text: UTF-16 without a
 * byte order mark is named as such with the fix; otherwise "looks like a binary file" for
 * a NUL or more than 10 % control characters (other than tab, CR, LF) or U+FFFD (bytes
 * that were not valid UTF-8). Cost O(1024).
 * Example: checkNotBinary('x,y\n1,2\n') passes; checkNotBinary('\u0000\u0001') throws.
 */
export function checkNotBinary(text: string, file?: string): void {
  const n = Math.min(text.length, BINARY_CHECK_CHARS);
  const order = utf16Order(text, n);
  if (order !== undefined) {
    // A UTF-16 byte order mark read as UTF-8 gives two U+FFFD: the mark was there, the decoder ignored it.
    const markLost = text.charCodeAt(0) === 0xfffd && text.charCodeAt(1) === 0xfffd;
    const what = markLost
      ? `looks like UTF-16 (${order}) text whose byte order mark was not honoured (it was read as UTF-8)`
      : `looks like UTF-16 (${order}) text without a byte order mark, which Knotwise cannot tell from binary data`;
    throw new InputError(`${what}; save it as UTF-8 (or as UTF-16 with a byte order mark)`, { file });
  }
  let bad = 0;
  for (let i = 0; i < n; i++) {
    const c = text.charCodeAt(i);
    if (c === 0) throw new InputError('looks like a binary file, not CSV text (it contains NUL bytes)', { file });
    if ((c < 32 && c !== 9 && c !== 10 && c !== 13) || c === 127 || c === 0xfffd) bad++;
  }
  if (n > 0 && bad > MAX_NON_TEXT_SHARE * n) {
    throw new InputError(`looks like a binary file, not CSV text (${bad} of the first ${n} characters are control characters or invalid UTF-8)`, { file });
  }
}

/**
 * Line break style of the first line break outside double quotes. Cost O(position of
 * that break). Example: detectLineEnding('"a\nb",c\r\n') -> 'crlf'.
 */
export function detectLineEnding(text: string): LineEnding {
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 34) quoted = !quoted;
    else if (!quoted && c === 10) return 'lf';
    else if (!quoted && c === 13) return text.charCodeAt(i + 1) === 10 ? 'crlf' : 'cr';
  }
  return 'none';
}

const NEWLINE: Record<LineEnding, '\n' | '\r\n' | '\r'> = { lf: '\n', crlf: '\r\n', cr: '\r', none: '\n' };

/**
 * The sample with every record cut after its first MAX_COLUMNS + 1 fields (double quotes
 * toggle as in detectLineEnding): detection then splits out no more fields than a table
 * Knotwise reads can have, plus one, so a wider table is still seen as wider (the reader
 * refuses it with its line) without a string for each of its fields. The sample itself
 * when no record is that wide. Cost O(sample length).
 * Example: capFields('a,b,c\n', ',') === 'a,b,c\n'.
 */
export function capFields(sample: string, delimiter: Delimiter): string {
  const d = delimiter.charCodeAt(0);
  let quoted = false;
  let fields = 1;
  let parts: string[] | undefined;
  let keepFrom = 0;
  let skipping = false;
  for (let i = 0; i < sample.length; i++) {
    const c = sample.charCodeAt(i);
    if (c === 34) quoted = !quoted;
    else if (quoted) continue;
    else if (c === 10 || c === 13) {
      if (skipping) keepFrom = i;
      skipping = false;
      fields = 1;
    } else if (c === d && !skipping && ++fields > MAX_COLUMNS + 1) {
      (parts ??= []).push(sample.slice(keepFrom, i));
      skipping = true;
    }
  }
  if (!parts) return sample;
  if (!skipping) parts.push(sample.slice(keepFrom));
  return parts.join('');
}

/** Records of the sample split with one delimiter (papaparse, RFC 4180 quoting), each of at most MAX_COLUMNS + 1 fields (capFields). */
function records(sample: string, delimiter: Delimiter, lineEnding: LineEnding, complete: boolean): string[][] {
  const result = Papa.parse<string[]>(capFields(sample, delimiter), {
    delimiter,
    newline: NEWLINE[lineEnding],
    quoteChar: '"',
    skipEmptyLines: 'greedy',
    preview: DETECT_RECORDS,
  });
  const rows = result.data;
  // A sample cut off inside the text ends with a partial record: leave it out.
  if (!complete && rows.length > 1 && rows.length < DETECT_RECORDS) rows.pop();
  return rows;
}

/** Most common value and its share. */
function mode(counts: readonly number[]): { value: number; share: number } {
  const freq = new Map<number, number>();
  let best = 0;
  let bestFreq = 0;
  for (const c of counts) {
    const f = (freq.get(c) ?? 0) + 1;
    freq.set(c, f);
    if (f > bestFreq || (f === bestFreq && c > best)) {
      best = c;
      bestFreq = f;
    }
  }
  return { value: best, share: counts.length > 0 ? bestFreq / counts.length : 0 };
}

const pointParser = new CellParser(false);
const commaParser = new CellParser(true);

/** Cell kinds under both decimal conventions. */
function isNumberWith(parser: CellParser, cell: string): boolean {
  parser.parse(cell, 0, cell.length);
  return parser.kind === CELL_NUMBER;
}

/** Share of non-missing cells that are numbers (either decimal convention unless ','). */
function numericShare(rows: readonly string[][], delimiter: Delimiter): number {
  let numbers = 0;
  let filled = 0;
  for (const row of rows) {
    for (const cell of row) {
      pointParser.parse(cell, 0, cell.length);
      if (pointParser.kind === CELL_EMPTY || pointParser.kind === CELL_MISSING) continue;
      filled++;
      if (pointParser.kind === CELL_NUMBER || (delimiter !== ',' && isNumberWith(commaParser, cell))) numbers++;
    }
  }
  return filled > 0 ? numbers / filled : 0;
}

/**
 * Decimal convention per column and for the sample as a whole: a column uses a decimal
 * comma when more of its cells are numbers with a comma than with a point (a cell with
 * neither, such as an integer, counts for neither); a tie, such as a column of integers,
 * takes the sample's majority. Thousands separators are not read, so a comma in a number
 * is always a decimal comma; a comma delimiter excludes it.
 */
function decimalCommas(rows: readonly string[][], delimiter: Delimiter): { columns: boolean[]; file: boolean } {
  const width = rows.reduce((w, r) => Math.max(w, r.length), 0);
  if (delimiter === ',') return { columns: new Array<boolean>(width).fill(false), file: false };
  const comma = new Float64Array(width);
  const point = new Float64Array(width);
  for (const row of rows) {
    for (let k = 0; k < row.length; k++) {
      const cell = row[k] as string;
      if (cell.includes(',') && isNumberWith(commaParser, cell)) (comma[k] as number)++;
      else if (cell.includes('.') && isNumberWith(pointParser, cell)) (point[k] as number)++;
    }
  }
  let commaAll = 0;
  let pointAll = 0;
  for (let k = 0; k < width; k++) {
    commaAll += comma[k] as number;
    pointAll += point[k] as number;
  }
  const file = commaAll > pointAll;
  const columns: boolean[] = [];
  for (let k = 0; k < width; k++) {
    const c = comma[k] as number;
    const p = point[k] as number;
    columns.push(c > p || (c === p && file));
  }
  return { columns, file };
}

/**
 * True when the first record names the columns: some cell of it is text (not a number,
 * not a missing token) while most later cells of that column are numbers, or every cell
 * of it is text and at least one later cell of its columns is not.
 */
function hasHeader(rows: readonly string[][], parserOf: (k: number) => CellParser): boolean {
  const first = rows[0] ?? [];
  const kinds = first.map((cell, k) => {
    const parser = parserOf(k);
    parser.parse(cell, 0, cell.length);
    return parser.kind;
  });
  // A number beyond the double range is still written as a number, not a name.
  const isText = kinds.map((k) => k !== CELL_NUMBER && k !== CELL_EMPTY && k !== CELL_MISSING && k !== CELL_OVERFLOW && k !== CELL_UNDERFLOW);
  if (!isText.some((t) => t)) return false;
  if (rows.length === 1) return isText.every((t) => t);
  let allText = true;
  for (let k = 0; k < first.length; k++) {
    if (!isText[k]) {
      allText = false;
      continue;
    }
    let numbers = 0;
    let filled = 0;
    const parser = parserOf(k);
    for (let r = 1; r < rows.length; r++) {
      const cell = rows[r]?.[k];
      if (cell === undefined) continue;
      parser.parse(cell, 0, cell.length);
      if (parser.kind === CELL_EMPTY || parser.kind === CELL_MISSING) continue;
      filled++;
      if (parser.kind === CELL_NUMBER) numbers++;
    }
    if (filled > 0 && numbers > filled / 2) return true;
  }
  return allText;
}

/**
 * Throws the unterminated-quote InputError when the whole text, split with any of the
 * candidate delimiters, ends inside a quoted field. Cost O(text length) per candidate.
 */
function checkQuotesClose(text: string, candidates: readonly Delimiter[], file: string | undefined): void {
  for (const delimiter of candidates) {
    let open: { quoteLine: number; lastLine: number } | undefined;
    const tokenizer = new CsvTokenizer(delimiter, {
      field: () => undefined,
      endRecord: () => undefined,
      blankLine: () => undefined,
      unclosedQuote: (quoteLine, lastLine) => {
        open = { quoteLine, lastLine };
      },
    });
    tokenizer.push(text);
    tokenizer.finish();
    if (open !== undefined) throw unterminatedQuote(open.quoteLine, open.lastLine, file);
  }
}

/**
 * Detects the format from the start of the text (BOM already removed). `complete` says
 * whether the sample is the whole text (else its last partial record is ignored).
 * Options given by the caller win over detection. Throws InputError when no candidate
 * delimiter splits the records into at least two fields.
 * Cost O(sample length) per candidate delimiter.
 * Example: detectFormat('a;b\n1,5;2.5\n', true) -> delimiter ';', columnDecimalComma
 * [true, false], header true, lineEnding 'lf', fieldCount 2.
 */
export function detectFormat(sample: string, complete: boolean, options: CsvReaderOptions = {}): Detection {
  const lineEnding = detectLineEnding(sample);
  const candidates = options.delimiter !== undefined ? [options.delimiter] : CANDIDATES;
  let best: { delimiter: Delimiter; rows: string[][]; fieldCount: number; score: number } | undefined;
  for (const delimiter of candidates) {
    const rows = records(sample, delimiter, lineEnding, complete);
    const counts = mode(rows.map((r) => r.length));
    if (counts.value < 2) continue;
    const body = rows.length > 1 ? rows.slice(1) : rows;
    const score = counts.share + numericShare(body, delimiter);
    if (best === undefined || score > best.score) best = { delimiter, rows, fieldCount: counts.value, score };
  }
  if (best === undefined) {
    // A quote opened early and never closed makes the rest one field: say that, not "a single column".
    if (complete) checkQuotesClose(sample, candidates, options.file);
    if (!complete && sample.length >= MAX_DETECT_CHARS && detectLineEnding(sample) === 'none') {
      const n = MAX_DETECT_CHARS.toLocaleString('en-US');
      throw new InputError(`the first line has more than ${n} characters without a line break, too long to detect the format from; is this a CSV file?`, { file: options.file, line: 1 });
    }
    const what = options.delimiter !== undefined ? `with the delimiter ${JSON.stringify(options.delimiter)}` : 'with comma, semicolon or tab as delimiter';
    throw new InputError(`found a single column ${what}; Knotwise needs at least two columns (x and y)`, { file: options.file, line: 1 });
  }
  const found = decimalCommas(best.rows, best.delimiter);
  const forced = options.decimalComma;
  const columnDecimalComma = forced !== undefined ? found.columns.map(() => forced) : found.columns;
  const parserOf = (k: number): CellParser => ((columnDecimalComma[k] ?? forced ?? found.file) ? commaParser : pointParser);
  const header = options.header ?? hasHeader(best.rows, parserOf);
  return { delimiter: best.delimiter, decimalComma: forced ?? found.file, columnDecimalComma, header, lineEnding, fieldCount: best.fieldCount };
}
