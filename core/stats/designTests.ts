import { breuschPaganWith, type BreuschPaganResult } from './breuschPagan';
import type { DesignRows } from './design';
import { designCrossProducts, type DesignCrossProducts } from './designCrossProducts';
import { DW_EXACT_LIMIT, durbinWatsonWith, type DurbinWatsonResult } from './durbinWatson';

/** Both residual tests that need the model's design. */
export interface DesignTestResults {
  readonly durbinWatson: DurbinWatsonResult;
  readonly breuschPagan: BreuschPaganResult;
}

/**
 * The Durbin-Watson test (`durbinWatson`) and the Breusch-Pagan test (`breuschPagan`) of
 * the same residuals, in x order, against the same design, with identical results but one
 * pass over the design rows instead of two: the cross products both need (X'X, X'AX,
 * X'A^2X, X'u) are gathered together by `designCrossProducts`. Below DW_EXACT_LIMIT rows
 * the exact Durbin-Watson path needs its own factorisation, so each test runs alone.
 * `given`: those cross products gathered already (for the same residuals and design, with
 * `squaresOf` and `differences`; core/analysis/designSums.ts sums them on a helper thread).
 * Errors are those of `durbinWatson` first, then those of `breuschPagan`.
 * Cost O(n p^2), one `design.row` call per row for n >= DW_EXACT_LIMIT.
 * Example: durbinWatsonAndBreuschPagan(e, design).breuschPagan equals breuschPagan(e, design).
 */
export function durbinWatsonAndBreuschPagan(residualsInXOrder: Float64Array, design: DesignRows, given?: DesignCrossProducts): DesignTestResults {
  const n = residualsInXOrder.length;
  const sums = given ?? (n >= DW_EXACT_LIMIT && design.p < n ? designCrossProducts(design, n, { squaresOf: residualsInXOrder, differences: true }) : undefined);
  return {
    durbinWatson: durbinWatsonWith(residualsInXOrder, design, sums),
    breuschPagan: breuschPaganWith(residualsInXOrder, design, sums),
  };
}
