import type { Metric } from './types';

/** A number with 3 significant digits, without trailing zeros (0.301, 12.5, 1.23e-7). */
export function sig(v: number, digits = 3): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-4 && a < 1e6) return String(Number(v.toPrecision(digits)));
  return v.toExponential(digits - 1).replace(/\.?0+e/, 'e');
}

/** How a metric is named in sentences. */
export function metricLabel(metric: Metric): string {
  switch (metric) {
    case 'rmse':
      return 'RMSE';
    case 'mae':
      return 'MAE';
    case 'maxAbs':
      return 'maximum absolute error';
    case 'gcv':
      return 'GCV score';
    case 'deviance':
      return 'deviance';
  }
}
