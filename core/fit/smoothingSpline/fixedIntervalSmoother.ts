/**
 * The backward pass of the cubic smoothing spline's state-space form (core/fit/smoothingSpline/
 * smootherState.ts): the fixed-interval smoother of de Jong (1989, "Smoothing and
 * interpolation with the state-space model", JASA 84, 1085-1088; Durbin & Koopman 2012,
 * "Time Series Analysis by State Space Methods", 2nd ed., chapter 4), with beta integrated
 * out. It gives the hat diagonal and its trace and, on full runs, the posterior mean at the
 * knots and the posterior covariance on each span (Wahba 1983, JRSS B 45, 133-150), from
 * which spanToBSpline.ts takes the B-spline coefficients and the band of A^-1.
 */
import type { BetaPosterior } from './kalmanFilter';
import type { SmootherState } from './smootherState';
import { spanToBSpline } from './spanToBSpline';

/**
 * Backward pass after `filterForward` (same `s`, `y` and lambda): the r and N recursions of
 * the fixed-interval smoother (de Jong 1989; Durbin & Koopman 2012, chapter 4). Always
 * writes the hat diagonal S_jj (`s.leverage`), `s.trace` and `s.residualTrace` (m - trace
 * summed without cancellation) and returns the trace; with `y` (pooled means) also the
 * posterior mean at the knots (`s.value`), the B-spline coefficients and the band of A^-1.
 * Cost O(m).
 * @example const trace = smoothBackward(state, null, filterForward(state, 1e-4, null));
 */
export function smoothBackward(s: SmootherState, y: Float64Array | null, beta: BetaPosterior): number {
  const { m, h, rho, obsVar, p: P, a: AY, aa: AB, wts } = s;
  const { beta0, beta1, rq01, iq00, iq11 } = beta;
  const full = y !== null;
  let r0 = 0; // y column
  let r1 = 0;
  let r2 = 0;
  let e00 = 0; // beta columns: e<state row><column>
  let e01 = 0;
  let e10 = 0;
  let e11 = 0;
  let e20 = 0;
  let e21 = 0;
  let n00 = 0;
  let n01 = 0;
  let n02 = 0;
  let n11 = 0;
  let n12 = 0;
  let n22 = 0;
  // quantities of knot j + 1 carried to knot j (full runs)
  let nextGammaMean = 0;
  let nextGammaVar = 0;
  let nextWg0 = 0; // R^-T times the smoothed beta columns' gamma row at j + 1
  let nextWg1 = 0;
  let trace = 0;
  let residualTrace = 0;
  const lev = s.leverage;
  for (let j = m - 1; j >= 0; j--) {
    const o6 = 6 * j;
    const p00j = P[o6] as number;
    const p01j = P[o6 + 1] as number;
    const p02j = P[o6 + 2] as number;
    const p11j = P[o6 + 3] as number;
    const p12j = P[o6 + 4] as number;
    const p22j = P[o6 + 5] as number;
    const wj = wts[j] as number;
    const hObs = obsVar[j] as number;
    const iF = 1 / (p00j + hObs);
    const v = y !== null ? (y[j] as number) - (AY[3 * j] as number) : 0;
    const u0 = AB[o6] as number;
    const u1 = AB[o6 + 1] as number;
    let dSmooth: number; // variance of the smoothing error u_j (disturbance smoothing, Durbin & Koopman 2012, chapter 4)
    // lag-one covariance Cov(alpha_j, gamma_{j+1} | y, beta), full runs only
    let x0 = 0;
    let x1 = 0;
    let x2 = 0;
    if (j === m - 1) {
      dSmooth = iF;
      r0 = v * iF;
      e00 = -u0 * iF;
      e01 = -u1 * iF;
      n00 = iF;
    } else {
      const hj = h[j] as number;
      const rr = rho[j] as number;
      const c02 = (hj * hj * (2 + rr)) / 6;
      const c12 = (hj * (1 + rr)) / 2;
      // gain K_j = T_j P_j e1 / F_j
      const k0 = (p00j + hj * p01j + c02 * p02j) * iF;
      const k1 = (p01j + c12 * p02j) * iF;
      const k2 = rr * p02j * iF;
      // N_j k and z = k' N_j k (N_j holds information from knots j+1..m-1)
      const nk0 = n00 * k0 + n01 * k1 + n02 * k2;
      const nk1 = n01 * k0 + n11 * k1 + n12 * k2;
      const nk2 = n02 * k0 + n12 * k1 + n22 * k2;
      const z = k0 * nk0 + k1 * nk1 + k2 * nk2;
      dSmooth = iF + z;
      if (full) {
        // Cov(alpha_j, alpha_{j+1} | y, beta) = P_j L_j' (I - N_j P_{j+1}) (Durbin & Koopman
        // 2012, chapter 4); only its gamma_{j+1} column is needed.
        const q = 6 * (j + 1);
        const c0 = P[q + 2] as number;
        const c1 = P[q + 4] as number;
        const c2 = P[q + 5] as number;
        const w0 = -(n00 * c0 + n01 * c1 + n02 * c2);
        const w1 = -(n01 * c0 + n11 * c1 + n12 * c2);
        const w2 = 1 - (n02 * c0 + n12 * c1 + n22 * c2);
        const kw = k0 * w0 + k1 * w1 + k2 * w2;
        const l0 = w0 - kw;
        const l1 = hj * w0 + w1;
        const l2 = c02 * w0 + c12 * w1 + rr * w2;
        x0 = p00j * l0 + p01j * l1 + p02j * l2;
        x1 = p01j * l0 + p11j * l1 + p12j * l2;
        x2 = p02j * l0 + p12j * l1 + p22j * l2;
      }
      // r_{j-1} = e1 v / F + L_j' r_j with L_j = T_j - K_j e1'
      const kr = k0 * r0 + k1 * r1 + k2 * r2;
      const nr0 = v * iF + r0 - kr;
      const nr1 = hj * r0 + r1;
      const nr2 = c02 * r0 + c12 * r1 + rr * r2;
      r0 = nr0;
      r1 = nr1;
      r2 = nr2;
      const ke0 = k0 * e00 + k1 * e10 + k2 * e20;
      const ke1 = k0 * e01 + k1 * e11 + k2 * e21;
      const ne00 = -u0 * iF + e00 - ke0;
      const ne01 = -u1 * iF + e01 - ke1;
      const ne10 = hj * e00 + e10;
      const ne11 = hj * e01 + e11;
      const ne20 = c02 * e00 + c12 * e10 + rr * e20;
      const ne21 = c02 * e01 + c12 * e11 + rr * e21;
      e00 = ne00;
      e01 = ne01;
      e10 = ne10;
      e11 = ne11;
      e20 = ne20;
      e21 = ne21;
      // N_{j-1} = e1 e1' / F + L' N L = e1 e1' / F + T'NT - y e1' - e1 y' + z e1 e1', y = T' N k
      const t00 = n00;
      const t01 = hj * n00 + n01;
      const t02 = c02 * n00 + c12 * n01 + rr * n02;
      const t11 = hj * n01 + n11;
      const t12 = c02 * n01 + c12 * n11 + rr * n12;
      const t22 = c02 * n02 + c12 * n12 + rr * n22;
      // (N T)_{ab} = t<a><b>; T' (N T): row a of T' is column a of T
      const m00 = t00;
      const m01 = t01;
      const m02 = t02;
      const m11 = hj * t01 + t11;
      const m12 = hj * t02 + t12;
      const m22 = c02 * t02 + c12 * t12 + rr * t22;
      const y0 = nk0;
      const y1 = hj * nk0 + nk1;
      const y2 = c02 * nk0 + c12 * nk1 + rr * nk2;
      n00 = iF + m00 - 2 * y0 + z;
      n01 = m01 - y1;
      n02 = m02 - y2;
      n11 = m11;
      n12 = m12;
      n22 = m22;
    }
    // hat diagonal: W_j Var(f_j | y) = W_j (Var(f_j | y, beta) + a' S^-1 a), a the smoothed
    // beta columns. Var(f_j | y, beta) = P_00 - (P N P)_00 loses digits when the fit nearly
    // interpolates; then 1 - D_j / W_j (D_j the smoothing-error variance above) is used instead.
    const pn0 = p00j * n00 + p01j * n01 + p02j * n02;
    const pn1 = p00j * n01 + p01j * n11 + p02j * n12;
    const pn2 = p00j * n02 + p01j * n12 + p02j * n22;
    let hb = wj * (p00j - (pn0 * p00j + pn1 * p01j + pn2 * p02j));
    let oneMinusHb = 1 - hb;
    if (hb > 0.5) {
      oneMinusHb = dSmooth * hObs;
      hb = 1 - oneMinusHb;
    }
    const as0 = u0 + p00j * e00 + p01j * e10 + p02j * e20;
    const as1 = u1 + p00j * e01 + p01j * e11 + p02j * e21;
    const ws0 = as0 * iq00;
    const ws1 = (as1 - rq01 * ws0) * iq11;
    const hBeta = wj * (ws0 * ws0 + ws1 * ws1);
    const sjj = hb + hBeta;
    lev[j] = sjj;
    trace += sjj;
    residualTrace += oneMinusHb - hBeta;
    if (full) {
      // smoothed state mean and covariance, beta integrated out
      const ay = 3 * j;
      const mean0 = (AY[ay] as number) + p00j * r0 + p01j * r1 + p02j * r2 + as0 * beta0 + as1 * beta1;
      const ag0 = (AB[o6 + 4] as number) + p02j * e00 + p12j * e10 + p22j * e20;
      const ag1 = (AB[o6 + 5] as number) + p02j * e01 + p12j * e11 + p22j * e21;
      const ad0 = (AB[o6 + 2] as number) + p01j * e00 + p11j * e10 + p12j * e20;
      const ad1 = (AB[o6 + 3] as number) + p01j * e01 + p11j * e11 + p12j * e21;
      const mean1 = (AY[ay + 1] as number) + p01j * r0 + p11j * r1 + p12j * r2 + ad0 * beta0 + ad1 * beta1;
      const mean2 = (AY[ay + 2] as number) + p02j * r0 + p12j * r1 + p22j * r2 + ag0 * beta0 + ag1 * beta1;
      // V = P - P N P (beta known), then + Ahat S^-1 Ahat'
      const pn10 = p01j * n00 + p11j * n01 + p12j * n02;
      const pn11 = p01j * n01 + p11j * n11 + p12j * n12;
      const pn12 = p01j * n02 + p11j * n12 + p12j * n22;
      const pn20 = p02j * n00 + p12j * n01 + p22j * n02;
      const pn21 = p02j * n01 + p12j * n11 + p22j * n12;
      const pn22 = p02j * n02 + p12j * n12 + p22j * n22;
      const wd0 = ad0 * iq00;
      const wd1 = (ad1 - rq01 * wd0) * iq11;
      const wg0 = ag0 * iq00;
      const wg1 = (ag1 - rq01 * wg0) * iq11;
      const cov = s.scratch;
      cov[0] = hb * hObs + ws0 * ws0 + ws1 * ws1;
      cov[1] = p01j - (pn0 * p01j + pn1 * p11j + pn2 * p12j) + ws0 * wd0 + ws1 * wd1;
      cov[2] = p02j - (pn0 * p02j + pn1 * p12j + pn2 * p22j) + ws0 * wg0 + ws1 * wg1;
      cov[5] = p11j - (pn10 * p01j + pn11 * p11j + pn12 * p12j) + wd0 * wd0 + wd1 * wd1;
      cov[6] = p12j - (pn10 * p02j + pn11 * p12j + pn12 * p22j) + wd0 * wg0 + wd1 * wg1;
      cov[10] = p22j - (pn20 * p02j + pn21 * p12j + pn22 * p22j) + wg0 * wg0 + wg1 * wg1;
      s.value[j] = mean0;
      if (j < m - 1) {
        // xi = (f_j, f'_j, gamma_j, gamma_{j+1}); covariance in the 4 x 4 scratch (row-major, upper part)
        cov[3] = x0 + ws0 * nextWg0 + ws1 * nextWg1;
        cov[7] = x1 + wd0 * nextWg0 + wd1 * nextWg1;
        cov[11] = x2 + wg0 * nextWg0 + wg1 * nextWg1;
        cov[15] = nextGammaVar;
        spanToBSpline(s, j, mean0, mean1, mean2, nextGammaMean);
      }
      nextGammaMean = mean2;
      nextGammaVar = cov[10] as number;
      nextWg0 = wg0;
      nextWg1 = wg1;
    }
  }
  s.trace = trace;
  s.residualTrace = residualTrace;
  return trace;
}
