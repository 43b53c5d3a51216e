/**
 * Quantiles of the Poisson and binomial distributions, for the prediction bands of counts
 * and proportions.
 */
import { pbeta, pgamma, qnorm } from './distributions';

/**
 * Smallest k with P(X <= k) >= p for X ~ Poisson(lambda), via P(X <= k) = Q(k + 1, lambda)
 * (the regularised upper incomplete gamma function). Starts at the Cornish-Fisher
 * approximation and steps by one. O(steps). Example: qpois(0.975, 2.5) = 6 (R: qpois(0.975, 2.5)).
 */
export function qpois(p: number, lambda: number): number {
  if (!(lambda > 0)) return 0;
  const cdf = (k: number): number => (k < 0 ? 0 : pgamma(lambda, k + 1, false));
  const sd = Math.sqrt(lambda);
  const zq = qnorm(p);
  let k = Math.max(0, Math.floor(lambda + sd * (zq + (zq * zq - 1) / (6 * sd))));
  while (k > 0 && cdf(k - 1) >= p) k--;
  while (cdf(k) < p) k++;
  return k;
}

/**
 * Smallest k with P(X <= k) >= p for X ~ Binomial(m, prob), via
 * P(X <= k) = I_{1-prob}(m - k, k + 1) (the regularised incomplete beta function).
 * O(steps). Example: qbinom(0.975, 10, 0.3) = 6 (R: qbinom(0.975, 10, 0.3)).
 */
export function qbinom(p: number, m: number, prob: number): number {
  if (!(prob > 0)) return 0;
  if (!(prob < 1)) return m;
  const cdf = (k: number): number => (k < 0 ? 0 : k >= m ? 1 : pbeta(1 - prob, m - k, k + 1));
  const sd = Math.sqrt(m * prob * (1 - prob));
  let k = Math.min(m, Math.max(0, Math.floor(m * prob + sd * qnorm(p))));
  while (k > 0 && cdf(k - 1) >= p) k--;
  while (k < m && cdf(k) < p) k++;
  return k;
}
