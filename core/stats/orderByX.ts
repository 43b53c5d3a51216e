import { sortedOrder } from './argsort';
import { sharedFloat64 } from '../sharedMemory';

/** Orders already computed, by the array they order: data arrays are not changed once read. */
const orders = new WeakMap<Float64Array, Int32Array>();

/**
 * Row indices sorted by x (ties by row index), by the stable argsort `sortedOrder`, which
 * gives x in that order too (kept for xInOrder); O(n) the first time for an array, then the
 * same order again (preparing the data, the resampling's strata and the residual checks all
 * ask for it). The caller must not change the returned order, nor x afterwards.
 */
export function orderByX(x: Float64Array): Int32Array {
  let order = orders.get(x);
  if (!order) {
    const both = sortedOrder(x);
    order = both.order;
    orders.set(x, order);
    inOrder.set(x, both.sorted);
  }
  return order;
}

/**
 * Records `order` as the x order of `x`, computed elsewhere (a worker thread receives both
 * from the thread that sorted them). `order` must be orderByX of the same values.
 */
export function knownOrder(x: Float64Array, order: Int32Array): void {
  if (order.length !== x.length) throw new Error(`an order of ${order.length} rows for ${x.length} values`);
  orders.set(x, order);
}

/** x gathered in orderByX order, by the array it came from (read-only for every caller). */
const inOrder = new WeakMap<Float64Array, Float64Array>();

/**
 * The values of x in the order of orderByX(x): x[order[0]], x[order[1]], ... (-0 kept as
 * it is). Gathered once per array and then shared: the residual checks and the lack-of-fit
 * test read the same values. O(n) the first time (one n-word array kept while x lives).
 * The caller must not change the result. Example: xInOrder(Float64Array.of(3, 1, 2)) -> [1, 2, 3].
 */
export function xInOrder(x: Float64Array): Float64Array {
  let sorted = inOrder.get(x);
  if (!sorted) {
    const order = orderByX(x);
    // Sorting x gives its values in order too; an order recorded by knownOrder needs the gather.
    const sortedThen = inOrder.get(x);
    if (sortedThen) return sortedThen;
    // In shared memory, as the sort's own copy is (core/stats/argsort.ts).
    sorted = sharedFloat64(x.length);
    for (let k = 0; k < x.length; k++) sorted[k] = x[order[k] as number] as number;
    inOrder.set(x, sorted);
  }
  return sorted;
}

/** True when `order` is the order orderByX(x) returned or knownOrder recorded for x: already checked. */
export function isOrderOf(x: Float64Array, order: Int32Array): boolean {
  return orders.get(x) === order;
}

/**
 * A sorted copy of x, the same values in the same places as Float64Array.from(x).sort()
 * (ascending, -0 before +0, NaN last), from the shared order in O(n) instead of a
 * comparison sort. Example: sortedCopy(Float64Array.of(0, -0, -1)) -> [-1, -0, 0].
 */
export function sortedCopy(x: Float64Array): Float64Array {
  const out = Float64Array.from(xInOrder(x));
  // The order ties -0 with +0 (by row index); the typed-array sort puts every -0 first.
  for (let k = 0; k < out.length;) {
    if (out[k] !== 0) {
      k++;
      continue;
    }
    let end = k;
    let negative = 0;
    while (end < out.length && out[end] === 0) if (Object.is(out[end++], -0)) negative++;
    for (let j = k; j < end; j++) out[j] = j < k + negative ? -0 : 0;
    k = end;
  }
  return out;
}
