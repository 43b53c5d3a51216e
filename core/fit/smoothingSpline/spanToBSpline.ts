/**
 * From the smoothed state of the cubic smoothing spline on one knot span to its B-spline
 * coefficients and to the band of A^-1 (the posterior covariance of the coefficients),
 * through blossoms.
 */
import type { SmootherState } from './smootherState';

/**
 * B-spline coefficients and band of A^-1 from the posterior of the cubic on span j.
 * Coefficient i is the blossom of the span's cubic at its knots tau_{i+1..i+3} (de Boor
 * 2001, "A Practical Guide to Splines", rev. ed.; Ramshaw 1989, "Blossoms are
 * polar forms"), the same on every span in the support of B_i because the spline is C2.
 * Span j writes coefficient j and band row j (the last span also rows m-1..m+1), from the
 * posterior mean (f, f1, g0, g1) = (f_j, f'_j, gamma_j, gamma_{j+1}) and the 4 x 4 covariance
 * in `s.scratch` (upper triangle). Cost O(1) per span.
 * @example spanToBSpline(state, j, mean0, mean1, mean2, nextGammaMean) // during smoothBackward
 */
export function spanToBSpline(s: SmootherState, j: number, f: number, f1: number, g0: number, g1: number): void {
  const { t, m, gmap: G, gc, scratch: C, coefficients, covarianceBand: band } = s;
  // complete the symmetric 4 x 4 from its upper triangle
  C[4] = C[1] as number;
  C[8] = C[2] as number;
  C[12] = C[3] as number;
  C[9] = C[6] as number;
  C[13] = C[7] as number;
  C[14] = C[11] as number;
  const base = t[j] as number;
  const inv6h = 1 / (6 * ((t[j + 1] as number) - base));
  for (let a = 0; a < 4; a++) {
    // coefficient i = j + a: blossom at tau_{i+1..i+3} = t[j+a-2], t[j+a-1], t[j+a] (clamped)
    const k1 = j + a - 2;
    const k3 = j + a < m - 1 ? j + a : m - 1;
    const d1 = (t[k1 < 0 ? 0 : k1 > m - 1 ? m - 1 : k1] as number) - base;
    const d2 = (t[k1 + 1 < 0 ? 0 : k1 + 1 > m - 1 ? m - 1 : k1 + 1] as number) - base;
    const d3 = (t[k3] as number) - base;
    const sig3 = d1 * d2 * d3 * inv6h;
    G[4 * a] = 1;
    G[4 * a + 1] = (d1 + d2 + d3) / 3;
    G[4 * a + 2] = (d1 * d2 + d1 * d3 + d2 * d3) / 6 - sig3;
    G[4 * a + 3] = sig3;
  }
  const last = j === m - 2 ? 3 : 0;
  for (let a = 0; a <= last; a++) {
    const ga0 = G[4 * a] as number;
    const ga1 = G[4 * a + 1] as number;
    const ga2 = G[4 * a + 2] as number;
    const ga3 = G[4 * a + 3] as number;
    for (let b = 0; b < 4; b++) gc[b] = ga0 * (C[b] as number) + ga1 * (C[4 + b] as number) + ga2 * (C[8 + b] as number) + ga3 * (C[12 + b] as number);
    const i = j + a;
    coefficients[i] = ga0 * f + ga1 * f1 + ga2 * g0 + ga3 * g1;
    for (let b = a; b < 4; b++) {
      band[4 * i + (b - a)] =
        (gc[0] as number) * (G[4 * b] as number) + (gc[1] as number) * (G[4 * b + 1] as number) + (gc[2] as number) * (G[4 * b + 2] as number) + (gc[3] as number) * (G[4 * b + 3] as number);
    }
    for (let b = 4 - a; b < 4; b++) band[4 * i + b] = 0;
  }
}
