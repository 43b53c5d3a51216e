/**
 * The forward pass of the cubic smoothing spline's state-space form (core/fit/smoothingSpline/
 * smootherState.ts): the augmented Kalman filter of de Jong (1991, "The diffuse Kalman
 * filter", Annals of Statistics 19, 1073-1083), which handles the flat prior on the value and
 * slope at the first knot exactly.
 */
import { FitError } from '../../errors';
import type { SmootherState } from './smootherState';

/**
 * Largest accepted ratio of the filter's predicted variance of f to the observation
 * variance 1 / W_j. The covariance update subtracts terms of that relative size, so beyond
 * it (lambda so small that the fit all but interpolates widely spaced knots) fewer than
 * 6 significant digits would survive and the fit is refused.
 */
export const MAX_VARIANCE_RATIO = 1e10;

/** The posterior of beta = (f_0, f'_0) from the filter: its mean and the triangular factor of its information. */
export interface BetaPosterior {
  readonly beta0: number;
  readonly beta1: number;
  /** Off-diagonal entry of R (R'R = S, the information matrix of beta). */
  readonly rq01: number;
  /** Reciprocals of R's diagonal. */
  readonly iq00: number;
  readonly iq11: number;
}

/**
 * Forward pass at smoothing parameter lambdaT (x scaled to [0, 1]): the augmented Kalman
 * filter (de Jong 1991) over the knots, storing in `s` the predicted covariance and the
 * predicted means of the y column (zero without `y`) and of the two beta columns at each
 * knot, setting `s.reliable` (MAX_VARIANCE_RATIO), and returning the posterior of beta. The
 * information matrix of beta is accumulated as a triangular factor by Givens rotations
 * (Golub & Van Loan 2013, "Matrix Computations", 4th ed., section 5.1). Cost O(m). Throws
 * FitError when the straight-line part is not determined.
 * @example const beta = filterForward(state, 1e-4, pooledMeans); // then smoothBackward(state, pooledMeans, beta)
 */
export function filterForward(s: SmootherState, lambdaT: number, y: Float64Array | null): BetaPosterior {
  const { m, h, rho, invSchur: dm, obsVar, p: P, a: AY, aa: AB } = s;
  let p00 = 0;
  let p01 = 0;
  let p02 = 0;
  let p11 = 0;
  let p12 = 0;
  const iLambda = 1 / lambdaT;
  let p22 = iLambda * (dm[0] as number);
  let a0 = 0;
  let a1 = 0;
  let a2 = 0;
  let b00 = 1; // beta columns: b<state row><column>
  let b01 = 0;
  let b10 = 0;
  let b11 = 1;
  let b20 = 0;
  let b21 = 0;
  // beta | y has information matrix S = sum U_j U_j' / F_j and score sum U_j v_j / F_j
  // (U_j the predicted f of the beta columns); both are accumulated as a triangular
  // factor [R | z] (R'R = S) by Givens rotations, which stays accurate when S is nearly
  // singular (a tiny first spacing with almost no smoothing).
  let rq00 = 0;
  let rq01 = 0;
  let rq11 = 0;
  let z0 = 0;
  let z1 = 0;
  let worstRatio = 0;
  for (let j = 0; j < m; j++) {
    const o6 = 6 * j;
    P[o6] = p00;
    P[o6 + 1] = p01;
    P[o6 + 2] = p02;
    P[o6 + 3] = p11;
    P[o6 + 4] = p12;
    P[o6 + 5] = p22;
    AY[3 * j] = a0;
    AY[3 * j + 1] = a1;
    AY[3 * j + 2] = a2;
    AB[o6] = b00;
    AB[o6 + 1] = b01;
    AB[o6 + 2] = b10;
    AB[o6 + 3] = b11;
    AB[o6 + 4] = b20;
    AB[o6 + 5] = b21;
    const hObs = obsVar[j] as number;
    if (p00 > worstRatio * hObs) worstRatio = p00 / hObs;
    const iF = 1 / (p00 + hObs);
    const v = y ? (y[j] as number) - a0 : 0;
    {
      const sf = Math.sqrt(iF);
      const x0 = b00 * sf;
      let x1 = b01 * sf;
      let xv = v * sf;
      if (x0 !== 0) {
        const rr = Math.sqrt(rq00 * rq00 + x0 * x0);
        const irr = 1 / rr;
        const c = rq00 * irr;
        const sn = x0 * irr;
        rq00 = rr;
        const t1 = c * rq01 + sn * x1;
        x1 = c * x1 - sn * rq01;
        rq01 = t1;
        const tz = c * z0 + sn * xv;
        xv = c * xv - sn * z0;
        z0 = tz;
      }
      if (x1 !== 0) {
        const rr = Math.sqrt(rq11 * rq11 + x1 * x1);
        const irr = 1 / rr;
        const c = rq11 * irr;
        const sn = x1 * irr;
        rq11 = rr;
        z1 = c * z1 + sn * xv;
      }
    }
    if (j === m - 1) break;
    // measurement update (filtered = predicted + gain * innovation); the first row of the
    // filtered covariance is written as P_0. * hObs / F to avoid cancellation.
    const g0 = p00 * iF;
    const g1 = p01 * iF;
    const g2 = p02 * iF;
    const fa0 = a0 + g0 * v;
    const fa1 = a1 + g1 * v;
    const fa2 = a2 + g2 * v;
    const fb00 = b00 - g0 * b00;
    const fb01 = b01 - g0 * b01;
    const fb10 = b10 - g1 * b00;
    const fb11 = b11 - g1 * b01;
    const fb20 = b20 - g2 * b00;
    const fb21 = b21 - g2 * b01;
    const f00 = p00 * hObs * iF;
    const f01 = p01 * hObs * iF;
    const f02 = p02 * hObs * iF;
    const f11 = p11 - p01 * g1;
    const f12 = p12 - p01 * g2;
    const f22 = p22 - p02 * g2;
    // time update with T_j and noise R_j eta_j
    const hj = h[j] as number;
    const r = rho[j] as number;
    const c02 = (hj * hj * (2 + r)) / 6;
    const c12 = (hj * (1 + r)) / 2;
    a0 = fa0 + hj * fa1 + c02 * fa2;
    a1 = fa1 + c12 * fa2;
    a2 = r * fa2;
    b00 = fb00 + hj * fb10 + c02 * fb20;
    b01 = fb01 + hj * fb11 + c02 * fb21;
    b10 = fb10 + c12 * fb20;
    b11 = fb11 + c12 * fb21;
    b20 = r * fb20;
    b21 = r * fb21;
    // q_k = Pf * (row k of T)
    const q00 = f00 + hj * f01 + c02 * f02;
    const q01 = f01 + hj * f11 + c02 * f12;
    const q02 = f02 + hj * f12 + c02 * f22;
    const q10 = f01 + c12 * f02;
    const q11 = f11 + c12 * f12;
    const q12 = f12 + c12 * f22;
    const q20 = r * f02;
    const q21 = r * f12;
    const q22 = r * f22;
    const tau = iLambda * (dm[j + 1] as number);
    const r0 = (hj * hj) / 6;
    const r1 = hj / 2;
    p00 = q00 + hj * q01 + c02 * q02 + tau * r0 * r0;
    p01 = q10 + hj * q11 + c02 * q12 + tau * r0 * r1;
    p02 = q20 + hj * q21 + c02 * q22 + tau * r0;
    p11 = q11 + c12 * q12 + tau * r1 * r1;
    p12 = q21 + c12 * q22 + tau * r1;
    p22 = r * q22 + tau;
  }
  s.reliable = worstRatio <= MAX_VARIANCE_RATIO;
  // beta | y ~ N(R^-1 z, R^-1 R^-T); a' S^-1 b = (R^-T a) . (R^-T b)
  if (!(rq00 > 0) || !(rq11 > 0) || !Number.isFinite(rq01 / rq11)) {
    throw new FitError('smoothing spline: the straight-line part of the fit is not determined (the x values are too close together)');
  }
  const beta1 = z1 / rq11;
  const beta0 = (z0 - rq01 * beta1) / rq00;
  const iq00 = 1 / rq00;
  const iq11 = 1 / rq11;
  return { beta0, beta1, rq01, iq00, iq11 };
}
