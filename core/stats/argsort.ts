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
