import type { CandidateResult, ErrorSummary } from './types';

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

/**
 * Exact leave-one-out errors from the hat diagonal, e_i = r_i / (1 - h_i). RMSE mean is the
 * exact LOO RMSE; its SE follows from the SE of the mean squared error by the delta method,
 * se(sqrt(m)) = se(m) / (2 sqrt(m)); MAE has SD / sqrt(n); the maximum has no SE. Any fit with
 * per-row residuals and leverage (a curve, a surface) and its prior weights.
 * Example: leaveOneOutErrors({ data: { w: undefined } }, fit).rmse.mean === fit.looRmse.
 */
export function leaveOneOutErrors(
  prepared: { readonly data: { readonly w?: Float64Array | undefined } },
  fit: { readonly n: number; readonly residuals: Float64Array; readonly leverage: Float64Array; readonly looRmse: number },
): Required<Pick<CandidateResult['errors'], 'rmse' | 'mae' | 'maxAbs'>> {
  const n = fit.n;
  const w = prepared.data.w;
  const sq = new Float64Array(n);
  const abs = new Float64Array(n);
  let sw = 0;
  let max = 0;
  // Read once: a fit's per-row arrays may be getters (core/fit/summary.ts summariseLazily).
  const { leverage, residuals } = fit;
  for (let i = 0; i < n; i++) {
    const h = leverage[i] as number;
    const e = (residuals[i] as number) / (1 - h);
    const wi = w ? (w[i] as number) : 1;
    sw += wi;
    sq[i] = wi * e * e;
    abs[i] = wi * Math.abs(e);
    if (Math.abs(e) > max) max = Math.abs(e);
  }
  const scale = n / sw;
  const ms = summarise(sq, false);
  const ma = summarise(abs, false);
  const mse = ms.mean * scale;
  return {
    rmse: { mean: fit.looRmse, se: (ms.se * scale) / (2 * Math.sqrt(mse)), values: [] },
    mae: { mean: ma.mean * scale, se: ma.se * scale, values: [] },
    maxAbs: { mean: max, se: NaN, values: [] },
  };
}
