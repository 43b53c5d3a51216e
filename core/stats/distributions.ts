/**
 * Probability distributions used by the diagnostics and the bands: log-gamma, the
 * regularized incomplete beta and gamma functions, and the normal, Student t,
 * chi-square and F distribution functions, with R's argument conventions
 * (`lowerTail = true` gives P(X <= q), `false` gives P(X > q) without cancellation).
 *
 * Accuracy comes from two devices:
 * - the prefactors x^a y^b / B(a, b) and x^a e^-x / Gamma(a + 1) are evaluated with the
 *   saddle-point form of Loader (2000), "Fast and accurate computation of binomial
 *   probabilities" (technical note), i.e. Stirling's error term and the deviance term
 *   bd0, so that large degrees of freedom lose no digits to cancelling logarithms;
 * - the incomplete gamma function is a series or a continued fraction evaluated with the
 *   modified Lentz method (Press, Teukolsky, Vetterling & Flannery, "Numerical Recipes",
 *   3rd ed. (2007), sections 5.2 and 6.2); the incomplete beta function is the even
 *   contraction of its continued fraction written in lambda = (a + b) y - b (Didonato &
 *   Morris 1992, ACM TOMS 18(3)), which stays accurate when x is close to 1. Each is
 *   evaluated on the side where it converges fast and returns the smaller tail directly.
 * Relative accuracy is about 1e-14 in both tails; every function costs O(1) for moderate
 * parameters and O(sqrt(shape)) iterations for very large shapes.
 */

const LN_SQRT_2PI = 0.918938533204672741780329736406; // log(sqrt(2 pi))
const SQRT_2PI = 2.506628274631000502415765284811;
/** Relative tolerance of the continued fractions and series. */
const SERIES_TOLERANCE = 1e-16;
/** Smallest magnitude allowed in a Lentz denominator (guards against division by zero). */
const LENTZ_FLOOR = 1e-300;

/** Iteration cap of the continued fractions and series: grows like sqrt(shape). */
function iterationLimit(shape: number): number {
  return 1000 + Math.ceil(50 * Math.sqrt(shape));
}

/**
 * Stirling's error: log Gamma(x + 1) - ((x + 1/2) log x - x + log sqrt(2 pi)), x > 0.
 * Asymptotic series for x > 15; below, the exact recurrence
 * err(x) = err(x + 1) + (x + 1/2) log1p(1/x) - 1, whose terms carry about 1e-16 absolute
 * error each (no lgamma differences). O(1).
 */
function stirlingError(x: number): number {
  let shift = 0;
  let v = x;
  while (v <= 15) {
    shift += (v + 0.5) * Math.log1p(1 / v) - 1;
    v += 1;
  }
  const v2 = v * v;
  // 1/(12v) - 1/(360v^3) + 1/(1260v^5) - 1/(1680v^7) + 1/(1188v^9)
  const series = (1 / 12 - (1 / 360 - (1 / 1260 - (1 / 1680 - 1 / 1188 / v2) / v2) / v2) / v2) / v;
  return series + shift;
}

/**
 * Deviance term bd0(x, m) = x log(x / m) + m - x >= 0, with a series for x close to m
 * (Loader 2000, section 2). O(1) to O(20) terms.
 */
function devianceTerm(x: number, m: number): number {
  const d = x - m;
  if (Math.abs(d) < 0.1 * (x + m)) {
    let v = d / (x + m);
    let s = d * v;
    let ej = 2 * x * v;
    v *= v;
    for (let j = 1; j < 1000; j++) {
      ej *= v;
      const next = s + ej / (2 * j + 1);
      if (next === s) return next;
      s = next;
    }
    return s;
  }
  return x * Math.log(x / m) + m - x;
}

/**
 * Natural logarithm of the gamma function for x > 0 (also negative non-integers, by
 * reflection). Uses Stirling's series with the exact recurrence below 15, so the absolute
 * error is about 1e-15 everywhere (relative error is larger only next to the zeros at 1
 * and 2). Cost O(1).
 * Example: lgamma(0.5) = log(sqrt(pi)) = 0.5723649429247001.
 */
export function lgamma(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x === Infinity) return Infinity;
  if (x <= 0) {
    if (Number.isInteger(x)) return Infinity; // poles at 0, -1, -2, ...
    // Reflection: Gamma(x) Gamma(1 - x) = pi / sin(pi x).
    return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - lgamma(1 - x);
  }
  if (x === 1 || x === 2) return 0; // exact zeros, which the sum below misses by an ulp
  return stirlingError(x) + (x - 0.5) * Math.log(x) - x + LN_SQRT_2PI;
}

/**
 * x^a y^b / B(a, b) with y = 1 - x given separately, via Loader's binomial form:
 * dbinom(a; a + b, x) * a b / (a + b) with Stirling errors and deviance terms.
 */
function betaPowerTerm(x: number, y: number, a: number, b: number): number {
  const n = a + b;
  const logTerm = stirlingError(n) - stirlingError(a) - stirlingError(b) - devianceTerm(a, n * x) - devianceTerm(b, n * y);
  return (Math.exp(logTerm) * Math.sqrt((n * a * b) / (2 * Math.PI))) / n;
}

/**
 * I_x(a, b) / (x^a y^b / B(a, b)) by the even contraction of the incomplete beta continued
 * fraction written with lambda = a - (a + b) x = (a + b) y - b, so that nothing cancels
 * when x is close to 1 (Didonato & Morris 1992, "Algorithm 708: Significant digit
 * computation of the incomplete beta function ratios", ACM TOMS 18(3), 360-373, section
 * on the continued fraction). Converges fast for x < (a + 1) / (a + b + 2), where
 * lambda > -1.
 */
function betaContinuedFraction(x: number, y: number, a: number, b: number): number {
  const limit = iterationLimit(Math.max(a, b));
  // lambda from whichever of x, y is small, where it is known to full relative accuracy.
  const lambda = x <= 0.5 ? a - (a + b) * x : (a + b) * y - b;
  const c = 1 + lambda;
  const c0 = b / a;
  const c1 = 1 + 1 / a;
  const yp1 = y + 1;
  let p = 1;
  let s = a + 1;
  let an = 0;
  let bn = 1;
  let anp1 = 1;
  let bnp1 = c / c1;
  let r = c1 / c;
  for (let n = 1; n <= limit; n++) {
    let t = n / a;
    const w = n * (b - n) * x;
    let e = a / s;
    const alpha = p * (p + c0) * e * e * (w * x);
    e = (1 + t) / (c1 + t + t);
    const beta = n + w / s + e * (c + n * yp1);
    p = 1 + t;
    s += 2;
    t = alpha * an + beta * anp1;
    an = anp1;
    anp1 = t;
    t = alpha * bn + beta * bnp1;
    bn = bnp1;
    bnp1 = t;
    const r0 = r;
    r = anp1 / bnp1;
    if (Math.abs(r - r0) <= SERIES_TOLERANCE * 4 * r) return r;
    // Rescale so the recurrences neither overflow nor underflow.
    an /= bnp1;
    bn /= bnp1;
    anp1 = r;
    bnp1 = 1;
  }
  throw new Error(`incomplete beta continued fraction did not converge (x=${x}, a=${a}, b=${b})`);
}

/**
 * Regularized incomplete beta with the complement y = 1 - x supplied exactly, so callers
 * with a small y (or a small x) keep full relative accuracy. Returns the lower tail
 * I_x(a, b) or the upper tail 1 - I_x(a, b).
 */
function betaTail(x: number, y: number, a: number, b: number, lowerTail: boolean): number {
  if (x <= 0) return lowerTail ? 0 : 1;
  if (y <= 0) return lowerTail ? 1 : 0;
  // The fraction converges fast below the mean; above it, use I_x(a,b) = 1 - I_y(b,a).
  if (x < (a + 1) / (a + b + 2)) {
    const lower = betaPowerTerm(x, y, a, b) * betaContinuedFraction(x, y, a, b);
    return lowerTail ? lower : 1 - lower;
  }
  const upper = betaPowerTerm(y, x, b, a) * betaContinuedFraction(y, x, b, a);
  return lowerTail ? 1 - upper : upper;
}

/**
 * Regularized incomplete beta function I_x(a, b) (the beta distribution function), or its
 * complement when `lowerTail` is false. Continued fraction in the form of Didonato &
 * Morris (1992) with Loader's (2000) prefactor, on the faster-converging side of
 * I_x(a, b) = 1 - I_{1-x}(b, a). Cost O(1) to O(sqrt(max(a, b))).
 * Example: pbeta(0.5, 2, 3) = 0.6875.
 */
export function pbeta(x: number, a: number, b: number, lowerTail = true): number {
  checkPositive('pbeta', 'a', a);
  checkPositive('pbeta', 'b', b);
  if (Number.isNaN(x)) return NaN;
  if (x <= 0) return lowerTail ? 0 : 1;
  if (x >= 1) return lowerTail ? 1 : 0;
  return betaTail(x, 1 - x, a, b, lowerTail);
}

/** x^a e^-x / Gamma(a + 1) via Loader's Poisson form. */
function poissonTerm(a: number, x: number): number {
  return Math.exp(-stirlingError(a) - devianceTerm(a, x)) / Math.sqrt(2 * Math.PI * a);
}

/**
 * Regularized incomplete gamma function P(a, x) = gamma(a, x) / Gamma(a) (the gamma
 * distribution function with unit scale), or Q(a, x) = 1 - P(a, x) when `lowerTail` is
 * false. Series for x < a + 1, Legendre's continued fraction otherwise (Numerical Recipes
 * 3rd ed., section 6.2). Cost O(1) to O(sqrt(a)).
 * Example: pgamma(1, 1) = 1 - exp(-1) = 0.6321205588285577.
 */
export function pgamma(x: number, a: number, lowerTail = true): number {
  checkPositive('pgamma', 'shape', a);
  if (Number.isNaN(x)) return NaN;
  if (x <= 0) return lowerTail ? 0 : 1;
  if (x === Infinity) return lowerTail ? 1 : 0;
  const limit = iterationLimit(a);
  if (x < a + 1) {
    // P = x^a e^-x / Gamma(a+1) * sum_k x^k / ((a+1)...(a+k)).
    let term = 1;
    let sum = 1;
    let ap = a;
    let converged = false;
    for (let k = 1; k <= limit; k++) {
      ap += 1;
      term *= x / ap;
      sum += term;
      if (term < sum * SERIES_TOLERANCE) {
        converged = true;
        break;
      }
    }
    if (!converged) throw new Error(`incomplete gamma series did not converge (x=${x}, a=${a})`);
    const lower = poissonTerm(a, x) * sum;
    return lowerTail ? lower : 1 - lower;
  }
  // Q = x^a e^-x / Gamma(a) * 1 / (x + 1 - a - 1(1 - a) / (x + 3 - a - 2(2 - a) / ...)).
  let b = x + 1 - a;
  let c = 1 / LENTZ_FLOOR;
  let d = 1 / b;
  let h = d;
  let converged = false;
  for (let i = 1; i <= limit; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < LENTZ_FLOOR) d = LENTZ_FLOOR;
    c = b + an / c;
    if (Math.abs(c) < LENTZ_FLOOR) c = LENTZ_FLOOR;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) <= SERIES_TOLERANCE) {
      converged = true;
      break;
    }
  }
  if (!converged) throw new Error(`incomplete gamma continued fraction did not converge (x=${x}, a=${a})`);
  const upper = a * poissonTerm(a, x) * h;
  return lowerTail ? 1 - upper : upper;
}

/**
 * Standard normal distribution function, P(Z <= q) (or P(Z > q) when `lowerTail` is
 * false), from the identity P(Z > |q|) = Q(1/2, q^2 / 2) / 2 (Z^2 is chi-square with one
 * df; Abramowitz & Stegun 1964, "Handbook of Mathematical Functions", chapter 26), so both
 * tails keep full relative accuracy (about 1e-15; 1e-13 beyond |q| = 10, where rounding
 * q^2 shows).
 * Cost O(1) (at most a few dozen terms).
 * Example: pnorm(1.959963984540054) = 0.975.
 */
export function pnorm(q: number, lowerTail = true): number {
  if (Number.isNaN(q)) return NaN;
  if (q === 0) return 0.5;
  const smallTail = 0.5 * pgamma(0.5 * q * q, 0.5, false); // P(Z > |q|)
  const wantSmall = q < 0 === lowerTail;
  return wantSmall ? smallTail : 1 - smallTail;
}

/**
 * Standard normal density exp(-x^2 / 2) / sqrt(2 pi). Cost O(1).
 * Example: dnorm(0) = 0.3989422804014327.
 */
export function dnorm(x: number): number {
  return Math.exp(-0.5 * x * x) / SQRT_2PI;
}

// Coefficients of Wichura (1988), Algorithm AS 241 PPND16, Applied Statistics 37(3).
const AS241_A = [3.387132872796366608, 133.14166789178437745, 1971.5909503065514427, 13731.693765509461125, 45921.953931549871457, 67265.770927008700853, 33430.575583588128105, 2509.0809287301226727];
const AS241_B = [1, 42.313330701600911252, 687.1870074920579083, 5394.1960214247511077, 21213.794301586595867, 39307.89580009271061, 28729.085735721942674, 5226.495278852854561];
const AS241_C = [
  1.42343711074968357734, 4.6303378461565452959, 5.7694972214606914055, 3.64784832476320460504, 1.27045825245236838258, 0.24178072517745061177, 0.0227238449892691845833, 7.7454501427834140764e-4,
];
const AS241_D = [1, 2.05319162663775882187, 1.6763848301838038494, 0.68976733498510000455, 0.14810397642748007459, 0.0151986665636164571966, 5.475938084995344946e-4, 1.05075007164441684324e-9];
const AS241_E = [
  6.6579046435011037772, 5.4637849111641143699, 1.7848265399172913358, 0.29656057182850489123, 0.026532189526576123093, 0.0012426609473880784386, 2.71155556874348757815e-5, 2.01033439929228813265e-7,
];
const AS241_F = [1, 0.59983220655588793769, 0.13692988092273580531, 0.0148753612908506148525, 7.868691311456132591e-4, 1.8463183175100546818e-5, 1.4215117583164458887e-7, 2.04426310338993978564e-15];

function horner(c: readonly number[], x: number): number {
  let s = 0;
  for (let i = c.length - 1; i >= 0; i--) s = s * x + (c[i] as number);
  return s;
}

/**
 * Standard normal quantile: z with P(Z <= z) = p (or P(Z > z) = p when `lowerTail` is
 * false). Wichura (1988), "Algorithm AS 241: The percentage points of the normal
 * distribution", Applied Statistics 37(3), 477-484 (PPND16, about 1e-16 relative).
 * Cost O(1).
 * Example: qnorm(0.975) = 1.959963984540054.
 */
export function qnorm(p: number, lowerTail = true): number {
  checkProbability('qnorm', p);
  // q is the distance of the lower-tail probability from 1/2; r the smaller tail.
  const q = lowerTail ? p - 0.5 : 0.5 - p;
  if (Math.abs(q) <= 0.425) {
    const r = 0.180625 - q * q;
    return (q * horner(AS241_A, r)) / horner(AS241_B, r);
  }
  const tail = q < 0 === lowerTail ? p : 1 - p; // the smaller tail
  if (tail <= 0) return q < 0 ? -Infinity : Infinity;
  let r = Math.sqrt(-Math.log(tail));
  let z: number;
  if (r <= 5) {
    r -= 1.6;
    z = horner(AS241_C, r) / horner(AS241_D, r);
  } else {
    r -= 5;
    z = horner(AS241_E, r) / horner(AS241_F, r);
  }
  return q < 0 ? -z : z;
}

/**
 * Student t distribution function with `df` > 0 degrees of freedom (non-integer allowed,
 * Infinity gives the normal): P(T <= q), or P(T > q) when `lowerTail` is false. Uses
 * P(|T| > |q|) = I_{df/(df+q^2)}(df/2, 1/2) (Abramowitz & Stegun 1964, section 26.7), with
 * the complement q^2/(df+q^2) supplied exactly. About 1e-14 relative in both tails.
 * Cost O(1) to O(sqrt(df)).
 * Example: pt(2.228138851986274, 10, false) = 0.025.
 */
export function pt(q: number, df: number, lowerTail = true): number {
  checkPositive('pt', 'df', df);
  if (Number.isNaN(q)) return NaN;
  if (df === Infinity) return pnorm(q, lowerTail);
  let tail: number; // P(T > |q|)
  if (!Number.isFinite(q)) tail = 0;
  else {
    const ratio = (q / df) * q; // q^2 / df without overflow for huge q
    const x = 1 / (1 + ratio); // df / (df + q^2)
    const y = ratio / (1 + ratio); // q^2 / (df + q^2)
    tail = 0.5 * betaTail(x, y, df / 2, 0.5, true);
  }
  const wantSmall = q < 0 === lowerTail;
  return wantSmall ? tail : 1 - tail;
}

/** Student t density, used only for the quantile's Newton steps (modest accuracy suffices). */
function dt(t: number, df: number): number {
  const half = df / 2;
  const logDensity = lgamma(half + 0.5) - lgamma(half) - 0.5 * Math.log(df * Math.PI) - (half + 0.5) * Math.log1p((t / df) * t);
  return Math.exp(logDensity);
}

/** Upper-tail Student t probability P(T > t) for t >= 0. */
function tUpper(t: number, df: number): number {
  return pt(t, df, false);
}

/** Iteration cap of the Student t quantile's safeguarded Newton iteration. */
const QT_MAX_ITERATIONS = 400;

/**
 * Student t quantile: t with P(T <= t) = p (or P(T > t) = p when `lowerTail` is false),
 * df > 0 (non-integer allowed, Infinity gives the normal). Closed forms for df = 1
 * (Cauchy) and df = 2; otherwise a safeguarded Newton iteration on log P(T > t) started
 * from the Cornish-Fisher expansion (Abramowitz & Stegun 1964, section 26.7) and bracketed by the
 * normal quantile below and the tail bound t <= sqrt(df) (df B(df/2, 1/2) q)^(-1/df) above.
 * Accurate to about 1e-13 relative. Cost: about 5-10 evaluations of `pt`.
 * Example: qt(0.975, 10) = 2.228138851986274.
 */
export function qt(p: number, df: number, lowerTail = true): number {
  checkProbability('qt', p);
  checkPositive('qt', 'df', df);
  // q: upper-tail probability of |t|; sign: which side of zero.
  let q: number;
  let sign: number;
  if (lowerTail) {
    if (p < 0.5) {
      q = p;
      sign = -1;
    } else {
      q = 1 - p;
      sign = 1;
    }
  } else if (p < 0.5) {
    q = p;
    sign = 1;
  } else {
    q = 1 - p;
    sign = -1;
  }
  if (q === 0.5) return 0;
  if (q === 0) return sign * Infinity;
  if (df === Infinity) return -sign * qnorm(q);
  if (df === 1) return sign * (q < 0.25 ? 1 / Math.tan(Math.PI * q) : Math.tan(Math.PI * (0.5 - q)));
  if (df === 2) return (sign * (1 - 2 * q)) / Math.sqrt(2 * q * (1 - q));
  return sign * tUpperQuantile(q, df);
}

/** t > 0 with P(T > t) = q, 0 < q < 1/2. */
function tUpperQuantile(q: number, df: number): number {
  const z = -qnorm(q); // normal quantile: the t quantile is never below it
  // Cornish-Fisher expansion of the t quantile in powers of 1/df.
  const z2 = z * z;
  const g1 = (z * (z2 + 1)) / 4;
  const g2 = (z * ((5 * z2 + 16) * z2 + 3)) / 96;
  const g3 = (z * (((3 * z2 + 19) * z2 + 17) * z2 - 15)) / 384;
  const g4 = (z * ((((79 * z2 + 776) * z2 + 1482) * z2 - 1920) * z2 - 945)) / 92160;
  const guess = z + (g1 + (g2 + (g3 + g4 / df) / df) / df) / df;
  // Tail bound: the density is below its power-law envelope, so S(t) <= S_envelope(t).
  const half = df / 2;
  const logBeta = lgamma(half) + lgamma(0.5) - lgamma(half + 0.5);
  const logHi = 0.5 * Math.log(df) - (Math.log(df) + logBeta + Math.log(q)) / df;
  let hi = Math.exp(logHi);
  let lo = Math.max(0, z);
  if (!(hi > lo)) hi = Math.max(2 * lo, 1);
  let t = guess > lo && guess < hi ? guess : Math.sqrt(lo * hi) || 0.5 * (lo + hi);
  const logQ = Math.log(q);
  for (let iter = 0; iter < QT_MAX_ITERATIONS; iter++) {
    const s = tUpper(t, df);
    const g = Math.log(s) - logQ; // decreasing in t
    if (g === 0) return t;
    if (g > 0) lo = t;
    else hi = t;
    // Newton step on log S: d/dt log S = -f / S.
    const f = dt(t, df);
    let next = t + (g * s) / f;
    if (!(next > lo && next < hi)) {
      // Outside the bracket: bisect, geometrically when the bracket spans decades.
      next = lo > 0 && hi / lo > 4 ? Math.sqrt(lo * hi) : 0.5 * (lo + hi);
    }
    if (Math.abs(next - t) <= 4e-16 * Math.abs(next) || hi - lo <= 4e-16 * hi) return next;
    t = next;
  }
  return t;
}

/**
 * Chi-square distribution function with `df` > 0 degrees of freedom: P(X <= q) or
 * P(X > q). Equals the regularized incomplete gamma P(df/2, q/2) (Abramowitz & Stegun
 * 1964, section 26.4). Cost O(1) to O(sqrt(df)).
 * Example: pchisq(3.841458820694124, 1, false) = 0.05.
 */
export function pchisq(q: number, df: number, lowerTail = true): number {
  checkPositive('pchisq', 'df', df);
  if (Number.isNaN(q)) return NaN;
  return pgamma(q / 2, df / 2, lowerTail);
}

/**
 * F distribution function with df1, df2 > 0 (df2 may be Infinity): P(X <= q) or P(X > q).
 * Equals I_x(df1/2, df2/2) with x = df1 q / (df1 q + df2) (Abramowitz & Stegun 1964, section 26.6),
 * with the complement df2 / (df1 q + df2) supplied exactly. Cost O(1) to O(sqrt(df)).
 * Example: pf(4.964602743730711, 1, 10, false) = 0.05.
 */
export function pf(q: number, df1: number, df2: number, lowerTail = true): number {
  checkPositive('pf', 'df1', df1);
  checkPositive('pf', 'df2', df2);
  if (!Number.isFinite(df1)) throw new RangeError(`pf: df1 must be finite, got ${df1}`);
  if (Number.isNaN(q)) return NaN;
  if (q <= 0) return lowerTail ? 0 : 1;
  if (q === Infinity) return lowerTail ? 1 : 0;
  if (df2 === Infinity) return pchisq(q * df1, df1, lowerTail);
  const u = df1 * q;
  const denominator = u + df2;
  return betaTail(u / denominator, df2 / denominator, df1 / 2, df2 / 2, lowerTail);
}

/** Bisection steps of qf: each halves the bracket, so 1100 reach any double in (0, 1) from [0, 1]. */
const QF_MAX_STEPS = 1100;
/** qf stops when the bracket of the beta variable is this narrow relative to its value. */
const QF_RELATIVE_TOLERANCE = 1e-15;

/**
 * Quantile of the F distribution with df1, df2 > 0 (df2 may be Infinity): the q with
 * P(X <= q) = p, or P(X > q) = p when `lowerTail` is false. Inverts pf through the beta
 * variable x = df1 q / (df1 q + df2) (Abramowitz & Stegun 1964, section 26.6) by bisection on
 * [0, 1], which cannot miss since I_x is monotone; then q = df2 x / (df1 (1 - x)). Accurate
 * to about 1e-14 relative. Cost: up to QF_MAX_STEPS evaluations of pf (about 50 for a median).
 * Example: qf(0.5, 8, 992) is the median of F(8, 992), about 0.92.
 */
export function qf(p: number, df1: number, df2: number, lowerTail = true): number {
  checkProbability('qf', p);
  checkPositive('qf', 'df1', df1);
  checkPositive('qf', 'df2', df2);
  if (df2 === Infinity) {
    // F(df1, Infinity) is chi-square(df1) / df1: bisection on the chi-square scale.
    return bisect((q) => pchisq(q * df1, df1, lowerTail), p, lowerTail);
  }
  const target = lowerTail ? p : 1 - p;
  if (target <= 0) return 0;
  if (target >= 1) return Infinity;
  let lo = 0;
  let hi = 1;
  for (let k = 0; k < QF_MAX_STEPS && hi - lo > QF_RELATIVE_TOLERANCE * hi; k++) {
    const mid = lo / 2 + hi / 2;
    if (mid <= lo || mid >= hi) break;
    const below = lowerTail ? pbeta(mid, df1 / 2, df2 / 2) < p : pbeta(mid, df1 / 2, df2 / 2, false) > p;
    if (below) lo = mid;
    else hi = mid;
  }
  const x = lo / 2 + hi / 2;
  return (df2 * x) / (df1 * (1 - x));
}

/** The q with cdf(q) = p (lower tail) or cdf(q) = p as an upper tail, for an increasing lower-tail cdf on [0, Infinity). */
function bisect(cdf: (q: number) => number, p: number, lowerTail: boolean): number {
  const below = (q: number): boolean => (lowerTail ? cdf(q) < p : cdf(q) > p);
  let lo = 0;
  let hi = 1;
  for (let k = 0; k < QF_MAX_STEPS && below(hi); k++) {
    lo = hi;
    hi *= 2;
  }
  for (let k = 0; k < QF_MAX_STEPS && hi - lo > QF_RELATIVE_TOLERANCE * hi; k++) {
    const mid = lo / 2 + hi / 2;
    if (mid <= lo || mid >= hi) break;
    if (below(mid)) lo = mid;
    else hi = mid;
  }
  return lo / 2 + hi / 2;
}

function checkPositive(fn: string, name: string, value: number): void {
  if (!(value > 0)) throw new RangeError(`${fn}: ${name} must be > 0, got ${value}`);
}

function checkProbability(fn: string, p: number): void {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`${fn}: probability must be in [0, 1], got ${p}`);
}
