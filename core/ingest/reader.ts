/**
 * Streaming CSV reader: skips the blank lines at the start, buffers the next 64 K
 * characters for format detection, then tokenizes every chunk straight into typed columns.
 */
import { InputError } from '../errors';
import { breakEnd, checkNotBinary, DETECT_CHARS, detectFormat, MAX_DETECT_CHARS, sampleLength } from './detect';
import type { BreakCount } from './detect';
import { TableBuilder } from './tableBuilder';
import { CsvTokenizer } from './tokenizer';
import type { CsvChunkReader, CsvReaderOptions, ParsedTable } from './types';

const BOM = 0xfeff;
const TAB = 9;
const LF = 10;
const CR = 13;
const SPACE = 32;
/** Room reserved beyond the rows the sample suggests (createCsvReader's sizeHint). */
const RESERVE_MARGIN = 1.1;
const MIN_RESERVE = 1024;

/**
 * A reader that takes the text in chunks of any size and split anywhere. A byte order
 * mark (U+FEFF) as the first character is removed and reported in the format. Lines
 * holding only spaces and tabs before the first line with content are counted, not kept,
 * so any number of them costs no memory and detection sees the content. Detection runs
 * once the content is longer than its detection sample (64 K characters, or more up to
 * 2 M when the first lines are longer: `sampleLength`), or at `finish` for shorter texts;
 * from then on each chunk is tokenized as it comes, so memory holds the columns, not the
 * text.
 * Throws InputError (with `options.file`) for an empty, blank or binary text (or UTF-16
 * without a byte order mark), a single column, a table wider than MAX_COLUMNS, a control
 * character in a column name, an unterminated quote, a header without data rows, or no
 * usable rows.
 * Example: const r = createCsvReader(); r.push('x,y\n1,'); r.push('2\n'); r.finish()
 * -> rowCount 1, values [[1], [2]], lines [2].
 */
export function createCsvReader(options: CsvReaderOptions = {}): CsvChunkReader {
  const file = options.file;
  let pending: string[] = [];
  let pendingLength = 0;
  let tokenizer: CsvTokenizer | undefined;
  let builder: TableBuilder | undefined;
  let finished = false;
  /** Whether the first character has been seen (a BOM is only a BOM there). */
  let started = false;
  let bom = false;
  /** Still in the blank lines before the content. */
  let leading = true;
  /** Complete blank lines before the content. */
  let blankLines = 0;
  /** The last character of the blank lines was a CR: an LF right after it pairs with it. */
  let afterCR = false;
  /** Whether any character at all arrived after the BOM. */
  let anyText = false;
  /** Line breaks of the content so far, until the one that ends the detection sample. */
  const breaks: BreakCount = { breaks: 0, afterCR: false };
  /** Position in the content just after that line break, once seen. */
  let sampleBreak: number | undefined;

  /**
   * Consumes the blank lines at the start of `chunk` and returns the rest, from the start
   * of the first line with content ('' while everything is blank).
   */
  function skipLeading(chunk: string): string {
    let lineStart = 0;
    for (let i = 0; i < chunk.length; i++) {
      const c = chunk.charCodeAt(i);
      if (c === SPACE || c === TAB) afterCR = false;
      else if (c === LF) {
        if (!afterCR || i !== lineStart) blankLines++;
        afterCR = false;
        lineStart = i + 1;
      } else if (c === CR) {
        blankLines++;
        afterCR = true;
        lineStart = i + 1;
      } else {
        leading = false;
        // An LF of a CRLF pair already counted stays with its CR.
        return chunk.slice(lineStart);
      }
    }
    return '';
  }

  function start(complete: boolean): void {
    const text = pending.join('');
    pending = [];
    if (complete && text.length === 0) throw new InputError(anyText ? 'the file is empty: it holds only blank lines' : 'the file is empty', { file });
    checkNotBinary(text, file);
    const length = sampleLength(text);
    const sampleComplete = complete && text.length <= length;
    const detection = detectFormat(sampleComplete ? text : text.slice(0, length), sampleComplete, options);
    builder = new TableBuilder({ ...detection, bom }, file, blankLines, options.keepText);
    tokenizer = new CsvTokenizer(detection.delimiter, builder, blankLines + 1);
    tokenizer.push(text);
    // The rows of the sample suggest the rows of the whole text; a tenth more, so that a
    // slightly longer rest does not double the columns at the end.
    const hint = options.sizeHint;
    if (!complete && hint !== undefined && hint > text.length) builder.reserve((builder.rows * hint * RESERVE_MARGIN) / text.length + MIN_RESERVE);
  }

  return {
    push(chunk: string): void {
      if (finished) throw new Error('createCsvReader: push after finish');
      if (tokenizer !== undefined) {
        tokenizer.push(chunk);
        return;
      }
      if (chunk.length === 0) return;
      if (!started) {
        started = true;
        if (chunk.charCodeAt(0) === BOM) {
          bom = true;
          chunk = chunk.slice(1);
        }
      }
      if (chunk.length > 0) anyText = true;
      if (leading) {
        chunk = skipLeading(chunk);
        if (chunk.length === 0) return;
      }
      if (sampleBreak === undefined) {
        const at = breakEnd(chunk, 0, chunk.length, breaks);
        if (at !== undefined) sampleBreak = pendingLength + at;
      }
      pending.push(chunk);
      pendingLength += chunk.length;
      // The content is longer than its detection sample (sampleLength), so detection sees
      // the same sample however the text was split.
      const sample = sampleBreak === undefined ? MAX_DETECT_CHARS : Math.min(MAX_DETECT_CHARS, Math.max(DETECT_CHARS, sampleBreak));
      if (pendingLength > sample) start(false);
    },
    finish(): ParsedTable {
      if (finished) throw new Error('createCsvReader: finish called twice');
      finished = true;
      if (tokenizer === undefined) start(true);
      (tokenizer as CsvTokenizer).finish();
      return (builder as TableBuilder).finish();
    },
    drain(): ParsedTable | undefined {
      return builder?.drain();
    },
    finishRows(): ParsedTable {
      if (finished) throw new Error('createCsvReader: finish called twice');
      finished = true;
      if (tokenizer === undefined) start(true);
      (tokenizer as CsvTokenizer).finish();
      const rest = (builder as TableBuilder).drain();
      if (rest === undefined) throw new InputError('the file is empty', { file });
      return rest;
    },
  };
}

/**
 * Parses a whole CSV text (e.g. an editor document with unsaved edits). Same result as
 * pushing the text in chunks to `createCsvReader`. Cost O(text length).
 * Example: parseCsvText('a;b\n1,5;2\n').values[0] -> Float64Array [1.5].
 */
export function parseCsvText(text: string, options: CsvReaderOptions = {}): ParsedTable {
  const reader = createCsvReader(options);
  reader.push(text);
  return reader.finish();
}
