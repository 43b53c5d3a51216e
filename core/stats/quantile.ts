import { InputError } from '../errors';

/** Arrays found ascending and free of NaN by quantileType7 (sorted samples are not changed once made). */
const checkedAscending = new WeakSet<Float64Array>();

/**
 * Sample quantiles by linear interpolation of the order statistics: Hyndman & Fan (1996),
 * "Sample quantiles in statistical packages", The American Statistician 50(4), 361-365,
 * definition 7 (R's default). With h = (n - 1) p, j = floor(h):
 * Q(p) = (1 - (h - j)) x[j] + (h - j) x[j + 1] (0-based), so Q(0) = min and Q(1) = max.
 *
 * `sortedValues` must be sorted ascending with no NaN (checked the first time an array is
 * seen, O(n); a caller must not change it afterwards); each quantile then
 * costs O(1). Throws InputError for an empty sample, unsorted values or a probability
 * outside [0, 1].
 * Example: quantileType7(Float64Array.of(1, 2, 3, 4), [0.5]) -> [2.5].
 */
export function quantileType7(sortedValues: Float64Array, probs: ArrayLike<number>): Float64Array {
  const n = sortedValues.length;
  if (n === 0) throw new InputError('quantiles need at least one value; the sample is empty');
  // Checked once per array: the knots of every candidate df are quantiles of the same sorted x.
  if (!checkedAscending.has(sortedValues)) {
    for (let i = 0; i < n; i++) {
      const v = sortedValues[i] as number;
      if (Number.isNaN(v)) throw new InputError(`quantiles: value at index ${i} is NaN`);
      if (i > 0 && v < (sortedValues[i - 1] as number)) {
        throw new InputError(`quantiles need ascending values; value at index ${i} (${v}) is below the one before (${sortedValues[i - 1]})`);
      }
    }
    checkedAscending.add(sortedValues);
  }
  const out = new Float64Array(probs.length);
  for (let k = 0; k < probs.length; k++) {
    const p = probs[k] as number;
    if (!(p >= 0 && p <= 1)) throw new InputError(`quantile probability ${k} must be in [0, 1], got ${p}`);
    const h = (n - 1) * p;
    const j = Math.floor(h);
    const g = h - j;
    const lo = sortedValues[j] as number;
    // g = 0 (including p = 1, where j = n - 1) returns the order statistic itself.
    out[k] = g === 0 ? lo : (1 - g) * lo + g * (sortedValues[j + 1] as number);
  }
  return out;
}
