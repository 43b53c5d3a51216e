import { denseDesign } from '../../../core/stats/design';

type Dense = ReturnType<typeof denseDesign>;

/**
 * Two bases of the polynomials of degree < p on x = i / (n - 1), i = 0..n-1: the raw
 * monomials x^k, whose Gram matrix is badly conditioned for p around 8, and the Chebyshev
 * polynomials T_k(2x - 1) = cos(k arccos(2x - 1)), which are nearly orthogonal there
 * (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, 22.3.15, from memory). Both span the
 * same column space, so projection-based statistics must agree.
 */
export function polynomialDesigns(n: number, p: number): { monomials: Dense; chebyshev: Dense } {
  const mono = new Float64Array(n * p);
  const cheb = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    const x = i / (n - 1);
    for (let k = 0; k < p; k++) {
      mono[i * p + k] = x ** k;
      cheb[i * p + k] = Math.cos(k * Math.acos(2 * x - 1));
    }
  }
  return { monomials: denseDesign(mono, p), chebyshev: denseDesign(cheb, p) };
}
