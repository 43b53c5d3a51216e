/**
 * Collects tokenized records into typed columns: one growable Float64Array per column
 * and an Int32Array of line numbers, doubled when full, plus compact per-column lists of
 * invalid cells. Records with the wrong number of fields are reported and left out.
 */
import { InputError } from '../errors';
import { columnNames } from './header';
import { CELL_EMPTY, CELL_MISSING, CELL_NOT_NUMBER, CELL_NUMBER, CellParser, cellReason, shortCellReason } from './numberCell';
import type { CellKind } from './numberCell';
import type { RecordSink } from './tokenizer';
import type { CellProblems, ColumnInfo, CsvFormat, ParsedTable, TableProblem } from './types';

/** Invalid cells per column whose reason quotes the cell text; later ones get a short reason. */
export const QUOTED_REASONS_PER_COLUMN = 1000;
const INITIAL_CAPACITY = 1024;
// Local copies of the cell kinds: a module loader may turn imported bindings into getters.
const NUMBER = CELL_NUMBER;
const EMPTY = CELL_EMPTY;
const MISSING = CELL_MISSING;
const NOT_NUMBER = CELL_NOT_NUMBER;

/** Growable sparse list of one column's invalid cells. */
class ProblemList {
  rows = new Int32Array(16);
  reasons: string[] = [];
  count = 0;
  add(row: number, reason: string): void {
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
}

/** Format facts the builder needs (from detection or the options). */
export interface BuilderFormat extends CsvFormat {
  /** Expected fields per record when there is no header row. */
  readonly fieldCount: number;
}

/**
 * RecordSink that builds a ParsedTable. With `format.header` the first record names the
 * columns and fixes the field count; otherwise `format.fieldCount` does.
 */
export class TableBuilder implements RecordSink {
  private readonly parser: CellParser;
  private headerPending: boolean;
  private headerTexts: string[] = [];
  private expected = 0;
  private fieldIndex = 0;
  private firstFieldBlank = false;
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
  private blankLines = 0;
  private readonly decimalComma: boolean;

  constructor(
    private readonly format: BuilderFormat,
    private readonly file?: string,
  ) {
    this.decimalComma = format.decimalComma;
    this.parser = new CellParser(format.decimalComma);
    this.headerPending = format.header;
    if (!format.header) this.allocate(format.fieldCount);
  }

  private allocate(count: number): void {
    this.expected = count;
    this.recValues = new Float64Array(count);
    this.recKinds = new Uint8Array(count);
    this.recTexts = new Array<string>(count).fill('');
    this.capacity = INITIAL_CAPACITY;
    this.columns = Array.from({ length: count }, () => new Float64Array(INITIAL_CAPACITY));
    this.lines = new Int32Array(INITIAL_CAPACITY);
    this.numericCounts = new Float64Array(count);
    this.missingCounts = new Float64Array(count);
    this.invalid = Array.from({ length: count }, () => new ProblemList());
  }

  field(s: string, start: number, end: number): void {
    const k = this.fieldIndex++;
    if (this.headerPending) {
      this.headerTexts.push(s.slice(start, end));
      return;
    }
    if (k >= this.expected) return;
    const parser = this.parser;
    this.recValues[k] = parser.parse(s, start, end);
    const kind = parser.kind;
    this.recKinds[k] = kind;
    if (k === 0) this.firstFieldBlank = kind === EMPTY;
    if (kind >= NOT_NUMBER) {
      this.recHasInvalid = true;
      this.recTexts[k] = s.slice(start, end);
    }
  }

  endRecord(line: number): void {
    const count = this.fieldIndex;
    this.fieldIndex = 0;
    const hadInvalid = this.recHasInvalid;
    this.recHasInvalid = false;
    if (this.headerPending) {
      this.headerPending = false;
      this.allocate(count);
      return;
    }
    if (count !== this.expected) {
      if (hadInvalid) this.recTexts.fill('');
      if (count === 1 && this.firstFieldBlank) this.blankLines++;
      else this.rowProblems.push({ line, reason: this.fieldCountReason(count) });
      return;
    }
    if (this.rowCount === this.capacity) this.grow();
    const row = this.rowCount++;
    this.lines[row] = line;
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

  blankLine(): void {
    this.blankLines++;
  }

  abortRecord(line: number, reason: string): void {
    this.fieldIndex = 0;
    this.recHasInvalid = false;
    if (this.headerPending) throw new InputError(reason, { file: this.file, line });
    this.rowProblems.push({ line, reason });
  }

  private fieldCountReason(count: number): string {
    const expected = this.expected;
    const source = this.format.header ? 'the header has' : 'most rows have';
    return `row has ${count} field${count === 1 ? '' : 's'}, but ${source} ${expected}`;
  }

  private recordInvalid(row: number): void {
    for (let k = 0; k < this.expected; k++) {
      const kind = this.recKinds[k] as CellKind;
      if (kind < NOT_NUMBER) continue;
      const list = this.invalid[k] as ProblemList;
      const text = this.recTexts[k] as string;
      list.add(row, list.count < QUOTED_REASONS_PER_COLUMN ? cellReason(kind, text, this.decimalComma) : shortCellReason(kind));
      this.recTexts[k] = '';
    }
  }

  private grow(): void {
    const capacity = this.capacity * 2;
    this.columns = this.columns.map((col) => {
      const grown = new Float64Array(capacity);
      grown.set(col);
      return grown;
    });
    const lines = new Int32Array(capacity);
    lines.set(this.lines);
    this.lines = lines;
    this.capacity = capacity;
  }

  /** The finished table. Throws InputError when there is no header or no data row. */
  finish(): ParsedTable {
    const place = { file: this.file };
    if (this.headerPending) throw new InputError('the file is empty', place);
    const n = this.rowCount;
    if (n === 0) {
      const first = this.rowProblems[0];
      if (first !== undefined) {
        throw new InputError(`no usable data rows: all ${this.rowProblems.length} rows have problems, the first: ${first.reason}`, { ...place, line: first.line });
      }
      throw new InputError(this.format.header ? 'the file has a header row but no data rows' : 'the file has no data rows', { ...place, line: 1 });
    }
    const names = columnNames(this.format.header ? this.headerTexts : undefined, this.expected);
    const columns: ColumnInfo[] = names.map((name, k) => {
      const problems = (this.invalid[k] as ProblemList).freeze();
      const numericCount = this.numericCounts[k] as number;
      const invalidCount = problems.rows.length;
      return {
        index: k,
        label: name.label,
        header: name.header,
        unit: name.unit,
        numericCount,
        missingCount: this.missingCounts[k] as number,
        invalidCount,
        numeric: numericCount > invalidCount,
        problems,
      };
    });
    return {
      columns,
      values: this.columns.map((col) => col.slice(0, n)),
      lines: this.lines.slice(0, n),
      rowCount: n,
      format: { delimiter: this.format.delimiter, decimalComma: this.format.decimalComma, header: this.format.header, bom: this.format.bom, lineEnding: this.format.lineEnding },
      problems: this.collectProblems(columns),
      blankLines: this.blankLines,
    };
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
