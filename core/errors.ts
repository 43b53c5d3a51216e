import { renderOptions, type Audience } from './words/options';

/** Where a problem is: file, 1-based line, column name. All optional. */
export interface Place {
  readonly file?: string | undefined;
  readonly line?: number | undefined;
  readonly column?: string | undefined;
}

/**
 * An error caused by the user's input or options (as opposed to a bug). The command line
 * prints its message and exits with code 2; the host shows it to the user.
 */
export class InputError extends Error {
  readonly place: Place;
  /** The message as written, with option references (core/words/options.ts) not yet rendered. */
  readonly raw: string;
  constructor(message: string, place: Place = {}) {
    super(renderOptions(message, 'cli'));
    this.raw = message;
    this.name = 'InputError';
    this.place = place;
  }
  /** The message in the audience's words (flags or settings), prefixed with file:line and column where known. */
  describe(audience: Audience = 'cli'): string {
    const p = this.place;
    const text = renderOptions(this.raw, audience);
    const at = [p.file, p.line !== undefined ? `line ${p.line}` : undefined, p.column !== undefined ? `column "${p.column}"` : undefined].filter((s) => s !== undefined).join(', ');
    return at ? `${at}: ${text}` : text;
  }
}

/** Raised when a fit cannot be computed at the asked df (rank deficiency, too few x, ...). */
export class FitError extends InputError {
  constructor(message: string) {
    super(message);
    this.name = 'FitError';
  }
}

/** Raised when a long computation was cancelled through its cancellation token. */
export class CancelledError extends Error {
  constructor() {
    super('cancelled');
    this.name = 'CancelledError';
  }
}

/** True for the errors JavaScript raises when memory for an array cannot be had. */
export function isAllocationFailure(e: unknown): boolean {
  return e instanceof RangeError && /allocation failed|Invalid (typed )?array length|out of memory/i.test(e.message);
}

/**
 * The InputError for running out of memory with `rows` data rows read (`stage`: while
 * reading them, or while fitting them): the count and what to do, never a stack trace.
 * Example: outOfMemory(20_000_000, 'reading', { file: 'big.csv', line: 20_000_002 }).
 */
export function outOfMemory(rows: number, stage: 'reading' | 'fitting', place: Place = {}): InputError {
  const count = rows.toLocaleString('en-US');
  const when = stage === 'reading' ? `after ${count} data rows were read` : `while fitting ${count} data rows`;
  return new InputError(
    `out of memory ${when}: the data do not fit in the memory this process may use. Fit a part of the rows (for example every 10th row, or one range of x at a time), or run where the process may use more memory (a larger machine, a higher ulimit, or NODE_OPTIONS=--max-old-space-size=<megabytes> when the JavaScript heap is the limit)`,
    place,
  );
}
