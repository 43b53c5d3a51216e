import { InputError } from '../errors';
import type { XYData } from '../types';
import { xInOrder } from '../stats/orderByX';

/** Largest magnitude accepted for y: squares and cross products of y must stay finite. */
export const MAX_MAGNITUDE = 1e150;
/**
 * Smallest accepted prior weight: weighted sums of squares of smaller weights come near
 * the smallest normal double and lose their digits. Only ratios of weights matter to a fit,
 * so a column of smaller weights can be rescaled.
 */
export const MIN_WEIGHT = 1e-150;
/**
 * Largest magnitude accepted for x. The fits work on x mapped to [0, 1] (or [-1, 1]) over the
 * data range, so only that range must be a finite number: any x up to this magnitude is
 * fitted as well as x of order 1 (docs/design.md, "Input").
 */
export const MAX_X_MAGNITUDE = 1e300;
/**
 * Smallest accepted spread max(x) - min(x) of data with more than one distinct x: below it,
 * differences between x values come near the smallest normal double (2.2e-308) and lose
 * their digits. x values spread over at least this much are fitted as well as x of order 1.
 */
export const MIN_X_RANGE = 1e-300;

/** Data checked once and sorted once, shared by every candidate fit. */
export interface PreparedData {
  readonly data: XYData;
  readonly sortedX: Float64Array;
  /** Number of distinct x values. */
  readonly distinct: number;
}

/**
 * Checks x, y and w (finite; |x| up to MAX_X_MAGNITUDE with a spread of at least
 * MIN_X_RANGE when x is not constant; |y| up to MAX_MAGNITUDE; weights from MIN_WEIGHT;
 * equal lengths; at least one row) and sorts x.
 * Throws InputError naming the first bad row (with its CSV line when known), or the spread
 * of x when it is below MIN_X_RANGE. Cost O(n log n).
 * Example: prepareData({ x: Float64Array.of(1e-300, 2e-300, 3e-300), y }).distinct === 3.
 */
export function prepareData(data: XYData): PreparedData {
  const { x, y, w } = data;
  const n = x.length;
  if (y.length !== n || (w && w.length !== n)) throw new InputError('x, y and weights must have the same length');
  if (n === 0) throw new InputError('no rows to fit');
  checkRowValues(data);
  // The sorted values through the order the tuning and the checks share: the residual checks'
  // copy (xInOrder) when it holds no -0, else one with -0 written as 0 (equal anyway).
  const inOrder = xInOrder(x);
  let negativeZero = false;
  for (let k = 0; k < n && !negativeZero; k++) negativeZero = inOrder[k] === 0 && 1 / (inOrder[k] as number) < 0;
  const sortedX = negativeZero ? inOrder.map((v) => v + 0) : inOrder;
  let distinct = 1;
  for (let i = 1; i < n; i++) if (sortedX[i] !== sortedX[i - 1]) distinct++;
  const spread = (sortedX[n - 1] as number) - (sortedX[0] as number);
  if (distinct > 1 && !(spread >= MIN_X_RANGE)) {
    throw new InputError(
      `the x values spread over only ${spread} (from ${sortedX[0]} to ${sortedX[n - 1]}); Knotwise needs a spread of at least ${MIN_X_RANGE} to tell them apart in double precision: rescale the column, e.g. change its unit`,
      { column: 'x' },
    );
  }
  return { data, sortedX, distinct };
}

/**
 * The value checks of prepareData, row by row: x finite and within MAX_X_MAGNITUDE, y within
 * MAX_MAGNITUDE, weights positive, finite and from MIN_WEIGHT. A file read in passes
 * (core/node/streamFile.ts) checks each part with it. Throws InputError naming the first bad
 * row (its CSV line when known) and the column by role. O(n).
 */
export function checkRowValues(data: XYData): void {
  const { x, y, w, lines } = data;
  const n = x.length;
  for (let i = 0; i < n; i++) {
    const line = lines ? lines[i] : undefined;
    const xi = x[i] as number;
    const yi = y[i] as number;
    if (!Number.isFinite(xi) || Math.abs(xi) > MAX_X_MAGNITUDE) throw new InputError(badValue('x', xi, MAX_X_MAGNITUDE), { line, column: 'x' });
    if (!Number.isFinite(yi) || Math.abs(yi) > MAX_MAGNITUDE) throw new InputError(badValue('y', yi, MAX_MAGNITUDE), { line, column: 'y' });
    if (w) {
      const wi = w[i] as number;
      if (!(wi > 0) || !Number.isFinite(wi)) throw new InputError(`weight ${wi} is not a positive finite number`, { line, column: 'weights' });
      if (wi < MIN_WEIGHT)
        throw new InputError(`weight ${wi} is too small to fit (weights from ${MIN_WEIGHT} up are supported; only their ratios matter, so rescale the column)`, { line, column: 'weights' });
    }
  }
}

function badValue(what: string, v: number, limit: number): string {
  if (!Number.isFinite(v)) return `${what} value ${v} is not a finite number`;
  return `${what} value ${v} is too large to fit (magnitudes up to ${limit} are supported; rescale the column, e.g. change its unit)`;
}

/** True when `d` is already prepared. */
export function isPrepared(d: XYData | PreparedData): d is PreparedData {
  return (d as PreparedData).sortedX !== undefined;
}
