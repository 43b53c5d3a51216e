/**
 * Weighted mean sum(w y) / sum(w) and the weight total, in one pass; w absent means all 1.
 * Used to centre y before a solve, so a small signal on a large offset keeps its digits.
 * O(n). Example: weightedMean(Float64Array.of(1, 3), undefined) -> { mean: 2, weight: 2 }.
 */
export function weightedMean(y: Float64Array, w: Float64Array | undefined): { mean: number; weight: number } {
  let sw = 0;
  let swy = 0;
  for (let i = 0; i < y.length; i++) {
    const wi = w ? (w[i] as number) : 1;
    sw += wi;
    swy += wi * (y[i] as number);
  }
  return { mean: swy / sw, weight: sw };
}

/** The weighted mean as a centring offset: 0 when it is not finite (no weight, or overflow). */
export function centringOffset(y: Float64Array, w: Float64Array | undefined): number {
  const { mean } = weightedMean(y, w);
  return Number.isFinite(mean) ? mean : 0;
}
