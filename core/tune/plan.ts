import { InputError } from '../errors';
import { RandomStream } from './rng';

/** The rows in x order (core/stats/orderByX.ts), shared by the tuning plan's callers. */
export { orderByX } from '../stats/orderByX';

/**
 * Held-out check set, stratified by x: rows in x order are cut into round(fraction n)
 * equal strata and one random row of each is held out. The rows with the smallest and the
 * largest x are never held out, so the curve is fitted over the whole data range and a
 * table over that range needs no extrapolation. Returns a mask (1 = held out).
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
    // Strata hold at least two rows (fraction <= 0.5), so one remains without the end row.
    const lo = Math.max(1, Math.floor((s * n) / m));
    const hi = Math.min(n - 1, Math.floor(((s + 1) * n) / m));
    if (hi > lo) mask[order[lo + rng.int(hi - lo)] as number] = 1;
  }
  if (!mask.includes(1)) throw new InputError(`${n} rows are too few to hold any out besides the rows at the ends of the x range`);
  return mask;
}
