import type { ErrorSummary } from './types';

/**
 * Mean, standard error (sample SD / sqrt(count), docs/design.md, "Errors") and values of the
 * finite entries of `values`. O(m).
 */
export function summarise(values: ArrayLike<number>, keepValues = true): ErrorSummary & { readonly count: number } {
  let m = 0;
  let sum = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as number;
    if (Number.isFinite(v)) {
      m++;
      sum += v;
    }
  }
  const mean = m > 0 ? sum / m : NaN;
  let ss = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i] as number;
    if (Number.isFinite(v)) ss += (v - mean) ** 2;
  }
  const se = m > 1 ? Math.sqrt(ss / (m - 1)) / Math.sqrt(m) : NaN;
  return { mean, se, values: keepValues ? Array.from(values, (v) => (Number.isFinite(v) ? v : NaN)) : [], count: m };
}
