/**
 * Chooses how readings are drawn: every point when there are few and they do not pile
 * up, otherwise counts on a grid (core/stats/density.ts binnedDensity), so the panel
 * message stays small at any n.
 */
import { binnedDensity } from '../stats/density';
import type { Cloud } from './model';
import { roundAll } from './round';

/** Limits of cloudOf. */
export interface CloudLimits {
  /** Largest number of readings drawn one by one. */
  readonly maxPoints: number;
  /** Grid size used when binning. */
  readonly nx: number;
  readonly ny: number;
  /** Bin when fewer than this fraction of the readings are distinct (x, y) pairs (overplotting). */
  readonly minDistinctFraction: number;
}

/** Defaults: dots up to 2,000 readings; a 64 x 40 grid beyond. */
export const DEFAULT_CLOUD_LIMITS: CloudLimits = { maxPoints: 2000, nx: 64, ny: 40, minDistinctFraction: 0.6 };

/**
 * Points or bins for (x[i], y[i]); non-finite pairs are left out. `lines` gives each
 * row's CSV line. Bins are binnedDensity's cells over the finite readings' ranges (each
 * [lo, lo + w) but the last, which holds the maximum; a flat range widened by 0.5 each
 * side). O(n) (plus O(n) hashing when n <= maxPoints).
 * Example: cloudOf(x, y, lines).kind === 'points' for 50 distinct readings.
 */
export function cloudOf(x: ArrayLike<number>, y: ArrayLike<number>, lines?: ArrayLike<number>, limits: CloudLimits = DEFAULT_CLOUD_LIMITS): Cloud {
  const n = x.length;
  let finite = 0;
  let xMin = Infinity;
  let xMax = -Infinity;
  let yMin = Infinity;
  let yMax = -Infinity;
  for (let i = 0; i < n; i++) {
    const xi = x[i] as number;
    const yi = y[i] as number;
    if (!Number.isFinite(xi) || !Number.isFinite(yi)) continue;
    finite++;
    if (xi < xMin) xMin = xi;
    if (xi > xMax) xMax = xi;
    if (yi < yMin) yMin = yi;
    if (yi > yMax) yMax = yi;
  }
  if (finite <= limits.maxPoints && !overplotted(x, y, finite, limits.minDistinctFraction)) {
    const px: number[] = [];
    const py: number[] = [];
    const pl: number[] = [];
    for (let i = 0; i < n; i++) {
      const xi = x[i] as number;
      const yi = y[i] as number;
      if (!Number.isFinite(xi) || !Number.isFinite(yi)) continue;
      px.push(xi);
      py.push(yi);
      pl.push(lines ? (lines[i] as number) : 0);
    }
    return { kind: 'points', x: roundAll(px), y: roundAll(py), lines: pl };
  }
  if (finite === 0) return { kind: 'points', x: [], y: [], lines: [] };
  // Widen flat ranges so every reading falls in a cell.
  if (xMin === xMax) [xMin, xMax] = [xMin - 0.5, xMax + 0.5];
  if (yMin === yMax) [yMin, yMax] = [yMin - 0.5, yMax + 0.5];
  // The one binning Knotwise has, checked against R's table(cut(...)) (test/reference/density.test.ts).
  const grid = binnedDensity(asFloat64(x), asFloat64(y), limits.nx, limits.ny, [xMin, xMax], [yMin, yMax]);
  return { kind: 'bins', xMin, xMax, yMin, yMax, nx: grid.nx, ny: grid.ny, counts: Array.from(grid.counts), total: finite };
}

/** `v` as a Float64Array (itself when it is one; a copy otherwise). */
function asFloat64(v: ArrayLike<number>): Float64Array {
  return v instanceof Float64Array ? v : Float64Array.from(v);
}

/** True when so many readings share the same (x, y) that dots would hide them. */
function overplotted(x: ArrayLike<number>, y: ArrayLike<number>, finite: number, minFraction: number): boolean {
  if (finite < 20) return false;
  const seen = new Set<string>();
  for (let i = 0; i < x.length; i++) {
    const xi = x[i] as number;
    const yi = y[i] as number;
    if (Number.isFinite(xi) && Number.isFinite(yi)) seen.add(`${xi},${yi}`);
  }
  return seen.size < minFraction * finite;
}
