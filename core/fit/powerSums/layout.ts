import { accumulateRow, SUMS_PER_CELL } from './cells';

/**
 * The rows in x order (ties by row index), which groups them by cell: the resampling hot
 * path's layout. A pass over it meets each cell's rows together, so the cell's sums stay in
 * local variables instead of memory, and it reads the rows and their bootstrap
 * multiplicities (drawn by x rank, core/registry/resampling/bootstrap.ts) one after another.
 * The rows of each cell are added in x order: the same sums to the last bit as accumulateRow
 * over the rows in x order (resampling version 3; version 2 added them in row order).
 */
export interface CellLayout {
  /** Row of each position, the x order: positions start[c] .. start[c + 1] - 1 hold the rows of cell c. */
  readonly perm: Int32Array;
  /** First position of each cell, length cells + 1. */
  readonly start: Int32Array;
  /** Scaled position in its cell of the row at each position. */
  readonly t: Float64Array;
  /** The outcome of the row at each position (the engine's centred and scaled y). */
  readonly y: Float64Array;
  /** Prior weight of the row at each position, or undefined for all 1. */
  readonly w: Float64Array | undefined;
}

/**
 * Lays out the rows in the x order `order` (orderByX of x) over the cells of `breaks`,
 * given x in that order (`sortedX`, xInOrder): each row's cell and its position t in it
 * come from a sweep over the sorted x, the same cell and the same bits of t as buildCells;
 * y is centred and scaled, (y - mean) / scale, and carried with the prior weights to each
 * row's position. `shared`: in shared memory, so that worker threads read the one copy.
 * The layout's `perm` is `order` itself unless a shared layout needs a shared copy of it.
 * Throws when sortedX is not in order or its length is not order's. O(n + cells).
 */
export function layoutByCell(
  breaks: Float64Array,
  sortedX: Float64Array,
  order: Int32Array,
  centred: { readonly y: Float64Array; readonly mean: number; readonly scale: number },
  w: Float64Array | undefined,
  shared = false,
): CellLayout {
  const { y, mean, scale } = centred;
  const cellCount = breaks.length - 1;
  const n = order.length;
  if (sortedX.length !== n) throw new Error(`layoutByCell: ${sortedX.length} sorted x for an order of ${n} rows`);
  const bytes = (size: number): ArrayBuffer | SharedArrayBuffer => (shared ? new SharedArrayBuffer(size) : new ArrayBuffer(size));
  const start = new Int32Array(cellCount + 1);
  // The x order is the positions' rows: the order itself serves, when it is where the layout must be.
  const perm = !shared || order.buffer instanceof SharedArrayBuffer ? order : new Int32Array(bytes(4 * n));
  const t = new Float64Array(bytes(8 * n));
  const yl = new Float64Array(bytes(8 * n));
  const wl = w ? new Float64Array(bytes(8 * n)) : undefined;
  let c = 0;
  let left = breaks[0] as number;
  let width = (breaks[1] as number) - left;
  let previous = -Infinity;
  // Each row's position: read in row order and written to its position (scattered writes
  // cost far less than as many scattered reads).
  const position = new Int32Array(n);
  for (let p = 0; p < n; p++) {
    const xi = sortedX[p] as number;
    if (!(xi >= previous)) throw new Error('layoutByCell: x is not in order');
    previous = xi;
    // The cell a binary search over the breaks finds (x below the first break: the first cell; at or above the last: the last).
    while (c < cellCount - 1 && xi >= (breaks[c + 1] as number)) {
      c++;
      start[c] = p;
      left = breaks[c] as number;
      width = (breaks[c + 1] as number) - left;
    }
    const i = order[p] as number;
    if (perm !== order) perm[p] = i;
    position[i] = p;
    t[p] = (xi - left) / width;
  }
  for (let k = c + 1; k <= cellCount; k++) start[k] = n;
  for (let i = 0; i < n; i++) {
    const p = position[i] as number;
    yl[p] = ((y[i] as number) - mean) / scale;
    if (wl) wl[p] = (w as Float64Array)[i] as number;
  }
  return { perm, start, t, y: yl, w: wl };
}

/**
 * The sums of several disjoint row groups (k-fold's folds, bundles): the row at position p
 * goes with its prior weight into the block labels[p] of `out` (labels by position, the x
 * rank; blocks of `stride` entries one after another; out is cleared first). Each block's
 * rows are added in x order, the same bits as accumulateRow over the rows in that order. O(n).
 */
export function sumsByLabel(layout: CellLayout, labels: Uint16Array, out: Float64Array, stride: number): void {
  out.fill(0);
  const { start, t, y, w } = layout;
  const cellCount = start.length - 1;
  const cellsPerBlock = stride / SUMS_PER_CELL;
  for (let c = 0; c < cellCount; c++) {
    const end = start[c + 1] as number;
    for (let p = start[c] as number; p < end; p++) {
      accumulateRow(out, (labels[p] as number) * cellsPerBlock + c, t[p] as number, y[p] as number, w ? (w[p] as number) : 1);
    }
  }
}

/**
 * The held-out rows of one resample, grouped by cell as the layout orders them: what the
 * absolute errors of every candidate are measured on. `count` rows of total prior weight
 * `weight`; the arrays may be longer than `count`.
 */
export interface HeldOutRows {
  count: number;
  weight: number;
  /** First held-out row of each cell, length cells + 1. */
  readonly start: Int32Array;
  t: Float64Array;
  y: Float64Array;
  w: Float64Array | undefined;
}

/** Room for the held-out rows of a layout with `cellCount` cells (the row arrays grow as needed). */
export function heldOutRows(cellCount: number, weighted: boolean): HeldOutRows {
  return { count: 0, weight: 0, start: new Int32Array(cellCount + 1), t: new Float64Array(0), y: new Float64Array(0), w: weighted ? new Float64Array(0) : undefined };
}

function ensureRoom(out: HeldOutRows, size: number): void {
  if (out.t.length >= size) return;
  out.t = new Float64Array(size);
  out.y = new Float64Array(size);
  if (out.w) out.w = new Float64Array(size);
}

/**
 * The bootstrap's sums from the multiplicities `counts` by position (x rank: counts[p] is
 * row perm[p]'s): `train` gets each row with weight count x prior weight, `test` each row of
 * count 0 with its prior weight, both the same bits as accumulateRow row by row in x order;
 * the rows of count 0 go into `out`. Returns their number. About a dozen multiply-adds a
 * row, on local variables, reading every array in order. O(n).
 */
export function sumsFromCounts(layout: CellLayout, counts: Uint32Array, train: Float64Array, test: Float64Array, out: HeldOutRows): number {
  const { perm, start, t: tl, y: yl, w: wl } = layout;
  const cellCount = start.length - 1;
  if (counts.length < perm.length) throw new Error(`sumsFromCounts: ${counts.length} multiplicities for ${perm.length} rows`);
  // At most every row is held out; the expected share is (1 - 1/n)^n, about 0.37.
  ensureRoom(out, Math.min(perm.length, Math.ceil(0.4 * perm.length) + 64));
  let ht = out.t;
  let hy = out.y;
  let hw = out.w;
  let room = ht.length;
  let j = 0;
  let weight = 0;
  for (let c = 0; c < cellCount; c++) {
    out.start[c] = j;
    let a0 = 0,
      a1 = 0,
      a2 = 0,
      a3 = 0,
      a4 = 0,
      a5 = 0,
      a6 = 0,
      a7 = 0,
      a8 = 0,
      a9 = 0,
      a10 = 0,
      a11 = 0;
    let b0 = 0,
      b1 = 0,
      b2 = 0,
      b3 = 0,
      b4 = 0,
      b5 = 0,
      b6 = 0,
      b7 = 0,
      b8 = 0,
      b9 = 0,
      b10 = 0,
      b11 = 0;
    const end = start[c + 1] as number;
    for (let p = start[c] as number; p < end; p++) {
      const m = counts[p] as number;
      const t = tl[p] as number;
      const y = yl[p] as number;
      const wi = wl ? (wl[p] as number) : 1;
      // accumulateRow's products, in its order.
      const t2 = t * t;
      const t3 = t2 * t;
      if (m > 0) {
        const wt = m * wi;
        const wy = wt * y;
        a0 += wt;
        a1 += wt * t;
        a2 += wt * t2;
        a3 += wt * t3;
        a4 += wt * t2 * t2;
        a5 += wt * t2 * t3;
        a6 += wt * t3 * t3;
        a7 += wy;
        a8 += wy * t;
        a9 += wy * t2;
        a10 += wy * t3;
        a11 += wy * y;
      } else {
        const wy = wi * y;
        b0 += wi;
        b1 += wi * t;
        b2 += wi * t2;
        b3 += wi * t3;
        b4 += wi * t2 * t2;
        b5 += wi * t2 * t3;
        b6 += wi * t3 * t3;
        b7 += wy;
        b8 += wy * t;
        b9 += wy * t2;
        b10 += wy * t3;
        b11 += wy * y;
        if (j === room) {
          grow(out, j);
          ht = out.t;
          hy = out.y;
          hw = out.w;
          room = ht.length;
        }
        ht[j] = t;
        hy[j] = y;
        if (hw) hw[j] = wi;
        weight += wi;
        j++;
      }
    }
    const o = c * SUMS_PER_CELL;
    train.set([a0, a1, a2, a3, a4, a5, a6, a7, a8, a9, a10, a11], o);
    test.set([b0, b1, b2, b3, b4, b5, b6, b7, b8, b9, b10, b11], o);
  }
  out.start[cellCount] = j;
  out.count = j;
  out.weight = weight;
  return j;
}

/** Doubles the held-out arrays, keeping the first `used` rows. */
function grow(out: HeldOutRows, used: number): void {
  const size = Math.max(64, 2 * out.t.length);
  const t = new Float64Array(size);
  const y = new Float64Array(size);
  t.set(out.t.subarray(0, used));
  y.set(out.y.subarray(0, used));
  out.t = t;
  out.y = y;
  if (out.w) {
    const w = new Float64Array(size);
    w.set(out.w.subarray(0, used));
    out.w = w;
  }
}

/** The rows marked 1 in `held` (by row) into `out`, grouped by cell. Returns their number. O(n). */
export function heldOutWhere(layout: CellLayout, held: Uint8Array, out: HeldOutRows): number {
  const { perm, start, t: tl, y: yl, w: wl } = layout;
  const cellCount = start.length - 1;
  let j = 0;
  let weight = 0;
  for (let c = 0; c < cellCount; c++) {
    out.start[c] = j;
    const end = start[c + 1] as number;
    for (let p = start[c] as number; p < end; p++) {
      if (held[perm[p] as number] !== 1) continue;
      if (j >= out.t.length) grow(out, j);
      const wi = wl ? (wl[p] as number) : 1;
      out.t[j] = tl[p] as number;
      out.y[j] = yl[p] as number;
      if (out.w) out.w[j] = wi;
      weight += wi;
      j++;
    }
  }
  out.start[cellCount] = j;
  out.count = j;
  out.weight = weight;
  return j;
}

/**
 * The held-out rows of every label at once (k-fold's folds; labels by position, the x
 * rank): those of label f, grouped by cell, are rows[f]; their arrays are views of one set
 * of arrays with every row once. Each entry's `weight` is its rows' prior weight added in x
 * order (their count without weights), as a sum over the listed rows adds it. O(n + labels x cells).
 */
export function heldOutByLabel(layout: CellLayout, labels: Uint16Array, labelCount: number): HeldOutRows[] {
  const { perm, start, t: tl, y: yl, w: wl } = layout;
  const cellCount = start.length - 1;
  const n = perm.length;
  // Rows per (label, cell), then each block's first position, label-major.
  const counts = new Int32Array(labelCount * cellCount + 1);
  for (let c = 0; c < cellCount; c++) {
    const end = start[c + 1] as number;
    for (let p = start[c] as number; p < end; p++) {
      const b = (labels[p] as number) * cellCount + c + 1;
      counts[b] = (counts[b] as number) + 1;
    }
  }
  for (let b = 0; b < labelCount * cellCount; b++) counts[b + 1] = (counts[b + 1] as number) + (counts[b] as number);
  const next = counts.slice(0, labelCount * cellCount);
  const t = new Float64Array(n);
  const y = new Float64Array(n);
  const w = wl ? new Float64Array(n) : undefined;
  for (let c = 0; c < cellCount; c++) {
    const end = start[c + 1] as number;
    for (let p = start[c] as number; p < end; p++) {
      const b = (labels[p] as number) * cellCount + c;
      const j = next[b] as number;
      next[b] = j + 1;
      t[j] = tl[p] as number;
      y[j] = yl[p] as number;
      if (w) w[j] = (wl as Float64Array)[p] as number;
    }
  }
  const weights = new Float64Array(labelCount);
  if (wl) for (let p = 0; p < n; p++) weights[labels[p] as number] = (weights[labels[p] as number] as number) + (wl[p] as number);
  const out: HeldOutRows[] = [];
  for (let f = 0; f < labelCount; f++) {
    const from = counts[f * cellCount] as number;
    const to = counts[(f + 1) * cellCount] as number;
    const cellStart = new Int32Array(cellCount + 1);
    for (let c = 0; c <= cellCount; c++) cellStart[c] = (counts[f * cellCount + c] as number) - from;
    out.push({
      count: to - from,
      weight: wl ? (weights[f] as number) : to - from,
      start: cellStart,
      t: t.subarray(from, to),
      y: y.subarray(from, to),
      w: w?.subarray(from, to),
    });
  }
  return out;
}

/**
 * Weighted sum of absolute errors and the largest absolute error of one candidate's
 * per-cell cubics (fitPoly[c * 4 + p], in t) on the held-out rows; `result` gets
 * [sum, largest]. Each cell's cubic stays in local variables over its rows. O(rows).
 */
export function absoluteErrors(rows: HeldOutRows, fitPoly: Float64Array, result: Float64Array): void {
  const { start, t: tt, y: yy, w: ww } = rows;
  const cellCount = start.length - 1;
  let sae = 0;
  let max = 0;
  for (let c = 0; c < cellCount; c++) {
    const o = c * 4;
    const p0 = fitPoly[o] as number;
    const p1 = fitPoly[o + 1] as number;
    const p2 = fitPoly[o + 2] as number;
    const p3 = fitPoly[o + 3] as number;
    const end = start[c + 1] as number;
    if (ww) {
      for (let j = start[c] as number; j < end; j++) {
        const t = tt[j] as number;
        const a = Math.abs((yy[j] as number) - (p0 + t * (p1 + t * (p2 + t * p3))));
        sae += (ww[j] as number) * a;
        if (a > max) max = a;
      }
    } else {
      for (let j = start[c] as number; j < end; j++) {
        const t = tt[j] as number;
        const a = Math.abs((yy[j] as number) - (p0 + t * (p1 + t * (p2 + t * p3))));
        sae += a;
        if (a > max) max = a;
      }
    }
  }
  result[0] = sae;
  result[1] = max;
}
