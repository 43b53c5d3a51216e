/**
 * Streaming CSV tokenizer: a character loop over text chunks that hands each field to a
 * sink as a range of a string, so unquoted fields cost no allocation.
 *
 * Quoting follows RFC 4180 (Y. Shafranovich, "Common Format and MIME Type for
 * Comma-Separated Values (CSV) Files", IETF RFC 4180, 2005, section 2): a field that
 * starts with a double quote runs to the next lone double quote and may hold delimiters,
 * line breaks and doubled quotes (""). A quote inside an unquoted field is an ordinary
 * character; text after a closing quote is kept with that quote, so `"1"2` reads as the
 * text 1"2 and never silently as a number. Line breaks are LF, CRLF or CR, inside quoted
 * fields too, so physical line numbers stay right after multi-line fields. A quoted field
 * still open at the end of the input is reported with the line where its quote opened:
 * from that quote on, every line would have been one field.
 */

/** Receives the tokens of the records in order. */
export interface RecordSink {
  /** Next field of the current record: the text s[start, end). */
  field(s: string, start: number, end: number): void;
  /**
   * The current record ends; `line` is the 1-based line where it started and `lastLine`
   * the line where it ended (later than `line` when a quoted field holds line breaks).
   */
  endRecord(line: number, lastLine: number): void;
  /** An empty line at `line` (no record). */
  blankLine(line: number): void;
  /**
   * The input ended inside a quoted field that opened on `quoteLine` and ran to
   * `lastLine`; the current record has the fields given so far, the open one is not given.
   */
  unclosedQuote(quoteLine: number, lastLine: number): void;
}

const QUOTE = 34;
const LF = 10;
const CR = 13;
const FIELD_START = 0;
const UNQUOTED = 1;
const QUOTED = 2;
/** A quote was seen inside a quoted field: it closes the field or starts a doubled quote. */
const QUOTE_SEEN = 3;
/** Longest field text kept; longer fields (never numbers) are cut and marked with an ellipsis. */
const MAX_FIELD_CHARS = 1 << 20;

/** Appends a piece of field text, keeping at most MAX_FIELD_CHARS characters. */
function append(partial: string, piece: string): string {
  if (partial.length + piece.length <= MAX_FIELD_CHARS) return partial + piece;
  if (partial.length > MAX_FIELD_CHARS) return partial;
  return `${partial}${piece.slice(0, MAX_FIELD_CHARS - partial.length)}\u2026`;
}

/**
 * Splits pushed text into fields and records for a sink. Chunks may end anywhere: in a
 * field, in a quoted field, between CR and LF. Cost O(total characters); fields that
 * are unquoted and inside one chunk are passed as ranges without copying.
 * Example: new CsvTokenizer(',', sink).push('a,"b\nc"\n') gives fields a and b\nc, and
 * endRecord(1, 2); a record after it would start on line 3.
 */
export class CsvTokenizer {
  private state = FIELD_START;
  /** Text of the current field when it is quoted or spans chunks. */
  private partial = '';
  /** Fields already given to the sink for the current record. */
  private fields = 0;
  /** Physical line of the next character. */
  private line: number;
  private recordLine: number;
  /** Line where the current quoted field opened. */
  private quoteLine = 1;
  /** The previous chunk ended with CR: an LF at the start of the next one is its pair. */
  private afterCR = false;
  /** The last chunk ended with a line break (CR or LF). */
  private afterBreak = false;
  private readonly delimiter: number;

  /** `firstLine` is the physical line of the first character pushed (1 unless lines were skipped before). */
  constructor(
    delimiter: string,
    private readonly sink: RecordSink,
    firstLine = 1,
  ) {
    if (delimiter.length !== 1 || delimiter === '"' || delimiter === '\n' || delimiter === '\r') {
      throw new Error(`invalid delimiter ${JSON.stringify(delimiter)}`);
    }
    this.delimiter = delimiter.charCodeAt(0);
    this.line = firstLine;
    this.recordLine = firstLine;
  }

  /** Tokenizes the next chunk. */
  push(s: string): void {
    const n = s.length;
    if (n === 0) return;
    const d = this.delimiter;
    const sink = this.sink;
    let state = this.state;
    let partial = this.partial;
    let fields = this.fields;
    let line = this.line;
    let recordLine = this.recordLine;
    let i = 0;
    if (this.afterCR && s.charCodeAt(0) === LF) {
      // The LF of a CRLF split across chunks: the line was counted at the CR.
      if (state === QUOTED) partial = append(partial, '\n');
      i = 1;
    }
    while (i < n) {
      if (state === QUOTED) {
        let j = i;
        for (; j < n; j++) {
          const c = s.charCodeAt(j);
          if (c === QUOTE) break;
          if (c === CR || (c === LF && (j === 0 || s.charCodeAt(j - 1) !== CR))) line++;
        }
        partial = append(partial, s.slice(i, j));
        if (j === n) break;
        state = QUOTE_SEEN;
        i = j + 1;
        continue;
      }
      let c = s.charCodeAt(i);
      let j = i;
      if (state === QUOTE_SEEN) {
        if (c === QUOTE) {
          partial = append(partial, '"');
          state = QUOTED;
          i++;
          continue;
        }
        if (c !== d && c !== LF && c !== CR) {
          // Text after a closing quote: keep the quote so the field reads as text.
          partial = append(partial, '"');
          state = UNQUOTED;
          continue;
        }
        sink.field(partial, 0, partial.length);
        partial = '';
      } else {
        if (state === FIELD_START) {
          if (c === QUOTE) {
            state = QUOTED;
            this.quoteLine = line;
            i++;
            continue;
          }
          if (fields === 0 && (c === LF || c === CR)) {
            sink.blankLine(line);
            line++;
            i += c === CR && i + 1 < n && s.charCodeAt(i + 1) === LF ? 2 : 1;
            recordLine = line;
            continue;
          }
        }
        // Hot loop: scan an unquoted field.
        for (; j < n; j++) {
          c = s.charCodeAt(j);
          if (c === d || c === LF || c === CR) break;
        }
        if (j === n) {
          partial = append(partial, s.slice(i, n));
          state = UNQUOTED;
          break;
        }
        if (partial.length === 0) sink.field(s, i, j);
        else {
          partial = append(partial, s.slice(i, j));
          sink.field(partial, 0, partial.length);
          partial = '';
        }
      }
      // s[j] is a delimiter or a line break that ends the field.
      fields++;
      state = FIELD_START;
      if (c === d) {
        i = j + 1;
        continue;
      }
      sink.endRecord(recordLine, line);
      fields = 0;
      line++;
      i = c === CR && j + 1 < n && s.charCodeAt(j + 1) === LF ? j + 2 : j + 1;
      recordLine = line;
    }
    this.state = state;
    this.partial = partial;
    this.fields = fields;
    this.line = line;
    this.recordLine = recordLine;
    const last = s.charCodeAt(n - 1);
    this.afterCR = last === CR;
    this.afterBreak = last === CR || last === LF;
  }

  /**
   * Ends the input: completes the last record (a missing final line break is fine), or
   * reports a quoted field that is still open.
   */
  finish(): void {
    const sink = this.sink;
    if (this.state === QUOTED) {
      sink.unclosedQuote(this.quoteLine, this.afterBreak ? this.line - 1 : this.line);
    } else if (this.state !== FIELD_START || this.fields > 0) {
      sink.field(this.partial, 0, this.partial.length);
      sink.endRecord(this.recordLine, this.line);
    }
    this.state = FIELD_START;
    this.partial = '';
    this.fields = 0;
  }
}
