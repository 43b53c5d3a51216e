/**
 * The fitted curve read the other way: the quantity x whose curve value is a reading y,
 * for a curve checked once to be monotone over its data range.
 */
import { InputError } from '../errors';
import { curveKind } from '../registry/curves/index';
import type { FitResult } from '../types';
import { digitsToTell, sig } from '../words/numbers';
import { opt } from '../words/options';
import { curvePieces, monotonicity, type CurvePieces, type Monotonicity } from './pieces';

/** Cap on the bisection halvings of `quantity`: the stopping width is reached after about 55. */
const MAX_INVERSION_STEPS = 200;

/** Turning points named in a refusal before the rest are counted. */
const TURNS_LISTED = 5;

/**
 * A monotone fitted curve with its inverse. The constructor checks the curve once
 * (`monotonicity`, cost O(pieces)); `quantity` then costs about 55 curve evaluations.
 *
 * Throws InputError when the curve turns within the data range (naming where and
 * suggesting a shape constraint), when it is constant, and as `curvePieces` (link-scale
 * curves, unknown kinds). A curve that is level on a stretch (a plateau of a
 * shape-constrained fit) or whose slope touches zero (a stall) is accepted: it is monotone.
 * @example
 *   const inv = new InverseCurve(fitCurve({ x, y }, { kind: 'natural-spline', df: 3 }));
 *   inv.quantity(40); // x with f(x) = 40, or NaN outside inv.readingRange
 */
export class InverseCurve {
  readonly direction: 'increasing' | 'decreasing';
  /** Lowest and highest curve value over the data range. */
  readonly readingRange: readonly [number, number];
  readonly pieces: CurvePieces;
  readonly shape: Monotonicity;
  /** +1 for an increasing curve, -1 for a decreasing one. */
  readonly sign: 1 | -1;
  /** Smallest x step worth bisecting to: one rounding unit of the largest |x| of the data range. */
  private readonly resolution: number;

  constructor(readonly fit: FitResult) {
    this.pieces = curvePieces(fit);
    this.shape = monotonicity(fit);
    this.direction = requireMonotone(fit, this.shape);
    this.sign = this.direction === 'increasing' ? 1 : -1;
    const { lower, upper } = fit.curve;
    const a = fit.curve.value(lower);
    const b = fit.curve.value(upper);
    this.readingRange = a <= b ? [a, b] : [b, a];
    this.resolution = Number.EPSILON * Math.max(Math.abs(lower), Math.abs(upper));
  }

  /**
   * The x in [lower, upper] with f(x) = y0, by bisection to the rounding unit of x (the
   * curve is continuous and monotone, so the bracket always holds the answer); where the
   * curve is level at y0 (a plateau), the lowest such x. NaN when y0 is outside the reading
   * range or not a number.
   */
  quantity(y0: number): number {
    const [lo, hi] = this.readingRange;
    if (!(y0 >= lo && y0 <= hi)) return NaN;
    const { curve } = this.fit;
    const sign = this.sign;
    const target = sign * y0;
    // Invariant: sign f(left) < target <= sign f(right).
    let left = curve.lower;
    let right = curve.upper;
    let fLeft = sign * curve.value(left);
    if (fLeft >= target) return left;
    let fRight = sign * curve.value(right);
    for (let step = 0; step < MAX_INVERSION_STEPS && right - left > this.resolution; step++) {
      const mid = 0.5 * (left + right);
      if (!(mid > left && mid < right)) break;
      const v = sign * curve.value(mid);
      if (v >= target) {
        right = mid;
        fRight = v;
      } else {
        left = mid;
        fLeft = v;
      }
    }
    return fRight - target <= target - fLeft ? right : left;
  }
}

/**
 * The lowest and highest value of the fitted curve over its data range: at the ends or at a
 * turning point (so it is right for curves that turn too). Cost O(pieces) for the
 * monotonicity check, once per fit (see `monotonicity`). Throws as `curvePieces`.
 * @example readingRange(fitCurve({ x: speed, y: dist }, { kind: 'polynomial', df: 2 })) // [-1.85, 80.7] for datasets::cars
 */
export function readingRange(fit: FitResult): [number, number] {
  const shape = monotonicity(fit);
  const { curve } = fit;
  let lo = Math.min(curve.value(curve.lower), curve.value(curve.upper));
  let hi = Math.max(curve.value(curve.lower), curve.value(curve.upper));
  for (const x of shape.turns) {
    const v = curve.value(x);
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  return [lo, hi];
}

/**
 * x with f(x) = y0 over the data range, NaN outside the reading range: InverseCurve's
 * `quantity` for the fit, the InverseCurve built on the first call for a fit object and kept
 * with it (the monotonicity check, O(pieces), runs once per fit; each later call costs about
 * 55 curve evaluations). Throws as InverseCurve.
 * @example inverseValue(fitCurve({ x: speed, y: dist }, { kind: 'polynomial', df: 2 }), 40) // (40 + 17.58) / 3.932 = 14.64 for datasets::cars
 */
export function inverseValue(fit: FitResult, y0: number): number {
  return inverseOf(fit).quantity(y0);
}

/** The InverseCurve of a fit, built once per fit object (a fit is read-only data). Throws as InverseCurve. */
export function inverseOf(fit: FitResult): InverseCurve {
  let inverse = inverses.get(fit);
  if (!inverse) {
    inverse = new InverseCurve(fit);
    inverses.set(fit, inverse);
  }
  return inverse;
}

const inverses = new WeakMap<FitResult, InverseCurve>();

/** The direction of a monotone curve; InputError naming the turns, or saying the curve is constant. */
function requireMonotone(fit: FitResult, shape: Monotonicity): 'increasing' | 'decreasing' {
  if (shape.direction) return shape.direction;
  const { lower, upper } = fit.curve;
  const range = `the data range (${sig(lower)} to ${sig(upper)})`;
  if (shape.turns.length === 0) {
    throw new InputError(`the fitted curve is constant over ${range}, so a reading tells nothing about the quantity; an inverse table needs a curve that rises or falls`);
  }
  throw new InputError(
    `the fitted curve turns at x = ${listTurns(shape.turns)} within ${range}, so a reading there can come from more than one quantity and the curve has no single inverse; ${shapeAdvice(fit)}`,
  );
}

/** "3.2", "3.2 and 7.9", "1, 2 and 3", "1, 2, 3, 4, 5 and 7 more", with digits enough to tell them apart. */
function listTurns(turns: readonly number[]): string {
  const shown = turns.slice(0, TURNS_LISTED);
  const digits = digitsToTell(shown);
  const words = shown.map((v) => sig(v, digits));
  if (turns.length > TURNS_LISTED) return `${words.join(', ')} and ${turns.length - TURNS_LISTED} more`;
  if (words.length === 1) return words[0] as string;
  return `${words.slice(0, -1).join(', ')} and ${words[words.length - 1] as string}`;
}

/** How to get a monotone curve with this fit's kind. */
function shapeAdvice(fit: FitResult): string {
  if (curveKind(fit.kind).supports.shapes) return `refit with ${opt('shape')} increasing or ${opt('shape')} decreasing (whichever way the instrument responds), or with a smaller df`;
  return `fit a spline with a shape constraint instead (${opt('curve')} natural-spline with ${opt('shape')} increasing or decreasing), or use a smaller df`;
}
