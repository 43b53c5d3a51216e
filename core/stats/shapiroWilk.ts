import { InputError } from '../errors';
import { pnorm, qnorm } from './distributions';

/** Largest sample the Royston (1995) approximation covers. */
export const SHAPIRO_WILK_MAX_N = 5000;

/** Result of the Shapiro-Wilk test of normality. */
export interface ShapiroWilkResult {
  /** W in (0, 1]; close to 1 for normal data. */
  readonly statistic: number;
  /** Upper-tail p-value of the normalising transformation of W. */
  readonly pValue: number;
  /** Number of values tested (at most 5000). */
  readonly n: number;
  /** Present when the values were subsampled. */
  readonly note?: string;
}

// Polynomial coefficients of Royston (1995), Remark AS R94, in increasing powers.
/** a_n as a polynomial in 1/sqrt(n), added to the normalised m_n. */
const C1 = [0, 0.221157, -0.147981, -2.07119, 4.434685, -2.706056];
/** a_(n-1) likewise. */
const C2 = [0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633];
/** Mean and log standard deviation of -log(gamma - log(1 - W)) for 4 <= n <= 11, in n. */
const C3 = [0.544, -0.39978, 0.025054, -6.714e-4];
const C4 = [1.3822, -0.77857, 0.062767, -0.0020322];
/** gamma(n) for 4 <= n <= 11. */
const G = [-2.273, 0.459];
/** Mean and log standard deviation of log(1 - W) for n >= 12, in log n. */
const C5 = [-1.5861, -0.31082, -0.083751, 0.0038915];
const C6 = [-0.4803, -0.082676, 0.0030302];

function poly(c: readonly number[], x: number): number {
  let s = 0;
  for (let i = c.length - 1; i >= 0; i--) s = s * x + (c[i] as number);
  return s;
}

/**
 * Shapiro-Wilk W test of normality: Shapiro & Wilk (1965), "An analysis of variance test
 * for normality (complete samples)", Biometrika 52, 591-611, with the coefficients and
 * p-value approximation of Royston (1995), "Remark AS R94: A remark on Algorithm AS 181:
 * The W-test for normality", Applied Statistics 44(4), 547-551 (as R's shapiro.test):
 * - coefficients from m_i = Phi^-1((i - 3/8) / (n + 1/4)), with polynomial corrections in
 *   1/sqrt(n) for the two most extreme ones (one when n <= 5), a_1 = sqrt(1/2) for n = 3;
 * - W as the squared correlation of the ordered sample with a, with 1 - W formed without
 *   cancellation;
 * - p-value exact for n = 3, otherwise from a normal approximation of
 *   -log(gamma - log(1 - W)) (n <= 11) or log(1 - W) (n >= 12).
 * For n > 5000 a deterministic, evenly spaced subsample of 5000 values (by row position:
 * rows round(k (n - 1) / 4999), k = 0..4999) is tested and `note` says so.
 * Cost O(n log n) for the sort plus n normal quantiles.
 *
 * Throws InputError for fewer than 3 values, non-finite values, or all values equal.
 * Example: shapiroWilk(Float64Array.of(2.1, 3.4, 1.9, 5.6, 4.4, 3.0)).statistic is close
 * to 1 (no evidence against normality).
 */
export function shapiroWilk(values: Float64Array): ShapiroWilkResult {
  const total = values.length;
  if (total < 3) throw new InputError(`the Shapiro-Wilk test needs at least 3 values; got ${total}`);
  for (let i = 0; i < total; i++) {
    const v = values[i] as number;
    if (!Number.isFinite(v)) throw new InputError(`Shapiro-Wilk: value ${i + 1} is not a finite number (${v})`);
  }
  let x: Float64Array;
  let note: string | undefined;
  if (total > SHAPIRO_WILK_MAX_N) {
    const m = SHAPIRO_WILK_MAX_N;
    x = new Float64Array(m);
    for (let k = 0; k < m; k++) x[k] = values[Math.round((k * (total - 1)) / (m - 1))] as number;
    note = `Shapiro-Wilk covers at most ${m} values; tested ${m} of ${total} rows, evenly spaced by row position.`;
  } else {
    x = Float64Array.from(values);
  }
  x.sort();
  const n = x.length;
  const range = (x[n - 1] as number) - (x[0] as number);
  if (!(range > 0)) throw new InputError(`Shapiro-Wilk: all ${n} values are equal, so normality cannot be tested`);
  const a = coefficients(n);
  const { w, oneMinusW } = statistic(x, a, range);
  const pValue = pValueOf(oneMinusW, w, n);
  return note === undefined ? { statistic: w, pValue, n } : { statistic: w, pValue, n, note };
}

/** The first half of the antisymmetric coefficients a (a_i for the i-th smallest, as positive numbers). */
function coefficients(n: number): Float64Array {
  const half = Math.floor(n / 2);
  const a = new Float64Array(half);
  if (n === 3) {
    a[0] = Math.SQRT1_2;
    return a;
  }
  const m = new Float64Array(half);
  let summ2 = 0;
  for (let i = 0; i < half; i++) {
    const v = qnorm((i + 1 - 0.375) / (n + 0.25));
    m[i] = v;
    summ2 += v * v;
  }
  summ2 *= 2;
  const ssumm2 = Math.sqrt(summ2);
  const rsn = 1 / Math.sqrt(n);
  const m0 = m[0] as number;
  const a1 = poly(C1, rsn) - m0 / ssumm2;
  let first: number;
  let fac: number;
  if (n > 5) {
    const m1 = m[1] as number;
    const a2 = -m1 / ssumm2 + poly(C2, rsn);
    fac = Math.sqrt((summ2 - 2 * m0 * m0 - 2 * m1 * m1) / (1 - 2 * a1 * a1 - 2 * a2 * a2));
    a[1] = a2;
    first = 2;
  } else {
    fac = Math.sqrt((summ2 - 2 * m0 * m0) / (1 - 2 * a1 * a1));
    first = 1;
  }
  a[0] = a1;
  for (let i = first; i < half; i++) a[i] = -(m[i] as number) / fac;
  return a;
}

/** W and 1 - W as the squared correlation between the sorted sample and the coefficients. */
function statistic(x: Float64Array, a: Float64Array, range: number): { w: number; oneMinusW: number } {
  const n = x.length;
  // Full coefficient of the i-th order statistic: -a_i in the lower half, +a in the upper.
  const coef = (i: number): number => {
    const j = n - 1 - i;
    if (i === j) return 0;
    return i < j ? -(a[i] as number) : (a[j] as number);
  };
  let sa = 0;
  let sx = 0;
  for (let i = 0; i < n; i++) {
    sa += coef(i);
    sx += (x[i] as number) / range;
  }
  sa /= n;
  sx /= n;
  let ssa = 0;
  let ssx = 0;
  let sax = 0;
  for (let i = 0; i < n; i++) {
    const ai = coef(i) - sa;
    const xi = (x[i] as number) / range - sx;
    ssa += ai * ai;
    ssx += xi * xi;
    sax += ai * xi;
  }
  // 1 - r^2 = (sqrt(ssa ssx) - sax)(sqrt(ssa ssx) + sax) / (ssa ssx), exact for W near 1.
  const root = Math.sqrt(ssa * ssx);
  const oneMinusW = ((root - sax) * (root + sax)) / (ssa * ssx);
  return { w: 1 - oneMinusW, oneMinusW };
}

/** Royston's (1995) p-value of W. */
function pValueOf(oneMinusW: number, w: number, n: number): number {
  if (n === 3) {
    // Exact: P = (6 / pi) (asin(sqrt(W)) - asin(sqrt(3/4))).
    return Math.max(0, (6 / Math.PI) * (Math.asin(Math.sqrt(w)) - Math.PI / 3));
  }
  let y = Math.log(oneMinusW);
  let mean: number;
  let sd: number;
  if (n <= 11) {
    const gamma = poly(G, n);
    if (y >= gamma) return 0; // beyond the transformation's range: W is extremely small
    y = -Math.log(gamma - y);
    mean = poly(C3, n);
    sd = Math.exp(poly(C4, n));
  } else {
    const logN = Math.log(n);
    mean = poly(C5, logN);
    sd = Math.exp(poly(C6, logN));
  }
  return pnorm((y - mean) / sd, false);
}
