/**
 * Cells of the union of several knot sets. Within one cell every cubic B-spline of every
 * candidate is a single cubic polynomial in t = (x - cell start) / cell width, t in [0, 1],
 * which lets one pass of weighted power sums serve all candidates (docs/design.md, "Power sums").
 */
export interface Cells {
  /** Cell start points, length C + 1 (the last entry is the upper boundary). */
  readonly breaks: Float64Array;
  /** Cell of each row. */
  readonly cell: Int32Array;
  /** Scaled position of each row in its cell, in [0, 1]. */
  readonly t: Float64Array;
}

/**
 * Builds the cells of the sorted, de-duplicated union of `knotSets` over the data x: row i
 * lies in the cell c with breaks[c] <= x < breaks[c + 1] (the first cell takes x below it,
 * the last x at or above its end). A table of evenly spaced buckets over the breaks gives
 * each row a cell at most a step or two away, so a row costs a couple of comparisons
 * instead of a binary search. The cells last built over the same x with the same breaks are
 * returned again (not copied; nobody changes them). O(n + cells).
 */
export function buildCells(x: Float64Array, knotSets: readonly Float64Array[]): Cells {
  const all: number[] = [];
  for (const k of knotSets) for (const v of k) all.push(v);
  all.sort((a, b) => a - b);
  const uniq: number[] = [];
  for (const v of all) if (uniq.length === 0 || v > (uniq[uniq.length - 1] as number)) uniq.push(v);
  const breaks = Float64Array.from(uniq);
  // The tuning's fits to all rows and its resamples ask for the same cells of the same rows: built once.
  const known = built.get(x);
  if (known && known.breaks.length === breaks.length && known.breaks.every((v, k) => Object.is(v, breaks[k]))) return known;
  const cellCount = breaks.length - 1;
  const n = x.length;
  const cell = new Int32Array(n);
  const t = new Float64Array(n);
  const lo = breaks[0] as number;
  const span = (breaks[cellCount] as number) - lo;
  // Bucket b covers [lo + b span / M, lo + (b + 1) span / M); its entry is the cell of its left end.
  const M = Math.max(1, 8 * cellCount);
  const scale = span > 0 && Number.isFinite(M / span) ? M / span : 0;
  const first = new Int32Array(M);
  for (let b = 0, c = 0; b < M; b++) {
    const edge = lo + b / scale;
    while (c < cellCount - 1 && edge >= (breaks[c + 1] as number)) c++;
    first[b] = c;
  }
  for (let i = 0; i < n; i++) {
    const xi = x[i] as number;
    const b = Math.floor((xi - lo) * scale);
    let c = first[b < 0 ? 0 : b >= M ? M - 1 : b] as number;
    // The bucket's entry is within a step or two of the cell (rounding of b): step to it.
    while (c > 0 && xi < (breaks[c] as number)) c--;
    while (c < cellCount - 1 && xi >= (breaks[c + 1] as number)) c++;
    const start = breaks[c] as number;
    const width = (breaks[c + 1] as number) - start;
    cell[i] = c;
    t[i] = (xi - start) / width;
  }
  const cells = { breaks, cell, t };
  built.set(x, cells);
  return cells;
}

/** The cells last built over each x (the rows' arrays are not changed once read). */
const built = new WeakMap<Float64Array, Cells>();

/** Number of sums kept per cell: w t^p (p = 0..6), w y t^p (p = 0..3), w y^2. */
export const SUMS_PER_CELL = 12;

/**
 * Adds row i with weight wt to the per-cell sums `s` (cell-major, SUMS_PER_CELL each).
 * About a dozen multiply-adds, whatever the number of candidates.
 */
export function accumulateRow(s: Float64Array, cellIndex: number, t: number, y: number, wt: number): void {
  const o = cellIndex * SUMS_PER_CELL;
  const t2 = t * t;
  const t3 = t2 * t;
  const wy = wt * y;
  s[o] = (s[o] as number) + wt;
  s[o + 1] = (s[o + 1] as number) + wt * t;
  s[o + 2] = (s[o + 2] as number) + wt * t2;
  s[o + 3] = (s[o + 3] as number) + wt * t3;
  s[o + 4] = (s[o + 4] as number) + wt * t2 * t2;
  s[o + 5] = (s[o + 5] as number) + wt * t2 * t3;
  s[o + 6] = (s[o + 6] as number) + wt * t3 * t3;
  s[o + 7] = (s[o + 7] as number) + wy;
  s[o + 8] = (s[o + 8] as number) + wy * t;
  s[o + 9] = (s[o + 9] as number) + wy * t2;
  s[o + 10] = (s[o + 10] as number) + wy * t3;
  s[o + 11] = (s[o + 11] as number) + wy * y;
}

/**
 * The sums of several disjoint row groups in one pass (k-fold's folds): row i goes with
 * weight w_i into the block labels[i] of `out`, whose blocks lie one after another,
 * `stride` entries each (out is cleared first). The same bits as accumulateRow row by row. O(n).
 */
export function accumulateByLabel(cells: Cells, y: Float64Array, w: Float64Array | undefined, labels: Uint16Array, out: Float64Array, stride: number): void {
  out.fill(0);
  const { cell, t } = cells;
  const n = labels.length;
  for (let i = 0; i < n; i++) {
    // accumulateRow's arithmetic on the block of row i's label (the cell offset moved by the block).
    accumulateRow(out, (labels[i] as number) * (stride / SUMS_PER_CELL) + (cell[i] as number), t[i] as number, y[i] as number, w ? (w[i] as number) : 1);
  }
}

/**
 * The per-cell cubics of several candidates (each fitPoly[c * 4 + p]) laid side by side per
 * cell into `out`: out[(c * C + k) * 4 + p], so a pass over rows reads one cell's cubics of
 * every candidate together. A candidate with `use[k] === 0` gets a zero cubic.
 */
export function interleaveCubics(polys: readonly Float64Array[], cellCount: number, out: Float64Array, use?: Uint8Array): Float64Array {
  const C = polys.length;
  for (let k = 0; k < C; k++) {
    const fp = polys[k] as Float64Array;
    const on = use === undefined || use[k] === 1;
    for (let c = 0; c < cellCount; c++) for (let p = 0; p < 4; p++) out[(c * C + k) * 4 + p] = on ? (fp[c * 4 + p] as number) : 0;
  }
  return out;
}
