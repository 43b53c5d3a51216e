/**
 * Distribution of a quadratic form in independent standard normal variables,
 * Q = sum_j lambda_j z_j^2, by numerical inversion of its characteristic function:
 * Imhof (1961), "Computing the distribution of quadratic forms in normal variables",
 * Biometrika 48(3/4), 419-426, equation (3.2) with x = 0 and central terms:
 *
 *   P(Q < 0) = 1/2 - (1/pi) int_0^inf sin(theta(u)) / (u rho(u)) du,
 *   theta(u) = (1/2) sum atan(lambda_j u),  rho(u) = prod (1 + lambda_j^2 u^2)^(1/4).
 *
 * The integral is truncated at U where Imhof's bound (3.3), applied to the largest
 * |lambda_j|, is below TRUNCATION_TOLERANCE. [0, U] is cut into [0, u0], [u0, 2 u0],
 * [2 u0, 4 u0], ... with u0 = 1 / max |lambda_j| (the integrand changes on the scale
 * 1 / |lambda_j| of every weight, so the pieces follow all scales), and each piece is
 * integrated by adaptive Gauss-Kronrod (7, 15) quadrature (Piessens, de Doncker-Kapenga,
 * Ueberhuber & Kahaner 1983, "QUADPACK", section 2.2) to its share of
 * INTEGRATION_TOLERANCE.
 */

/** Bound on the part of the integral beyond U (in probability units). */
const TRUNCATION_TOLERANCE = 1e-11;
/** Absolute error target of the quadrature over [0, U] (in probability units). */
const INTEGRATION_TOLERANCE = 1e-10;
/** Deepest interval bisection of the adaptive quadrature. */
const MAX_DEPTH = 40;
/** Most intervals the quadrature may examine. */
const MAX_INTERVALS = 20000;

// Kronrod 15-point nodes (positive half, descending) and weights; Gauss 7-point weights
// belong to the odd-indexed nodes xk[1], xk[3], xk[5] and the centre xk[7].
const XK = [
  0.991455371120812639206854697526329, 0.949107912342758524526189684047851, 0.864864423359769072789712788640926, 0.741531185599394439863864773280788, 0.586087235467691130294144845693013,
  0.405845151377397166906606412076961, 0.207784955007898467600689403773245, 0,
];
const WK = [
  0.02293532201052922496373200805897, 0.063092092629978553290700663189204, 0.104790010322250183839876322541518, 0.140653259715525918745189590510238, 0.16900472663926790282658342659855,
  0.190350578064785409913256402421014, 0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
];
const WG = [0.129484966168869693270611432679082, 0.27970539148927666790146777142378, 0.381830050505118944950369775488975, 0.417959183673469387755102040816327];

/** Integrand sin(theta(u)) / (u rho(u)); its limit at u = 0 is (1/2) sum lambda. O(m). */
function imhofIntegrand(lambda: Float64Array, u: number): number {
  let theta = 0;
  let logRho = 0;
  for (let j = 0; j < lambda.length; j++) {
    const lu = (lambda[j] as number) * u;
    theta += Math.atan(lu);
    logRho += Math.log1p(lu * lu);
  }
  return Math.sin(0.5 * theta) / (u * Math.exp(0.25 * logRho));
}

/** Upper integration limit: smallest U whose truncation bound (Imhof 1961, eq. 3.3) is small enough. */
function truncationPoint(lambda: Float64Array, scratch: Float64Array): number {
  const m = lambda.length;
  for (let j = 0; j < m; j++) scratch[j] = Math.abs(lambda[j] as number);
  scratch.sort();
  // |integral beyond U| <= 1 / (k U^k prod_{j in S} |lambda_j|^(1/2)) for any subset S of
  // size 2k (dropping factors >= 1 from rho); take S = the largest |lambda| of each size.
  let best = Infinity;
  let logProd = 0;
  for (let size = 1; size <= m; size++) {
    const l = scratch[m - size] as number;
    if (l === 0) break;
    logProd += 0.5 * Math.log(l);
    const k = size / 2;
    const logU = (-Math.log(TRUNCATION_TOLERANCE * Math.PI * k) - logProd) / k;
    best = Math.min(best, Math.exp(logU));
  }
  return best;
}

/**
 * P(sum_j lambda_j z_j^2 < 0) for independent standard normal z_j, by Imhof's (1961)
 * inversion (see the module comment). Accurate to about 1e-9 absolute.
 * Cost O(m * number of quadrature nodes), typically a few thousand evaluations of O(m).
 * Example: lambda = [1, -1] gives 0.5 (by symmetry).
 */
export function quadraticFormLowerTail(lambda: Float64Array): number {
  const m = lambda.length;
  if (m === 0) throw new RangeError('quadraticFormLowerTail needs at least one weight');
  let allPositive = true;
  let allNegative = true;
  for (let j = 0; j < m; j++) {
    const l = lambda[j] as number;
    if (!Number.isFinite(l)) throw new RangeError(`quadratic form weight ${j} is not finite: ${l}`);
    if (l < 0) allPositive = false;
    if (l > 0) allNegative = false;
  }
  if (allPositive) return 0;
  if (allNegative) return 1;
  const scratch = new Float64Array(m);
  const upper = truncationPoint(lambda, scratch);
  const u0 = 1 / (scratch[m - 1] as number); // scratch holds the sorted |lambda|
  const pieces = Math.max(1, Math.ceil(Math.log2(Math.max(1, upper / u0))) + 1);
  const share = (INTEGRATION_TOLERANCE * Math.PI) / pieces; // integral units: probability times pi
  let integral = 0;
  let a = 0;
  let b = Math.min(u0, upper);
  while (a < upper) {
    integral += adaptiveKronrod(lambda, a, b, share);
    a = b;
    b = Math.min(2 * b, upper);
  }
  return Math.min(1, Math.max(0, 0.5 - integral / Math.PI));
}

/** Adaptive Gauss-Kronrod (7, 15) integral of the Imhof integrand over [lower, upper]. */
function adaptiveKronrod(lambda: Float64Array, lower: number, upper: number, tolerance: number): number {
  // Depth-first stack of intervals: each entry is (a, b, depth); no allocation in the loop.
  const stackA = new Float64Array(MAX_DEPTH + 2);
  const stackB = new Float64Array(MAX_DEPTH + 2);
  const stackDepth = new Int32Array(MAX_DEPTH + 2);
  stackA[0] = lower;
  stackB[0] = upper;
  stackDepth[0] = 0;
  let top = 1;
  let total = 0;
  let examined = 0;
  while (top > 0) {
    top--;
    const a = stackA[top] as number;
    const b = stackB[top] as number;
    const depth = stackDepth[top] as number;
    const centre = 0.5 * (a + b);
    const half = 0.5 * (b - a);
    const fc = imhofIntegrand(lambda, centre);
    let kronrod = (WK[7] as number) * fc;
    let gauss = (WG[3] as number) * fc;
    for (let j = 0; j < 7; j++) {
      const dx = half * (XK[j] as number);
      const sum = imhofIntegrand(lambda, centre - dx) + imhofIntegrand(lambda, centre + dx);
      kronrod += (WK[j] as number) * sum;
      if (j % 2 === 1) gauss += (WG[(j - 1) / 2] as number) * sum;
    }
    kronrod *= half;
    gauss *= half;
    examined++;
    const error = Math.abs(kronrod - gauss);
    const allowed = (tolerance * (b - a)) / (upper - lower);
    if (error <= allowed || depth >= MAX_DEPTH || examined >= MAX_INTERVALS) {
      total += kronrod;
      continue;
    }
    // Push the right half first so the left half is processed next.
    stackA[top] = centre;
    stackB[top] = b;
    stackDepth[top] = depth + 1;
    top++;
    stackA[top] = a;
    stackB[top] = centre;
    stackDepth[top] = depth + 1;
    top++;
  }
  return total;
}
