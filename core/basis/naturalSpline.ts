import { FitError } from '../errors';
import { quantileType7 } from '../stats/quantile';
import { BSplineEvaluator, clampedKnots } from './bspline';
import type { RowBasis } from './rowBasis';

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
 */
export class ExtrapolatingBSplineBasis implements RowBasis {
  readonly width = 4;
  readonly size: number;
  readonly knotVector: Float64Array;
  private readonly ev: BSplineEvaluator;

  constructor(readonly lower: number, readonly upper: number, interior: Float64Array) {
    this.knotVector = clampedKnots(lower, upper, interior);
    this.ev = new BSplineEvaluator(this.knotVector);
    this.size = this.ev.size;
  }

  row(x: number, out: Float64Array): number {
    const ev = this.ev;
    if (x < this.lower || x > this.upper) {
      const edge = x < this.lower ? this.lower : this.upper;
      const first = ev.eval(edge, 1);
      const dx = x - edge;
      for (let j = 0; j < 4; j++) out[j] = (ev.value[j] as number) + dx * (ev.d1[j] as number);
      return first;
    }
    const first = ev.eval(x, 0);
    for (let j = 0; j < 4; j++) out[j] = ev.value[j] as number;
    return first;
  }

  /** Second derivatives of the basis at the two boundary knots: the natural constraint rows (2 x size, row-major). */
  naturalConstraint(): Float64Array {
    const c = new Float64Array(2 * this.size);
    const ev = this.ev;
    for (let side = 0; side < 2; side++) {
      const first = ev.eval(side === 0 ? this.lower : this.upper, 2);
      for (let j = 0; j < 4; j++) c[side * this.size + first + j] = ev.d2[j] as number;
    }
    return c;
  }
}
