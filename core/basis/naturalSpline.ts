import { FitError } from '../errors';
import { quantileType7 } from '../stats/quantile';
import { BSplineEvaluator, clampedKnots } from './bspline';
import type { BasisSpec, RowBasis } from './rowBasis';

/** Knots of a natural cubic regression spline and what was done to place them. */
export interface NaturalKnots {
  readonly lower: number;
  readonly upper: number;
  readonly interior: Float64Array;
  readonly notes: readonly string[];
}

/**
 * Knot placement (docs/design.md, "Knots"): df - 2 interior knots at equally spaced probability levels
 * j / (df - 1), j = 1..df-2, of the empirical distribution of all x (Hyndman & Fan 1996,
 * "Sample quantiles in statistical packages", The American Statistician 50(4),
 * definition 7), boundary knots at min(x) and max(x). When two knots coincide (tied x),
 * the quantiles are taken over the distinct x values instead and a note says so.
 * `sortedX` must be sorted ascending; `distinct` is the number of distinct values.
 * Cost O(n) for the distinct pass. Example: naturalKnots(sorted 1..10, 10, 4).interior = [4, 7].
 */
export function naturalKnots(sortedX: Float64Array, distinct: number, df: number): NaturalKnots {
  const n = sortedX.length;
  const lower = sortedX[0] as number;
  const upper = sortedX[n - 1] as number;
  if (!(df >= 2) || !Number.isInteger(df)) throw new FitError(`natural spline df must be a whole number of at least 2; got ${df}`);
  if (df > distinct) throw new FitError(`natural spline with df ${df} needs at least ${df} distinct x values; the data has ${distinct}`);
  const probs = new Float64Array(df - 2);
  for (let j = 1; j <= df - 2; j++) probs[j - 1] = j / (df - 1);
  let interior = quantileType7(sortedX, probs);
  const notes: string[] = [];
  if (hasCoincidentKnots(interior, lower, upper)) {
    const unique = new Float64Array(distinct);
    let m = 0;
    for (let i = 0; i < n; i++) if (i === 0 || sortedX[i] !== sortedX[i - 1]) unique[m++] = sortedX[i] as number;
    interior = quantileType7(unique, probs);
    notes.push(`Tied x values made quantile knots coincide, so the ${df - 2} interior knots were placed at quantiles of the ${distinct} distinct x values.`);
    if (hasCoincidentKnots(interior, lower, upper)) throw new FitError(`natural spline with df ${df}: the knots still coincide at quantiles of the distinct x values`);
  }
  return { lower, upper, interior, notes };
}

/** The knots as one ascending array: lower boundary, interior, upper boundary. Example: knotArray(naturalKnots(sorted 1..10, 10, 4)) = [1, 4, 7, 10]. */
export function knotArray(k: NaturalKnots): Float64Array {
  return Float64Array.of(k.lower, ...k.interior, k.upper);
}

function hasCoincidentKnots(interior: Float64Array, lower: number, upper: number): boolean {
  let prev = lower;
  for (const k of interior) {
    if (!(k > prev)) return true;
    prev = k;
  }
  return interior.length > 0 && !(upper > prev);
}

/**
 * The cubic B-spline basis on the clamped knot vector of `knots`, evaluated with linear
 * extrapolation beyond the boundary knots (value plus slope at the boundary), as a
 * natural spline requires. Size = interior + 4, width 4. The natural boundary conditions
 * (zero second derivative at both boundary knots) are imposed by the fit as a constraint;
 * see `naturalConstraint`.
 *
 * Scale. B-spline values depend only on ratios of differences of x and knots, so they are
 * the same for x and for any affine image of x; derivatives are not: the k-th derivative
 * scales as 1 / (knot spacing)^k, which overflows or vanishes for x of about 1e150 or
 * 1e-78 and beyond. Everything derivative-based (the boundary slopes used beyond the data,
 * the natural constraint rows, the knot vector the shape rows are built on) is therefore
 * taken on the unit knot vector, the knots mapped to [0, 1] by u = (x - lower) / (upper -
 * lower), where spacings are of order 1 / size whatever the units of x. Values inside the
 * knot range come from the knots in x units, so offsets of x (x = 1e9 + u) lose nothing to
 * the mapping either. Requires upper > lower (distinct boundary knots).
 */
export class ExtrapolatingBSplineBasis implements RowBasis {
  readonly width = 4;
  readonly size: number;
  /** Clamped knot vector in the units of x. */
  readonly knotVector: Float64Array;
  /** The same knot vector mapped to [0, 1] (u = (x - lower) / range): derivatives in these units are of moderate size at any scale of x. */
  readonly unitKnotVector: Float64Array;
  /** upper - lower: x units per unit of u. */
  readonly range: number;
  /** The interior knots, where the cubic pieces join (RowBasis.pieceBreaks). */
  readonly pieceBreaks: Float64Array;
  private readonly ev: BSplineEvaluator;
  private readonly unit: BSplineEvaluator;
  /** Values and u-slopes of the 4 basis functions active at each boundary (lower: 0..3, upper: 4..7), and their first indices. */
  private readonly edgeValue = new Float64Array(8);
  private readonly edgeSlope = new Float64Array(8);
  private readonly edgeFirst = new Int32Array(2);

  constructor(
    readonly lower: number,
    readonly upper: number,
    interior: Float64Array,
  ) {
    this.knotVector = clampedKnots(lower, upper, interior);
    this.ev = new BSplineEvaluator(this.knotVector);
    this.size = this.ev.size;
    this.range = upper - lower;
    if (!(this.range > 0) || !Number.isFinite(this.range)) throw new FitError(`natural spline: the boundary knots ${lower} and ${upper} must differ by a positive finite amount`);
    const unitInterior = new Float64Array(interior.length);
    for (let j = 0; j < interior.length; j++) unitInterior[j] = ((interior[j] as number) - lower) / this.range;
    this.unitKnotVector = clampedKnots(0, 1, unitInterior);
    this.pieceBreaks = Float64Array.from(interior);
    for (let j = 4; j < this.unitKnotVector.length - 4; j++) {
      if (!((this.unitKnotVector[j] as number) > (this.unitKnotVector[j - 1] as number)) || !((this.unitKnotVector[j] as number) < 1)) {
        throw new FitError(`natural spline: the knots ${this.knotVector[j - 1]} and ${this.knotVector[j]} are too close together, relative to the x range ${this.range}, to be told apart`);
      }
    }
    this.unit = new BSplineEvaluator(this.unitKnotVector);
    for (let side = 0; side < 2; side++) {
      this.edgeFirst[side] = this.unit.eval(side, 1);
      for (let j = 0; j < 4; j++) {
        this.edgeValue[4 * side + j] = this.unit.value[j] as number;
        this.edgeSlope[4 * side + j] = this.unit.d1[j] as number;
      }
    }
  }

  row(x: number, out: Float64Array): number {
    if (x < this.lower || x > this.upper) {
      // Beyond the data: value plus slope at the boundary, with the slope and the distance both in units of u.
      const side = x < this.lower ? 0 : 1;
      const du = (x - (side === 0 ? this.lower : this.upper)) / this.range;
      const o = 4 * side;
      for (let j = 0; j < 4; j++) out[j] = (this.edgeValue[o + j] as number) + du * (this.edgeSlope[o + j] as number);
      return this.edgeFirst[side] as number;
    }
    const ev = this.ev;
    const first = ev.eval(x, 0);
    for (let j = 0; j < 4; j++) out[j] = ev.value[j] as number;
    return first;
  }

  /** Boundary and interior knots: ExtrapolatingBSplineBasis(lower, upper, interior) is this basis again (basisFromSpec). */
  spec(): BasisSpec {
    return { kind: 'extrapolating-b-spline', lower: this.lower, upper: this.upper, interior: Float64Array.from(this.pieceBreaks) };
  }

  /**
   * Coefficients of the constant function 1: all ones (the B-splines sum to 1 on the knot
   * range, and beyond it their slopes sum to 0). Fits centre y with it.
   */
  unitCoefficients(out: Float64Array): void {
    out.fill(1, 0, this.size);
  }

  /** The knot interval [t_k, t_(k+4)] where B-spline k is nonzero (x units), for messages. */
  supportOf(k: number): readonly [number, number] {
    return [this.knotVector[k] as number, this.knotVector[k + 4] as number];
  }

  /**
   * The natural constraint rows (2 x size, row-major): second derivatives of the basis at
   * the two boundary knots, taken in units of u (the same null space as in units of x, a
   * factor range^2 apart) and each scaled to largest entry 1.
   */
  naturalConstraint(): Float64Array {
    const c = new Float64Array(2 * this.size);
    const ev = this.unit;
    for (let side = 0; side < 2; side++) {
      const first = ev.eval(side, 2);
      let big = 0;
      for (let j = 0; j < 4; j++) big = Math.max(big, Math.abs(ev.d2[j] as number));
      for (let j = 0; j < 4; j++) c[side * this.size + first + j] = (ev.d2[j] as number) / big;
    }
    return c;
  }
}

/** The basis a spec describes (RowBasis.spec), built as the fit built it: the same rows to the last bit. */
export function basisFromSpec(spec: BasisSpec): RowBasis {
  return new ExtrapolatingBSplineBasis(spec.lower, spec.upper, spec.interior);
}
