/**
 * The automatic table step: the coarsest uniform grid on which linear interpolation between
 * adjacent table rows stays within a tolerance of the fitted curve.
 */
import { InputError } from '../errors';
import { opt } from '../words/options';
import type { Curve } from '../types';
import { defaultGrid, formatGrid, gridPoints, MAX_GRID_POINTS, type GridSpec } from './grid';
import { interpolationError } from './interpolation';

/** Outcome of autoStep. */
export interface AutoStep {
  /** Number of intervals m; the table has m + 1 rows. */
  readonly intervals: number;
  /** (stop - start) / m. */
  readonly step: number;
  /** Largest gap between the curve and the interpolated table (as printed), over [start, stop]. */
  readonly maxError: number;
  /** Where that gap occurs. */
  readonly at: number;
}

/** A grid ready to evaluate: never of kind 'auto'. */
export interface ResolvedGrid {
  /** The concrete grid (an automatic step becomes a count grid). */
  readonly spec: GridSpec;
  readonly points: Float64Array;
  /** The automatic step's outcome, when the grid asked for one. */
  readonly auto?: AutoStep & { readonly tolerance: number };
}

/** Evaluations of the curve used to estimate the smallest error rounding alone makes. */
const ROUNDING_PROBES = 257;

/** Largest half unit in the last printed digit of the curve over [start, stop] (what rounding alone costs). */
function roundingFloor(value: (x: number) => number, start: number, stop: number, round: (v: number) => number): number {
  let floor = 0;
  for (let i = 0; i < ROUNDING_PROBES; i++) {
    const v = value(start + ((stop - start) * i) / (ROUNDING_PROBES - 1));
    floor = Math.max(floor, Math.abs(v - round(v)));
  }
  return floor;
}

/**
 * The smallest number of equal intervals m over [start, stop] for which the broken line
 * through the table rows (x_i, f(x_i)), both printed through `round`, stays within
 * `tolerance` of f everywhere in [start, stop], checked by interpolationError (dense
 * evaluation with golden-section refinement). m is found by doubling from 1 and then by
 * bisection between the last failing and the first passing m; the bisection assumes the
 * error shrinks as m grows, which holds for the h^2 |f''| / 8 bound of linear
 * interpolation (de Boor 1978, chapter II, from memory) but can fail by a row or two for
 * curves whose error oscillates with m. The returned m always passes its own check.
 * Throws InputError when the tolerance is below what rounding alone costs, or when more than
 * MAX_GRID_POINTS rows would be needed. Cost: O(m log m) curve evaluations.
 * Example: autoStep((x) => x * x, 0, 1, 0.011, (v) => v) -> { intervals: 5, step: 0.2, maxError: 0.01 (h^2 / 4), at: 0.1 }.
 */
export function autoStep(value: (x: number) => number, start: number, stop: number, tolerance: number, round: (v: number) => number, label = `auto:${tolerance}`): AutoStep {
  const floor = roundingFloor(value, start, stop, round);
  if (floor >= tolerance) {
    throw new InputError(`grid "${label}": the tolerance ${tolerance} is not above the rounding of the printed table values (up to ${floor.toPrecision(2)}); raise ${opt('digits')} or the tolerance`);
  }
  const check = (m: number, stopAbove: number): AutoStep => {
    const pts = gridPoints({ kind: 'count', start, stop, count: m + 1 }, new Float64Array(0));
    const nx = new Float64Array(m + 1);
    const ny = new Float64Array(m + 1);
    for (let i = 0; i <= m; i++) {
      const x = pts[i] as number;
      nx[i] = round(x);
      ny[i] = round(value(x));
    }
    const e = interpolationError(value, nx, ny, stopAbove);
    return { intervals: m, step: (stop - start) / m, maxError: e.maxError, at: e.at };
  };
  const maxIntervals = MAX_GRID_POINTS - 1;
  let lo = 0;
  let m = 1;
  let best: AutoStep;
  for (;;) {
    const r = check(m, tolerance);
    if (r.maxError <= tolerance) {
      best = r;
      break;
    }
    lo = m;
    if (m >= maxIntervals) {
      throw new InputError(`grid "${label}": linear interpolation needs more than ${MAX_GRID_POINTS} table rows to stay within ${tolerance} of the curve; choose a larger tolerance`);
    }
    m = Math.min(2 * m, maxIntervals);
  }
  let hi = m;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    const r = check(mid, tolerance);
    if (r.maxError <= tolerance) {
      hi = mid;
      best = r;
    } else {
      lo = mid;
    }
  }
  return best;
}

/**
 * Turns a grid spec into points: the default (DEFAULT_GRID_COUNT points over the data range)
 * when `spec` is undefined, the spec's own points, or, for an automatic step, a count grid
 * from autoStep over [start, stop] (the data range unless given). O(points) or autoStep's cost.
 * Example: resolveGrid({ kind: 'auto', tolerance: 1e-3 }, sortedX, fit.curve, (v) => v).auto.step.
 */
export function resolveGrid(spec: GridSpec | undefined, sortedX: Float64Array, curve: Curve, round: (v: number) => number): ResolvedGrid {
  const given = spec ?? defaultGrid(sortedX);
  if (given.kind !== 'auto') return { spec: given, points: gridPoints(given, sortedX) };
  const start = given.start ?? (sortedX[0] as number);
  const stop = given.stop ?? (sortedX[sortedX.length - 1] as number);
  if (!(stop > start)) throw new InputError(`grid "${formatGrid(given)}": the data range is a single x value, so there is no step to choose`);
  const a = autoStep((x) => curve.value(x), start, stop, given.tolerance, round, formatGrid(given));
  const concrete: GridSpec = { kind: 'count', start, stop, count: a.intervals + 1 };
  return { spec: concrete, points: gridPoints(concrete, sortedX), auto: { ...a, tolerance: given.tolerance } };
}
