import { InputError } from '../errors';
import { argsortStable } from '../stats/argsort';
import { RandomStream } from './rng';

/** Row indices sorted by x (ties by row index), by the stable radix argsort `argsortStable`; O(n). */
export function orderByX(x: Float64Array): Int32Array {
  return argsortStable(x);
}

/**
 * Held-out check set, stratified by x: rows in x order are cut into round(fraction n)
 * equal strata and one random row of each is held out. Returns a mask (1 = held out).
 * Throws InputError for a fraction outside (0, 0.5]. O(n).
 */
export function holdoutMask(order: Int32Array, fraction: number, seed: number): Uint8Array {
  const n = order.length;
  if (!(fraction > 0 && fraction <= 0.5)) throw new InputError(`the held-out fraction must be above 0 and at most 0.5; got ${fraction}`);
  const m = Math.round(fraction * n);
  if (m < 1) throw new InputError(`a held-out fraction of ${fraction} leaves no row out of ${n}`);
  const mask = new Uint8Array(n);
  const rng = new RandomStream(seed, 2_000_000);
  for (let s = 0; s < m; s++) {
    const lo = Math.floor((s * n) / m);
    const hi = Math.floor(((s + 1) * n) / m);
    mask[order[lo + rng.int(hi - lo)] as number] = 1;
  }
  return mask;
}
