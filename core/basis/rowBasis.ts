/**
 * A basis whose value at any x has at most `width` nonzero entries, stored contiguously
 * from the index `row` returns. Cubic B-spline bases have width 4; dense bases (the
 * orthogonal polynomials) have width = size. Fitting, leverage and band kernels only
 * touch those entries, so their cost is O(n width^2).
 */
export interface RowBasis {
  /** Number of basis functions. */
  readonly size: number;
  /** Largest number of nonzero entries in one row. */
  readonly width: number;
  /** Writes the nonzero basis values at x into out[0..width) and returns the index of the first. */
  row(x: number, out: Float64Array): number;
  /**
   * Writes the coefficients (length size) of the constant function 1, exactly, when the
   * basis spans the constants. Fits use it to centre y: they solve for y - mean(y) and add
   * the mean back through these coefficients, which keeps the digits of a small signal on a
   * large offset (y = 1e14 + signal). Absent: y is fitted as it is.
   */
  unitCoefficients?(out: Float64Array): void;
  /** The x range where basis function k is nonzero, for messages (bases with local support). */
  supportOf?(k: number): readonly [number, number];
  /**
   * For a piecewise polynomial basis: the x where its pieces join (the distinct interior
   * knots), increasing. Between two of them every basis function is one polynomial, and
   * `row` reports the same first index there.
   */
  readonly pieceBreaks?: Float64Array;
  /**
   * What rebuilds this basis on another thread (plain values that post as they are), for a
   * basis that has one; `basisFromSpec` (core/basis/naturalSpline.ts) builds it again, with
   * the same rows to the last bit.
   */
  spec?(): BasisSpec;
}

/** The values that rebuild a basis (RowBasis.spec). */
export interface BasisSpec {
  readonly kind: 'extrapolating-b-spline';
  readonly lower: number;
  readonly upper: number;
  readonly interior: Float64Array;
}
