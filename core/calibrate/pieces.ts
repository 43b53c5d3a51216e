/**
 * Where a fitted curve is one polynomial, and where it rises, falls or turns: the exact
 * monotonicity check an inverse table stands on.
 */
import { InputError } from '../errors';
import { LinkCurve } from '../fit/linkCurve';
import type { FitResult } from '../types';
import { opt } from '../words/options';
import { chebDerivative, chebSpread, chebValue, ChebyshevNodes } from './chebyshev';
import { RootFinder } from './roots';

/** The breakpoints of a curve over its data range and the degree of its polynomial pieces. */
export interface CurvePieces {
  /**
   * lower = b_0 < b_1 < ... < b_P = upper: the curve is one polynomial on each [b_i, b_{i+1}].
   * Holds only lower when the data range is a single point (no pieces).
   */
  readonly breaks: Float64Array;
  /** Degree of each piece's polynomial. */
  readonly degree: number;
}

/**
 * Degree of the pieces of each curve kind. The splines are cubic between their knots; the
 * polynomial is one piece of degree df - 1 (docs/design.md, "Polynomial with df = k").
 * The curve registry does not describe pieces, so they are listed here.
 */
const PIECE_DEGREE: Readonly<Record<string, (fit: FitResult) => number>> = {
  'natural-spline': () => 3,
  'smoothing-spline': () => 3,
  polynomial: (fit) => fit.df - 1,
};

/**
 * The breakpoints between which the fitted curve is a single polynomial, over the data range
 * [fit.curve.lower, fit.curve.upper], and that polynomial's degree: for the natural and the
 * smoothing spline the knots inside the range (plus both ends), degree 3; for the polynomial
 * one piece of degree df - 1. Repeated knots (the clamped knot vector of the smoothing spline)
 * count once. Cost O(K) for K knots; one array of at most K + 2 values.
 *
 * Throws InputError for a curve on a link scale (counts or proportions): inverse tables need
 * a continuous outcome. Throws InputError for a curve kind whose pieces are not known.
 * @example curvePieces(fitCurve({ x, y }, { kind: 'natural-spline', df: 4 })) // { breaks: [min x, q1, q2, max x], degree: 3 }
 */
export function curvePieces(fit: FitResult): CurvePieces {
  requireContinuous(fit);
  const rule = PIECE_DEGREE[fit.kind];
  if (!rule) throw new InputError(`inverse tables are not available for the curve "${fit.kind}": where it is one polynomial is not known`);
  const degree = rule(fit);
  if (!(degree >= 0) || !Number.isInteger(degree)) throw new InputError(`the ${fit.kind} fit has df ${fit.df}, which gives no whole polynomial degree`);
  const { lower, upper } = fit.curve;
  if (!(upper > lower)) return { breaks: Float64Array.of(lower), degree };
  const knots = fit.knots;
  const breaks = new Float64Array(knots.length + 2);
  let count = 0;
  breaks[count++] = lower;
  for (let i = 0; i < knots.length; i++) {
    const k = knots[i] as number;
    if (k > (breaks[count - 1] as number) && k < upper) breaks[count++] = k;
  }
  breaks[count++] = upper;
  return { breaks: breaks.slice(0, count), degree };
}

/** Refuses a curve on a link scale (Poisson or binomial outcome). */
function requireContinuous(fit: FitResult): void {
  if (!(fit.curve instanceof LinkCurve)) return;
  const outcome = fit.model?.outcome ?? (fit.curve.link === 'log' ? 'counts' : 'proportions');
  throw new InputError(
    `inverse tables need a continuous outcome: this curve models ${outcome} through a ${fit.curve.link} link, so readings do not scatter evenly about it and its prediction band cannot be inverted; refit with ${opt('outcome')} continuous`,
  );
}

/** Where the fitted curve rises, falls and turns over its data range. */
export interface Monotonicity {
  /** 'increasing' or 'decreasing' when the slope never changes sign; null when it turns or the curve is constant. */
  readonly direction: 'increasing' | 'decreasing' | null;
  /** x where the slope changes sign, ascending. */
  readonly turns: readonly number[];
  /** x where the slope touches zero without changing sign (the curve stays monotone but is level there for an instant), ascending. */
  readonly stalls: readonly number[];
  /** [from, to] stretches where the curve is level (whole pieces) between stretches of one direction, ascending. */
  readonly plateaus: readonly (readonly [number, number])[];
  /** True when the curve is constant over the whole data range. */
  readonly flat: boolean;
}

/**
 * Slopes below this fraction of the curve's magnitude (per unit of the local variable
 * s in [-1, 1] of a piece, which spans the piece) count as zero: about 450 units of 2^-53,
 * above the rounding of curve values and of the Chebyshev coefficients of a cubic piece.
 * Scaled by (degree + 1)^2 / 16 for higher degrees, whose derivative series amplify
 * rounding more.
 */
export const SLOPE_ZERO_TOLERANCE = 1e-13;

/**
 * The same for fits with shape constraints: the constrained solvers hold a constraint to
 * about 1e-12 of the largest coefficient per B-spline step (core/fit/shapedSmoothing/
 * feasibility.ts), so a stretch the constraint holds level can dip by a few 1e-12 of the
 * curve's magnitude; such dips count as level, and a curve fitted increasing is never
 * refused for them.
 */
export const CONSTRAINED_SLOPE_TOLERANCE = 1e-10;

/**
 * Exact monotonicity of the fitted curve over its data range. On each piece of
 * `curvePieces` the polynomial is interpolated at degree + 1 Chebyshev points in a local
 * variable (exact for a polynomial of that degree up to rounding), differentiated, and every
 * real root of the derivative in the piece is found (closed form for the quadratic
 * derivative of a cubic piece, recursive isolation plus bisection above: core/calibrate/roots.ts).
 * The sign of the slope between consecutive roots then tells turns (sign changes, located
 * at the root, or at the knot where the slope changes sign between pieces), stalls (a zero
 * with the same sign on both sides: an inflection with zero slope, or a touching double
 * root) and plateaus (whole pieces of zero slope). Slopes within SLOPE_ZERO_TOLERANCE
 * (CONSTRAINED_SLOPE_TOLERANCE for a fit with shape constraints) of zero count as zero; a cluster of such zeros counts once, at its midpoint.
 *
 * Cost O(P d^2) for P pieces of degree d (d + 1 curve evaluations per piece); the work
 * arrays are allocated once, never per piece, so smoothing splines with a million knots are
 * fine (about 2 s on a 2-core laptop-class machine). The result is kept per fit object
 * (frozen), so later calls for the same fit cost nothing. Throws as `curvePieces`.
 * @example
 *   monotonicity(fitCurve({ x, y }, { kind: 'natural-spline', df: 8 }))
 *   // -> { direction: null, turns: [14.6, 21.3, 31.2], stalls: [], plateaus: [], flat: false }
 */
export function monotonicity(fit: FitResult): Monotonicity {
  const known = checked.get(fit);
  if (known) return known;
  const { breaks, degree } = curvePieces(fit);
  const walk = new SlopeWalk();
  const pieces = breaks.length - 1;
  if (degree >= 1 && pieces >= 1) scanSlopes(fit, breaks, degree, walk);
  walk.finish();
  const flat = walk.last === 0;
  const direction = flat || walk.turns.length > 0 ? null : walk.last > 0 ? 'increasing' : 'decreasing';
  const result: Monotonicity = Object.freeze({
    direction,
    turns: Object.freeze(walk.turns),
    stalls: Object.freeze(walk.stalls),
    plateaus: Object.freeze(walk.plateaus.map((p) => Object.freeze(p))),
    flat,
  });
  checked.set(fit, result);
  return result;
}

/**
 * Results of `monotonicity` by fit, so the reading range, the inverse and the table of one
 * fit share one pass over a curve of a million pieces. A fit is read-only data, so its
 * result cannot go stale; entries go with their fits.
 */
const checked = new WeakMap<FitResult, Monotonicity>();

/** Feeds the slope signs of every piece, left to right, to `walk`. */
function scanSlopes(fit: FitResult, breaks: Float64Array, degree: number, walk: SlopeWalk): void {
  const curve = fit.curve;
  const n = degree + 1;
  const nodes = new ChebyshevNodes(n);
  const values = new Float64Array(n);
  const coef = new Float64Array(n);
  const slope = new Float64Array(n);
  const roots = new Float64Array(2 * n);
  const finder = new RootFinder(Math.max(1, degree - 1));
  const constrained = (fit.model?.shape.length ?? 0) > 0;
  const tolerance = Math.max(constrained ? CONSTRAINED_SLOPE_TOLERANCE : 0, SLOPE_ZERO_TOLERANCE * Math.max(1, (n * n) / 16));
  const scale = curveScale(fit);
  for (let i = 0; i + 1 < breaks.length; i++) {
    const a = breaks[i] as number;
    const b = breaks[i + 1] as number;
    let big = scale;
    for (let j = 0; j < n; j++) {
      const v = curve.value(nodes.at(j, a, b));
      values[j] = v;
      big = Math.max(big, Math.abs(v));
    }
    nodes.interpolate(values, coef);
    chebDerivative(coef, n, slope);
    const noise = tolerance * big;
    if (Math.abs(slope[0] as number) + chebSpread(slope, n - 1) <= noise) {
      walk.zero(a, b, true);
      continue;
    }
    const count = finder.roots(slope, n - 1, noise, roots);
    let prev = -1;
    for (let r = 0; r <= count; r++) {
      const p = r < count ? (roots[r] as number) : 1;
      if (p > prev) {
        const v = chebValue(slope, n - 1, 0.5 * (prev + p));
        if (Math.abs(v) <= noise) walk.zero(onPiece(prev, a, b), onPiece(p, a, b), false);
        else walk.sign(v > 0 ? 1 : -1, onPiece(prev, a, b));
      }
      if (r < count) walk.zero(onPiece(p, a, b), onPiece(p, a, b), false);
      prev = p;
    }
  }
}

/** x on the piece [a, b] at the local variable s in [-1, 1], the ends exactly. Example: onPiece(0, 2, 6) = 4; onPiece(1, 0.1, 0.3) = 0.3. */
export function onPiece(s: number, a: number, b: number): number {
  return s <= -1 ? a : s >= 1 ? b : a + (1 + s) * 0.5 * (b - a);
}

/** Magnitude of the curve: the largest |value| at the ends and the fitted values. O(n). */
function curveScale(fit: FitResult): number {
  let s = Math.max(Math.abs(fit.curve.value(fit.curve.lower)), Math.abs(fit.curve.value(fit.curve.upper)));
  const f = fit.fitted;
  for (let i = 0; i < f.length; i++) s = Math.max(s, Math.abs(f[i] as number));
  return s;
}

/**
 * The slope's signs, left to right: zero stretches are held until the next non-zero sign
 * says whether they were a turn, a stall or a plateau.
 */
class SlopeWalk {
  /** Sign of the slope last seen (0 before the first non-zero slope). */
  last = 0;
  readonly turns: number[] = [];
  readonly stalls: number[] = [];
  readonly plateaus: (readonly [number, number])[] = [];
  private from = NaN;
  private to = NaN;
  private level = false;

  /** The slope is zero from `from` to `to`; `wholePiece`: a whole piece is level. */
  zero(from: number, to: number, wholePiece: boolean): void {
    if (Number.isNaN(this.from)) this.from = from;
    this.to = to;
    this.level ||= wholePiece;
  }

  /** The slope has sign `s` from `x` on. */
  sign(s: number, x: number): void {
    const held = !Number.isNaN(this.from);
    if (this.last !== 0 && s !== this.last) this.turns.push(held ? 0.5 * (this.from + this.to) : x);
    else if (held && this.level) this.plateaus.push([this.from, this.to]);
    else if (held && this.last !== 0) this.stalls.push(0.5 * (this.from + this.to));
    this.last = s;
    this.from = NaN;
    this.level = false;
  }

  /** A level stretch at the upper end is a plateau; a zero slope exactly at the end is nothing. */
  finish(): void {
    if (!Number.isNaN(this.from) && this.level && this.last !== 0) this.plateaus.push([this.from, this.to]);
  }
}
