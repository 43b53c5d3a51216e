import type { Bands } from './bands';

/** Bands with every array allocated for the points `xs` (x filled in), to be filled by a family. */
export function emptyBands(xs: ArrayLike<number>): { -readonly [K in keyof Bands]: Bands[K] } {
  const m = xs.length;
  return {
    x: Float64Array.from(xs),
    fit: new Float64Array(m),
    se: new Float64Array(m),
    ciLower: new Float64Array(m),
    ciUpper: new Float64Array(m),
    piLower: new Float64Array(m),
    piUpper: new Float64Array(m),
    extrapolated: new Uint8Array(m),
  };
}
