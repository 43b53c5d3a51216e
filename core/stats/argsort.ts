import { sharedFloat64, sharedInt32 } from '../sharedMemory';

/** Bits per least-significant-digit radix pass: 6 passes cover the 64 bits of a double. */
const DIGIT_BITS = 11;
const RADIX = 1 << DIGIT_BITS;
const DIGIT_MASK = RADIX - 1;
/** Digit passes over each 32-bit half of the key (11 + 11 + 10 bits). */
const PASSES_PER_WORD = 3;
/** Below this many values a stable insertion sort beats the radix passes' fixed cost. */
const INSERTION_LIMIT = 32;
/** Index of the low 32-bit word of a double in a Uint32Array view (0 on little-endian hosts). */
const LOW_WORD = new Uint8Array(Uint16Array.of(1).buffer)[0] === 1 ? 0 : 1;

/**
 * Stable argsort of doubles: the row indices ordered by value, ties (and -0 against +0) by
 * row index, NaN after every number. Same order as
 * `Int32Array.from(indices).sort((a, b) => v[a] - v[b] || a - b)` for NaN-free input,
 * without a JavaScript comparator call per comparison.
 *
 * Method: least-significant-digit radix sort (Knuth, "The Art of Computer Programming",
 * vol. 3, 2nd ed. (1998), section 5.2.5, "Sorting by distribution") on the IEEE 754 bit
 * pattern mapped to an unsigned key whose order is the numeric order (sign bit set for
 * non-negative values, all bits flipped for negative ones), in six 11-bit passes over the
 * two 32-bit halves; each pass is a stable counting sort, so equal keys keep index order.
 * Passes whose digit is the same for every value are skipped. Cost O(n) time (six passes
 * at most) and six n-word buffers, one of them the result; n below 32 uses insertion sort.
 * Example: argsortStable(Float64Array.of(3, -1, 3, 0)) -> Int32Array [1, 3, 0, 2].
 */
export function argsortStable(values: Float64Array): Int32Array {
  return sortedOrder(values).order;
}

/**
 * argsortStable's order together with the values in that order (NaN last). Values of a
 * finite range take the bucket path (bucketOrder): spread by value over about n/4 buckets,
 * each bucket then sorted in place; the rest (infinities, a range beyond the doubles, fewer
 * than 32 values) take the radix sort, whose order is the same.
 * Example: sortedOrder(Float64Array.of(3, -1, 3)).sorted -> Float64Array [-1, 3, 3].
 */
export function sortedOrder(values: Float64Array): { readonly order: Int32Array; readonly sorted: Float64Array } {
  const byBuckets = values.length >= INSERTION_LIMIT ? bucketOrder(values) : undefined;
  if (byBuckets) return byBuckets;
  const order = radixArgsort(values);
  const sorted = sharedFloat64(values.length);
  for (let k = 0; k < order.length; k++) sorted[k] = values[order[k] as number] as number;
  return { order, sorted };
}

/** Average values per bucket of the bucket path (a few, so that sorting inside a bucket is cheap). */
const PER_BUCKET = 4;
/** Nested bucket passes before a crowded bucket is merge-sorted instead (values whose spread defeats even spacing). */
const BUCKET_DEPTH = 3;

/**
 * The bucket path of sortedOrder (bucket sort: Knuth, vol. 3, section 5.2.5, and Cormen et
 * al., "Introduction to Algorithms", 3rd ed., section 8.4): undefined when the values hold
 * an infinity or their range overflows, else the stable order and the sorted values. NaN
 * go last in index order. Each bucket keeps its values in index order (a counting scatter),
 * a small bucket is finished by insertion sort with a strict comparison, a crowded one by
 * the same step inside it (its own range), then by merge sort; so ties keep index order and
 * the order equals the radix sort's. O(n) for values spread evenly enough, O(n log n) at worst.
 */
function bucketOrder(values: Float64Array): { order: Int32Array; sorted: Float64Array } | undefined {
  const n = values.length;
  let lo = Infinity;
  let hi = -Infinity;
  let nan = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i] as number;
    if (v !== v) nan++;
    else {
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  const m = n - nan;
  if (m > 0 && !(Number.isFinite(lo) && Number.isFinite(hi) && Number.isFinite(hi - lo))) return undefined;
  // In shared memory, so that worker threads read them without a copy (core/node/pool.ts, core/analysis/designSums.ts).
  const order = sharedInt32(n);
  const sorted = sharedFloat64(n);
  const scratch = new Scratch();
  const buckets = Math.max(2, Math.floor(m / PER_BUCKET));
  const scale = buckets / (hi - lo);
  // The first bucket pass goes straight from the values (the step sortRange takes: the same
  // buckets in the same order), so they are not copied first. When sortRange would not take
  // that step, one bucket at scale 0 copies them in index order and sortRange goes on.
  // NaN go after the numbers, in index order (-0 and +0 compare equal, as their radix keys are).
  const direct = m > INSERTION_LIMIT && lo !== hi && Number.isFinite(scale);
  const passBuckets = direct ? buckets : 1;
  const passScale = direct ? scale : 0;
  const last = passBuckets - 1;
  const bucketOf = (v: number): number => {
    const q = Math.floor((v - lo) * passScale);
    return q > last ? last : q;
  };
  const start = new Int32Array(passBuckets + 1);
  for (let i = 0; i < n; i++) {
    const v = values[i] as number;
    if (v !== v) continue;
    const c = bucketOf(v) + 1;
    start[c] = (start[c] as number) + 1;
  }
  for (let c = 0; c < passBuckets; c++) start[c + 1] = (start[c + 1] as number) + (start[c] as number);
  const next = start.slice(0, passBuckets);
  let b = m;
  for (let i = 0; i < n; i++) {
    const v = values[i] as number;
    if (v !== v) {
      order[b] = i;
      sorted[b++] = v;
      continue;
    }
    const c = bucketOf(v);
    const at = next[c] as number;
    next[c] = at + 1;
    order[at] = i;
    sorted[at] = v;
  }
  if (direct) sortBuckets(order, sorted, 0, start, buckets, scratch, 0);
  else sortRange(order, sorted, 0, m, lo, hi, scratch, 0);
  return { order, sorted };
}

/** Scratch of the nested passes and the merge sort, made as large as the largest range that needs it, when one does. */
class Scratch {
  idx = new Int32Array(0);
  val = new Float64Array(0);
  /** Room for `size` entries. */
  ensure(size: number): void {
    if (this.idx.length >= size) return;
    this.idx = new Int32Array(size);
    this.val = new Float64Array(size);
  }
}

/**
 * Sorts positions from..to-1 of (order, sorted) by value, stably, given their least and
 * greatest value; `scratch` grows to the length of the range when a pass needs it.
 */
function sortRange(order: Int32Array, sorted: Float64Array, from: number, to: number, lo: number, hi: number, scratch: Scratch, depth: number): void {
  const size = to - from;
  if (size < 2 || lo === hi) return;
  if (size <= INSERTION_LIMIT) return insertionRange(order, sorted, from, to);
  const buckets = Math.max(2, Math.floor(size / PER_BUCKET));
  const scale = buckets / (hi - lo);
  scratch.ensure(size);
  const { idx, val } = scratch;
  if (depth >= BUCKET_DEPTH || !Number.isFinite(scale)) return mergeRange(order, sorted, from, to, idx, val);
  const last = buckets - 1;
  // Bucket of each position (monotone in the value: a subtraction and a product by a positive number round monotonically).
  const bucketOf = new Int32Array(size);
  const start = new Int32Array(buckets + 1);
  for (let k = 0; k < size; k++) {
    const q = Math.floor(((sorted[from + k] as number) - lo) * scale);
    const c = q > last ? last : q;
    bucketOf[k] = c;
    start[c + 1] = (start[c + 1] as number) + 1;
  }
  for (let c = 0; c < buckets; c++) start[c + 1] = (start[c + 1] as number) + (start[c] as number);
  const next = start.slice(0, buckets);
  for (let k = 0; k < size; k++) {
    const c = bucketOf[k] as number;
    const at = next[c] as number;
    next[c] = at + 1;
    idx[at] = order[from + k] as number;
    val[at] = sorted[from + k] as number;
  }
  order.set(idx.subarray(0, size), from);
  sorted.set(val.subarray(0, size), from);
  sortBuckets(order, sorted, from, start, buckets, scratch, depth);
}

/** Finishes the buckets of a pass (bucket c at from + start[c] .. from + start[c + 1] - 1): insertion sort when small, another pass inside when crowded. */
function sortBuckets(order: Int32Array, sorted: Float64Array, from: number, start: Int32Array, buckets: number, scratch: Scratch, depth: number): void {
  for (let c = 0; c < buckets; c++) {
    const s = from + (start[c] as number);
    const e = from + (start[c + 1] as number);
    if (e - s < 2) continue;
    if (e - s <= INSERTION_LIMIT) {
      insertionRange(order, sorted, s, e);
      continue;
    }
    let bLo = Infinity;
    let bHi = -Infinity;
    for (let k = s; k < e; k++) {
      const v = sorted[k] as number;
      if (v < bLo) bLo = v;
      if (v > bHi) bHi = v;
    }
    sortRange(order, sorted, s, e, bLo, bHi, scratch, depth + 1);
  }
}

/** Stable insertion sort of positions from..to-1 by value (strict comparison: ties keep their order). */
function insertionRange(order: Int32Array, sorted: Float64Array, from: number, to: number): void {
  for (let i = from + 1; i < to; i++) {
    const v = sorted[i] as number;
    if (!(v < (sorted[i - 1] as number))) continue;
    const o = order[i] as number;
    let k = i;
    while (k > from && v < (sorted[k - 1] as number)) {
      sorted[k] = sorted[k - 1] as number;
      order[k] = order[k - 1] as number;
      k--;
    }
    sorted[k] = v;
    order[k] = o;
  }
}

/** Stable bottom-up merge sort of positions from..to-1 by value; `idx`, `val`: scratch of at least to - from. */
function mergeRange(order: Int32Array, sorted: Float64Array, from: number, to: number, idx: Int32Array, val: Float64Array): void {
  const size = to - from;
  for (let s = from; s < to; s += INSERTION_LIMIT) insertionRange(order, sorted, s, Math.min(to, s + INSERTION_LIMIT));
  let srcO = order.subarray(from, to);
  let srcV = sorted.subarray(from, to);
  let dstO = idx.subarray(0, size);
  let dstV = val.subarray(0, size);
  for (let width = INSERTION_LIMIT; width < size; width *= 2) {
    for (let left = 0; left < size; left += 2 * width) {
      const mid = Math.min(size, left + width);
      const end = Math.min(size, left + 2 * width);
      let i = left;
      let j = mid;
      let k = left;
      // Strict comparison: a tie takes the left (earlier) run's value first.
      while (i < mid && j < end) {
        if ((srcV[j] as number) < (srcV[i] as number)) {
          dstO[k] = srcO[j] as number;
          dstV[k++] = srcV[j++] as number;
        } else {
          dstO[k] = srcO[i] as number;
          dstV[k++] = srcV[i++] as number;
        }
      }
      while (i < mid) {
        dstO[k] = srcO[i] as number;
        dstV[k++] = srcV[i++] as number;
      }
      while (j < end) {
        dstO[k] = srcO[j] as number;
        dstV[k++] = srcV[j++] as number;
      }
    }
    [srcO, dstO] = [dstO, srcO];
    [srcV, dstV] = [dstV, srcV];
  }
  if (srcO.buffer !== order.buffer || srcO.byteOffset !== order.byteOffset + 4 * from) {
    order.set(srcO, from);
    sorted.set(srcV, from);
  }
}

/** The radix path of argsortStable (see there). */
function radixArgsort(values: Float64Array): Int32Array {
  const n = values.length;
  if (n < INSERTION_LIMIT) return insertionArgsort(values);
  const scratch = new Float64Array(1);
  const words = new Uint32Array(scratch.buffer);
  let hiKeys = new Uint32Array(n);
  let loKeys = new Uint32Array(n);
  const histograms = new Int32Array(2 * PASSES_PER_WORD * RADIX);
  for (let i = 0; i < n; i++) {
    const v = values[i] as number;
    // One bit pattern for every NaN, and +0 for -0, so that they tie as numbers do.
    scratch[0] = v !== v ? NaN : v + 0;
    let lo = words[LOW_WORD] as number;
    let hi = words[1 - LOW_WORD] as number;
    if (hi >>> 31) {
      hi = ~hi >>> 0;
      lo = ~lo >>> 0;
    } else {
      hi = (hi | 0x80000000) >>> 0;
    }
    hiKeys[i] = hi;
    loKeys[i] = lo;
    for (let pass = 0; pass < PASSES_PER_WORD; pass++) {
      const shift = pass * DIGIT_BITS;
      const a = pass * RADIX + ((lo >>> shift) & DIGIT_MASK);
      const b = (pass + PASSES_PER_WORD) * RADIX + ((hi >>> shift) & DIGIT_MASK);
      histograms[a] = (histograms[a] as number) + 1;
      histograms[b] = (histograms[b] as number) + 1;
    }
  }
  let order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  let nextOrder = new Int32Array(n);
  let nextHi = new Uint32Array(n);
  let nextLo = new Uint32Array(n);
  for (let pass = 0; pass < 2 * PASSES_PER_WORD; pass++) {
    const base = pass * RADIX;
    if (!toOffsets(histograms, base, n)) continue;
    const lowWord = pass < PASSES_PER_WORD;
    const shift = (pass % PASSES_PER_WORD) * DIGIT_BITS;
    if (lowWord) {
      // The low word is still needed by later low-word passes; the high word always is.
      for (let k = 0; k < n; k++) {
        const lo = loKeys[k] as number;
        const slot = base + ((lo >>> shift) & DIGIT_MASK);
        const at = histograms[slot] as number;
        histograms[slot] = at + 1;
        nextLo[at] = lo;
        nextHi[at] = hiKeys[k] as number;
        nextOrder[at] = order[k] as number;
      }
      const t = loKeys;
      loKeys = nextLo;
      nextLo = t;
    } else {
      for (let k = 0; k < n; k++) {
        const hi = hiKeys[k] as number;
        const slot = base + ((hi >>> shift) & DIGIT_MASK);
        const at = histograms[slot] as number;
        histograms[slot] = at + 1;
        nextHi[at] = hi;
        nextOrder[at] = order[k] as number;
      }
    }
    const th = hiKeys;
    hiKeys = nextHi;
    nextHi = th;
    const to = order;
    order = nextOrder;
    nextOrder = to;
  }
  return order;
}

/**
 * Turns the digit counts at histograms[base .. base + RADIX) into starting offsets.
 * Returns false when one digit holds all n values, so the pass would not move anything.
 */
function toOffsets(histograms: Int32Array, base: number, n: number): boolean {
  let sum = 0;
  for (let d = 0; d < RADIX; d++) {
    const count = histograms[base + d] as number;
    if (count === n) return false;
    histograms[base + d] = sum;
    sum += count;
  }
  return true;
}

/** True when value a sorts before value b (NaN last; equal values, -0 and +0 included, tie). */
function before(a: number, b: number): boolean {
  return a < b || (b !== b && a === a);
}

function insertionArgsort(values: Float64Array): Int32Array {
  const n = values.length;
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    const v = values[i] as number;
    let k = i;
    // Strict comparison keeps equal values in index order.
    while (k > 0 && before(v, values[order[k - 1] as number] as number)) {
      order[k] = order[k - 1] as number;
      k--;
    }
    order[k] = i;
  }
  return order;
}
