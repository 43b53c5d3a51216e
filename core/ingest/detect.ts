/**
 * Format detection on the start of a CSV text: binary check, line ending, delimiter,
 * decimal comma and header row. The sample is parsed with papaparse once per candidate
 * delimiter; the candidate whose records have the most consistent field count and the
 * most numeric cells wins.
 */
import Papa from 'papaparse';
import { InputError } from '../errors';
import { CELL_EMPTY, CELL_MISSING, CELL_NUMBER, CellParser } from './numberCell';
import type { CsvReaderOptions, Delimiter, LineEnding } from './types';

/** Characters of the text start used for detection (64 K). */
export const DETECT_CHARS = 65536;
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
  readonly decimalComma: boolean;
  readonly header: boolean;
  readonly lineEnding: LineEnding;
  /** Most common number of fields per record in the sample. */
  readonly fieldCount: number;
}

/**
 * Throws InputError "looks like a binary file, not CSV text" when the first 1024
 * characters hold a NUL or more than 10 % control characters (other than tab, CR, LF)
 * or U+FFFD (bytes that were not valid UTF-8). Cost O(1024).
 * Example: checkNotBinary('x,y\n1,2\n') passes; checkNotBinary('\u0000\u0001') throws.
 */
export function checkNotBinary(text: string, file?: string): void {
  const n = Math.min(text.length, BINARY_CHECK_CHARS);
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

/** Records of the sample split with one delimiter (papaparse, RFC 4180 quoting). */
function records(sample: string, delimiter: Delimiter, lineEnding: LineEnding, complete: boolean): string[][] {
  const result = Papa.parse<string[]>(sample, {
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

/** True when more cells are numbers with a decimal comma than with a decimal point. */
function usesDecimalComma(rows: readonly string[][]): boolean {
  let comma = 0;
  let point = 0;
  for (const row of rows) {
    for (const cell of row) {
      if (cell.includes(',') && isNumberWith(commaParser, cell)) comma++;
      else if (cell.includes('.') && isNumberWith(pointParser, cell)) point++;
    }
  }
  return comma > point;
}

/**
 * True when the first record names the columns: some cell of it is text (not a number,
 * not a missing token) while most later cells of that column are numbers, or every cell
 * of it is text and at least one later cell of its columns is not.
 */
function hasHeader(rows: readonly string[][], parser: CellParser): boolean {
  const first = rows[0] ?? [];
  const kinds = first.map((cell) => {
    parser.parse(cell, 0, cell.length);
    return parser.kind;
  });
  const isText = kinds.map((k) => k !== CELL_NUMBER && k !== CELL_EMPTY && k !== CELL_MISSING);
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
 * Detects the format from the start of the text (BOM already removed). `complete` says
 * whether the sample is the whole text (else its last partial record is ignored).
 * Options given by the caller win over detection. Throws InputError when no candidate
 * delimiter splits the records into at least two fields.
 * Cost O(sample length) per candidate delimiter.
 * Example: detectFormat('a;b\n1,5;2\n', true) -> delimiter ';', decimalComma true,
 * header true, lineEnding 'lf', fieldCount 2.
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
    const what = options.delimiter !== undefined ? `with the delimiter ${JSON.stringify(options.delimiter)}` : 'with comma, semicolon or tab as delimiter';
    throw new InputError(`found a single column ${what}; Knotwise needs at least two columns (x and y)`, { file: options.file, line: 1 });
  }
  const decimalComma = options.decimalComma ?? (best.delimiter !== ',' && usesDecimalComma(best.rows));
  const header = options.header ?? hasHeader(best.rows, decimalComma ? commaParser : pointParser);
  return { delimiter: best.delimiter, decimalComma, header, lineEnding, fieldCount: best.fieldCount };
}
