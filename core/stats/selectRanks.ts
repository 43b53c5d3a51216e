import { argsortStable } from './argsort';

/** Equal-width value buckets of the first pass (a few per kept rank, most holding few values). */
const BUCKETS = 1 << 14;
/** When the buckets holding the ranks hold more than this share of the values, sorting them all is as cheap. */
const GATHER_SHARE = 0.25;
/** Buckets up to this size are sorted by insertion. */
const INSERTION_LIMIT = 32;

/**
 * Row indices at the given 0-based ranks of the stable ascending order of `values` (ties,
 * -0 and +0 included, by row index): the same as reading `argsortStable(values)` at those
 * ranks, without ordering every value. `values` must be free of NaN; `ranks` must increase
 * strictly and lie in 0..n-1.
 *
 * Method: distribution into equal-width buckets over [min, max] (bucket sort: Knuth, "The
 * Art of Computer Programming", vol. 3, 2nd ed. (1998), section 5.2.5); the bucket of a
 * value never decreases with the value, so equal values share a bucket and the counts of
 * the buckets below give every bucket's first rank. Only the buckets holding a wanted rank
 * are gathered (in row order) and sorted by value, ties by row index. When those hold more
 * than a quarter of the values (clumped or extreme values), the values are ordered whole
 * by argsortStable instead. Cost O(n) passes plus the sorts of the gathered buckets.
 * Example: selectRanks(Float64Array.of(3, -1, 3, 0), Uint32Array.of(0, 3)) -> Int32Array [1, 2].
 */
export function selectRanks(values: Float64Array, ranks: Uint32Array): Int32Array {
  const n = values.length;
  const k = ranks.length;
  for (let j = 0; j < k; j++) {
    const r = ranks[j] as number;
    if (!(r < n) || (j > 0 && !(r > (ranks[j - 1] as number)))) throw new Error(`selectRanks: ranks must increase and lie below ${n}; rank ${j} is ${r}`);
  }
  const out = new Int32Array(k);
  if (k === 0) return out;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = values[i] as number;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (!(hi > lo)) {
    // All values equal: the stable order is the row order.
    for (let j = 0; j < k; j++) out[j] = ranks[j] as number;
    return out;
  }
  const buckets = Math.min(BUCKETS, n);
  const scale = buckets / (hi - lo);
  if (!Number.isFinite(scale) || !(scale > 0) || !Number.isFinite(hi - lo)) return wholeOrder(values, ranks);
  const bucketOf = (v: number): number => Math.min(buckets - 1, Math.floor((v - lo) * scale));
  // starts[b]: the rank of the first value of bucket b.
  const starts = new Int32Array(buckets + 1);
  for (let i = 0; i < n; i++) {
    const b = bucketOf(values[i] as number) + 1;
    starts[b] = (starts[b] as number) + 1;
  }
  for (let b = 0; b < buckets; b++) starts[b + 1] = (starts[b + 1] as number) + (starts[b] as number);
  // The buckets holding a wanted rank, each with its place in the gathered rows.
  const place = new Int32Array(buckets).fill(-1);
  const rankBucket = new Int32Array(k);
  let gathered = 0;
  for (let j = 0, b = 0; j < k; j++) {
    const r = ranks[j] as number;
    while ((starts[b + 1] as number) <= r) b++;
    rankBucket[j] = b;
    if ((place[b] as number) < 0) {
      place[b] = gathered;
      gathered += (starts[b + 1] as number) - (starts[b] as number);
    }
  }
  if (gathered > GATHER_SHARE * n) return wholeOrder(values, ranks);
  const rows = new Int32Array(gathered);
  const fill = Int32Array.from(place);
  for (let i = 0; i < n; i++) {
    const b = bucketOf(values[i] as number);
    const at = fill[b] as number;
    if (at >= 0) {
      rows[at] = i;
      fill[b] = at + 1;
    }
  }
  for (let j = 0; j < k; j++) {
    const b = rankBucket[j] as number;
    const from = place[b] as number;
    const size = (starts[b + 1] as number) - (starts[b] as number);
    // Sort each gathered bucket once (its first rank marks it); rows arrived in increasing index.
    if (j === 0 || rankBucket[j - 1] !== b) sortBucket(values, rows.subarray(from, from + size));
    out[j] = rows[from + (ranks[j] as number) - (starts[b] as number)] as number;
  }
  return out;
}

/** The ranks read from the whole stable order. */
function wholeOrder(values: Float64Array, ranks: Uint32Array): Int32Array {
  const order = argsortStable(values);
  return Int32Array.from(ranks, (r) => order[r] as number);
}

/** Sorts row indices by value, ties by index (the rows come in increasing index). */
function sortBucket(values: Float64Array, rows: Int32Array): void {
  if (rows.length > INSERTION_LIMIT) {
    rows.sort((a, b) => (values[a] as number) - (values[b] as number) || a - b);
    return;
  }
  for (let s = 1; s < rows.length; s++) {
    const i = rows[s] as number;
    const v = values[i] as number;
    let j = s;
    // Strictly smaller values move up: equal ones keep their (index) order.
    while (j > 0 && v < (values[rows[j - 1] as number] as number)) {
      rows[j] = rows[j - 1] as number;
      j--;
    }
    rows[j] = i;
  }
}
