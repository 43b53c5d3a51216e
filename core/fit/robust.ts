/**
 * Huber M-estimation of a curve in a row basis by iteratively reweighted least squares.
 *
 * Estimator: minimise sum_i rho(r_i / s) with Huber's rho (Huber 1964, "Robust estimation
 * of a location parameter", Annals of Mathematical Statistics 35, 73-101): quadratic for
 * |u| <= k, linear beyond, i.e. weights psi(u) / u = min(1, k / |u|). Default tuning
 * constant k = 1.345 (95 % efficiency at the normal; Holland & Welsch 1977). The scale s
 * is re-estimated each iteration as median |r| / 0.6745 (the MAD about zero of the
 * residuals of a fit with an intercept), and the loop stops when the relative change of the
 * residual vector sqrt(sum (r_old - r)^2 / sum r_old^2) falls below ROBUST_TOLERANCE. This
 * is the algorithm of MASS::rlm with psi = psi.huber and its default scale.est = "MAD",
 * initial least-squares fit and prior weights as inverse variances (Venables & Ripley,
 * Modern Applied Statistics with S, 4th ed., 2002, section 6.5), which the reference tests
 * compare with. Shape constraints make each step a constrained least-squares problem; the
 * iteration is then a majorise-minimise scheme for the constrained convex objective.
 *
 * Standard errors (for bands) follow Huber's (1981, Robust Statistics, section 7.6)
 * correction as in MASS's summary.rlm (method "XtX"): Var(theta) = tau^2 (B'WB)^-1 with W
 * the prior weights, tau = sqrt(sum psi(u)^2 s^2 / (n - p)) kappa / mean(psi'(u)),
 * kappa = 1 + p var(psi') / (n mean(psi')^2).
 */
import type { CachedRows } from './cachedRows';
import type { LinearSystem, StepSolution } from './linearSystem';

/** Huber's tuning constant giving 95 % asymptotic efficiency at the normal distribution. */
export const HUBER_K = 1.345;
/** Relative change of the residual vector below which the iteration stops. */
export const ROBUST_TOLERANCE = 1e-10;
/** Cap on reweighting iterations. */
export const MAX_ROBUST_ITERATIONS = 200;
/**
 * A robust scale below this fraction of the root mean square of the least-squares residuals
 * counts as 0: more than half the rows lie on the curve to rounding, and the weights are
 * undefined (MASS::rlm stops at a scale of exactly 0).
 */
export const ROBUST_SCALE_FLOOR = 1e-9;
/** MAD consistency constant at the normal distribution, as in MASS::rlm (0.6745 = qnorm(0.75) rounded). */
export const MAD_CONSTANT = 0.6745;

/** Outcome of `huberIrls`. */
export interface HuberResult {
  readonly theta: Float64Array;
  readonly fitted: Float64Array;
  /** Huber weights min(1, k s / |sqrt(w) r|) used in the last solve. */
  readonly weights: Float64Array;
  /** Robust scale used in the last solve. */
  readonly scale: number;
  readonly solution: StepSolution;
  /** tau / s: the factor by which Huber's standard errors exceed s sqrt(b'(B'WB)^-1 b). */
  readonly seFactor: number;
  readonly iterations: number;
  readonly converged: boolean;
  readonly problem?: string;
}

/**
 * Huber M-estimate with the MAD scale by IRLS (see the module comment). `w` are prior
 * weights (inverse variances; 0 leaves a row out). `freq`, if given, are whole-number
 * frequencies (bootstrap multiplicities, 0 for rows left out): a row of frequency c counts
 * as c copies of itself, in the median as in the sums, which for a robust fit differs from
 * a prior weight c. Scratch allocated once, O(n); each iteration O(n width^2 + p^3) plus an
 * O(n) median by selection. Throws FitError when a weighted least-squares step is rank
 * deficient. Example: huberIrls(new CachedRows(basis, x), system, y, ones, HUBER_K).weights.
 */
export function huberIrls(rows: CachedRows, system: LinearSystem, y: Float64Array, w: Float64Array, k: number, freq?: Float64Array): HuberResult {
  const n = rows.n;
  const p = rows.size;
  const g = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  const fitted = new Float64Array(n);
  const resid = new Float64Array(n);
  const old = new Float64Array(n);
  const hw = new Float64Array(n).fill(1);
  const total = new Float64Array(n);
  // Frequency of each row (0 where the prior weight is 0), and the rows' total count.
  const f = new Float64Array(n);
  let used = 0;
  for (let i = 0; i < n; i++) {
    const c = (w[i] as number) > 0 ? (freq ? Math.round(freq[i] as number) : 1) : 0;
    f[i] = c;
    used += c;
    total[i] = c * (w[i] as number);
  }
  const scratch = new Float64Array(used);
  rows.gram(total, y, g, rhs);
  let solution = system.solve(g, rhs);
  const residuals = (theta: Float64Array): void => {
    rows.apply(theta, fitted);
    for (let i = 0; i < n; i++) resid[i] = Math.sqrt(w[i] as number) * ((y[i] as number) - (fitted[i] as number));
  };
  residuals(solution.theta);
  let rms = 0;
  for (let i = 0; i < n; i++) rms += (f[i] as number) * (resid[i] as number) ** 2;
  const floor = ROBUST_SCALE_FLOOR * Math.sqrt(rms / Math.max(1, used));
  let scale = 0;
  let iterations = 0;
  let converged = false;
  let problem: string | undefined;
  while (iterations < MAX_ROBUST_ITERATIONS) {
    iterations++;
    scale = medianAbs(resid, f, scratch, f) / MAD_CONSTANT;
    if (!(scale > floor)) {
      // More than half the rows are fitted exactly: the weights are undefined; keep the fit of the last step (as MASS::rlm).
      converged = true;
      problem = 'more than half of the rows lie on the curve to rounding, so the robust scale is 0; the fit of the last reweighting step was kept';
      scale = 0;
      // Rows on the curve count as fully weighted; rows off it keep the weight of the last step.
      for (let i = 0; i < n; i++) if (Math.abs(resid[i] as number) <= 10 * floor) hw[i] = 1;
      break;
    }
    for (let i = 0; i < n; i++) {
      const a = Math.abs(resid[i] as number) / scale;
      hw[i] = a > k ? k / a : 1;
      total[i] = (f[i] as number) * (w[i] as number) * (hw[i] as number);
    }
    rows.gram(total, y, g, rhs);
    solution = system.solve(g, rhs);
    old.set(resid);
    residuals(solution.theta);
    let num = 0;
    let den = 0;
    for (let i = 0; i < n; i++) {
      num += (f[i] as number) * ((old[i] as number) - (resid[i] as number)) ** 2;
      den += (f[i] as number) * (old[i] as number) ** 2;
    }
    if (Math.sqrt(num / Math.max(1e-20, den)) <= ROBUST_TOLERANCE) {
      converged = true;
      break;
    }
  }
  if (!converged) problem = `the Huber weights were still changing after ${MAX_ROBUST_ITERATIONS} iterations`;
  // Huber's correction (summary.rlm, method "XtX").
  let sumPsi2 = 0;
  let m1 = 0;
  for (let i = 0; i < n; i++) {
    const c = f[i] as number;
    if (c === 0) continue;
    const u = scale > 0 ? (resid[i] as number) / scale : 0;
    const psi = Math.abs(u) > k ? k * Math.sign(u) : u;
    sumPsi2 += c * psi * psi;
    if (Math.abs(u) <= k) m1 += c;
  }
  const mean = m1 / used;
  const varPsiPrime = used > 1 ? (m1 * (1 - mean) * (1 - mean) + (used - m1) * mean * mean) / (used - 1) : 0;
  const kappa = 1 + (system.q * varPsiPrime) / (used * mean * mean);
  const seFactor = scale > 0 && used > system.q ? (Math.sqrt(sumPsi2 / (used - system.q)) * kappa) / mean : 1;
  const out: HuberResult = { theta: solution.theta, fitted, weights: hw, scale, solution, seFactor, iterations, converged };
  return problem !== undefined ? { ...out, problem } : out;
}

/**
 * Median of |r_i| over the rows with w_i > 0 (R's median: mean of the two middle values for
 * an even count), each row counted freq_i times when `freq` (whole numbers) is given, by
 * Hoare's selection (Hoare 1961, "Algorithm 65: Find", CACM 4(7)) with a median-of-three
 * pivot: O(n) expected, no allocation (`scratch` must hold the total count).
 * Example: medianAbs(Float64Array.of(-3, 1, 2), undefined, new Float64Array(3)) = 2.
 */
export function medianAbs(r: Float64Array, w: Float64Array | undefined, scratch: Float64Array, freq?: Float64Array): number {
  let m = 0;
  for (let i = 0; i < r.length; i++) {
    if (w && !((w[i] as number) > 0)) continue;
    const a = Math.abs(r[i] as number);
    const c = freq ? (freq[i] as number) : 1;
    for (let j = 0; j < c; j++) scratch[m++] = a;
  }
  if (m === 0) return NaN;
  const hi = select(scratch, m, m >> 1);
  if (m % 2 === 1) return hi;
  // The lower middle value is the largest entry left of position m/2 after selection.
  let lo = -Infinity;
  for (let i = 0; i < m >> 1; i++) if ((scratch[i] as number) > lo) lo = scratch[i] as number;
  return 0.5 * (lo + hi);
}

/** The k-th smallest (0-based) of a[0..m), partially reordering a (Hoare partition, which splits runs of ties evenly). */
function select(a: Float64Array, m: number, k: number): number {
  let left = 0;
  let right = m - 1;
  while (right > left) {
    const x = a[left] as number;
    const y = a[(left + right) >> 1] as number;
    const z = a[right] as number;
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = left;
    let j = right;
    while (i <= j) {
      while ((a[i] as number) < pivot) i++;
      while ((a[j] as number) > pivot) j--;
      if (i <= j) {
        const t = a[i] as number;
        a[i] = a[j] as number;
        a[j] = t;
        i++;
        j--;
      }
    }
    // Now a[left..j] <= pivot <= a[i..right], and a[j+1..i-1] equal the pivot.
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else return a[k] as number;
  }
  return a[k] as number;
}
