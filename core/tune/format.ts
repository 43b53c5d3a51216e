import type { Metric } from './types';

export { sig } from '../words/numbers';

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
