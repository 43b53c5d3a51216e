import type { XYData } from '../types';

/**
 * The rows with positive weight as their own data set (x, y and those weights), for
 * trainers that refit from scratch on a resample's training rows. O(n).
 */
export function trainingRows(x: Float64Array, y: Float64Array, weights: Float64Array): XYData {
  let m = 0;
  for (let i = 0; i < weights.length; i++) if ((weights[i] as number) > 0) m++;
  const sx = new Float64Array(m);
  const sy = new Float64Array(m);
  const sw = new Float64Array(m);
  m = 0;
  for (let i = 0; i < weights.length; i++) {
    const wi = weights[i] as number;
    if (wi > 0) {
      sx[m] = x[i] as number;
      sy[m] = y[i] as number;
      sw[m++] = wi;
    }
  }
  return { x: sx, y: sy, w: sw };
}
