/**
 * The pointwise bands of a fitted curve (the arrays every family fills) and their allocation;
 * bandsAt (core/fit/bands.ts) and linkBandsAt (core/fit/linkCurve.ts) fill them.
 */
/** The fitted curve with pointwise bands at a set of x. */
export interface Bands {
  readonly x: Float64Array;
  readonly fit: Float64Array;
  /** Standard error of the fitted mean. */
  readonly se: Float64Array;
  readonly ciLower: Float64Array;
  readonly ciUpper: Float64Array;
  readonly piLower: Float64Array;
  readonly piUpper: Float64Array;
  /** 1 where x lies outside the data range. */
  readonly extrapolated: Uint8Array;
}

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
