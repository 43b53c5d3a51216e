import type { BasisSpec } from '../basis/rowBasis';
import { RowBasisCurve } from '../fit/linearFit';
import type { DesignRows, SparseRows } from '../stats/design';
import type { FitResult } from '../types';

/** A basis in sparse form: `row` writes the `width` non-zeros at x and returns the first index; E (`expand`) maps them to the model's columns. */
export interface SparseBasisAt {
  readonly size: number;
  readonly width: number;
  readonly expand: Float64Array | undefined;
  row(x: number, out: Float64Array): number;
}

/** Model-matrix rows of a regression basis at x sorted ascending (scaled by sqrt(w)), or undefined for the smoothing spline. */
export function designInXOrder(fit: FitResult, xSorted: Float64Array, rootW: Float64Array | undefined): (DesignRows & { readonly spec?: BasisSpec | undefined }) | undefined {
  const curve = fit.curve;
  if (!(curve instanceof RowBasisCurve)) return undefined;
  const sparse = curve.sparseDesign();
  return {
    p: curve.designSize,
    row(j: number, out: Float64Array): void {
      curve.designRow(xSorted[j] as number, out);
      if (rootW) {
        const s = rootW[j] as number;
        for (let k = 0; k < out.length; k++) out[k] = (out[k] as number) * s;
      }
    },
    // The same rows as basis rows with a few non-zeros, so the cross products skip the zeros.
    sparse: sparseRowsInXOrder(sparse, xSorted, rootW),
    spec: sparse.spec,
  };
}

/**
 * The sparse rows of `basis` at x sorted ascending, scaled by sqrt(w) when `rootW` is given:
 * the rows the residual checks' design tests read, here and on a helper thread
 * (core/analysis/designSums.ts), so both sum the same values.
 */
export function sparseRowsInXOrder(basis: SparseBasisAt, xSorted: Float64Array, rootW: Float64Array | undefined): SparseRows {
  return {
    size: basis.size,
    width: basis.width,
    expand: basis.expand,
    row(j: number, out: Float64Array): number {
      const first = basis.row(xSorted[j] as number, out);
      if (rootW) {
        const s = rootW[j] as number;
        for (let k = 0; k < basis.width; k++) out[k] = (out[k] as number) * s;
      }
      return first;
    },
  };
}

/**
 * [1, u] rows at x sorted ascending (scaled by sqrt(w)), u = (x - mid) / half mapping the x
 * range to [-1, 1]: the Breusch-Pagan regressors when the model has no finite design. They
 * span the same columns as [1, x], so the test is the same, and their squares stay finite
 * and normal at any scale of x.
 */
export function lineDesign(xSorted: Float64Array, rootW: Float64Array | undefined): DesignRows {
  const lo = xSorted[0] as number;
  const hi = xSorted[xSorted.length - 1] as number;
  const mid = lo / 2 + hi / 2;
  const half = hi > lo ? hi / 2 - lo / 2 : 1;
  return {
    p: 2,
    row(j: number, out: Float64Array): void {
      const s = rootW ? (rootW[j] as number) : 1;
      out[0] = s;
      out[1] = s * (((xSorted[j] as number) - mid) / half);
    },
  };
}
