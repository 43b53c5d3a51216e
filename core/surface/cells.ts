import type { AxisBasis } from './axis';

/**
 * The 2-D cells of the surface power sums (docs/design.md, "Surfaces", "Power sums"): per
 * input, the boundary and interior knots of every candidate merged, sorted and
 * de-duplicated; the cells are the products of consecutive pairs. Within a cell every
 * tensor B-spline of every candidate is one bicubic polynomial in (t, s), the positions
 * scaled to [0, 1] in the cell, so one pass of weighted sums of t^p s^q serves them all.
 */
export interface SurfaceCells {
  /** Cell breaks of each input (length cells + 1). */
  readonly breaksU: Float64Array;
  readonly breaksV: Float64Array;
  /** Cell of each row: cu * (breaksV.length - 1) + cv. */
  readonly cell: Int32Array;
  /** Scaled positions of each row in its cell, in [0, 1]. */
  readonly t: Float64Array;
  readonly s: Float64Array;
}

/** Highest power of t (and of s) kept: products of two cubics. */
const GRAM_POWERS = 7;
/** Sums per cell: w t^p s^q (p, q = 0..6), w y t^p s^q (p, q = 0..3), w y^2. */
export const SURFACE_SUMS_PER_CELL = GRAM_POWERS * GRAM_POWERS + 16 + 1;
/** Offset of the y sums and of the y^2 sum within a cell's sums. */
export const Y_OFFSET = GRAM_POWERS * GRAM_POWERS;
export const YY_OFFSET = Y_OFFSET + 16;

/** The sorted union of the knots of several axis bases and the data range of the input. */
export function unionBreaks(axes: readonly AxisBasis[], lower: number, upper: number): Float64Array {
  const all = [lower, upper];
  for (const a of axes) for (const k of a.knots) all.push(k);
  all.sort((a, b) => a - b);
  const out: number[] = [];
  for (const v of all) if (out.length === 0 || v > (out[out.length - 1] as number)) out.push(v);
  return Float64Array.from(out);
}

/** Places each row in its cell with its scaled positions. O(n log cells). */
export function buildSurfaceCells(u: Float64Array, v: Float64Array, breaksU: Float64Array, breaksV: Float64Array): SurfaceCells {
  const n = u.length;
  const cell = new Int32Array(n);
  const t = new Float64Array(n);
  const s = new Float64Array(n);
  const nv = breaksV.length - 1;
  for (let i = 0; i < n; i++) {
    const cu = locate(breaksU, u[i] as number);
    const cv = locate(breaksV, v[i] as number);
    cell[i] = cu * nv + cv;
    t[i] = ((u[i] as number) - (breaksU[cu] as number)) / ((breaksU[cu + 1] as number) - (breaksU[cu] as number));
    s[i] = ((v[i] as number) - (breaksV[cv] as number)) / ((breaksV[cv + 1] as number) - (breaksV[cv] as number));
  }
  return { breaksU, breaksV, cell, t, s };
}

/** The cell index c with breaks[c] <= x < breaks[c + 1] (the last cell holds the upper break). */
function locate(breaks: Float64Array, x: number): number {
  let lo = 0;
  let hi = breaks.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (x < (breaks[mid] as number)) hi = mid;
    else lo = mid;
  }
  return lo;
}

/**
 * Adds one row (cell c, positions t and s, response y, weight wt) to the per-cell sums
 * `sums` (cell-major, SURFACE_SUMS_PER_CELL each): 49 + 16 + 1 multiply-adds, whatever the
 * number of candidates.
 */
export function accumulateSurfaceRow(sums: Float64Array, c: number, t: number, s: number, y: number, wt: number): void {
  const o = c * SURFACE_SUMS_PER_CELL;
  const s2 = s * s;
  const s3 = s2 * s;
  const s4 = s2 * s2;
  const s5 = s4 * s;
  const s6 = s3 * s3;
  let wp = wt;
  for (let p = 0; p < GRAM_POWERS; p++) {
    const k = o + p * GRAM_POWERS;
    sums[k] = (sums[k] as number) + wp;
    sums[k + 1] = (sums[k + 1] as number) + wp * s;
    sums[k + 2] = (sums[k + 2] as number) + wp * s2;
    sums[k + 3] = (sums[k + 3] as number) + wp * s3;
    sums[k + 4] = (sums[k + 4] as number) + wp * s4;
    sums[k + 5] = (sums[k + 5] as number) + wp * s5;
    sums[k + 6] = (sums[k + 6] as number) + wp * s6;
    wp *= t;
  }
  let wy = wt * y;
  const oy = o + Y_OFFSET;
  for (let p = 0; p < 4; p++) {
    const k = oy + p * 4;
    sums[k] = (sums[k] as number) + wy;
    sums[k + 1] = (sums[k + 1] as number) + wy * s;
    sums[k + 2] = (sums[k + 2] as number) + wy * s2;
    sums[k + 3] = (sums[k + 3] as number) + wy * s3;
    wy *= t;
  }
  sums[o + YY_OFFSET] = (sums[o + YY_OFFSET] as number) + wt * y * y;
}

/**
 * How the cells of the union grid of one input sit in the cells of one candidate's knots:
 * union cell c lies in candidate cell map[c], where the candidate's position is alpha[c] +
 * beta[c] t for the union cell's position t. Its sums move into the candidate cell through
 * (alpha + beta t)^P = sum_k C(P, k) alpha^(P-k) beta^k t^k, all terms non-negative, so no
 * digits are lost to cancellation (matrix m[c * 49 + P * 7 + k]).
 */
export interface AxisProjection {
  /** The candidate's cell breaks (its knots; the data range for df 1). */
  readonly breaks: Float64Array;
  readonly map: Int32Array;
  readonly alpha: Float64Array;
  readonly beta: Float64Array;
  readonly m: Float64Array;
}

/** The projection of the union cells `union` onto the candidate breaks `breaks` (a subset of them). O(cells log cells). */
export function axisProjection(union: Float64Array, breaks: Float64Array): AxisProjection {
  const cells = union.length - 1;
  const map = new Int32Array(cells);
  const alpha = new Float64Array(cells);
  const beta = new Float64Array(cells);
  const m = new Float64Array(cells * 49);
  for (let c = 0; c < cells; c++) {
    const k = locate(breaks, union[c] as number);
    const start = breaks[k] as number;
    const width = (breaks[k + 1] as number) - start;
    map[c] = k;
    const a = ((union[c] as number) - start) / width;
    const b = ((union[c + 1] as number) - (union[c] as number)) / width;
    alpha[c] = a;
    beta[c] = b;
    for (let p = 0; p < GRAM_POWERS; p++) {
      let binom = 1;
      for (let j = 0; j <= p; j++) {
        m[c * 49 + p * 7 + j] = binom * a ** (p - j) * b ** j;
        binom = (binom * (p - j)) / (j + 1);
      }
    }
  }
  return { breaks, map, alpha, beta, m };
}

/**
 * Moves sums from the union cells of u into the candidate cells of u (`dst`, cells of the
 * projection x nv, SURFACE_SUMS_PER_CELL each): the powers of t change, those of s stay.
 * About 240 multiply-adds per union cell.
 */
export function projectU(src: Float64Array, proj: AxisProjection, nv: number, dst: Float64Array): void {
  dst.fill(0);
  const nu = proj.map.length;
  const { m, map } = proj;
  for (let cu = 0; cu < nu; cu++) {
    const ku = map[cu] as number;
    const mo = cu * 49;
    for (let cv = 0; cv < nv; cv++) {
      const o = (cu * nv + cv) * SURFACE_SUMS_PER_CELL;
      if ((src[o] as number) === 0) continue;
      const d = (ku * nv + cv) * SURFACE_SUMS_PER_CELL;
      for (let p = 0; p < GRAM_POWERS; p++) {
        const mp = mo + p * 7;
        const dp = d + p * 7;
        for (let q = 0; q < GRAM_POWERS; q++) {
          let acc = 0;
          for (let j = 0; j <= p; j++) acc += (m[mp + j] as number) * (src[o + j * 7 + q] as number);
          dst[dp + q] = (dst[dp + q] as number) + acc;
        }
      }
      for (let p = 0; p < 4; p++) {
        const mp = mo + p * 7;
        const dp = d + Y_OFFSET + p * 4;
        for (let q = 0; q < 4; q++) {
          let acc = 0;
          for (let j = 0; j <= p; j++) acc += (m[mp + j] as number) * (src[o + Y_OFFSET + j * 4 + q] as number);
          dst[dp + q] = (dst[dp + q] as number) + acc;
        }
      }
      dst[d + YY_OFFSET] = (dst[d + YY_OFFSET] as number) + (src[o + YY_OFFSET] as number);
    }
  }
}

/**
 * Moves sums from the union cells of v into the candidate cells of v (src: nu x union cells
 * of v; dst: nu x cells of the projection): the powers of s change, those of t stay.
 */
export function projectV(src: Float64Array, proj: AxisProjection, nu: number, dst: Float64Array): void {
  dst.fill(0);
  const nvUnion = proj.map.length;
  const nv = proj.breaks.length - 1;
  const { m, map } = proj;
  for (let cu = 0; cu < nu; cu++) {
    for (let cv = 0; cv < nvUnion; cv++) {
      const o = (cu * nvUnion + cv) * SURFACE_SUMS_PER_CELL;
      if ((src[o] as number) === 0) continue;
      const d = (cu * nv + (map[cv] as number)) * SURFACE_SUMS_PER_CELL;
      const mo = cv * 49;
      for (let p = 0; p < GRAM_POWERS; p++) {
        const so = o + p * 7;
        const dp = d + p * 7;
        for (let q = 0; q < GRAM_POWERS; q++) {
          const mq = mo + q * 7;
          let acc = 0;
          for (let j = 0; j <= q; j++) acc += (m[mq + j] as number) * (src[so + j] as number);
          dst[dp + q] = (dst[dp + q] as number) + acc;
        }
      }
      for (let p = 0; p < 4; p++) {
        const so = o + Y_OFFSET + p * 4;
        const dp = d + Y_OFFSET + p * 4;
        for (let q = 0; q < 4; q++) {
          const mq = mo + q * 7;
          let acc = 0;
          for (let j = 0; j <= q; j++) acc += (m[mq + j] as number) * (src[so + j] as number);
          dst[dp + q] = (dst[dp + q] as number) + acc;
        }
      }
      dst[d + YY_OFFSET] = (dst[d + YY_OFFSET] as number) + (src[o + YY_OFFSET] as number);
    }
  }
}

/** The cell breaks of one candidate input: its knots, or the data range for df 1. */
export function candidateBreaks(axis: AxisBasis): Float64Array {
  return axis.knots.length > 0 ? axis.knots : Float64Array.of(axis.lower, axis.upper);
}
