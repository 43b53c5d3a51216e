import { InputError } from '../errors';
import type { XYData } from '../types';

/** Largest magnitude accepted for x and y: squares and cross products must stay finite. */
export const MAX_MAGNITUDE = 1e150;

/** Data checked once and sorted once, shared by every candidate fit. */
export interface PreparedData {
  readonly data: XYData;
  readonly sortedX: Float64Array;
  /** Number of distinct x values. */
  readonly distinct: number;
}

/**
 * Checks x, y and w (finite, weights > 0, magnitudes below MAX_MAGNITUDE, equal lengths,
 * at least one row) and sorts x. Throws InputError naming the first bad row (with its CSV
 * line when known). Cost O(n log n).
 */
export function prepareData(data: XYData): PreparedData {
  const { x, y, w, lines } = data;
  const n = x.length;
  if (y.length !== n || (w && w.length !== n)) throw new InputError('x, y and weights must have the same length');
  if (n === 0) throw new InputError('no rows to fit');
  for (let i = 0; i < n; i++) {
    const line = lines ? lines[i] : undefined;
    const xi = x[i] as number;
    const yi = y[i] as number;
    if (!Number.isFinite(xi) || Math.abs(xi) > MAX_MAGNITUDE) throw new InputError(badValue('x', xi), { line, column: 'x' });
    if (!Number.isFinite(yi) || Math.abs(yi) > MAX_MAGNITUDE) throw new InputError(badValue('y', yi), { line, column: 'y' });
    if (w) {
      const wi = w[i] as number;
      if (!(wi > 0) || !Number.isFinite(wi)) throw new InputError(`weight ${wi} is not a positive finite number`, { line, column: 'weights' });
    }
  }
  const sortedX = Float64Array.from(x).sort();
  let distinct = 1;
  for (let i = 1; i < n; i++) if (sortedX[i] !== sortedX[i - 1]) distinct++;
  return { data, sortedX, distinct };
}

function badValue(what: string, v: number): string {
  if (!Number.isFinite(v)) return `${what} value ${v} is not a finite number`;
  return `${what} value ${v} is too large to fit (magnitudes up to ${MAX_MAGNITUDE} are supported; rescale the column, e.g. change its unit)`;
}

/** True when `d` is already prepared. */
export function isPrepared(d: XYData | PreparedData): d is PreparedData {
  return (d as PreparedData).sortedX !== undefined;
}
