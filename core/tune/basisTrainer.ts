/**
 * The resampling trainer of a dense row basis (the orthogonal polynomials): each resample
 * refits from its weighted rows.
 */
import type { RowBasis } from '../basis/rowBasis';
import { FitError } from '../errors';
import { factorSpd } from '../linalg/spd';
import type { Trainer } from '../registry/curves/types';

/** The basis of a constant (df = 1). */
export const constantBasis: RowBasis = { size: 1, width: 1, row: (_x: number, out: Float64Array) => ((out[0] = 1), 0) };

/**
 * Refits a row basis (the orthogonal polynomials, or any basis with `width` nonzero entries
 * per row) from weighted rows by its Gram matrix and Cholesky with a condition check:
 * O(n width^2 + p^3) per resample. Returns false from train when the rows cannot determine
 * the coefficients. Example: basisTrainer(x, yc, new OrthoPolyBasis(sorted, x, 3), 'cubic').
 */
export function basisTrainer(x: Float64Array, yc: Float64Array, basis: RowBasis, label: string): Trainer {
  const p = basis.size;
  const width = basis.width;
  const buf = new Float64Array(width);
  const g = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  let theta: Float64Array = new Float64Array(p);
  return {
    train(weights: Float64Array): boolean {
      g.fill(0);
      rhs.fill(0);
      for (let i = 0; i < x.length; i++) {
        const wi = weights[i] as number;
        if (wi === 0) continue;
        // Only the row's `width` nonzero entries, from index `first`, are touched.
        const first = basis.row(x[i] as number, buf);
        for (let a = 0; a < width; a++) {
          const wa = wi * (buf[a] as number);
          const ia = first + a;
          rhs[ia] = (rhs[ia] as number) + wa * (yc[i] as number);
          for (let b = 0; b <= a; b++) g[ia * p + first + b] = (g[ia * p + first + b] as number) + wa * (buf[b] as number);
        }
      }
      try {
        theta = factorSpd(g, p, label).solve(rhs);
        return true;
      } catch (e) {
        if (e instanceof FitError) return false;
        throw e;
      }
    },
    predict(i: number): number {
      const first = basis.row(x[i] as number, buf);
      let f = 0;
      for (let a = 0; a < width; a++) f += (buf[a] as number) * (theta[first + a] as number);
      return f;
    },
  };
}
