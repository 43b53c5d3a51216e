/**
 * Streaming CSV reader: buffers the first 64 K characters for format detection, then
 * tokenizes every chunk straight into typed columns.
 */
import { InputError } from '../errors';
import { checkNotBinary, DETECT_CHARS, detectFormat } from './detect';
import { TableBuilder } from './tableBuilder';
import { CsvTokenizer } from './tokenizer';
import type { CsvReader, CsvReaderOptions, ParsedTable } from './types';

const BOM = 0xfeff;

/** True when the text has only spaces, tabs and line breaks. */
function isBlank(text: string): boolean {
  for (let i = 0; i < text.length; i++) if (text.charCodeAt(i) > 32) return false;
  return true;
}

/**
 * A reader that takes the text in chunks of any size and split anywhere. Detection runs
 * once 64 K characters have arrived (or at `finish` for shorter texts); from then on each
 * chunk is tokenized as it comes, so memory holds the columns, not the text.
 * Throws InputError (with `options.file`) for an empty or binary text, a single column,
 * a header without data rows, or no usable rows.
 * Example: const r = createCsvReader(); r.push('x,y\n1,'); r.push('2\n'); r.finish()
 * -> rowCount 1, values [[1], [2]], lines [2].
 */
export function createCsvReader(options: CsvReaderOptions = {}): CsvReader {
  const file = options.file;
  let pending: string[] = [];
  let pendingLength = 0;
  let tokenizer: CsvTokenizer | undefined;
  let builder: TableBuilder | undefined;
  let finished = false;

  function start(complete: boolean): void {
    let text = pending.join('');
    pending = [];
    const bom = text.charCodeAt(0) === BOM;
    if (bom) text = text.slice(1);
    if (complete && isBlank(text)) throw new InputError('the file is empty', { file });
    checkNotBinary(text, file);
    const sampleComplete = complete && text.length <= DETECT_CHARS;
    const detection = detectFormat(sampleComplete ? text : text.slice(0, DETECT_CHARS), sampleComplete, options);
    builder = new TableBuilder({ ...detection, bom }, file);
    tokenizer = new CsvTokenizer(detection.delimiter, builder);
    tokenizer.push(text);
  }

  return {
    push(chunk: string): void {
      if (finished) throw new Error('createCsvReader: push after finish');
      if (tokenizer !== undefined) {
        tokenizer.push(chunk);
        return;
      }
      pending.push(chunk);
      pendingLength += chunk.length;
      // Two more than DETECT_CHARS: even after removing a BOM the text is longer than the
      // sample, so detection sees the same sample however the text was split.
      if (pendingLength > DETECT_CHARS + 1) start(false);
    },
    finish(): ParsedTable {
      if (finished) throw new Error('createCsvReader: finish called twice');
      finished = true;
      if (tokenizer === undefined) start(true);
      (tokenizer as CsvTokenizer).finish();
      return (builder as TableBuilder).finish();
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
