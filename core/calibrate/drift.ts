/**
 * Drift of a calibration curve: how far a newly fitted curve lies from the curve an earlier
 * fit record holds, over the x range both cover, judged against their pointwise standard
 * errors. The record keeps a curve sample (the fitted mean and its standard error at evenly
 * spaced x), so the comparison works for every curve kind and outcome without refitting.
 *
 * Scale: fit and se are on the scale of the readings. For counts and proportions the se is
 * the delta-method standard error of the mean, |dmu/deta| se_eta (what bandsAt reports,
 * core/fit/linkCurve.ts), and the band is rebuilt on the link scale from it, so it matches
 * the band the record's own figures showed.
 */
import { InputError } from '../errors';
import { bandsAt } from '../fit/bands';
import { LinkCurve } from '../fit/linkCurve';
import { OUTCOMES } from '../registry/outcomes/index';
import { qnorm, qt } from '../stats/distributions';
import type { FitResult, Outcome } from '../types';
import { roundSig } from '../view/round';
import { atPlace, percent, sig } from '../words/numbers';

/**
 * Points of a curve sample: 256 equal steps over the data range. The maximum of a
 * difference d sampled with step h misses the true one by at most h^2 max|d''| / 8 (d' = 0
 * at an interior maximum, so Taylor's theorem over the half step h / 2 gives this). A drift
 * with up to five waves over the range, d = A sin(10 pi x / range), then reads at least
 * 1 - (10 pi / 256)^2 / 8 = 99.8 % of its largest value; 129 points would give 99.2 %, 513
 * points 99.95 % for twice the record. Three arrays of 257 numbers with 10 digits take
 * about 9 kB of JSON in the record. 2^8 + 1 keeps the steps halvable. The test measures the
 * shortfall on real data (test/unit/calibrate/drift.test.ts).
 */
export const SAMPLE_POINTS = 257;

/**
 * Significant digits a sample keeps at least: a relative resolution of 1e-10, far finer than
 * the standard error of any fitted calibration curve, and coarse enough that last-bit differences of Math.exp
 * and friends between platforms do not change the record's bytes in practice.
 */
export const SAMPLE_DIGITS = 10;

/** Most significant digits: 17 digits round-trip every double exactly (IEEE 754-2008, section 5.12.2, from memory). */
const MAX_DIGITS = 17;
/** x is kept to this fraction of the range, so x of 1.7e9 (epoch seconds) over a day still resolves. */
const X_RESOLUTION = 1e-9;
/** Fitted values are kept to this fraction of the smallest standard error. */
const FIT_RESOLUTION = 1e-6;

/**
 * A fitted curve sampled for a record: the mean `fit` and its standard error `se` at `x`,
 * evenly spaced over the data range [lower, upper] (plain JSON; rounded, see curveSample).
 */
export interface CurveSample {
  /** Smallest and largest x of the data the curve was fitted to. */
  readonly lower: number;
  readonly upper: number;
  /** Level of the band, 0.95 for 95 %. */
  readonly level: number;
  /**
   * Band multiplier: the band is fit +- t se for continuous readings (Student t on the
   * residual df), eta +- t se_eta on the link scale for counts and proportions (normal
   * quantile). null when there is no residual df (an interpolating fit).
   */
  readonly t: number | null;
  /** The outcome (core/registry/outcomes/): says how the band is rebuilt from fit, se and t. */
  readonly outcome: Outcome;
  readonly x: readonly number[];
  readonly fit: readonly number[];
  /** Standard error of the fitted mean at each x; null where it is not finite. */
  readonly se: readonly (number | null)[];
}

/** Significant digits at which numbers up to `scale` in magnitude resolve `resolution`, from SAMPLE_DIGITS to MAX_DIGITS. */
function digitsFor(scale: number, resolution: number): number {
  if (!(scale > 0 && resolution > 0 && Number.isFinite(scale) && Number.isFinite(resolution))) return SAMPLE_DIGITS;
  const d = Math.floor(Math.log10(scale)) - Math.floor(Math.log10(resolution)) + 1;
  return Math.min(MAX_DIGITS, Math.max(SAMPLE_DIGITS, d));
}

/** Digits of a sample's x: enough to resolve X_RESOLUTION of its range. */
function xDigits(lower: number, upper: number): number {
  return digitsFor(Math.max(Math.abs(lower), Math.abs(upper)), (upper - lower) * X_RESOLUTION);
}

/** Digits of a sample's fitted values: enough to resolve FIT_RESOLUTION of its smallest positive se. */
function fitDigits(fit: ArrayLike<number>, se: ArrayLike<number | null>): number {
  let big = 0;
  let small = Infinity;
  for (let i = 0; i < fit.length; i++) big = Math.max(big, Math.abs(fit[i] as number));
  for (let i = 0; i < se.length; i++) {
    const s = se[i];
    if (typeof s === 'number' && s > 0 && s < small) small = s;
  }
  return digitsFor(big, small * FIT_RESOLUTION);
}

/**
 * The fitted mean and its pointwise standard error at `points` evenly spaced x over the
 * data range of `fit`, with the band level and its multiplier t (as bandsAt computes them,
 * core/fit/bands.ts: Student t on n - df for least squares, the normal quantile on the
 * link scale for counts and proportions). Every number keeps at least SAMPLE_DIGITS
 * significant digits, more where the magnitudes need them (x: 1e-9 of the range; fit: 1e-6
 * of the smallest se), so the record stays small and its bytes stable; x is rounded before
 * the curve is evaluated, so fit[i] is the curve at x[i] as stored. Throws InputError for
 * fewer than 2 points, a level outside (0, 1) or a curve without an x range. O(points).
 * Example: curveSample(fitCurve({ x, y }, { kind: 'natural-spline', df: 5 })).x.length -> 257.
 */
export function curveSample(fit: FitResult, points = SAMPLE_POINTS, level = 0.95): CurveSample {
  if (!Number.isInteger(points) || points < 2) throw new InputError(`a curve sample needs a whole number of at least 2 points; got ${points}`);
  if (!(level > 0 && level < 1)) throw new InputError(`a curve sample's band level must lie between 0 and 1; got ${level}`);
  const { lower: lo, upper: hi } = fit.curve;
  if (!(Number.isFinite(lo) && Number.isFinite(hi) && lo < hi)) throw new InputError(`a curve sample needs a data range of x; the fit has ${lo} to ${hi}`);
  const dx = xDigits(lo, hi);
  const lower = roundSig(lo, dx);
  const upper = roundSig(hi, dx);
  const x: number[] = [];
  for (let i = 0; i < points; i++) x.push(i === points - 1 ? upper : roundSig(lower + ((upper - lower) * i) / (points - 1), dx));
  const b = bandsAt(fit, x, level);
  // The same multiplier bandsAt uses (core/fit/bands.ts, core/fit/linkCurve.ts).
  const t = fit.curve instanceof LinkCurve ? qnorm(0.5 + level / 2) : fit.residualDf > 0 ? qt(0.5 + level / 2, fit.residualDf) : NaN;
  const se = Array.from(b.se, (s) => (Number.isFinite(s) ? roundSig(s, SAMPLE_DIGITS) : null));
  const df = fitDigits(b.fit, se);
  return {
    lower,
    upper,
    level,
    t: Number.isFinite(t) ? roundSig(t, SAMPLE_DIGITS) : null,
    outcome: fit.model?.outcome ?? 'continuous',
    x,
    fit: Array.from(b.fit, (f) => roundSig(f, df)),
    se,
  };
}

/**
 * Checks a sample read from a record: matching lengths, at least 2 points, finite x in
 * increasing order from lower to upper, a known outcome. Throws InputError naming the fault.
 */
export function checkSample(s: CurveSample, name = 'curve sample'): void {
  const k = s.x.length;
  if (k < 2 || s.fit.length !== k || s.se.length !== k) throw new InputError(`${name}: x, fit and se need the same length of at least 2; got ${k}, ${s.fit.length} and ${s.se.length}`);
  if (!Object.hasOwn(OUTCOMES, s.outcome)) throw new InputError(`${name}: unknown outcome "${String(s.outcome)}"`);
  if (!(s.level > 0 && s.level < 1)) throw new InputError(`${name}: the band level must lie between 0 and 1; got ${s.level}`);
  if (s.x[0] !== s.lower || s.x[k - 1] !== s.upper) throw new InputError(`${name}: x must run from lower (${s.lower}) to upper (${s.upper})`);
  for (let i = 1; i < k; i++) {
    if (!((s.x[i] as number) > (s.x[i - 1] as number))) throw new InputError(`${name}: x must increase; x[${i}] = ${s.x[i]} follows ${s.x[i - 1]}`);
  }
}

/** A number from a sample, NaN for null. */
const val = (v: number | null | undefined): number => (typeof v === 'number' ? v : NaN);

/**
 * The sample's fit and se at x by linear interpolation between its neighbouring points
 * (exact at a sampled x); NaN outside [lower, upper]. O(log points).
 * Example: sampleAt(s, s.x[3]).fit === s.fit[3].
 */
export function sampleAt(s: CurveSample, x: number): { fit: number; se: number } {
  const k = s.x.length;
  if (!(x >= s.lower && x <= s.upper)) return { fit: NaN, se: NaN };
  let a = 0;
  let b = k - 1;
  // Invariant x[a] <= x <= x[b].
  while (b - a > 1) {
    const m = (a + b) >> 1;
    if ((s.x[m] as number) <= x) a = m;
    else b = m;
  }
  const xa = s.x[a] as number;
  const xb = s.x[b] as number;
  if (x === xa) return { fit: val(s.fit[a]), se: val(s.se[a]) };
  if (x === xb) return { fit: val(s.fit[b]), se: val(s.se[b]) };
  const w = (x - xa) / (xb - xa);
  const lerp = (p: number, q: number): number => p + (q - p) * w;
  return { fit: lerp(val(s.fit[a]), val(s.fit[b])), se: lerp(val(s.se[a]), val(s.se[b])) };
}

/**
 * Estimated bound on the error of sampleAt's fitted values between the sampled x. Linear
 * interpolation over a step h misses a curve f by at most h^2 max|f''| / 8 (error formula of
 * linear interpolation, f(x) - L(x) = f''(xi) (x - x_i)(x - x_i+1) / 2; de Boor, "A Practical
 * Guide to Splines", 1978, chapter II, from memory). On evenly spaced x the second difference
 * D2_i = f_i-1 - 2 f_i + f_i+1 equals h^2 f''(xi_i) for some xi_i in (x_i-1, x_i+1) (mean
 * value form of divided differences), and every x of a step lies within 2h of such a xi_i,
 * so h^2 |f''(x)| <= max|D2| + 2 h^3 max|f'''|, with h^3 max|f'''| estimated in the same way
 * by the largest third difference D3. The bound is therefore estimated as
 * (max|D2| + 2 max|D3|) / 8: an estimate, as f''' may peak between points; the test measures
 * it against dense evaluation of real fits. O(points).
 * Example: for f = x^2 sampled at x = 0, 0.5, 1 -> (0 - 2 * 0.25 + 1) / 8 = 0.0625, which is h^2 f'' / 8 exactly.
 */
export function interpolationBound(s: CurveSample): number {
  const f = (i: number): number => val(s.fit[i]);
  let d2 = 0;
  let d3 = 0;
  for (let i = 1; i + 1 < s.fit.length; i++) d2 = Math.max(d2, Math.abs(f(i - 1) - 2 * f(i) + f(i + 1)));
  for (let i = 1; i + 2 < s.fit.length; i++) d3 = Math.max(d3, Math.abs(f(i + 2) - 3 * f(i + 1) + 3 * f(i) - f(i - 1)));
  return (d2 + 2 * d3) / 8;
}

/**
 * The sample's band at one point, from its fitted value and se: fit +- t se for continuous
 * readings; for counts and proportions eta +- t se_eta on the link scale, se_eta = se /
 * |dmu/deta|, mapped back (as core/fit/linkCurve.ts draws it), falling back to fit +- t se
 * where the link is not finite (a mean numerically at 0 or 1). NaN without t or se.
 */
export function bandOfSample(s: CurveSample, fit: number, se: number): [number, number] {
  const t = val(s.t);
  if (!(Number.isFinite(t) && Number.isFinite(se) && Number.isFinite(fit))) return [NaN, NaN];
  const glm = OUTCOMES[s.outcome].glm;
  if (glm) {
    const eta = glm.linkfun(fit);
    const seEta = se / glm.muEta(eta);
    const lo = glm.linkinv(eta - t * seEta);
    const hi = glm.linkinv(eta + t * seEta);
    if (Number.isFinite(eta) && Number.isFinite(lo) && Number.isFinite(hi)) return [lo, hi];
  }
  return [fit - t * se, fit + t * se];
}

/** The whole band of a sample at its own x. O(points). */
export function sampleBand(s: CurveSample): { lower: number[]; upper: number[] } {
  const lower: number[] = [];
  const upper: number[] = [];
  for (let i = 0; i < s.x.length; i++) {
    const [lo, hi] = bandOfSample(s, val(s.fit[i]), val(s.se[i]));
    lower.push(lo);
    upper.push(hi);
  }
  return { lower, upper };
}

/** A stretch of x, both ends compared points. */
export interface Stretch {
  readonly from: number;
  readonly to: number;
}

/** How a new curve differs from a recorded one over the x range both cover. */
export interface Drift {
  /** The common x range compared. */
  readonly from: number;
  readonly to: number;
  /** Points compared: the recorded sample's x inside the common range and its two ends. */
  readonly points: number;
  /** Level of the recorded band. */
  readonly level: number;
  /** The recorded sample's x range. */
  readonly recordedRange: readonly [number, number];
  /** The new curve's x range (from a new fit: its data range, rounded like the recorded x). */
  readonly currentRange: readonly [number, number];
  /** Largest |new - recorded| and where; `difference` is new minus recorded. */
  readonly largest: { readonly x: number; readonly difference: number };
  /**
   * Largest z = |difference| / sqrt(se_recorded^2 + se_new^2) and where; null when no
   * point can be judged (recorded se 0 or missing everywhere).
   */
  readonly largestRelative: { readonly x: number; readonly z: number; readonly difference: number } | null;
  /** True when the new curve lies inside the recorded band at every judged point; null when none can be judged. */
  readonly withinRecordedBand: boolean | null;
  /** Stretches of compared points where the new curve lies outside the recorded band. */
  readonly outside: readonly Stretch[];
  /** Compared points that cannot be judged: recorded se 0 or missing, or no band multiplier. */
  readonly unjudged: number;
  /** Estimated bound on the interpolation error in the differences (0 when every value was evaluated at a sampled x). */
  readonly interpolationBound: number;
  /** The drift in a sentence or two (driftWords). */
  readonly words: string;
}

/** The compared x: the recorded sample's x strictly inside (lo, hi), and lo and hi themselves. */
function comparedX(s: CurveSample, lo: number, hi: number): number[] {
  if (lo === hi) return [lo];
  const xs = [lo];
  for (const x of s.x) if (x > lo && x < hi) xs.push(x);
  xs.push(hi);
  return xs;
}

/**
 * The new curve's range [lo, hi] rounded like the sample's x (so the same data give the same
 * ends), and the range both cover, or null without overlap.
 */
function ranges(s: CurveSample, lo: number, hi: number): { current: [number, number]; common: [number, number] | null } {
  const d = xDigits(s.lower, s.upper);
  const current: [number, number] = [roundSig(lo, d), roundSig(hi, d)];
  const a = Math.max(s.lower, current[0]);
  const b = Math.min(s.upper, current[1]);
  return { current, common: a <= b ? [a, b] : null };
}

const isNode = (s: CurveSample, x: number): boolean => s.x.includes(x);

/** The recorded values at the compared x. */
function recordedAt(s: CurveSample, xs: readonly number[]): { fit: number[]; se: number[] } {
  const fit: number[] = [];
  const se: number[] = [];
  for (const x of xs) {
    const v = sampleAt(s, x);
    fit.push(v.fit);
    se.push(v.se);
  }
  return { fit, se };
}

/** Compares new values with recorded ones at the same x and fills a Drift. */
function judge(
  recorded: CurveSample,
  currentRange: readonly [number, number],
  xs: readonly number[],
  rec: { fit: readonly number[]; se: readonly number[] },
  cur: { fit: readonly number[]; se: readonly number[] },
  bound: number,
): Drift {
  let largest = { x: xs[0] as number, difference: 0 };
  let largestRelative: Drift['largestRelative'] = null;
  let judged = 0;
  let within = true;
  const outside: Stretch[] = [];
  let open: number | undefined;
  let last = NaN;
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i] as number;
    const rf = rec.fit[i] as number;
    const rs = rec.se[i] as number;
    const cf = cur.fit[i] as number;
    const cs = cur.se[i] as number;
    const d = cf - rf;
    if (Math.abs(d) > Math.abs(largest.difference)) largest = { x, difference: d };
    // Independent fits (two calibrations from separate data): the variances add.
    const ok = Number.isFinite(rs) && rs > 0 && Number.isFinite(cs) && recorded.t !== null && recorded.t > 0;
    let out = false;
    if (ok) {
      judged++;
      const z = Math.abs(d) / Math.sqrt(rs * rs + cs * cs);
      if (!largestRelative || z > largestRelative.z) largestRelative = { x, z, difference: d };
      const [lo, hi] = bandOfSample(recorded, rf, rs);
      out = !(cf >= lo && cf <= hi);
      if (out) within = false;
    }
    if (out && open === undefined) open = x;
    if (!out && open !== undefined) {
      outside.push({ from: open, to: last });
      open = undefined;
    }
    last = x;
  }
  if (open !== undefined) outside.push({ from: open, to: last });
  const partial: Omit<Drift, 'words'> = {
    from: xs[0] as number,
    to: xs[xs.length - 1] as number,
    points: xs.length,
    level: recorded.level,
    recordedRange: [recorded.lower, recorded.upper],
    currentRange,
    largest,
    largestRelative,
    withinRecordedBand: judged > 0 ? within : null,
    outside,
    unjudged: xs.length - judged,
    interpolationBound: bound,
  };
  return { ...partial, words: driftWords(partial) };
}

/**
 * Compares a newly fitted curve with a recorded curve sample over the x range both cover:
 * the new curve is evaluated exactly (bandsAt, core/fit/bands.ts) at the recorded x inside
 * that range and at its two ends (where the recorded values are interpolated linearly when
 * the end is not a sampled x), and rounded like the record, so an unchanged curve compares
 * as equal. z = |new - recorded| / sqrt(se_recorded^2 + se_new^2) assumes independent fits:
 * two calibrations from separate data. The new curve is inside the recorded band where it
 * lies between the band's limits (fit +- t se; on the link scale for counts and proportions).
 * Points where the recorded se is 0 or missing are not judged. Returns null when the ranges
 * do not overlap. Throws InputError for a malformed sample. O(points) evaluations.
 * Example: driftFromRecord(curveSample(fit), fit)?.largest.difference -> 0.
 */
export function driftFromRecord(recorded: CurveSample, current: FitResult): Drift | null {
  checkSample(recorded, 'recorded curve sample');
  const { current: currentRange, common } = ranges(recorded, current.curve.lower, current.curve.upper);
  if (!common) return null;
  const xs = comparedX(recorded, common[0], common[1]);
  const rec = recordedAt(recorded, xs);
  const b = bandsAt(current, xs, recorded.level);
  // Rounded like the record, so differences below the record's digits read as 0.
  const digits = fitDigits(recorded.fit, recorded.se);
  const cur = { fit: Array.from(b.fit, (f) => roundSig(f, digits)), se: Array.from(b.se) };
  const ends = isNode(recorded, common[0]) && isNode(recorded, common[1]) ? 0 : interpolationBound(recorded);
  return judge(recorded, currentRange, xs, rec, cur, ends);
}

/**
 * Compares two recorded curve samples: `b` (the newer) against `a` (the reference) at a's x
 * inside the common range and its two ends. b's values there come from linear
 * interpolation between its sampled points (sampleAt). Linear rather than cubic Hermite
 * interpolation: it never overshoots, interpolates se with the same rule, matches how a
 * curve table is read, and its error has the simple bound h^2 max|f''| / 8, estimated by
 * interpolationBound; with 257 points over the range it is about 1 / 524,288 of range^2
 * max|f''|, far below the standard errors of a fitted curve in practice (at most 1.3 % of
 * the smallest one for the mcycle fits of the test). The reported
 * interpolationBound is b's bound, plus a's when a common end falls between a's points.
 * Returns null when the ranges do not overlap. Throws InputError for a malformed sample. O(points log points).
 * Example: driftBetweenSamples(curveSample(fitA), curveSample(fitB))?.words.
 */
export function driftBetweenSamples(a: CurveSample, b: CurveSample): Drift | null {
  checkSample(a, 'first curve sample');
  checkSample(b, 'second curve sample');
  const { common } = ranges(a, b.lower, b.upper);
  if (!common) return null;
  const xs = comparedX(a, common[0], common[1]);
  const ends = isNode(a, common[0]) && isNode(a, common[1]) ? 0 : interpolationBound(a);
  return judge(a, [b.lower, b.upper], xs, recordedAt(a, xs), recordedAt(b, xs), interpolationBound(b) + ends);
}

/** Stretches listed by x before they are counted instead. */
const MAX_LISTED_STRETCHES = 3;

/** A list in words: 'a', 'a and b', 'a, b and c'. */
function listWords(items: readonly string[]): string {
  return items.length <= 1 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1] as string}`;
}

/**
 * The drift in plain words: whether the new curve stays within the recorded band over the
 * common range, the largest difference and where, in standard errors of the difference;
 * where it leaves the band; the common range when the curves cover different ranges; and
 * the points that cannot be judged. x is printed to 3 significant digits of the compared
 * range's width, differences and z to 2 significant digits (core/words/numbers.ts).
 * Example: 'The new curve stays within the recorded curve's 95 % band everywhere over x = 0.5 to 9.8 (largest difference 0.012 at x = 3.1, 0.8 standard errors).'
 */
export function driftWords(d: Omit<Drift, 'words'>): string {
  const width = d.to - d.from;
  const scale = width > 0 ? width : Math.abs(d.from);
  const place = scale > 0 ? Math.floor(Math.log10(scale)) - 2 : 0;
  const at = (x: number): string => atPlace(x, place);
  const span = (a: number, b: number): string => (a === b ? at(a) : `${at(a)} to ${at(b)}`);
  const size = (v: number): string => sig(Math.abs(v), 2);
  const band = `the recorded curve's ${percent(d.level)} band`;
  const [r0, r1] = d.recordedRange;
  const [c0, c1] = d.currentRange;
  const partial = d.from > Math.min(r0, c0) || d.to < Math.max(r1, c1);
  const subject = partial ? `Over x = ${span(d.from, d.to)}, the range both curves cover (the recorded one ${span(r0, r1)}, the new one ${span(c0, c1)}), the new curve` : 'The new curve';
  const where = partial ? '' : d.from === d.to ? ` at x = ${at(d.from)}` : ` over x = ${span(d.from, d.to)}`;
  const L = d.largest;
  const R = d.largestRelative;
  let text: string;
  if (!R) {
    text =
      L.difference === 0
        ? `${subject} equals the recorded curve at every compared point${where}.`
        : `${subject} differs from the recorded curve by up to ${size(L.difference)} at x = ${at(L.x)}${where}; the recorded curve's standard error is 0 or missing, so this cannot be judged against its uncertainty.`;
  } else if (d.withinRecordedBand) {
    const detail =
      L.difference === 0
        ? '; it equals the recorded curve at every compared point'
        : R.x === L.x
          ? ` (largest difference ${size(L.difference)} at x = ${at(L.x)}, ${sig(R.z, 2)} standard errors)`
          : ` (largest difference ${size(L.difference)} at x = ${at(L.x)}; at most ${sig(R.z, 2)} standard errors, at x = ${at(R.x)})`;
    text = `${subject} stays within ${band} everywhere${where}${detail}.`;
  } else {
    const o = d.outside;
    const first = o[0] as Stretch;
    const lastStretch = o[o.length - 1] as Stretch;
    const leaves =
      o.length > MAX_LISTED_STRETCHES
        ? `in ${o.length} stretches between x = ${at(first.from)} and ${at(lastStretch.to)}`
        : o.length === 1 && first.from === first.to
          ? `at x = ${at(first.from)}`
          : `for x = ${listWords(o.map((s) => span(s.from, s.to)))}`;
    const direction = R.difference > 0 ? 'above' : 'below';
    const also = R.x === L.x || size(L.difference) === size(R.difference) ? '' : `; the largest difference is ${size(L.difference)}, at x = ${at(L.x)}`;
    text = `${subject} moves by up to ${sig(R.z, 2)} standard errors near x = ${at(R.x)} (${size(R.difference)} ${direction} the recorded curve${also}); it leaves ${band} ${leaves}.`;
  }
  if (R && d.unjudged > 0) {
    text += ` At ${d.unjudged} of the ${d.points} compared points the recorded curve's standard error is 0 or missing; the difference there cannot be judged.`;
  }
  return text;
}

/** A number for JSON: null when not finite. */
const jsonNumber = (v: number): number | null => (Number.isFinite(v) ? v : null);

/**
 * The drift as plain JSON (the record's `drift`, and `knotwise compare --json`'s with the
 * interpolation bound added): non-finite numbers as null. Example: driftJson(d).words.
 */
export function driftJson(d: Drift): Record<string, unknown> {
  return {
    from: d.from,
    to: d.to,
    points: d.points,
    largest: { x: d.largest.x, difference: jsonNumber(d.largest.difference) },
    largestRelative: d.largestRelative ? { x: d.largestRelative.x, z: jsonNumber(d.largestRelative.z), difference: jsonNumber(d.largestRelative.difference) } : null,
    withinRecordedBand: d.withinRecordedBand,
    outside: d.outside.map((o) => ({ from: o.from, to: o.to })),
    words: d.words,
  };
}
