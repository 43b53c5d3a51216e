/**
 * Thinning of per-row series for the panel: the largest value per x cell (influence
 * figures) and a few hundred quantiles (normal quantile plot).
 */
import { selectRanks } from '../stats/selectRanks';
import { qnorm } from '../stats/distributions';
import { roundAll } from './round';

/** A per-row series, or its per-cell maxima when binned. */
export interface ThinSeries {
  readonly x: number[];
  readonly v: number[];
  readonly lines: number[];
  readonly binned: boolean;
}

/**
 * Every (x, v) when n <= maxPoints, else for each of `cells` equal x cells the row with the
 * largest v (so no influential row disappears). O(n). Example: maxPerCell(x, cooks, lines, 2000, 200).
 */
export function maxPerCell(x: ArrayLike<number>, v: ArrayLike<number>, lines: ArrayLike<number> | undefined, maxPoints: number, cells: number): ThinSeries {
  const n = x.length;
  if (n <= maxPoints) {
    const l: number[] = [];
    for (let i = 0; i < n; i++) l.push(lines ? (lines[i] as number) : 0);
    return { x: roundAll(x), v: roundAll(v), lines: l, binned: false };
  }
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const xi = x[i] as number;
    if (xi < lo) lo = xi;
    if (xi > hi) hi = xi;
  }
  const width = hi > lo ? (hi - lo) / cells : 1;
  const best = new Int32Array(cells).fill(-1);
  for (let i = 0; i < n; i++) {
    const vi = v[i] as number;
    if (!Number.isFinite(vi)) continue;
    const c = Math.min(cells - 1, Math.floor(((x[i] as number) - lo) / width));
    const b = best[c] as number;
    if (b < 0 || vi > (v[b] as number)) best[c] = i;
  }
  const out: ThinSeries = { x: [], v: [], lines: [], binned: true };
  for (const i of best) {
    if (i < 0) continue;
    out.x.push(x[i] as number);
    out.v.push(v[i] as number);
    out.lines.push(lines ? (lines[i] as number) : 0);
  }
  return { ...out, x: roundAll(out.x), v: roundAll(out.v) };
}

/**
 * Normal quantile plot data: the sorted values against standard normal quantiles at
 * plotting positions (i - a) / (n + 1 - 2a) with a = 3/8 for n <= 10 and 1/2 above (as in
 * Chambers, Cleveland, Kleiner & Tukey, Graphical Methods for Data Analysis, 1983,
 * section 6.6, the convention R's ppoints uses). For n > maxPoints, `maxPoints` evenly
 * spaced order statistics (always including both extremes), found by selection (selectRanks)
 * without sorting the rest. O(n) expected, O(n log n) when every value is kept.
 * Example: normalQuantiles(Float64Array.of(-1, 0, 1), 300).theoretical[1] === 0.
 */
export function normalQuantiles(values: ArrayLike<number>, maxPoints: number): { theoretical: number[]; sample: number[] } {
  let n = 0;
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i] as number)) n++;
  const finite = new Float64Array(n);
  for (let i = 0, k = 0; i < values.length; i++) if (Number.isFinite(values[i] as number)) finite[k++] = values[i] as number;
  const a = n <= 10 ? 3 / 8 : 1 / 2;
  const take = Math.min(n, Math.max(2, maxPoints));
  const ranks = new Uint32Array(n > 0 ? take : 0);
  for (let k = 0; k < ranks.length; k++) ranks[k] = take === n ? k : Math.round((k * (n - 1)) / (take - 1));
  // Only the kept order statistics are found (selection, not a sort of every value): the same values.
  const sorted = take === n ? finite.sort() : undefined;
  const at = sorted ? undefined : selectRanks(finite, ranks);
  const theoretical: number[] = [];
  const sample: number[] = [];
  for (let k = 0; k < ranks.length; k++) {
    const i = ranks[k] as number;
    theoretical.push(qnorm((i + 1 - a) / (n + 1 - 2 * a)));
    sample.push(sorted ? (sorted[i] as number) : (finite[(at as Int32Array)[k] as number] as number));
  }
  return { theoretical: roundAll(theoretical, 5), sample: roundAll(sample) };
}
