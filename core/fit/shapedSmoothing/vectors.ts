/** Two small vector helpers of the shape-constrained smoothing spline. */

/**
 * Largest absolute entry of v (0 for an empty vector): the scale of the feasibility
 * tolerance. Cost O(length).
 * @example maxAbs(Float64Array.of(1, -3, 2)) // 3
 */
export function maxAbs(v: Float64Array): number {
  let s = 0;
  for (let j = 0; j < v.length; j++) s = Math.max(s, Math.abs(v[j] as number));
  return s;
}

/**
 * Dot product of two vectors of the same length. Cost O(length).
 * @example dot(Float64Array.of(1, 2), Float64Array.of(3, 4)) // 11
 */
export function dot(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let j = 0; j < a.length; j++) s += (a[j] as number) * (b[j] as number);
  return s;
}
