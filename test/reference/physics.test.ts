/**
 * External reference checks of Poisson and binomial fits, Huber fits, shape-constrained
 * natural splines (core/fit/model.ts through fitCurve and bandsAt) and of the NNLS solver
 * (core/linalg/nnls.ts), against R 4.2 with splines and MASS 7.3; fixture from
 * test/reference/r/physics.R (regenerate with `Rscript test/reference/r/physics.R` from the
 * repository root). Each check names its R call in the assertion message.
 *
 * Datasets (open, shipped with R): datasets::discoveries, datasets::quakes, MASS::menarche
 * (trials column), MASS::Pima.tr (0/1 outcome), MASS::mcycle, datasets::stackloss,
 * datasets::cars, datasets::airquality, MASS::Boston, datasets::Loblolly, datasets::longley.
 *
 * Tolerances: the R fits are iterated to machine precision (see the script), Knotwise stops
 * at IRLS_TOLERANCE = 1e-10 relative deviance change and ROBUST_TOLERANCE = 1e-10 relative
 * residual change; both are compared at 1e-7 relative with an absolute floor of 1e-9 times
 * the scale of the quantity (B-spline coefficients of constrained Poisson/binomial fits,
 * less well determined than the fitted means, at 1e-6). Least-squares shape-constrained
 * fits and NNLS are exact finite algorithms on both sides and are compared at 1e-8 relative.
 * Shape-constrained references are computed in R by enumerating every active set (see the
 * script), an independent route to the constrained optimum.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { bandsAt } from '../../core/fit/bands';
import { fitCurve } from '../../core/fit/index';
import { qbinom, qpois } from '../../core/fit/linkCurve';
import { nnls } from '../../core/linalg/nnls';
import type { FitResult, Shape } from '../../core/types';

interface Dataset {
  readonly source: string;
  readonly x: number[];
  readonly y: number[];
  readonly trials: number[] | null;
}
interface GlmCase {
  readonly name: string;
  readonly dataset: string;
  /** The R glm family of the case (test/reference/r/physics.R). */
  readonly outcome: 'poisson' | 'binomial';
  readonly df: number;
  readonly rCall: string;
  readonly fitted: number[];
  readonly linearPredictor: number[];
  readonly deviance: number;
  readonly nullDeviance: number;
  readonly aic: number;
  readonly bic: number;
  readonly logLik: number;
  readonly hat: number[];
  readonly cooks: number[];
  readonly pearsonResiduals: number[];
  readonly devianceResiduals: number[];
  readonly pearsonChi2: number;
  readonly grid: number[];
  readonly linkFit: number[];
  readonly linkSe: number[];
  readonly ciLower: number[];
  readonly ciUpper: number[];
}
interface RlmCase {
  readonly name: string;
  readonly dataset: string;
  readonly df: number;
  readonly rCall: string;
  readonly fitted: number[];
  readonly weights: number[];
  readonly scale: number;
  readonly hat: number[];
  readonly grid: number[];
  readonly gridFit: number[];
  readonly gridSe: number[];
}
interface ShapeCase {
  readonly name: string;
  readonly dataset: string;
  readonly df: number;
  readonly shape: Shape[];
  readonly constraints: number;
  readonly fitted: number[];
  readonly rss: number;
  readonly unconstrainedRss: number;
  readonly coefficients: number[];
  readonly denseX: number[];
  readonly denseFit: number[];
}
interface GlmShapeCase {
  readonly name: string;
  readonly dataset: string;
  /** The R glm family of the case (test/reference/r/physics.R). */
  readonly outcome: 'poisson' | 'binomial';
  readonly df: number;
  readonly shape: Shape[];
  readonly fitted: number[];
  readonly deviance: number;
  readonly unconstrainedDeviance: number;
  readonly coefficients: number[];
}
interface NnlsCase {
  readonly name: string;
  readonly source: string;
  readonly m: number;
  readonly n: number;
  readonly E: number[];
  readonly f: number[];
  readonly x: number[];
  readonly residualNorm: number;
}
interface QuantileCase {
  readonly kind: 'poisson' | 'binomial';
  readonly p: number;
  readonly lambda: number;
  readonly trials: number;
  readonly prob: number;
  readonly q: number;
}
interface Fixture {
  readonly rVersion: string;
  readonly quantiles: QuantileCase[];
  readonly datasets: Record<string, Dataset>;
  readonly glm: GlmCase[];
  readonly rlm: RlmCase[];
  readonly shape: ShapeCase[];
  readonly glmShape: GlmShapeCase[];
  readonly nnls: NnlsCase[];
}

const fixture = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'physics.json'), 'utf8')) as Fixture;

/** Knotwise's outcome for R's glm family: poisson() fits counts, binomial() proportions. */
const outcomeOf = (c: { outcome: 'poisson' | 'binomial' }): 'counts' | 'proportions' => (c.outcome === 'poisson' ? 'counts' : 'proportions');
const SOURCE = `${fixture.rVersion}, fixture test/reference/r/physics.R`;

function data(name: string): Dataset {
  const d = fixture.datasets[name];
  if (!d) throw new Error(`dataset ${name} missing from physics.json`);
  return d;
}

function close(what: string, actual: number, expected: number, rel: number, absScale: number): void {
  const tol = rel * Math.abs(expected) + rel * 1e-2 * absScale;
  assert.ok(Math.abs(actual - expected) <= tol, `${what}: got ${actual}, R gives ${expected} (tolerance ${tol.toExponential(2)}; ${SOURCE})`);
}

function closeAll(what: string, actual: ArrayLike<number>, expected: readonly number[], rel: number): void {
  assert.equal(actual.length, expected.length, `${what}: length`);
  let scale = 0;
  for (const v of expected) scale = Math.max(scale, Math.abs(v));
  for (let i = 0; i < expected.length; i++) close(`${what}[${i}]`, actual[i] as number, expected[i] as number, rel, scale);
}

const GLM_REL = 1e-7;
const EXACT_REL = 1e-8;

describe(`Poisson and binomial natural splines against R glm with splines::ns (${SOURCE})`, () => {
  for (const c of fixture.glm) {
    it(`fitCurve(${c.name}) matches ${c.rCall}: fitted, deviance, AIC, hat, residuals, link-scale bands`, () => {
      const d = data(c.dataset);
      const fit: FitResult = fitCurve(
        { x: Float64Array.from(d.x), y: Float64Array.from(d.y) },
        { kind: 'natural-spline', df: c.df, outcome: outcomeOf(c), ...(d.trials ? { trials: Float64Array.from(d.trials) } : {}) },
      );
      const glm = fit.model?.glm;
      assert.ok(glm, 'a glm report');
      assert.ok(fit.model?.converged, 'IRLS converged');
      closeAll(`${c.name} fitted (proportions for the binomial)`, fit.fitted, c.fitted, GLM_REL);
      closeAll(`${c.name} linear predictor`, glm.linearPredictor, c.linearPredictor, GLM_REL);
      close(`${c.name} deviance`, glm.deviance, c.deviance, GLM_REL, c.nullDeviance);
      close(`${c.name} null deviance`, glm.nullDeviance, c.nullDeviance, GLM_REL, c.nullDeviance);
      close(`${c.name} Pearson chi-square`, glm.pearsonChi2, c.pearsonChi2, GLM_REL, c.nullDeviance);
      close(`${c.name} AIC`, fit.aic, c.aic, GLM_REL, 1);
      close(`${c.name} BIC`, fit.bic, c.bic, GLM_REL, 1);
      close(`${c.name} logLik`, fit.logLik, c.logLik, GLM_REL, 1);
      closeAll(`${c.name} hat values`, fit.leverage, c.hat, GLM_REL);
      closeAll(`${c.name} Cook's distance`, fit.cooksDistance, c.cooks, GLM_REL);
      closeAll(`${c.name} Pearson residuals`, glm.pearsonResiduals, c.pearsonResiduals, GLM_REL);
      closeAll(`${c.name} deviance residuals`, glm.devianceResiduals, c.devianceResiduals, GLM_REL);
      const b = bandsAt(fit, c.grid);
      const linkSe = Float64Array.from(c.grid, (x) => Math.sqrt((fit.curve as unknown as { linkVarianceFactor(x: number): number }).linkVarianceFactor(x)));
      closeAll(`${c.name} predict(type = "link", se.fit = TRUE)$se.fit`, linkSe, c.linkSe, GLM_REL);
      closeAll(`${c.name} confidence band lower (linkinv(fit - z se))`, b.ciLower, c.ciLower, GLM_REL);
      closeAll(`${c.name} confidence band upper (linkinv(fit + z se))`, b.ciUpper, c.ciUpper, GLM_REL);
      for (let i = 0; i < c.grid.length; i++) {
        const lo = b.ciLower[i] as number;
        const hi = b.ciUpper[i] as number;
        assert.ok(lo > 0 && hi >= lo, `${c.name}: band inside the valid range at x = ${c.grid[i]}`);
        if (c.outcome === 'binomial') assert.ok(hi < 1 && (b.piUpper[i] as number) <= 1 && (b.piLower[i] as number) >= 0, `${c.name}: binomial bands within [0, 1]`);
        else assert.ok((b.piLower[i] as number) >= 0, `${c.name}: Poisson prediction band not negative`);
      }
    });
  }
});

describe(`Huber fits against MASS::rlm(psi = psi.huber) (${SOURCE})`, () => {
  for (const c of fixture.rlm) {
    it(`fitCurve(${c.name}, robust) matches ${c.rCall}: fitted, weights, scale, hat, standard errors`, () => {
      const d = data(c.dataset);
      const fit = fitCurve({ x: Float64Array.from(d.x), y: Float64Array.from(d.y) }, { kind: 'natural-spline', df: c.df, robust: true });
      const robust = fit.model?.robust;
      assert.ok(robust && fit.model?.converged, 'a converged robust report');
      closeAll(`${c.name} fitted`, fit.fitted, c.fitted, GLM_REL);
      closeAll(`${c.name} weights (rlm $w)`, robust.weights, c.weights, GLM_REL);
      close(`${c.name} scale (rlm $s)`, robust.scale, c.scale, GLM_REL, c.scale);
      close(`${c.name} sigma = robust scale`, fit.sigma, c.scale, GLM_REL, c.scale);
      closeAll(`${c.name} hat values`, fit.leverage, c.hat, GLM_REL);
      const b = bandsAt(fit, c.grid);
      closeAll(`${c.name} fit on the grid`, b.fit, c.gridFit, GLM_REL);
      closeAll(`${c.name} standard error of the fit (vcov(summary.rlm))`, b.se, c.gridSe, GLM_REL);
      // Every row with weight below 1 is counted (and listed up to ROBUST_LIST_LIMIT).
      const below = c.weights.filter((w) => w < 1 - 1e-9).length;
      assert.equal(robust.downweighted.total, below, `${c.name}: count of down-weighted rows`);
    });
  }
});

describe(`Shape-constrained natural splines against brute-force active-set enumeration in R (${SOURCE})`, () => {
  for (const c of fixture.shape) {
    it(`fitCurve(${c.name}) equals the best feasible equality-constrained fit`, () => {
      const d = data(c.dataset);
      const fit = fitCurve({ x: Float64Array.from(d.x), y: Float64Array.from(d.y) }, { kind: 'natural-spline', df: c.df, shape: c.shape });
      closeAll(`${c.name} fitted`, fit.fitted, c.fitted, EXACT_REL);
      close(`${c.name} RSS`, fit.rss, c.rss, EXACT_REL, c.rss);
      closeAll(`${c.name} B-spline coefficients`, fit.coefficients, c.coefficients, EXACT_REL);
      closeAll(
        `${c.name} curve on a dense grid`,
        Float64Array.from(c.denseX, (x) => fit.curve.value(x)),
        c.denseFit,
        EXACT_REL,
      );
      assert.equal(
        fit.model?.constraints?.total,
        c.constraints - (c.shape.some((s) => s === 'convex' || s === 'concave') ? 2 : 0),
        'number of inequalities (R also lists the two boundary-knot rows that the natural conditions fix)',
      );
      const inactive = Math.abs(c.rss - c.unconstrainedRss) <= 1e-12 * c.rss;
      assert.equal(fit.model?.constraints?.active === 0, inactive, `${c.name}: active constraints reported iff the constrained RSS exceeds the unconstrained one`);
      if (inactive) {
        const plain = fitCurve({ x: Float64Array.from(d.x), y: Float64Array.from(d.y) }, { kind: 'natural-spline', df: c.df });
        closeAll(`${c.name} equals the unconstrained fit`, fit.fitted, Array.from(plain.fitted), 1e-10);
      }
    });
  }
});

describe(`Shape-constrained Poisson and binomial splines against brute-force active-set enumeration with R's glm.fit (${SOURCE})`, () => {
  for (const c of fixture.glmShape) {
    it(`fitCurve(${c.name}) equals the feasible equality-constrained glm fit of least deviance`, () => {
      const d = data(c.dataset);
      const fit = fitCurve({ x: Float64Array.from(d.x), y: Float64Array.from(d.y) }, { kind: 'natural-spline', df: c.df, outcome: outcomeOf(c), shape: c.shape });
      assert.ok(fit.model?.converged, 'IRLS converged');
      assert.ok((fit.model?.constraints?.active ?? 0) > 0, 'some constraint active (R: constrained deviance above the unconstrained one)');
      assert.ok(c.deviance > c.unconstrainedDeviance);
      closeAll(`${c.name} fitted`, fit.fitted, c.fitted, GLM_REL);
      close(`${c.name} deviance`, fit.model?.glm?.deviance as number, c.deviance, GLM_REL, c.deviance);
      closeAll(`${c.name} B-spline coefficients of the linear predictor`, fit.coefficients, c.coefficients, 1e-6);
    });
  }
});

describe(`nnls (Lawson & Hanson) against brute-force subset enumeration in R (${SOURCE})`, () => {
  for (const c of fixture.nnls) {
    it(`nnls(${c.name}) gives R's solution and residual norm (${c.source})`, () => {
      const r = nnls(Float64Array.from(c.E), c.m, c.n, Float64Array.from(c.f));
      assert.ok(r.converged, 'converged');
      const scale = Math.max(...c.x.map(Math.abs));
      for (let j = 0; j < c.n; j++) close(`${c.name} x[${j}]`, r.x[j] as number, c.x[j] as number, EXACT_REL, scale * 100);
      close(`${c.name} residual norm`, r.residualNorm, c.residualNorm, EXACT_REL, c.residualNorm);
    });
  }
});

describe(`qpois and qbinom (prediction bands of Poisson and binomial fits) against R's qpois and qbinom (${SOURCE})`, () => {
  it('return the same whole-number quantiles', () => {
    for (const c of fixture.quantiles) {
      const got = c.kind === 'poisson' ? qpois(c.p, c.lambda) : qbinom(c.p, c.trials, c.prob);
      const call = c.kind === 'poisson' ? `qpois(${c.p}, ${c.lambda})` : `qbinom(${c.p}, ${c.trials}, ${c.prob})`;
      assert.equal(got, Math.abs(c.q), `${call}: got ${got}, R gives ${c.q} (${SOURCE})`);
    }
  });
});
