import { InputError } from '../errors';

/**
 * Rows of a model matrix, read one at a time so that diagnostics never need the whole
 * n x p matrix: row i goes into `out` (length p). Rows come in the same order as the
 * residuals they belong to, and the intercept column is included (docs/design.md, "df": df counts
 * the intercept). For weighted fits pass rows and residuals multiplied by sqrt(w).
 */
export interface DesignRows {
  /** Number of columns. */
  readonly p: number;
  /** Copies row i (0-based) into `out`, which has length p. */
  row(i: number, out: Float64Array): void;
  /** The same rows in a sparse form, when the design has one (a B-spline basis); absent: dense rows only. */
  readonly sparse?: SparseRows | undefined;
}

/**
 * Design rows as x_i = E' b_i, where b_i (length `size`) is zero but for `width` entries
 * from index `first` (a B-spline basis: 4 of them), and E is `size` x p (row-major; absent
 * when p = size and E is the identity). Cross products are then summed in the sparse basis,
 * touching `width` x `width` entries a row, and mapped by E once at the end.
 */
export interface SparseRows {
  readonly size: number;
  readonly width: number;
  readonly expand?: Float64Array | undefined;
  /** Writes the `width` entries of b_i into `out` and returns `first`. */
  row(i: number, out: Float64Array): number;
}

/**
 * A DesignRows view of a dense row-major matrix (`values[i * p + j]`), for tests and small
 * problems. Cost O(p) per row.
 * Example: denseDesign(Float64Array.of(1, 0, 1, 1, 1, 2), 2) is the design of y ~ x with
 * x = 0, 1, 2.
 */
export function denseDesign(values: Float64Array, p: number): DesignRows & { readonly n: number } {
  if (!(Number.isInteger(p) && p >= 1)) throw new InputError(`design needs a whole number of columns >= 1, got ${p}`);
  if (values.length % p !== 0) {
    throw new InputError(`design values (${values.length}) are not a whole number of rows of ${p} columns`);
  }
  const n = values.length / p;
  return {
    p,
    n,
    row(i: number, out: Float64Array): void {
      for (let j = 0; j < p; j++) out[j] = values[i * p + j] as number;
    },
  };
}
