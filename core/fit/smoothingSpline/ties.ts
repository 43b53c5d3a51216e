/**
 * Pooling of rows with equal x for the cubic smoothing spline: weights summed, y averaged
 * with those weights, which leaves the penalised minimiser unchanged (the weighted residual
 * sums of squares of the rows and of the pooled means differ by a constant), and the way
 * back from the pooled problem to the rows.
 */
import { centringOffset } from '../../stats/weightedMean';
import { FitError } from '../../errors';
import type { XYData } from '../../types';
import { prepareData } from '../prepared';

/** Minimum number of distinct x values for a smoothing spline. */
export const MIN_DISTINCT_X = 4;

/** Rows pooled by distinct x: u sorted distinct x, w summed weights, y weighted mean y. */
export interface Pooled {
  readonly data: XYData;
  readonly n: number;
  readonly m: number;
  readonly u: Float64Array;
  readonly w: Float64Array;
  readonly y: Float64Array;
  /** The weighted mean of y, and the pooled means of y - offset (computed without forming y, so a small signal on a large offset keeps its digits). */
  readonly offset: number;
  readonly yc: Float64Array;
  /** Index into u of each row. */
  readonly group: Int32Array;
}

/**
 * Checks the data (via prepareData: finite values, positive weights, each problem named by
 * its line) and pools tied x: u the sorted distinct x, w the summed weights, y the weighted
 * mean y (also as offset + yc, offset the weighted mean of all y, pooled from y - offset),
 * and the group (index into u) of every row. Throws FitError for fewer than
 * MIN_DISTINCT_X distinct x. Cost O(n log n): the sort in prepareData, then the rows are
 * assigned to groups by a scan when x is ascending, else by binary search.
 * @example poolTies({ x: [1, 1, 2, 3, 4], y: [0, 2, 5, 6, 8] }) // u = [1, 2, 3, 4], w = [2, 1, 1, 1], y = [1, 5, 6, 8]
 */
export function poolTies(data: XYData): Pooled {
  const prepared = prepareData(data);
  const m = prepared.distinct;
  if (m < MIN_DISTINCT_X) throw new FitError(`smoothing spline needs at least ${MIN_DISTINCT_X} distinct x values; the data has ${m}`);
  const n = data.x.length;
  const sorted = prepared.sortedX;
  const u = new Float64Array(m);
  let k = 0;
  for (let i = 0; i < n; i++) if (i === 0 || sorted[i] !== sorted[i - 1]) u[k++] = sorted[i] as number;
  const group = new Int32Array(n);
  const { x, y, w } = data;
  let ascending = true;
  for (let i = 1; i < n && ascending; i++) if ((x[i] as number) < (x[i - 1] as number)) ascending = false;
  if (ascending) {
    let j = 0;
    for (let i = 0; i < n; i++) {
      while ((u[j] as number) !== (x[i] as number)) j++;
      group[i] = j;
    }
  } else {
    for (let i = 0; i < n; i++) {
      const xi = x[i] as number;
      let lo = 0;
      let hi = m - 1;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if ((u[mid] as number) < xi) lo = mid + 1;
        else hi = mid;
      }
      group[i] = lo;
    }
  }
  const offset = centringOffset(y, w);
  const ws = new Float64Array(m);
  const yc = new Float64Array(m);
  for (let i = 0; i < n; i++) {
    const g = group[i] as number;
    const wi = w ? (w[i] as number) : 1;
    ws[g] = (ws[g] as number) + wi;
    yc[g] = (yc[g] as number) + wi * ((y[i] as number) - offset);
  }
  const ys = new Float64Array(m);
  for (let j = 0; j < m; j++) {
    yc[j] = (yc[j] as number) / (ws[j] as number);
    ys[j] = offset + (yc[j] as number);
  }
  return { data, n, m, u, w: ws, y: ys, offset, yc, group };
}

/**
 * Pooled values and hat diagonal back to rows: fitted_i = value_j and
 * leverage_i = w_i / W_j * S_jj for row i in tied group j (the pooled leverage shared out by
 * weight). Writes `fitted` and `leverage` (length n). Cost O(n).
 * @example perRow(pooled, smoother.value, smoother.leverage, fitted, leverage)
 */
export function perRow(pooled: Pooled, value: Float64Array, lev: Float64Array, fitted: Float64Array, leverage: Float64Array): void {
  const w = pooled.data.w;
  for (let i = 0; i < pooled.n; i++) {
    const g = pooled.group[i] as number;
    fitted[i] = value[g] as number;
    leverage[i] = ((w ? (w[i] as number) : 1) / (pooled.w[g] as number)) * (lev[g] as number);
  }
}

/**
 * The note on pooled ties, or none when every x is distinct. Cost O(1).
 * @example tieNote(poolTies({ x: [1, 1, 2, 3, 4], y })) // ['5 rows have 4 distinct x values; rows with equal x were pooled ...']
 */
export function tieNote(pooled: Pooled): string[] {
  if (pooled.m === pooled.n) return [];
  return [`${pooled.n} rows have ${pooled.m} distinct x values; rows with equal x were pooled (weights summed, weighted mean of y) before smoothing, which does not change the fit.`];
}
