/**
 * Linear scales and readable tick values for the figures. Pure functions, no DOM.
 */

/** Maps a data interval onto a pixel interval (either may be reversed). */
export interface LinearScale {
  (v: number): number;
  readonly domain: readonly [number, number];
}

/** A linear map from `domain` to `range`; a zero-width domain maps to the middle of the range. */
export function linearScale(domain: readonly [number, number], range: readonly [number, number]): LinearScale {
  const [d0, d1] = domain;
  const [r0, r1] = range;
  const span = d1 - d0;
  const f = ((v: number) => (span === 0 ? (r0 + r1) / 2 : r0 + ((v - d0) / span) * (r1 - r0))) as LinearScale;
  Object.defineProperty(f, 'domain', { value: domain });
  return f;
}

/**
 * Tick values at 1, 2 or 5 times a power of ten, about `count` of them, covering [lo, hi]
 * (the usual "nice numbers" steps; Heckbert, "Nice numbers for graph labels", Graphics
 * Gems, 1990). O(count). Example: niceTicks(0, 1, 5) -> [0, 0.2, 0.4, 0.6, 0.8, 1].
 */
export function niceTicks(lo: number, hi: number, count = 5): number[] {
  if (!Number.isFinite(lo) || !Number.isFinite(hi)) return [];
  if (lo === hi) return [lo];
  if (lo > hi) [lo, hi] = [hi, lo];
  const raw = (hi - lo) / Math.max(1, count);
  const power = Math.pow(10, Math.floor(Math.log10(raw)));
  const f = raw / power;
  const step = (f < 1.5 ? 1 : f < 3 ? 2 : f < 7 ? 5 : 10) * power;
  const first = Math.ceil(lo / step - 1e-9);
  const last = Math.floor(hi / step + 1e-9);
  const out: number[] = [];
  for (let k = first; k <= last && out.length < 50; k++) out.push(Number((k * step).toPrecision(12)));
  return out;
}

/** [min, max] of the finite values of several arrays, widened by `pad` of the span (or by 1 when flat). */
export function extent(arrays: readonly (readonly number[])[], pad = 0.04): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const a of arrays) {
    for (const v of a) {
      if (!Number.isFinite(v)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  if (lo === Infinity) return [0, 1];
  if (lo === hi) return [lo - 1, hi + 1];
  const p = (hi - lo) * pad;
  return [lo - p, hi + p];
}
