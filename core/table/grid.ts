import { InputError } from '../errors';
import { opt } from '../words/options';

/** Where the curve table is evaluated. */
export type GridSpec =
  | { readonly kind: 'count'; readonly start: number; readonly stop: number; readonly count: number }
  | { readonly kind: 'step'; readonly start: number; readonly stop: number; readonly step: number }
  | { readonly kind: 'data' }
  | { readonly kind: 'list'; readonly values: readonly number[] }
  /**
   * The coarsest uniform step for which straight lines between adjacent table rows stay
   * within `tolerance` (units of y) of the fitted curve; over [start, stop] when given,
   * else over the data range. Resolved against the fit by resolveGrid (core/table/autoStep.ts).
   */
  | { readonly kind: 'auto'; readonly tolerance: number; readonly start?: number; readonly stop?: number };

/** Most grid points in one table. */
export const MAX_GRID_POINTS = 1_000_000;
/** Default number of table points over the data range. */
export const DEFAULT_GRID_COUNT = 101;

/**
 * Parses a grid: `<start>:<stop>:count=<n>`, `<start>:<stop>:step=<step>`, `data` (the
 * distinct x of the data), a list `1,2.5,4`, or an automatic step `auto:<tolerance>`
 * (over the data range) or `<start>:<stop>:auto=<tolerance>`. A bare third field
 * (`10:94:2`) is refused: some read it as a count, others as a step.
 */
export function parseGrid(text: string): GridSpec {
  const t = text.trim();
  if (t === 'data') return { kind: 'data' };
  const parts = t.split(':');
  if (parts.length === 2 && (parts[0] as string).trim() === 'auto') return { kind: 'auto', tolerance: tolerance(parts[1] as string, t) };
  if (parts.length === 3) {
    const start = num(parts[0] as string, 'start', t);
    const stop = num(parts[1] as string, 'stop', t);
    if (!(stop > start)) throw new InputError(`grid "${t}": stop must be greater than start`);
    const last = parts[2] as string;
    if (last.trim().startsWith('auto=')) return { kind: 'auto', tolerance: tolerance(last.trim().slice(5), t), start, stop };
    if (last.startsWith('step=')) {
      const step = num(last.slice(5), 'step', t);
      if (!(step > 0)) throw new InputError(`grid "${t}": step must be positive`);
      if ((stop - start) / step + 1 > MAX_GRID_POINTS) throw new InputError(`grid "${t}" has more than ${MAX_GRID_POINTS} points`);
      return { kind: 'step', start, stop, step };
    }
    if (!last.trim().startsWith('count=')) {
      throw new InputError(
        `grid "${t}": the third field must say what it is: <start>:<stop>:count=<n> (n points), <start>:<stop>:step=<h> or <start>:<stop>:auto=<tolerance>; other forms: data, a list 1,2.5,4, auto:<tolerance>`,
      );
    }
    const count = num(last.trim().slice(6), 'count', t);
    if (!Number.isInteger(count) || count < 2 || count > MAX_GRID_POINTS) throw new InputError(`grid "${t}": count must be a whole number from 2 to ${MAX_GRID_POINTS}`);
    return { kind: 'count', start, stop, count };
  }
  const values = t.split(',').map((s) => num(s, 'value', t));
  return { kind: 'list', values: [...values].sort((a, b) => a - b) };
}

function tolerance(s: string, whole: string): number {
  const v = num(s, 'tolerance', whole);
  if (!(v > 0)) throw new InputError(`grid "${whole}": the tolerance of the automatic step must be a positive number (in units of y)`);
  return v;
}

/** The text form of a grid, as parseGrid reads it (the inverse of parseGrid up to spacing and list order). */
export function formatGrid(spec: GridSpec): string {
  switch (spec.kind) {
    case 'count':
      return `${spec.start}:${spec.stop}:count=${spec.count}`;
    case 'step':
      return `${spec.start}:${spec.stop}:step=${spec.step}`;
    case 'data':
      return 'data';
    case 'list':
      return spec.values.join(',');
    case 'auto':
      return spec.start !== undefined && spec.stop !== undefined ? `${spec.start}:${spec.stop}:auto=${spec.tolerance}` : `auto:${spec.tolerance}`;
  }
}

function num(s: string, what: string, whole: string): number {
  const v = Number(s.trim());
  if (s.trim() === '' || !Number.isFinite(v)) throw new InputError(`grid "${whole}": ${what} "${s}" is not a number`);
  return v;
}

/**
 * The grid's x values. Counts are spaced evenly with start and stop exact; steps run from
 * start while <= stop (+ a relative 1e-9 allowance for rounding); `data` gives the sorted
 * distinct x. O(points).
 */
export function gridPoints(spec: GridSpec, sortedX: Float64Array): Float64Array {
  switch (spec.kind) {
    case 'count': {
      const out = new Float64Array(spec.count);
      for (let i = 0; i < spec.count; i++) out[i] = i === spec.count - 1 ? spec.stop : spec.start + ((spec.stop - spec.start) * i) / (spec.count - 1);
      return out;
    }
    case 'step': {
      const m = Math.floor((spec.stop - spec.start) / spec.step + 1e-9) + 1;
      // The rounding allowance can admit a last point one ulp above stop (0:0.3:step=0.1 gives
      // 3 x 0.1 = 0.30000000000000004), which checkInRange would refuse: clamp it to stop.
      return Float64Array.from({ length: m }, (_, i) => Math.min(spec.start + i * spec.step, spec.stop));
    }
    case 'data': {
      const out: number[] = [];
      for (let i = 0; i < sortedX.length; i++) if (i === 0 || sortedX[i] !== sortedX[i - 1]) out.push(sortedX[i] as number);
      return Float64Array.from(out);
    }
    case 'list':
      return Float64Array.from(spec.values);
    case 'auto':
      // The step depends on the fitted curve: resolveGrid (core/table/autoStep.ts) turns it into a count grid.
      throw new InputError(`grid "${formatGrid(spec)}": an automatic step needs the fitted curve; resolve it with resolveGrid first`);
  }
}

/** Default grid: DEFAULT_GRID_COUNT points over the data range. */
export function defaultGrid(sortedX: Float64Array): GridSpec {
  return { kind: 'count', start: sortedX[0] as number, stop: sortedX[sortedX.length - 1] as number, count: DEFAULT_GRID_COUNT };
}

/** Throws InputError when grid points fall outside [lower, upper] and extrapolation was not asked for. */
export function checkInRange(points: Float64Array, lower: number, upper: number, allowExtrapolation: boolean): number {
  let outside = 0;
  for (const p of points) if (p < lower || p > upper) outside++;
  if (outside > 0 && !allowExtrapolation) {
    throw new InputError(`${outside} grid point(s) lie outside the data range [${lower}, ${upper}]; extrapolation is refused unless asked for (${opt('extrapolate')})`);
  }
  return outside;
}
