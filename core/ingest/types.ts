/**
 * Shapes of a parsed CSV table. Columns are typed arrays (NaN marks a missing or invalid
 * cell); problems are kept compactly per column and as a flat list for messages.
 */

/** Field separators Knotwise detects. */
export type Delimiter = ',' | ';' | '\t';

/** Line break style of the file ('none' when the text has a single line). */
export type LineEnding = 'lf' | 'crlf' | 'cr' | 'none';

/** What was detected (or forced through the options) about the file's format. */
export interface CsvFormat {
  readonly delimiter: Delimiter;
  /**
   * The decimal convention of columns the detection sample gave no evidence for: true when
   * more sampled cells are numbers with a decimal comma (`1,5`) than with a decimal point.
   * Each column has its own convention (`ColumnInfo.decimalComma`); a comma delimiter
   * excludes the decimal comma.
   */
  readonly decimalComma: boolean;
  /** True when the first record holds column names. */
  readonly header: boolean;
  /** True when the text started with a byte order mark (U+FEFF, removed before parsing). */
  readonly bom: boolean;
  readonly lineEnding: LineEnding;
}

/**
 * Invalid cells of one column as a sparse list: `rows[i]` is a data-row index (0-based,
 * ascending; its file line is `table.lines[rows[i]]`) and `reasons[i]` says why.
 */
export interface CellProblems {
  readonly rows: Int32Array;
  readonly reasons: readonly string[];
}

/** One column of the table. */
export interface ColumnInfo {
  /** 0-based position in the record. */
  readonly index: number;
  /**
   * Unique label: the header name without its unit, or "column k" (1-based) when absent;
   * names longer than MAX_NAME_CHARS (core/ingest/header.ts) are cut and end in "…".
   */
  readonly label: string;
  /**
   * The header cell as written ('' without a header row), with each run of tabs and line
   * breaks inside it turned into one space and cut after MAX_NAME_CHARS characters.
   */
  readonly header: string;
  /** Unit taken from brackets or parentheses at the end of the header, if any. */
  readonly unit: string | undefined;
  /** True when the column's numbers use a decimal comma; then a decimal point is invalid in it. */
  readonly decimalComma: boolean;
  readonly numericCount: number;
  readonly missingCount: number;
  readonly invalidCount: number;
  /** True when most non-missing cells are numbers (numericCount > invalidCount). */
  readonly numeric: boolean;
  readonly problems: CellProblems;
}

/** A problem with a whole row (no column) or with one cell (column = its label). */
export interface TableProblem {
  /** 1-based physical line in the file where the record starts. */
  readonly line: number;
  readonly column?: string;
  readonly reason: string;
}

/** A CSV file read into typed columns. */
export interface ParsedTable {
  readonly columns: readonly ColumnInfo[];
  /** One array per column, each of length rowCount; NaN for missing and invalid cells. */
  readonly values: readonly Float64Array[];
  /** 1-based physical line where each data record starts. */
  readonly lines: Int32Array;
  readonly rowCount: number;
  readonly format: CsvFormat;
  /**
   * Everything that was not read as a number, sorted by line: rows with the wrong number
   * of fields (not stored in `values`), invalid cells of numeric columns, and one summary
   * entry per non-numeric column that holds text.
   */
  readonly problems: readonly TableProblem[];
  /** Lines with no content or only spaces and tabs, which hold no data and are skipped. */
  readonly blankLines: number;
  /**
   * The cell texts of the column the reader was asked to keep (CsvReaderOptions.keepText),
   * trimmed and interned: `codes[row]` indexes `names`, -1 for an empty cell. Absent when
   * none was asked for or no column has that name.
   */
  readonly text?: { readonly column: number; readonly codes: Int32Array; readonly names: readonly string[] };
}

/** Options of the CSV reader; anything left out is detected from the first 64 KB. */
export interface CsvReaderOptions {
  /** Name of the file, used in error messages. */
  readonly file?: string | undefined;
  readonly delimiter?: Delimiter | undefined;
  readonly header?: boolean | undefined;
  /** Forces the decimal convention of every column. */
  readonly decimalComma?: boolean | undefined;
  /** A column (label or header text) whose cell texts are kept as `ParsedTable.text`, e.g. the column naming each row's device. */
  readonly keepText?: string | undefined;
  /**
   * About how long the whole text is, in characters (a file's size in bytes will do), when
   * it is read whole: the columns then get room for the rows this suggests once the
   * detection sample is read, instead of doubling. Only memory use and speed depend on it.
   */
  readonly sizeHint?: number | undefined;
}

/** Streaming reader: push text chunks in order, then finish. */
export interface CsvReader {
  /** Adds the next piece of text; chunks may split lines, fields and quoted fields anywhere. */
  push(chunk: string): void;
  /** Ends the input and returns the table (throws InputError for unusable input). */
  finish(): ParsedTable;
}

/**
 * A reader whose rows can be taken in parts (core/node/streamFile.ts reads files larger than
 * memory in passes): `drain` hands over the rows read so far as a table of their own and
 * forgets them; `finishRows` ends the input and hands over the last ones. Each part has
 * the rows, cells, reasons and messages a whole read would give those rows (row indices
 * and counts are the part's own). Use either `finish` or `finishRows`, once.
 */
export interface CsvChunkReader extends CsvReader {
  /** The rows since the last drain (views valid until the next push), or undefined while the header is still being read. */
  drain(): ParsedTable | undefined;
  /** Ends the input and returns the rows since the last drain (throws InputError for an empty file or an open quote). */
  finishRows(): ParsedTable;
}
