import { argsortStable } from './argsort';

/** Orders already computed, by the array they order: data arrays are not changed once read. */
const orders = new WeakMap<Float64Array, Int32Array>();

/**
 * Row indices sorted by x (ties by row index), by the stable radix argsort `argsortStable`;
 * O(n) the first time for an array, then the same order again (preparing the data, the
 * resampling's strata and the residual checks all ask for it). The caller must not change
 * the returned order, nor x afterwards.
 */
export function orderByX(x: Float64Array): Int32Array {
  let order = orders.get(x);
  if (!order) {
    order = argsortStable(x);
    orders.set(x, order);
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
