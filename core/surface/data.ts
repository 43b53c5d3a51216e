import { InputError } from '../errors';
import { MAX_MAGNITUDE, MAX_X_MAGNITUDE, MIN_WEIGHT, MIN_X_RANGE } from '../fit/prepared';
import { sortedInput, type SortedInput } from './axis';

/** Readings of a quantity y at two inputs u and v, all arrays of the same length n. */
export interface SurfaceData {
  readonly u: Float64Array;
  readonly v: Float64Array;
  readonly y: Float64Array;
  /** Prior weights (> 0); absent means all 1. */
  readonly w?: Float64Array | undefined;
  /** 1-based line in the source CSV of each row, for messages. */
  readonly lines?: Int32Array | undefined;
  /** Column names for messages and words; default 'u', 'v', 'y', 'weights'. */
  readonly names?: Partial<SurfaceNames> | undefined;
}

/** The names of the columns, as messages and explanations say them. */
export interface SurfaceNames {
  readonly u: string;
  readonly v: string;
  readonly y: string;
  readonly w: string;
}

/** Surface data checked once, with each input sorted once, shared by every candidate fit. */
export interface PreparedSurface {
  readonly data: SurfaceData;
  readonly u: SortedInput;
  readonly v: SortedInput;
  readonly names: SurfaceNames;
}

/**
 * Checks surface data and sorts each input: equal lengths, at least one row, u and v finite
 * with |value| up to MAX_X_MAGNITUDE and a spread of at least MIN_X_RANGE when not constant,
 * |y| up to MAX_MAGNITUDE, weights finite and from MIN_WEIGHT (the limits of curves,
 * docs/design.md, "Input", "Range and scale"). Throws InputError naming the column and the
 * CSV line of the first bad row. Cost O(n log n).
 * Example: prepareSurface({ u, v, y }).u.distinct.
 */
export function prepareSurface(data: SurfaceData): PreparedSurface {
  const names: SurfaceNames = { u: 'u', v: 'v', y: 'y', w: 'weights', ...data.names };
  const { u, v, y, w, lines } = data;
  const n = u.length;
  if (v.length !== n || y.length !== n || (w && w.length !== n)) throw new InputError(`${names.u}, ${names.v}, ${names.y}${w ? ` and ${names.w}` : ''} must have the same length`);
  if (n === 0) throw new InputError('no rows to fit');
  for (let i = 0; i < n; i++) {
    const line = lines ? lines[i] : undefined;
    checkValue(u[i] as number, MAX_X_MAGNITUDE, names.u, line);
    checkValue(v[i] as number, MAX_X_MAGNITUDE, names.v, line);
    checkValue(y[i] as number, MAX_MAGNITUDE, names.y, line);
    if (w) {
      const wi = w[i] as number;
      if (!(wi > 0) || !Number.isFinite(wi)) throw new InputError(`weight ${wi} is not a positive finite number`, { line, column: names.w });
      if (wi < MIN_WEIGHT)
        throw new InputError(`weight ${wi} is too small to fit (weights from ${MIN_WEIGHT} up are supported; only their ratios matter, so rescale the column)`, { line, column: names.w });
    }
  }
  const su = sortedInput(u);
  const sv = sortedInput(v);
  checkSpread(su, names.u);
  checkSpread(sv, names.v);
  return { data, u: su, v: sv, names };
}

function checkValue(value: number, limit: number, column: string, line: number | undefined): void {
  if (!Number.isFinite(value) || Math.abs(value) > limit) {
    throw new InputError(`${column} value ${value} is ${Number.isFinite(value) ? `beyond ${limit} in magnitude` : 'not a finite number'}`, { line, column });
  }
}

function checkSpread(input: SortedInput, column: string): void {
  const s = input.sorted;
  const spread = (s[s.length - 1] as number) - (s[0] as number);
  if (input.distinct > 1 && !(spread >= MIN_X_RANGE)) {
    throw new InputError(`the values of ${column} spread over ${spread}, less than ${MIN_X_RANGE}: differences this small lose their digits; rescale the column`, { column });
  }
}

/** Number of distinct (u, v) points, for messages. O(n log n). */
export function distinctPoints(u: Float64Array, v: Float64Array): number {
  const n = u.length;
  const idx = Array.from({ length: n }, (_, i) => i);
  idx.sort((a, b) => (u[a] as number) - (u[b] as number) || (v[a] as number) - (v[b] as number));
  let m = n > 0 ? 1 : 0;
  for (let k = 1; k < n; k++) {
    const a = idx[k - 1] as number;
    const b = idx[k] as number;
    if (u[a] !== u[b] || v[a] !== v[b]) m++;
  }
  return m;
}
