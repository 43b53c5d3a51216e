import { ExtrapolatingBSplineBasis, knotArray, naturalKnots } from '../basis/naturalSpline';
import { FitError } from '../errors';
import { nullSpace } from '../linalg/nullSpace';

/**
 * The basis of one input of a surface: the natural cubic regression spline of that input
 * with df k exactly as for curves (docs/design.md, "Natural cubic regression spline" and
 * "Knots": knots at type-7 quantiles of the input's values, boundary knots at its min and
 * max, the tie rule), in its B-spline form with the natural boundary conditions as the
 * null-space map `z`. df 1 is the constant (one basis function equal to 1, no knots), as
 * df 1 is a constant in every family (docs/design.md, "df"); df 2 is the straight line.
 */
export interface AxisBasis {
  /** The input's df: number of free coefficients (columns of z). */
  readonly df: number;
  /** Number of basis functions before the natural conditions (df + 2 for a spline, 1 for the constant). */
  readonly size: number;
  /** Nonzero entries per row: 4 for a spline, 1 for the constant. */
  readonly width: number;
  /** Null-space map, size x df row-major (orthonormal columns); for the constant [1]. */
  readonly z: Float64Array;
  /** Boundary and interior knots in increasing order (empty for df 1). */
  readonly knots: Float64Array;
  /** Smallest and largest value of the input in the data. */
  readonly lower: number;
  readonly upper: number;
  /** Notes of the knot placement (ties moved the knots). */
  readonly notes: readonly string[];
  /** Writes the `width` nonzero basis values at x into out and returns the index of the first (linear beyond the boundary knots). */
  row(x: number, out: Float64Array): number;
  /** The range of x where basis function k is nonzero, for messages. */
  supportOf(k: number): readonly [number, number];
}

/** The input's values sorted ascending, and how many distinct values they hold. */
export interface SortedInput {
  readonly sorted: Float64Array;
  readonly distinct: number;
}

/**
 * The basis of one input with df k (see AxisBasis). `name` names the input in messages.
 * Throws FitError when k is not a whole number of at least 1, when the input has fewer
 * than k distinct values, or when the knots coincide even at quantiles of the distinct
 * values. Cost O(n) for the knot placement (the values come sorted).
 * Example: axisBasis(sortedInput(Float64Array.of(1, 2, 3, 4)), 3, 'temperature').knots -> [1, 2.5, 4].
 */
export function axisBasis(input: SortedInput, df: number, name: string): AxisBasis {
  const { sorted, distinct } = input;
  const n = sorted.length;
  const lower = sorted[0] as number;
  const upper = sorted[n - 1] as number;
  if (!Number.isInteger(df) || df < 1) throw new FitError(`the df of ${name} must be a whole number of at least 1; got ${df}`);
  if (df > distinct) throw new FitError(`df ${df} in ${name} needs at least ${df} distinct values of ${name}; the data has ${distinct}`);
  if (df === 1) return constantAxis(lower, upper);
  let knots;
  try {
    knots = naturalKnots(sorted, distinct, df);
  } catch (e) {
    if (e instanceof FitError) throw new FitError(`${name}: ${e.message.replace(/x values/g, `values of ${name}`)}`);
    throw e;
  }
  const basis = new ExtrapolatingBSplineBasis(knots.lower, knots.upper, knots.interior);
  const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
  return {
    df,
    size: basis.size,
    width: 4,
    z,
    knots: knotArray(knots),
    lower,
    upper,
    notes: knots.notes.map((note) => `${name}: ${note.replace(/ x values/g, ` values of ${name}`)}`),
    row: (x, out) => basis.row(x, out),
    supportOf: (k) => basis.supportOf(k),
  };
}

function constantAxis(lower: number, upper: number): AxisBasis {
  return {
    df: 1,
    size: 1,
    width: 1,
    z: Float64Array.of(1),
    knots: new Float64Array(0),
    lower,
    upper,
    notes: [],
    row(_x, out) {
      out[0] = 1;
      return 0;
    },
    supportOf: () => [lower, upper],
  };
}

/**
 * The values of one input sorted ascending with their count of distinct values. O(n log n).
 * Example: sortedInput(Float64Array.of(3, 1, 3)) -> { sorted: [1, 3, 3], distinct: 2 }.
 */
export function sortedInput(values: Float64Array): SortedInput {
  const sorted = Float64Array.from(values).sort();
  let distinct = sorted.length > 0 ? 1 : 0;
  for (let i = 1; i < sorted.length; i++) if (sorted[i] !== sorted[i - 1]) distinct++;
  return { sorted, distinct };
}
