/**
 * The lowest and highest quantity x in the data range whose prediction band for a reading
 * contains that reading: the ends of an inverse prediction interval.
 */
import type { Curve } from '../types';
import { chebDerivative, chebSpread, chebValue, ChebyshevNodes } from './chebyshev';
import { onPiece, type CurvePieces } from './pieces';
import { RootFinder } from './roots';

/** What widens the band of a reading besides the curve's own standard error. */
export interface ReadingBand {
  /** Student t quantile of the interval. */
  readonly t: number;
  /** Residual standard error of the fit. */
  readonly sigma: number;
  /** Number of readings averaged into the one inverted (>= 1). */
  readonly readingsAveraged: number;
  /** Standard uncertainty of the reference standard, in units of x (>= 0). */
  readonly referenceUncertainty: number;
}

/**
 * Per-piece bounds are widened by this fraction of their magnitude, so rounding in them
 * never prunes a piece that holds part of the set.
 */
const BOUND_SLACK = 1e-9;

/** A zero of the band polynomial within this fraction of its terms counts as touching zero. */
const TOUCH_TOLERANCE = 1e-12;

/**
 * For a reading y0, the set S = {x in [lower, upper] : |y0 - f(x)| <= t w(x)} with
 * w(x)^2 = sigma^2 / m + sigma^2 v(x) + (f'(x) u)^2 (v the curve's variance factor, m the
 * readings averaged, u the reference standard's uncertainty), and its lowest and highest
 * point. On each piece of the curve, D(x) = (y0 - f(x))^2 - t^2 w(x)^2 is a polynomial of
 * degree 2d (f of degree d, v of degree 2d as a quadratic form in the degree-d basis), so S
 * on a piece is where that polynomial is <= 0, found exactly from its Chebyshev interpolant
 * at 2d + 1 points and its roots (core/calibrate/roots.ts).
 *
 * Which pieces to look at: the constructor bounds f + t w from above and f - t w from below
 * on every piece (|T_k| <= 1 bounds each Chebyshev series), with running maxima and minima,
 * so the first piece that can hold a point of S (and the last) is found by binary search.
 * For a monotone curve, mirrored by `sign` to increasing, the search then usually looks at
 * one piece or a few.
 *
 * Cost: O(P d^2) once (4 arrays of P numbers for P pieces); per reading O(log P) plus
 * O(d^3) for each piece examined. No allocation per piece or per reading.
 * @example
 *   const hull = new BandHull(fit.curve, curvePieces(fit), 1, { t: 2.01, sigma: fit.sigma, readingsAveraged: 1, referenceUncertainty: 0 });
 *   hull.lowest(40); hull.highest(40); // NaN where S is empty
 */
export class BandHull {
  private readonly breaks: Float64Array;
  private readonly count: number;
  private readonly n: number;
  private readonly nodes: ChebyshevNodes;
  private readonly finder: RootFinder;
  private readonly fv: Float64Array;
  private readonly vv: Float64Array;
  private readonly dv: Float64Array;
  private readonly cf: Float64Array;
  private readonly cs: Float64Array;
  private readonly cd: Float64Array;
  private readonly found: Float64Array;
  /** Upper bound of sign f + t w on each piece, and its running maximum from the left. */
  private readonly up: Float64Array;
  private readonly upMax: Float64Array;
  /** Lower bound of sign f - t w on each piece, and its running minimum from the right. */
  private readonly lo: Float64Array;
  private readonly loMin: Float64Array;
  private readonly t2: number;
  private readonly base: number;
  private readonly s2: number;
  private readonly u2: number;

  constructor(
    private readonly curve: Curve,
    pieces: CurvePieces,
    private readonly sign: 1 | -1,
    band: ReadingBand,
  ) {
    this.breaks = pieces.breaks;
    this.count = pieces.breaks.length - 1;
    const degree = Math.max(1, pieces.degree);
    this.n = 2 * degree + 1;
    this.nodes = new ChebyshevNodes(this.n);
    this.finder = new RootFinder(this.n - 1);
    this.fv = new Float64Array(this.n);
    this.vv = new Float64Array(this.n);
    this.dv = new Float64Array(this.n);
    this.cf = new Float64Array(this.n);
    this.cs = new Float64Array(this.n);
    this.cd = new Float64Array(this.n);
    this.found = new Float64Array(2 * this.n);
    this.t2 = band.t * band.t;
    this.s2 = band.sigma * band.sigma;
    this.base = this.s2 / band.readingsAveraged;
    this.u2 = band.referenceUncertainty * band.referenceUncertainty;
    this.up = new Float64Array(this.count);
    this.lo = new Float64Array(this.count);
    this.upMax = new Float64Array(this.count);
    this.loMin = new Float64Array(this.count);
    this.bound(band.t);
  }

  /** Smallest x of S, or NaN when S is empty. */
  lowest(y0: number): number {
    const target = this.sign * y0;
    // First piece whose band can reach up to the reading.
    let a = 0;
    let b = this.count;
    while (a < b) {
      const mid = (a + b) >>> 1;
      if ((this.upMax[mid] as number) >= target) b = mid;
      else a = mid + 1;
    }
    for (let k = a; k < this.count; k++) {
      if ((this.up[k] as number) < target || (this.lo[k] as number) > target) continue;
      const x = this.inPiece(k, target, true);
      if (!Number.isNaN(x)) return x;
    }
    return NaN;
  }

  /** Largest x of S, or NaN when S is empty. */
  highest(y0: number): number {
    const target = this.sign * y0;
    // Last piece whose band can reach down to the reading.
    let a = 0;
    let b = this.count;
    while (a < b) {
      const mid = (a + b) >>> 1;
      if ((this.loMin[mid] as number) > target) b = mid;
      else a = mid + 1;
    }
    for (let k = a - 1; k >= 0; k--) {
      if ((this.up[k] as number) < target || (this.lo[k] as number) > target) continue;
      const x = this.inPiece(k, target, false);
      if (!Number.isNaN(x)) return x;
    }
    return NaN;
  }

  /** Fills the bounds of every piece and their running extremes. */
  private bound(t: number): void {
    const { n, cf, cs, cd, vv } = this;
    for (let k = 0; k < this.count; k++) {
      const a = this.breaks[k] as number;
      const b = this.breaks[k + 1] as number;
      this.sample(a, b);
      this.nodes.interpolate(vv, cd);
      const fSpread = chebSpread(cf, n);
      const slope = ((Math.abs(cs[0] as number) + chebSpread(cs, n - 1)) * 2) / (b - a);
      const v = Math.max(0, (cd[0] as number) + chebSpread(cd, n));
      const tw = t * Math.sqrt(this.base + this.s2 * v + this.u2 * slope * slope);
      const hi = (cf[0] as number) + fSpread;
      const lo = (cf[0] as number) - fSpread;
      const slack = BOUND_SLACK * (Math.abs(hi) + Math.abs(lo) + tw);
      this.up[k] = hi + tw + slack;
      this.lo[k] = lo - tw - slack;
    }
    let run = -Infinity;
    for (let k = 0; k < this.count; k++) this.upMax[k] = run = Math.max(run, this.up[k] as number);
    run = Infinity;
    for (let k = this.count - 1; k >= 0; k--) this.loMin[k] = run = Math.min(run, this.lo[k] as number);
  }

  /** sign f and v at the nodes of [a, b], the Chebyshev series of sign f and of its derivative in s. */
  private sample(a: number, b: number): void {
    const { n, fv, vv, curve, sign } = this;
    for (let j = 0; j < n; j++) {
      const x = this.nodes.at(j, a, b);
      fv[j] = sign * curve.value(x);
      vv[j] = Math.max(0, curve.varianceFactor(x));
    }
    this.nodes.interpolate(fv, this.cf);
    chebDerivative(this.cf, n, this.cs);
  }

  /** The lowest (or highest) x of piece k where D <= 0, or NaN. */
  private inPiece(k: number, target: number, lowest: boolean): number {
    const { n, fv, vv, dv, cs, cd, found, nodes } = this;
    const a = this.breaks[k] as number;
    const b = this.breaks[k + 1] as number;
    this.sample(a, b);
    const perS = 2 / (b - a);
    let size = 0;
    for (let j = 0; j < n; j++) {
      const slope = chebValue(cs, n - 1, nodes.s[j] as number) * perS;
      const r = target - (fv[j] as number);
      const band = this.t2 * (this.base + this.s2 * (vv[j] as number) + this.u2 * slope * slope);
      dv[j] = r * r - band;
      size = Math.max(size, r * r + band);
    }
    nodes.interpolate(dv, cd);
    if (chebValue(cd, n, lowest ? -1 : 1) <= 0) return lowest ? a : b;
    const count = this.finder.roots(cd, n, TOUCH_TOLERANCE * size, found);
    if (count === 0) return NaN;
    return onPiece(found[lowest ? 0 : count - 1] as number, a, b);
  }
}
