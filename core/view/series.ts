/**
 * Thinning of per-row series for the panel: the largest value per x cell (influence
 * figures) and a few hundred quantiles (normal quantile plot).
 */
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
