/**
 * Poisson (log link) and binomial (logit link) regression in a row basis by iteratively
 * reweighted least squares (IRLS), McCullagh & Nelder, Generalized Linear Models, 2nd ed.
 * (1989), section 2.5: with eta = B theta, mu = g^-1(eta), each step regresses the working
 * response z = eta + (y - mu) / (dmu/deta) on B with working weights
 * W = w (dmu/deta)^2 / V(mu) (Fisher scoring, equal to Newton's method for canonical links).
 * The Gram matrix B'WB is accumulated from the 4 nonzero B-spline values of each row
 * (CachedRows), so each step costs O(n) plus a p x p solve; shape constraints make each step
 * a constrained least-squares problem (LinearSystem), a sequential quadratic programme.
 *
 * Conventions follow R's glm.fit (R Core Team, stats package) so results can be checked
 * against it: starting values mu = y + 0.1 (Poisson) and (w y + 0.5) / (w + 1) (binomial);
 * the inverse links are bounded away from 0 and 1 by machine epsilon (logit: eta clamped to
 * [-30, 30]); convergence when |dev - dev_old| / (|dev| + 0.1) < IRLS_TOLERANCE; a step
 * whose deviance is not finite or increases is halved (at most MAX_STEP_HALVINGS times).
 * Binomial data are proportions y in [0, 1] with the number of trials as prior weights w
 * (`binomialFromTrials` converts successes and trials); 0/1 outcomes have w = 1.
 */
import { InputError } from '../errors';
import { qbinom, qpois } from '../stats/discreteQuantiles';
import { lgamma } from '../stats/distributions';
import type { Outcome, XYData } from '../types';
import type { CachedRows } from './cachedRows';
import type { LinearSystem, StepSolution } from './linearSystem';

/** Cap on IRLS iterations (R's glm.control default maxit = 25). */
export const MAX_IRLS_ITERATIONS = 25;
/** Relative deviance change below which IRLS stops (stricter than R's default 1e-8; one more step at most, by quadratic convergence). */
export const IRLS_TOLERANCE = 1e-10;
/** Cap on step halvings within one IRLS iteration. */
export const MAX_STEP_HALVINGS = 30;

const EPS = 2.220446049250313e-16;
/** Logit inverse-link clamp (R's binomial family: THRESH = 30). */
const LOGIT_THRESH = 30;

/** Link, variance and deviance of an outcome family (McCullagh & Nelder 1989, table 2.1). */
export interface OutcomeFamily {
  readonly outcome: Exclude<Outcome, 'continuous'>;
  /** The distribution's name in sentences. */
  readonly distribution: 'Poisson' | 'binomial';
  readonly link: 'log' | 'logit';
  /** True when y can be a reading of this outcome (a count from 0; a proportion from 0 to 1). */
  validReading(y: number): boolean;
  /** What a reading must be, for the message that refuses one. */
  readonly readingRule: string;
  /** The note for rows whose fitted mean sits on the edge of the outcome's range. */
  boundNote(rows: number): string;
  /** Lower and upper prediction limits for a new reading at confidence limits lo and hi of the mean. */
  predictionLimits(lowP: number, highP: number, lo: number, hi: number, trials: number): [number, number];
  linkfun(mu: number): number;
  linkinv(eta: number): number;
  /** dmu/deta at eta. */
  muEta(eta: number): number;
  variance(mu: number): number;
  /** Deviance contribution of one row of prior weight w: 2 w (l(y; y) - l(mu; y)). */
  deviance(y: number, mu: number, w: number): number;
  /** Log-likelihood of one row (R's aic / -2 convention, weights as trials for the binomial). */
  logLik(y: number, mu: number, w: number): number;
  /** IRLS starting mean. */
  start(y: number, w: number): number;
}

const yLogY = (y: number, mu: number): number => (y > 0 ? y * Math.log(y / mu) : 0);

/** Poisson outcome with log link: mu = exp(eta), V(mu) = mu. */
export const poissonFamily: OutcomeFamily = {
  outcome: 'counts',
  distribution: 'Poisson',
  link: 'log',
  // Poisson readings are counts of events: whole numbers of at least 0 (McCullagh & Nelder 1989, chapter 6; chapter from memory).
  validReading: (y) => y >= 0 && Number.isInteger(y),
  readingRule: 'counts must be whole numbers of at least 0',
  boundNote: (rows) => `${rows} row(s) have a fitted mean numerically 0; the curve's logarithm runs off to minus infinity there and its bands are unreliable.`,
  predictionLimits: (lowP, highP, lo, hi) => [qpois(lowP, lo), qpois(highP, hi)],
  linkfun: (mu) => Math.log(mu),
  linkinv: (eta) => Math.max(Math.exp(eta), EPS),
  muEta: (eta) => Math.max(Math.exp(eta), EPS),
  variance: (mu) => mu,
  deviance: (y, mu, w) => 2 * w * (yLogY(y, mu) - (y - mu)),
  logLik: (y, mu, w) => w * (y * Math.log(mu) - mu - lgamma(y + 1)),
  start: (y) => y + 0.1,
};

/** Binomial outcome with logit link: mu = 1 / (1 + exp(-eta)), V(mu) = mu (1 - mu). */
export const binomialFamily: OutcomeFamily = {
  outcome: 'proportions',
  distribution: 'binomial',
  link: 'logit',
  validReading: (y) => y >= 0 && y <= 1,
  readingRule: 'proportions without a trials column must lie from 0 to 1 (or be 0/1 readings)',
  boundNote: (rows) => `${rows} row(s) have fitted probabilities numerically 0 or 1 (the outcome separates along x); the curve is too steep to estimate there and its bands are unreliable.`,
  predictionLimits: (lowP, highP, lo, hi, trials) => [qbinom(lowP, trials, lo) / trials, qbinom(highP, trials, hi) / trials],
  linkfun: (mu) => Math.log(mu / (1 - mu)),
  linkinv: (eta) => {
    const t = eta < -LOGIT_THRESH ? EPS : eta > LOGIT_THRESH ? 1 / EPS : Math.exp(eta);
    return t / (1 + t);
  },
  muEta: (eta) => {
    if (eta > LOGIT_THRESH || eta < -LOGIT_THRESH) return EPS;
    const e = Math.exp(eta);
    return e / ((1 + e) * (1 + e));
  },
  variance: (mu) => mu * (1 - mu),
  deviance: (y, mu, w) => 2 * w * (yLogY(y, mu) + yLogY(1 - y, 1 - mu)),
  logLik: (y, mu, w) => {
    // The number of trials is w; successes rounded as R's binomial()$aic does.
    const m = Math.round(w);
    const k = Math.round(w * y);
    if (m <= 0) return 0;
    const choose = lgamma(m + 1) - lgamma(k + 1) - lgamma(m - k + 1);
    return choose + (k > 0 ? k * Math.log(mu) : 0) + (m - k > 0 ? (m - k) * Math.log(1 - mu) : 0);
  },
  start: (y, w) => (w * y + 0.5) / (w + 1),
};

/**
 * Checks that y fits the outcome: Poisson counts whole numbers y >= 0; binomial proportions 0 <= y <= 1.
 * Throws InputError naming the first bad row's CSV line. O(n).
 * Example: checkOutcomeData('counts', { x, y: Float64Array.of(0, 2, -1) }) throws for the third row.
 */
export function checkOutcomeData(fam: OutcomeFamily, data: XYData): void {
  const { y, lines } = data;
  for (let i = 0; i < y.length; i++) {
    const yi = y[i] as number;
    if (!fam.validReading(yi)) throw new InputError(`${fam.readingRule}; got ${yi}`, { line: lines ? lines[i] : undefined, column: 'y' });
  }
}

/**
 * Binomial data from successes y and trials m per row: y / m as the outcome and m (times
 * any prior weights) as weights, which gives the same likelihood as successes out of m
 * trials (McCullagh & Nelder 1989, section 4.3). Throws InputError naming the line when
 * m is not a positive finite number or y is outside [0, m]. O(n).
 * Example: binomialFromTrials({ x, y: [3, 0] }, [10, 4]) -> y [0.3, 0], w [10, 4].
 */
export function binomialFromTrials(data: XYData, trials: Float64Array): XYData {
  const { x, y, w, lines } = data;
  const n = x.length;
  if (trials.length !== n) throw new InputError(`the trials column has ${trials.length} values for ${n} rows`);
  const prop = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const m = trials[i] as number;
    const yi = y[i] as number;
    const line = lines ? lines[i] : undefined;
    if (!(m > 0) || !Number.isFinite(m)) throw new InputError(`the number of trials must be a positive number; got ${m}`, { line, column: 'trials' });
    if (!(yi >= 0 && yi <= m)) throw new InputError(`the number of successes must be from 0 to the number of trials (${m}); got ${yi}`, { line, column: 'y' });
    prop[i] = yi / m;
    weights[i] = m * (w ? (w[i] as number) : 1);
  }
  return { x, y: prop, w: weights, lines };
}

/** Iteration limits of `irls` (defaults: the named constants above). */
export interface IrlsLimits {
  readonly maxIterations: number;
  readonly tolerance: number;
}

/** Outcome of `irls`. */
export interface IrlsResult {
  readonly theta: Float64Array;
  readonly eta: Float64Array;
  readonly mu: Float64Array;
  /** Working weights w (dmu/deta)^2 / V(mu) at the final estimate. */
  readonly workingWeights: Float64Array;
  /** The least-squares solve with the final working weights (covariance, active set). */
  readonly solution: StepSolution;
  readonly deviance: number;
  readonly iterations: number;
  readonly converged: boolean;
  /** A plain-language reason when not converged. */
  readonly problem?: string;
}

/**
 * IRLS for a Poisson or binomial outcome (see the module comment). `w` are the prior
 * weights (0 leaves a row out, as the resampling engine does); `start`, if given, are
 * coefficients to start from instead of the family's starting means; `limits` caps the
 * iterations (MAX_IRLS_ITERATIONS, IRLS_TOLERANCE by default). Allocates its O(n)
 * scratch once; each iteration is O(n width^2 + p^3). Does not throw on non-convergence:
 * `converged` is false and `problem` says why; throws FitError when a working least-squares
 * problem is rank deficient.
 * Example: irls(new CachedRows(basis, x), new LinearSystem(p, z, undefined, 'fit'), y, ones, poissonFamily).theta.
 */
export function irls(
  rows: CachedRows,
  system: LinearSystem,
  y: Float64Array,
  w: Float64Array,
  fam: OutcomeFamily,
  start?: Float64Array,
  limits: IrlsLimits = { maxIterations: MAX_IRLS_ITERATIONS, tolerance: IRLS_TOLERANCE },
): IrlsResult {
  const n = rows.n;
  const p = rows.size;
  const eta = new Float64Array(n);
  const mu = new Float64Array(n);
  const ww = new Float64Array(n);
  const zw = new Float64Array(n);
  const g = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  const newEta = new Float64Array(n);
  const newMu = new Float64Array(n);
  let theta: Float64Array | undefined;
  if (start) {
    theta = start;
    rows.apply(start, eta);
  } else {
    for (let i = 0; i < n; i++) eta[i] = fam.linkfun(fam.start(y[i] as number, w[i] as number));
  }
  let dev = 0;
  for (let i = 0; i < n; i++) {
    mu[i] = fam.linkinv(eta[i] as number);
    const wi = w[i] as number;
    if (wi > 0) dev += fam.deviance(y[i] as number, mu[i] as number, wi);
  }
  let solution: StepSolution | undefined;
  let iterations = 0;
  let converged = false;
  let problem: string | undefined;
  const workingProblem = (): void => {
    for (let i = 0; i < n; i++) {
      const wi = w[i] as number;
      const e = eta[i] as number;
      const d = fam.muEta(e);
      const m = mu[i] as number;
      ww[i] = wi > 0 ? (wi * d * d) / fam.variance(m) : 0;
      zw[i] = e + ((y[i] as number) - m) / d;
    }
  };
  while (iterations < limits.maxIterations) {
    iterations++;
    workingProblem();
    rows.gram(ww, zw, g, rhs);
    solution = system.solve(g, rhs);
    let next = solution.theta;
    let newDev = deviance(rows, next, newEta, newMu, y, w, fam);
    let halvings = 0;
    // Step halving while the deviance is not finite or rises (theta stays feasible: a convex combination).
    while (theta && (!Number.isFinite(newDev) || newDev > dev * (1 + 1e-12) + 1e-12) && halvings < MAX_STEP_HALVINGS) {
      const prev = theta;
      next = next.map((v, j) => 0.5 * (v + (prev[j] as number)));
      newDev = deviance(rows, next, newEta, newMu, y, w, fam);
      halvings++;
    }
    if (!Number.isFinite(newDev)) {
      problem = `the deviance became infinite in iteration ${iterations} and step halving did not recover`;
      break;
    }
    theta = next;
    eta.set(newEta);
    mu.set(newMu);
    const change = Math.abs(newDev - dev) / (Math.abs(newDev) + 0.1);
    dev = newDev;
    if (change < limits.tolerance) {
      converged = true;
      break;
    }
  }
  if (!converged && problem === undefined) problem = `the deviance was still changing after ${limits.maxIterations} iterations`;
  // Working weights and the least-squares system at the final estimate (for leverage and bands).
  workingProblem();
  rows.gram(ww, zw, g, rhs);
  const finalSolution = system.solve(g, rhs);
  // Keep the active set of the last step that produced theta: at convergence the two agree.
  solution = { ...finalSolution, active: (solution ?? finalSolution).active, activeCount: (solution ?? finalSolution).activeCount };
  const out: IrlsResult = { theta: theta ?? finalSolution.theta, eta, mu, workingWeights: ww, solution, deviance: dev, iterations, converged };
  return problem !== undefined ? { ...out, problem } : out;
}

/** Deviance of coefficients theta (writes eta and mu). O(n). */
function deviance(rows: CachedRows, theta: Float64Array, eta: Float64Array, mu: Float64Array, y: Float64Array, w: Float64Array, fam: OutcomeFamily): number {
  rows.apply(theta, eta);
  let dev = 0;
  for (let i = 0; i < rows.n; i++) {
    const m = fam.linkinv(eta[i] as number);
    mu[i] = m;
    const wi = w[i] as number;
    if (wi > 0) dev += fam.deviance(y[i] as number, m, wi);
  }
  return dev;
}
