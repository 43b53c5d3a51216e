/**
 * Collects tokenized records into typed columns: one growable Float64Array per column
 * and an Int32Array of line numbers, doubled when full, plus compact per-column lists of
 * invalid cells. Records with the wrong number of fields are reported and left out; a
 * header wider than MAX_COLUMNS, a control character in a column name and a quoted field
 * left open at the end of the file stop the whole file.
 */
import { InputError, isAllocationFailure, outOfMemory } from '../errors';
import { columnNames, headerControl, headerText, MAX_COLUMNS, MAX_NAME_CHARS } from './header';
import { CELL_EMPTY, CELL_MISSING, CELL_NOT_NUMBER, CELL_NUMBER, CellParser, cellReason, shortCellReason } from './numberCell';
import type { CellKind } from './numberCell';
import { codePoint, escapeHidden, shorten } from './text';
import type { RecordSink } from './tokenizer';
import type { CellProblems, ColumnInfo, CsvFormat, ParsedTable, TableProblem } from './types';

/** The index of the column `name` names among `names` (label, then header text, then either ignoring case), or -1. */
function keptColumn(names: readonly { readonly label: string; readonly header: string }[], name: string): number {
  const exact = names.findIndex((c) => c.label === name);
  if (exact >= 0) return exact;
  const header = names.findIndex((c) => c.header !== '' && c.header === name);
  if (header >= 0) return header;
  const lower = name.toLowerCase();
  return names.findIndex((c) => c.label.toLowerCase() === lower || (c.header !== '' && c.header.toLowerCase() === lower));
}

/** Invalid cells per column whose reason quotes the cell text; later ones get a short reason. */
export const QUOTED_REASONS_PER_COLUMN = 1000;
/** Rows of the first allocation of every column, when the table is narrow. */
const INITIAL_CAPACITY = 1024;
/** Cells of the first allocation of all columns together: wide tables start with fewer rows. */
const INITIAL_CELLS = 1 << 20;
/** Fewest rows of a first allocation. */
const MIN_CAPACITY = 16;
/** Most rows `reserve` makes room for at once (an estimate above it is left to doubling). */
const MAX_RESERVED_ROWS = 2 ** 28;
// Local copies of the cell kinds: a module loader may turn imported bindings into getters.
const NUMBER = CELL_NUMBER;
const EMPTY = CELL_EMPTY;
const MISSING = CELL_MISSING;
const NOT_NUMBER = CELL_NOT_NUMBER;
const TAB = 9;
const SPACE = 32;

/** Growable sparse list of one column's invalid cells. */
class ProblemList {
  rows = new Int32Array(16);
  reasons: string[] = [];
  count = 0;
  /** Cells listed since the start of the file, also across `clear` (the limit of quoted reasons counts them all). */
  total = 0;
  add(row: number, reason: string): void {
    this.total++;
    if (this.count === this.rows.length) {
      const grown = new Int32Array(this.count * 2);
      grown.set(this.rows);
      this.rows = grown;
    }
    this.rows[this.count++] = row;
    this.reasons.push(reason);
  }
  freeze(): CellProblems {
    return { rows: this.rows.slice(0, this.count), reasons: this.reasons };
  }
  /** Forgets the listed cells (rows handed on by TableBuilder.drain), keeping `total`. */
  clear(): void {
    this.count = 0;
    this.reasons = [];
  }
}

/** True when s[start, end) holds only spaces and tabs. */
function blankRange(s: string, start: number, end: number): boolean {
  for (let i = start; i < end; i++) {
    const c = s.charCodeAt(i);
    if (c !== SPACE && c !== TAB) return false;
  }
  return true;
}

/**
 * The InputError of a quoted field still open at the end of the file, which opened on
 * `quoteLine` (in `column` when known) and ran to `lastLine`.
 */
export function unterminatedQuote(quoteLine: number, lastLine: number, file: string | undefined, column?: string): InputError {
  const span = lastLine > quoteLine ? `lines ${quoteLine} to ${lastLine} would be one field` : 'the rest of the line would be one field';
  return new InputError(
    `unterminated quote: the quoted field that opens on line ${quoteLine} is not closed before the end of the file (${span}); add the closing double quote, or remove the opening one`,
    { file, line: quoteLine, column },
  );
}

/**
 * The InputError of a file without a data row: `problemRows` rows were left out for their
 * field count, the first of them `first`.
 */
export function noDataRows(header: boolean, problemRows: number, first: TableProblem | undefined, file: string | undefined): InputError {
  if (first !== undefined) return new InputError(`no usable data rows: all ${problemRows} rows have problems, the first: ${first.reason}`, { file, line: first.line });
  return new InputError(header ? 'the file has a header row but no data rows' : 'the file has no data rows', { file, line: 1 });
}

/** Format facts the builder needs (from detection or the options). */
export interface BuilderFormat extends CsvFormat {
  /** Expected fields per record when there is no header row. */
  readonly fieldCount: number;
  /** Decimal convention per column (index k); columns beyond the list use `decimalComma`. */
  readonly columnDecimalComma?: readonly boolean[] | undefined;
}

/**
 * RecordSink that builds a ParsedTable. With `format.header` the first record that is not
 * blank names the columns and fixes the field count; otherwise `format.fieldCount` does.
 * A record is blank when its line holds only spaces and tabs (any number of fields in a
 * tab-separated file, one field otherwise): it is counted in `blankLines`, before the
 * header as after it. `blankLines` starts at `skippedBlankLines`, the blank lines the
 * reader consumed before the tokenizer started.
 * Throws InputError from `field` as soon as a header (or first record) has more than
 * MAX_COLUMNS fields, from `endRecord` for a control character in a column name, and
 * from `unclosedQuote`.
 */
export class TableBuilder implements RecordSink {
  private readonly pointParser = new CellParser(false);
  private readonly commaParser = new CellParser(true);
  private parsers: CellParser[] = [];
  private headerPending: boolean;
  private headerTexts: string[] = [];
  private expected = 0;
  private fieldIndex = 0;
  /** Every field of the current record so far holds only spaces and tabs. */
  private recBlank = true;
  /** Values, kinds and texts of invalid cells of the current record. */
  private recValues = new Float64Array(0);
  private recKinds = new Uint8Array(0);
  private recTexts: string[] = [];
  private recHasInvalid = false;
  private columns: Float64Array[] = [];
  private lines = new Int32Array(0);
  private capacity = 0;
  private rowCount = 0;
  private numericCounts = new Float64Array(0);
  private missingCounts = new Float64Array(0);
  private invalid: ProblemList[] = [];
  private readonly rowProblems: TableProblem[] = [];
  private blankLines: number;
  private readonly tabs: boolean;
  /** Line where the next record starts (known once the previous one ended). */
  private nextLine: number;
  /** The column whose cell texts are kept (keepText), once the header named it; -1: none. */
  private textColumn = -1;
  /** Code of each row's kept text (-1: an empty cell), and the texts by code. */
  private textCodes = new Int32Array(0);
  private readonly textNames: string[] = [];
  private readonly textIndex = new Map<string, number>();
  /** The kept column's text in the current record (interned only when the record becomes a row). */
  private recText = '';

  constructor(
    private readonly format: BuilderFormat,
    private readonly file?: string,
    skippedBlankLines = 0,
    /** A column (label or header text, as column choices name them) whose cell texts are kept, e.g. a device name. */
    private readonly keepText?: string,
  ) {
    this.headerPending = format.header;
    this.blankLines = skippedBlankLines;
    this.nextLine = skippedBlankLines + 1;
    this.tabs = format.delimiter === '\t';
    if (!format.header) {
      if (format.fieldCount > MAX_COLUMNS) throw this.tooWide(`more than ${MAX_COLUMNS.toLocaleString('en-US')}`, skippedBlankLines + 1, 'its first row has');
      this.allocate(format.fieldCount);
    }
  }

  /** The InputError of a table wider than MAX_COLUMNS. */
  private tooWide(count: string, line: number, what: string): InputError {
    return new InputError(`the table is too wide: ${what} ${count} fields, and Knotwise reads at most ${MAX_COLUMNS.toLocaleString('en-US')} columns`, { file: this.file, line });
  }

  /** Decimal convention of column k. */
  private commaAt(k: number): boolean {
    return this.format.columnDecimalComma?.[k] ?? this.format.decimalComma;
  }

  private allocate(count: number): void {
    this.expected = count;
    this.parsers = Array.from({ length: count }, (_, k) => (this.commaAt(k) ? this.commaParser : this.pointParser));
    this.recValues = new Float64Array(count);
    this.recKinds = new Uint8Array(count);
    this.recTexts = new Array<string>(count).fill('');
    this.capacity = Math.max(MIN_CAPACITY, Math.min(INITIAL_CAPACITY, Math.floor(INITIAL_CELLS / Math.max(count, 1))));
    this.columns = Array.from({ length: count }, () => new Float64Array(this.capacity));
    this.lines = new Int32Array(this.capacity);
    this.numericCounts = new Float64Array(count);
    this.missingCounts = new Float64Array(count);
    this.invalid = Array.from({ length: count }, () => new ProblemList());
    if (this.keepText !== undefined) this.textColumn = keptColumn(columnNames(this.format.header ? this.headerTexts : undefined, count), this.keepText);
    // Codes only when a text column is kept.
    if (this.textColumn >= 0) this.textCodes = new Int32Array(this.capacity);
  }

  field(s: string, start: number, end: number): void {
    const k = this.fieldIndex++;
    if (this.headerPending) {
      if (k >= MAX_COLUMNS) throw this.tooWide(`more than ${MAX_COLUMNS.toLocaleString('en-US')}`, this.nextLine, 'the header row has');
      if (this.recBlank && !blankRange(s, start, end)) this.recBlank = false;
      // headerText keeps at most MAX_NAME_CHARS characters: copy no more than it needs to see the cut.
      this.headerTexts.push(s.slice(start, Math.min(end, start + MAX_NAME_CHARS + 2)));
      return;
    }
    if (k >= this.expected) {
      if (this.recBlank && !blankRange(s, start, end)) this.recBlank = false;
      return;
    }
    if (k === this.textColumn) this.recText = s.slice(start, end).trim();
    const parser = this.parsers[k] as CellParser;
    this.recValues[k] = parser.parse(s, start, end);
    const kind = parser.kind;
    this.recKinds[k] = kind;
    if (kind !== EMPTY) this.recBlank = false;
    if (kind >= NOT_NUMBER) {
      this.recHasInvalid = true;
      this.recTexts[k] = s.slice(start, end);
    }
  }

  endRecord(line: number, lastLine: number = line): void {
    const count = this.fieldIndex;
    this.fieldIndex = 0;
    const hadInvalid = this.recHasInvalid;
    this.recHasInvalid = false;
    const blank = this.recBlank && (count === 1 || this.tabs);
    this.recBlank = true;
    this.nextLine = lastLine + 1;
    if (this.headerPending) {
      if (blank) {
        this.blankLines++;
        this.headerTexts = [];
        return;
      }
      this.headerPending = false;
      this.headerTexts = this.headerTexts.map(headerText);
      this.checkHeader(line);
      this.allocate(count);
      return;
    }
    if (count !== this.expected || blank) {
      this.recText = '';
      if (hadInvalid) this.recTexts.fill('');
      if (blank) this.blankLines++;
      else this.rowProblems.push({ line, reason: this.fieldCountReason(count, line, lastLine) });
      return;
    }
    if (this.rowCount === this.capacity) this.grow(line);
    const row = this.rowCount++;
    this.lines[row] = line;
    if (this.textColumn >= 0) this.textCodes[row] = this.textCode(this.recText);
    this.recText = '';
    const values = this.recValues;
    const kinds = this.recKinds;
    for (let k = 0; k < count; k++) {
      (this.columns[k] as Float64Array)[row] = values[k] as number;
      const kind = kinds[k] as CellKind;
      if (kind === NUMBER) (this.numericCounts[k] as number)++;
      else if (kind <= MISSING) (this.missingCounts[k] as number)++;
    }
    if (hadInvalid) this.recordInvalid(row);
  }

  blankLine(line: number): void {
    this.blankLines++;
    this.nextLine = line + 1;
  }

  /** A quoted field open at the end of the file: the whole file is refused (no rows are guessed). */
  unclosedQuote(quoteLine: number, lastLine: number): void {
    const k = this.fieldIndex;
    let column: string | undefined;
    if (!this.headerPending) column = columnNames(this.format.header ? this.headerTexts : undefined, Math.max(this.expected, k + 1))[k]?.label;
    throw unterminatedQuote(quoteLine, lastLine, this.file, column);
  }

  /** Refuses a column name holding a control character (tabs and line breaks are already spaces). */
  private checkHeader(line: number): void {
    this.headerTexts.forEach((text, k) => {
      const at = headerControl(text);
      if (at < 0) return;
      const shown = escapeHidden(shorten(text, 60));
      throw new InputError(
        `the name of column ${k + 1} in the header holds the control character ${codePoint(text.charCodeAt(at))} at character ${at + 1} ("${shown}"); column names must be printable text: remove it from the file`,
        { file: this.file, line },
      );
    });
  }

  private fieldCountReason(count: number, line: number, lastLine: number): string {
    const expected = this.expected;
    const source = this.format.header ? 'the header has' : 'most rows have';
    const span = lastLine > line ? ` (a quoted field holds line breaks: the row runs from line ${line} to line ${lastLine})` : '';
    return `row has ${count} field${count === 1 ? '' : 's'}, but ${source} ${expected}${span}`;
  }

  private recordInvalid(row: number): void {
    for (let k = 0; k < this.expected; k++) {
      const kind = this.recKinds[k] as CellKind;
      if (kind < NOT_NUMBER) continue;
      const list = this.invalid[k] as ProblemList;
      const text = this.recTexts[k] as string;
      list.add(row, list.total < QUOTED_REASONS_PER_COLUMN ? cellReason(kind, text, this.commaAt(k)) : shortCellReason(kind));
      this.recTexts[k] = '';
    }
  }

  /** Rows kept so far (since the last drain). */
  get rows(): number {
    return this.rowCount;
  }

  /**
   * Room for `rows` rows in all, when that is more than there is: the columns sized once
   * from an estimate of the whole text's rows (createCsvReader's `sizeHint`) instead of
   * doubling, which touches about twice the memory. Room the rows never fill is never
   * written, and `finish` keeps a view or a copy of the rows as after doubling. Without
   * memory for it (or for an estimate beyond any array) the columns keep doubling as
   * before. Before the header, nothing.
   */
  reserve(rows: number): void {
    if (this.headerPending || this.expected === 0 || !(rows > this.capacity) || !(rows <= MAX_RESERVED_ROWS)) return;
    try {
      this.resize(Math.ceil(rows));
    } catch (e) {
      if (!(e instanceof RangeError)) throw e;
    }
  }

  /** Doubles the columns' room for the row on `line`. Running out of memory here is an InputError with the rows read so far. */
  private grow(line: number): void {
    try {
      this.resize(this.capacity * 2);
    } catch (e) {
      if (isAllocationFailure(e)) throw outOfMemory(this.rowCount, 'reading', { file: this.file, line });
      throw e;
    }
  }

  /** Moves the columns into room for `capacity` rows (more than now); all or nothing when memory runs out. */
  private resize(capacity: number): void {
    const columns = this.columns.map((col) => {
      const grown = new Float64Array(capacity);
      grown.set(col);
      return grown;
    });
    const lines = new Int32Array(capacity);
    lines.set(this.lines);
    let codes = this.textCodes;
    if (this.textColumn >= 0) {
      codes = new Int32Array(capacity);
      codes.set(this.textCodes);
    }
    this.columns = columns;
    this.lines = lines;
    this.textCodes = codes;
    this.capacity = capacity;
  }

  /**
   * The rows read since the last drain as a table of their own (row indices, problems and
   * counts of that part only), then forgets them, so a file can be read in passes with
   * memory for one chunk's rows (core/node/streamFile.ts). The columns are views of the
   * builder's buffers, valid until the next text is pushed. Undefined while the header is
   * still being read. The rules are those of a whole read: the same rows, cells, reasons
   * and messages.
   */
  drain(): ParsedTable | undefined {
    if (this.headerPending || this.expected === 0) return undefined;
    const n = this.rowCount;
    const names = columnNames(this.format.header ? this.headerTexts : undefined, this.expected);
    const columns = this.columnInfos(names);
    const table: ParsedTable = {
      columns,
      values: this.columns.map((col) => col.subarray(0, n)),
      lines: this.lines.subarray(0, n),
      rowCount: n,
      format: { delimiter: this.format.delimiter, decimalComma: this.format.decimalComma, header: this.format.header, bom: this.format.bom, lineEnding: this.format.lineEnding },
      problems: this.collectProblems(columns),
      blankLines: this.blankLines,
    };
    this.rowCount = 0;
    this.rowProblems.length = 0;
    this.numericCounts.fill(0);
    this.missingCounts.fill(0);
    for (const list of this.invalid) list.clear();
    return table;
  }

  /** Column facts of the rows held now. */
  private columnInfos(names: ReturnType<typeof columnNames>): ColumnInfo[] {
    return names.map((name, k) => {
      const problems = (this.invalid[k] as ProblemList).freeze();
      const numericCount = this.numericCounts[k] as number;
      const invalidCount = problems.rows.length;
      return {
        index: k,
        label: name.label,
        header: name.header,
        unit: name.unit,
        decimalComma: this.commaAt(k),
        numericCount,
        missingCount: this.missingCounts[k] as number,
        invalidCount,
        numeric: numericCount > invalidCount,
        problems,
      };
    });
  }

  /** The finished table. Throws InputError when there is no header or no data row. */
  finish(): ParsedTable {
    const place = { file: this.file };
    if (this.headerPending) throw new InputError('the file is empty', place);
    const n = this.rowCount;
    if (n === 0) throw noDataRows(this.format.header, this.rowProblems.length, this.rowProblems[0], this.file);
    const columns = this.columnInfos(columnNames(this.format.header ? this.headerTexts : undefined, this.expected));
    return {
      columns,
      values: this.columns.map((col) => trimmed(col, n)),
      lines: trimmed(this.lines, n),
      rowCount: n,
      format: { delimiter: this.format.delimiter, decimalComma: this.format.decimalComma, header: this.format.header, bom: this.format.bom, lineEnding: this.format.lineEnding },
      problems: this.collectProblems(columns),
      blankLines: this.blankLines,
      ...(this.textColumn >= 0 ? { text: { column: this.textColumn, codes: trimmed(this.textCodes, n), names: [...this.textNames] } } : {}),
    };
  }

  /** The code of a kept cell text (interned: one string per distinct text); -1 for an empty cell. */
  private textCode(text: string): number {
    if (text === '') return -1;
    let code = this.textIndex.get(text);
    if (code === undefined) {
      code = this.textNames.length;
      this.textNames.push(text);
      this.textIndex.set(text, code);
    }
    return code;
  }

  /** Row problems, cell problems of numeric columns and one entry per text column, by line. */
  private collectProblems(columns: readonly ColumnInfo[]): TableProblem[] {
    const all: TableProblem[] = [...this.rowProblems];
    for (const col of columns) {
      const { rows, reasons } = col.problems;
      if (rows.length === 0) continue;
      if (col.numeric) {
        for (let i = 0; i < rows.length; i++) all.push({ line: this.lines[rows[i] as number] as number, column: col.label, reason: reasons[i] as string });
      } else {
        const filled = col.numericCount + col.invalidCount;
        all.push({
          line: this.lines[rows[0] as number] as number,
          column: col.label,
          reason: `column is not numeric: ${col.invalidCount} of ${filled} filled cells are not numbers, the first: ${reasons[0] as string}`,
        });
      }
    }
    return all.sort((a, b) => a.line - b.line);
  }
}

/**
 * The first n values of a column grown by doubling: a view when little room is left over
 * (no second copy of a large column at the end of reading), a copy when much is.
 */
function trimmed<T extends Float64Array | Int32Array>(a: T, n: number): T {
  return (n >= a.length * 0.75 ? a.subarray(0, n) : a.slice(0, n)) as T;
}
