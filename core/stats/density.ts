import { InputError } from '../errors';

/** Point counts on a regular grid. */
export interface DensityGrid {
  /** counts[iy * nx + ix]: points in column ix (x bin) and row iy (y bin, 0 = lowest y). */
  readonly counts: Uint32Array;
  readonly nx: number;
  readonly ny: number;
  /** Bin i covers [lo + i w, lo + (i + 1) w), the last bin also includes hi. */
  readonly xRange: readonly [number, number];
  readonly yRange: readonly [number, number];
  /** Largest count, for the colour scale. */
  readonly maxCount: number;
  /** Points outside the ranges or with a non-finite coordinate. */
  readonly outside: number;
}

/**
 * Two-dimensional histogram of (x, y) on an nx x ny grid, for plots where points
 * overplot (integer data, large n): each bin is half-open [lo, lo + w) except the last,
 * which includes the upper limit (as R's cut(..., right = FALSE, include.lowest = TRUE)).
 * Ranges default to the finite data's minimum and maximum; a zero-width range is widened
 * by 0.5 on each side. One pass over the points: O(n + nx ny).
 * Throws InputError for arrays of different lengths, grid sizes that are not whole
 * numbers >= 1, or a range whose upper end is not above its lower end.
 * Example: binnedDensity(Float64Array.of(0, 1), Float64Array.of(0, 1), 2, 2).counts =
 * [1, 0, 0, 1].
 */
export function binnedDensity(x: Float64Array, y: Float64Array, nx: number, ny: number, xRange?: readonly [number, number], yRange?: readonly [number, number]): DensityGrid {
  const n = x.length;
  if (y.length !== n) throw new InputError(`density grid: x has ${n} values but y has ${y.length}`);
  for (const [name, v] of [
    ['nx', nx],
    ['ny', ny],
  ] as const) {
    if (!(Number.isInteger(v) && v >= 1)) throw new InputError(`density grid: ${name} must be a whole number >= 1, got ${v}`);
  }
  const xr = xRange ?? finiteRange(x);
  const yr = yRange ?? finiteRange(y);
  for (const [name, r] of [
    ['x', xr],
    ['y', yr],
  ] as const) {
    if (!(Number.isFinite(r[0]) && Number.isFinite(r[1]) && r[1] > r[0])) {
      throw new InputError(`density grid: the ${name} range must be finite with upper > lower, got [${r[0]}, ${r[1]}]`);
    }
  }
  const [x0, x1] = xr;
  const [y0, y1] = yr;
  const xScale = nx / (x1 - x0);
  const yScale = ny / (y1 - y0);
  const counts = new Uint32Array(nx * ny);
  let outside = 0;
  let maxCount = 0;
  for (let i = 0; i < n; i++) {
    const xi = x[i] as number;
    const yi = y[i] as number;
    // Comparisons are false for NaN, so non-finite points land in `outside`.
    if (!(xi >= x0 && xi <= x1 && yi >= y0 && yi <= y1)) {
      outside++;
      continue;
    }
    const ix = Math.min(nx - 1, Math.floor((xi - x0) * xScale));
    const iy = Math.min(ny - 1, Math.floor((yi - y0) * yScale));
    const cell = iy * nx + ix;
    const c = (counts[cell] as number) + 1;
    counts[cell] = c;
    if (c > maxCount) maxCount = c;
  }
  return { counts, nx, ny, xRange: [x0, x1], yRange: [y0, y1], maxCount, outside };
}

/** [min, max] of the finite values, widened by 0.5 each side when they coincide. */
function finiteRange(v: Float64Array): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < v.length; i++) {
    const a = v[i] as number;
    if (!Number.isFinite(a)) continue;
    if (a < lo) lo = a;
    if (a > hi) hi = a;
  }
  if (lo > hi) return [0, 1]; // no finite values: an empty unit grid
  return lo === hi ? [lo - 0.5, hi + 0.5] : [lo, hi];
}
