/**
 * Exact order statistics of values that arrive in passes and are never held together
 * (docs/design.md, "Streaming"): the sorted value at each asked rank, found by narrowing
 * windows of x. The first pass counts the values in evenly spaced bins over [min, max],
 * keeping each bin's smallest and largest value; a bin that holds a rank becomes a window
 * [its smallest, its largest value] for the next pass, whose values are either collected
 * and sorted (when few enough) or binned again. A rank that falls on a bin's first or last
 * value, or in a bin of equal values, is known without another pass, so tied x cost nothing.
 * Each pass narrows a window strictly (its ends fall in different bins), so it ends.
 */

/** Bins of all binned windows of one pass together (3 numbers each: count, smallest, largest). */
const HIST_CELLS = 1 << 20;
/** Fewest bins of one window. */
const MIN_BINS = 256;
/** Most values collected in one pass (8 bytes each). */
export const COLLECT_LIMIT = 1 << 22;

interface RankWindow {
  readonly lo: number;
  readonly hi: number;
  /** Values below lo. */
  readonly below: number;
  /** Values in [lo, hi]. */
  readonly count: number;
  /** The asked ranks (0-based in the sorted values) inside this window. */
  readonly ranks: number[];
  /** Binned: counts, smallest and largest value per bin; collected: the values. */
  bins?: { counts: Float64Array; min: Float64Array; max: Float64Array; scale: number };
  values?: Float64Array;
  filled: number;
}

/**
 * The sorted values at given ranks of n values seen in passes. Give every value of a pass to
 * `offer` (in any order; the same values in every pass), then call `endPass`; repeat until
 * `done`, then read `value(rank)`. Memory: at most 24 MiB of bins and COLLECT_LIMIT values.
 * Cost per value O(log windows). Throws Error when a pass did not see the values of the
 * first (the caller checks the file did not change).
 * Example: for 1..1000 in any order and ranks [0, 499, 999]: one binned pass, then value(499) === 500.
 */
export class ExactRanks {
  private windows: RankWindow[] = [];
  private readonly known = new Map<number, number>();
  private first = true;
  /** Distinct values the first pass proves (exact when the first pass collected every value). */
  distinctAtLeast = 1;
  /** True when distinctAtLeast is the exact number of distinct values. */
  distinctExact = false;

  constructor(
    readonly n: number,
    ranks: readonly number[],
    readonly min: number,
    readonly max: number,
    private readonly collectLimit = COLLECT_LIMIT,
  ) {
    const asked = [...new Set(ranks)].sort((a, b) => a - b);
    for (const r of asked) if (!(Number.isInteger(r) && r >= 0 && r < n)) throw new Error(`rank ${r} is outside 0..${n - 1}`);
    if (!(max > min)) {
      for (const r of asked) this.known.set(r, min + 0);
      this.distinctExact = true;
      this.first = false;
      return;
    }
    for (const r of asked) {
      if (r === 0) this.known.set(r, min + 0);
      else if (r === n - 1) this.known.set(r, max + 0);
    }
    // The first pass bins every value, even few, so that distinctAtLeast is found; it collects them when that costs less.
    const open = asked.filter((r) => !this.known.has(r));
    this.windows = [{ lo: min, hi: max, below: 0, count: n, ranks: open, filled: 0 }];
    this.prepare();
  }

  /** True when every asked rank's value is known (no pass needed). */
  get done(): boolean {
    return this.windows.length === 0 && !this.first;
  }

  /** The sorted value at `rank` (after `done`). */
  value(rank: number): number {
    const v = this.known.get(rank);
    if (v === undefined) throw new Error(`rank ${rank} was not asked for or is not found yet`);
    return v;
  }

  /** One value of the current pass. */
  offer(x: number): void {
    const ws = this.windows;
    let w: RankWindow | undefined;
    if (ws.length === 1) w = ws[0];
    else {
      let lo = 0;
      let hi = ws.length - 1;
      if (ws.length === 0 || x < (ws[0] as RankWindow).lo) return;
      while (lo < hi) {
        const mid = (lo + hi + 1) >> 1;
        if ((ws[mid] as RankWindow).lo <= x) lo = mid;
        else hi = mid - 1;
      }
      w = ws[lo];
    }
    if (w === undefined || x < w.lo || x > w.hi) return;
    const v = x + 0;
    if (w.values) {
      if (w.filled < w.values.length) w.values[w.filled] = v;
      w.filled++;
      return;
    }
    const bins = w.bins as NonNullable<RankWindow['bins']>;
    const B = bins.counts.length;
    // Any bin function that does not decrease with v serves: the next windows are the bins' own smallest and largest values.
    let b = Math.floor((v - w.lo) * bins.scale);
    if (b >= B) b = B - 1;
    else if (b < 0) b = 0;
    bins.counts[b] = (bins.counts[b] as number) + 1;
    if (v < (bins.min[b] as number)) bins.min[b] = v;
    if (v > (bins.max[b] as number)) bins.max[b] = v;
    w.filled++;
  }

  /** Ends a pass: resolves what it can and sets up the next pass. */
  endPass(): void {
    const next: RankWindow[] = [];
    for (const w of this.windows) {
      if (w.filled !== w.count) throw new Error(`a pass saw ${w.filled} values in [${w.lo}, ${w.hi}] where the first saw ${w.count}`);
      if (w.values) {
        const sorted = w.values.sort();
        if (this.first) {
          this.distinctAtLeast = distinctOf(sorted);
          this.distinctExact = true;
        }
        for (const r of w.ranks) this.known.set(r, sorted[r - w.below] as number);
        continue;
      }
      const { counts, min, max } = w.bins as NonNullable<RankWindow['bins']>;
      if (this.first) {
        let d = 0;
        for (let b = 0; b < counts.length; b++) if ((counts[b] as number) > 0) d += (min[b] as number) < (max[b] as number) ? 2 : 1;
        this.distinctAtLeast = d;
      }
      let b = 0;
      let before = w.below;
      for (const r of w.ranks) {
        while (before + (counts[b] as number) <= r) before += counts[b++] as number;
        const c = counts[b] as number;
        const lo = min[b] as number;
        const hi = max[b] as number;
        if (r === before || lo === hi) this.known.set(r, lo);
        else if (r === before + c - 1) this.known.set(r, hi);
        else {
          const last = next[next.length - 1];
          if (last && last.lo === lo && last.below === before) last.ranks.push(r);
          else next.push({ lo, hi, below: before, count: c, ranks: [r], filled: 0 });
        }
      }
    }
    this.first = false;
    this.windows = next.sort((a, b) => a.lo - b.lo);
    this.prepare();
  }

  /** Collects the values of the windows that fit within collectLimit (smallest first), bins the others. */
  private prepare(): void {
    let room = this.collectLimit;
    const bySize = [...this.windows].sort((a, b) => a.count - b.count);
    const binned: RankWindow[] = [];
    for (const w of bySize) {
      // The first pass over all values bins them unless they are few (distinct values are counted either way).
      if (w.count <= room) {
        w.values = new Float64Array(w.count);
        room -= w.count;
      } else binned.push(w);
    }
    const B = Math.max(MIN_BINS, Math.floor(HIST_CELLS / Math.max(1, binned.length)));
    for (const w of binned) w.bins = { counts: new Float64Array(B), min: new Float64Array(B).fill(Infinity), max: new Float64Array(B).fill(-Infinity), scale: B / (w.hi - w.lo) };
  }
}

function distinctOf(sorted: Float64Array): number {
  let d = sorted.length > 0 ? 1 : 0;
  for (let i = 1; i < sorted.length; i++) if (sorted[i] !== sorted[i - 1]) d++;
  return d;
}

/**
 * The ranks type-7 quantiles at `probs` of n sorted values read (Hyndman & Fan 1996,
 * definition 7: h = (n - 1) p, j = floor(h), x[j] and x[j + 1] when h is not whole), and
 * the quantiles from the values at those ranks, with the arithmetic of
 * core/stats/quantile.ts quantileType7, so the result is the same to the last bit. O(probs).
 */
export function type7Ranks(n: number, probs: ArrayLike<number>): number[] {
  const out: number[] = [];
  for (let k = 0; k < probs.length; k++) {
    const h = (n - 1) * (probs[k] as number);
    const j = Math.floor(h);
    out.push(j);
    if (h - j !== 0) out.push(j + 1);
  }
  return out;
}

/** The type-7 quantiles at `probs` from `at(rank)`, the sorted value at each rank type7Ranks named. */
export function type7From(n: number, probs: ArrayLike<number>, at: (rank: number) => number): Float64Array {
  const out = new Float64Array(probs.length);
  for (let k = 0; k < probs.length; k++) {
    const h = (n - 1) * (probs[k] as number);
    const j = Math.floor(h);
    const g = h - j;
    const lo = at(j);
    out[k] = g === 0 ? lo : (1 - g) * lo + g * at(j + 1);
  }
  return out;
}
