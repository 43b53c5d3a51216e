/**
 * Effect sizes of residual checks: how large a departure is, beside the test that says
 * whether it is there at all. At large n a test finds departures far too small to matter;
 * these measures say whether they do (core/analysis/diagnose.ts compares them with stated
 * thresholds).
 */
import { InputError } from '../errors';
import { pnorm } from './distributions';

/**
 * Lag-1 autocorrelation of a series around zero (residuals have mean about 0):
 * r1 = sum_t e_t e_(t-1) / sum_t e_t^2 (Box & Jenkins 1976, Time Series Analysis, section
 * 2.1.4, without centring, as residuals need none). Durbin-Watson's d is close to 2 (1 - r1)
 * (Durbin & Watson 1950, section 2). NaN for fewer than 2 values or all zeros. O(n).
 * Example: lag1Correlation(Float64Array.of(1, 1, -1, -1)) = (1 - 1 + 1) / 4 = 0.25.
 */
export function lag1Correlation(series: Float64Array): number {
  const n = series.length;
  if (n < 2) return NaN;
  let ss = 0;
  let cross = 0;
  for (let i = 0; i < n; i++) {
    const v = series[i] as number;
    ss += v * v;
    if (i > 0) cross += v * (series[i - 1] as number);
  }
  return ss > 0 ? cross / ss : NaN;
}

/** Sample skewness and excess kurtosis. */
export interface Shape {
  /** g1 = m3 / m2^(3/2): 0 for a symmetric distribution. */
  readonly skewness: number;
  /** g2 = m4 / m2^2 - 3: 0 for a normal distribution, above 0 for heavier tails. */
  readonly excessKurtosis: number;
}

/**
 * Moment skewness g1 = m3 / m2^(3/2) and excess kurtosis g2 = m4 / m2^2 - 3 of the values,
 * with m_k the k-th central moment (divisor n): the "type 1" estimators of Joanes & Gill
 * (1998), "Comparing measures of sample skewness and kurtosis", The Statistician 47(1),
 * 183-189. Two passes (mean, then moments), O(n). NaN for fewer than 2 values or no spread.
 * Example: moments(Float64Array.of(1, 2, 3)) -> { skewness: 0, excessKurtosis: -1.5 }.
 */
export function moments(values: Float64Array): Shape {
  const n = values.length;
  if (n < 2) return { skewness: NaN, excessKurtosis: NaN };
  let sum = 0;
  // Indexed loops over the rows: they run fast before the optimising compiler gets to them, which for-of loops do not.
  for (let i = 0; i < n; i++) sum += values[i] as number;
  const mean = sum / n;
  let m2 = 0;
  let m3 = 0;
  let m4 = 0;
  for (let i = 0; i < n; i++) {
    const d = (values[i] as number) - mean;
    const d2 = d * d;
    m2 += d2;
    m3 += d2 * d;
    m4 += d2 * d2;
  }
  m2 /= n;
  m3 /= n;
  m4 /= n;
  if (!(m2 > 0)) return { skewness: NaN, excessKurtosis: NaN };
  return { skewness: m3 / Math.pow(m2, 1.5), excessKurtosis: m4 / (m2 * m2) - 3 };
}

/**
 * The spread ratio of residuals along x: the root mean square of the residuals in each of
 * `parts` consecutive groups of (nearly) equal size in x order, largest over smallest. 1
 * when the spread is the same everywhere; 2 when one part scatters twice as widely as
 * another. A measure of size for the Breusch-Pagan test, in the spirit of Goldfeld & Quandt
 * (1965), "Some tests for homoscedasticity", JASA 60, 539-547 (variances of the low and high
 * parts of the ordered data compared). NaN with fewer rows than parts or a part without
 * spread. O(n).
 * Example: spreadRatio(Float64Array.of(1, -1, 2, -2, 3, -3)) = 3.
 */
export function spreadRatio(residualsInXOrder: Float64Array, parts = 3): number {
  const n = residualsInXOrder.length;
  if (!(Number.isInteger(parts) && parts >= 2)) throw new InputError(`spreadRatio: parts must be a whole number >= 2, got ${parts}`);
  if (n < parts) return NaN;
  let lo = Infinity;
  let hi = 0;
  for (let k = 0; k < parts; k++) {
    const start = Math.floor((k * n) / parts);
    const end = Math.floor(((k + 1) * n) / parts);
    let ss = 0;
    for (let i = start; i < end; i++) {
      const v = residualsInXOrder[i] as number;
      ss += v * v;
    }
    const rms = Math.sqrt(ss / (end - start));
    lo = Math.min(lo, rms);
    hi = Math.max(hi, rms);
  }
  return lo > 0 ? hi / lo : NaN;
}

/** Result of the runs test on the signs of a series. */
export interface RunsResult {
  /** Number of runs of equal sign (zeros left out). */
  readonly runs: number;
  /** Expected number of runs for a random order of the same signs. */
  readonly expected: number;
  /** (runs - expected) / its standard deviation: negative when signs come in long runs. */
  readonly z: number;
  /** P(Z <= z): small when there are too few runs (neighbours share their sign: drift). */
  readonly pValue: number;
}

/**
 * Wald-Wolfowitz runs test on the signs of a series (Wald & Wolfowitz 1940, "On a test
 * whether two samples are from the same population", Annals of Mathematical Statistics
 * 11(2), 147-162), by its normal approximation: with n1 positive and n2 negative values
 * (zeros left out), N = n1 + n2, E R = 2 n1 n2 / N + 1 and
 * Var R = 2 n1 n2 (2 n1 n2 - N) / (N^2 (N - 1)). One-sided against too few runs, as drift
 * in acquisition order makes neighbours share their sign. NaN fields when one sign is
 * missing or N < 3. O(n).
 * Example: runsTest(Float64Array.of(1, 2, 3, -1, -2, -3)).runs = 2.
 */
export function runsTest(series: Float64Array): RunsResult {
  let n1 = 0;
  let n2 = 0;
  let runs = 0;
  let last = 0;
  for (let i = 0; i < series.length; i++) {
    const v = series[i] as number;
    const s = v > 0 ? 1 : v < 0 ? -1 : 0;
    if (s === 0) continue;
    if (s > 0) n1++;
    else n2++;
    if (s !== last) runs++;
    last = s;
  }
  const total = n1 + n2;
  if (n1 === 0 || n2 === 0 || total < 3) return { runs, expected: NaN, z: NaN, pValue: NaN };
  const product = 2 * n1 * n2;
  const expected = product / total + 1;
  const variance = (product * (product - total)) / (total * total * (total - 1));
  const z = variance > 0 ? (runs - expected) / Math.sqrt(variance) : NaN;
  return { runs, expected, z, pValue: Number.isFinite(z) ? pnorm(z) : NaN };
}
