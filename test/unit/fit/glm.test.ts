/**
 * Poisson and binomial fits (core/fit/glm.ts, glmSummary.ts, linkCurve.ts through
 * fitCurve): identities of the likelihood that any correct implementation satisfies, input
 * checks, non-convergence reporting, and the shape of the link-scale bands. Values against
 * R's glm are in test/reference/physics.test.ts.
 *
 * Identities (McCullagh & Nelder, Generalized Linear Models, 2nd ed., 1989): successes out
 * of m trials have the same likelihood in the coefficients as m 0/1 outcomes (section 4.3);
 * a Poisson row of prior weight k has the same likelihood as k copies of the row. Data:
 * MASS::menarche and datasets::discoveries from test/reference/fixtures/physics.json, and
 * seeded draws (test/unit/stats/seededNormal.ts) where stated.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { diagnose } from '../../../core/analysis/diagnose';
import { InputError } from '../../../core/errors';
import { bandsAt } from '../../../core/fit/bands';
import { CachedRows } from '../../../core/fit/cachedRows';
import { binomialFromTrials, irls, poissonFamily } from '../../../core/fit/glm';
import { fitCurve } from '../../../core/fit/index';
import { LinearSystem } from '../../../core/fit/linearSystem';
import { curveKind, type CurveKind } from '../../../core/registry/curves/index';
import { prepareData } from '../../../core/fit/prepared';
import { seededNormals } from '../stats/seededNormal';
import { resolveModel } from '../../../core/registry/curves/index';

const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'physics.json'), 'utf8')) as {
  datasets: Record<string, { x: number[]; y: number[]; trials: number[] | null }>;
};
const menarche = fixture.datasets.menarche as { x: number[]; y: number[]; trials: number[] };
const discoveries = fixture.datasets.discoveries as { x: number[]; y: number[] };

/** Tolerance of the identities: 1e-7 relative (IRLS stops at a 1e-10 relative deviance change on each side). */
const REL = 1e-7;

describe('Poisson and binomial fits (IRLS)', () => {
  it('successes out of trials give the same fitted probabilities as the expanded 0/1 outcomes (MASS::menarche)', () => {
    // 3918 girls: each age's Menarche girls as 1 and the rest as 0. A polynomial spans the same space on the
    // 25 ages and on the expanded rows (a natural spline's quantile knots would differ), so the maximisers agree.
    const xs: number[] = [];
    const ys: number[] = [];
    menarche.x.forEach((x, i) => {
      const m = menarche.trials[i] as number;
      const s = menarche.y[i] as number;
      for (let k = 0; k < m; k++) {
        xs.push(x);
        ys.push(k < s ? 1 : 0);
      }
    });
    const ones = fitCurve({ x: Float64Array.from(xs), y: Float64Array.from(ys) }, { kind: 'polynomial', df: 4, outcome: 'proportions' });
    const grouped = fitCurve({ x: Float64Array.from(menarche.x), y: Float64Array.from(menarche.y) }, { kind: 'polynomial', df: 4, outcome: 'proportions', trials: Float64Array.from(menarche.trials) });
    for (const x of menarche.x) {
      const a = ones.curve.value(x);
      const b = grouped.curve.value(x);
      assert.ok(Math.abs(a - b) <= REL * b + 1e-12, `probability at age ${x}: 0/1 rows ${a}, grouped ${b}`);
    }
    // The grouped log-likelihood also holds the binomial coefficients log choose(m, s).
    assert.ok(Math.abs(ones.logLik - (grouped.logLik - binomialConstant(menarche))) <= REL * Math.abs(ones.logLik), 'log-likelihoods differ by the binomial coefficients');
  });

  it('a Poisson row with prior weight k fits as k copies of the row (datasets::discoveries)', () => {
    const w = Float64Array.from(discoveries.x, (_, i) => 1 + (i % 3));
    const weighted = fitCurve({ x: Float64Array.from(discoveries.x), y: Float64Array.from(discoveries.y), w }, { kind: 'polynomial', df: 4, outcome: 'counts' });
    const xs: number[] = [];
    const ys: number[] = [];
    discoveries.x.forEach((x, i) => {
      for (let k = 0; k < (w[i] as number); k++) {
        xs.push(x);
        ys.push(discoveries.y[i] as number);
      }
    });
    const copies = fitCurve({ x: Float64Array.from(xs), y: Float64Array.from(ys) }, { kind: 'polynomial', df: 4, outcome: 'counts' });
    for (const x of discoveries.x) assert.ok(Math.abs(weighted.curve.value(x) - copies.curve.value(x)) <= REL * copies.curve.value(x), `mean at ${x}`);
    assert.ok(Math.abs((weighted.model?.glm?.deviance as number) - (copies.model?.glm?.deviance as number)) <= REL * (copies.model?.glm?.deviance as number), 'deviance');
  });

  it('deviance and Pearson residuals square-sum to the deviance and the Pearson chi-square', () => {
    const fit = fitCurve({ x: Float64Array.from(discoveries.x), y: Float64Array.from(discoveries.y) }, { kind: 'natural-spline', df: 5, outcome: 'counts' });
    const g = fit.model?.glm;
    assert.ok(g);
    const sd = g.devianceResiduals.reduce((s, v) => s + v * v, 0);
    const sp = g.pearsonResiduals.reduce((s, v) => s + v * v, 0);
    assert.ok(Math.abs(sd - g.deviance) <= 1e-12 * g.deviance && Math.abs(sp - g.pearsonChi2) <= 1e-12 * g.pearsonChi2);
    assert.ok(Math.abs(fit.leverage.reduce((s, v) => s + v, 0) - 5) <= 1e-9, 'the hat matrix has trace df');
    assert.equal(fit.sigma, 1, 'the dispersion of a Poisson outcome is 1');
  });

  it('bands of Poisson and binomial fits are built on the link scale and stay inside the valid range', () => {
    const pois = fitCurve({ x: Float64Array.from(discoveries.x), y: Float64Array.from(discoveries.y) }, { kind: 'natural-spline', df: 5, outcome: 'counts' });
    const bin = fitCurve({ x: Float64Array.from(menarche.x), y: Float64Array.from(menarche.y) }, { kind: 'natural-spline', df: 4, outcome: 'proportions', trials: Float64Array.from(menarche.trials) });
    for (const [fit, upper] of [
      [pois, Infinity],
      [bin, 1],
    ] as const) {
      const xs = Float64Array.from({ length: 41 }, (_, k) => fit.curve.lower - 5 + ((fit.curve.upper - fit.curve.lower + 10) * k) / 40);
      const b = bandsAt(fit, xs);
      for (let k = 0; k < xs.length; k++) {
        const f = b.fit[k] as number;
        assert.ok((b.ciLower[k] as number) > 0 && (b.ciLower[k] as number) < f && f < (b.ciUpper[k] as number) && (b.ciUpper[k] as number) <= upper, `confidence band at ${xs[k]}`);
        // Discrete quantiles need not contain the confidence band where the mean is near a bound (the 97.5 %
        // quantile of a Poisson(0.01) count is 0), but they stay ordered and in range.
        assert.ok((b.piLower[k] as number) >= 0 && (b.piUpper[k] as number) >= (b.piLower[k] as number) && (b.piUpper[k] as number) <= upper, `prediction band at ${xs[k]}`);
      }
    }
    // On the log scale the interval is symmetric, so on the count scale it is wider above than below.
    const b = bandsAt(pois, [1900]);
    assert.ok((b.ciUpper[0] as number) - (b.fit[0] as number) > (b.fit[0] as number) - (b.ciLower[0] as number));
  });

  it('counts and proportions outside their range are refused with the CSV line', () => {
    const x = Float64Array.of(1, 2, 3, 4, 5);
    const lines = Int32Array.of(2, 3, 4, 5, 6);
    assert.throws(
      () => fitCurve({ x, y: Float64Array.of(1, 2, -1, 0, 3), lines }, { kind: 'natural-spline', df: 2, outcome: 'counts' }),
      (e: unknown) => e instanceof InputError && e.place.line === 4 && /counts must be whole numbers of at least 0; got -1/.test(e.message),
    );
    assert.throws(
      () => fitCurve({ x, y: Float64Array.of(1, 2, 0.5, 0, 3), lines }, { kind: 'natural-spline', df: 2, outcome: 'counts' }),
      (e: unknown) => e instanceof InputError && e.place.line === 4 && e.place.column === 'y' && /counts must be whole numbers of at least 0; got 0\.5/.test(e.message),
    );
    assert.throws(
      () => fitCurve({ x, y: Float64Array.of(0, 1, 0.5, 1.5, 0), lines }, { kind: 'natural-spline', df: 2, outcome: 'proportions' }),
      (e: unknown) => e instanceof InputError && e.place.line === 5 && /proportions without a trials column must lie from 0 to 1/.test(e.message),
    );
    assert.throws(
      () => fitCurve({ x, y: Float64Array.of(0, 1, 5, 1, 0), lines }, { kind: 'natural-spline', df: 2, outcome: 'proportions', trials: Float64Array.of(3, 3, 3, 3, 3) }),
      (e: unknown) => e instanceof InputError && e.place.line === 4 && /from 0 to the number of trials \(3\); got 5/.test(e.message),
    );
    assert.throws(
      () => binomialFromTrials({ x, y: Float64Array.of(0, 0, 0, 0, 0), lines }, Float64Array.of(1, 0, 1, 1, 1)),
      (e: unknown) => e instanceof InputError && e.place.line === 3,
    );
    assert.throws(() => fitCurve({ x, y: x }, { kind: 'natural-spline', df: 2, trials: x }), /a trials column needs the proportions outcome/);
  });

  it('irls reports non-convergence with the reason instead of throwing when its iteration cap is reached', () => {
    const prepared = prepareData({ x: Float64Array.from(discoveries.x), y: Float64Array.from(discoveries.y) });
    const model = resolveModel('natural-spline', { outcome: 'counts' });
    const mb = (curveKind('natural-spline').rowBasis as NonNullable<CurveKind['rowBasis']>)(prepared, 5, model);
    const rows = new CachedRows(mb.basis, prepared.data.x);
    const system = new LinearSystem(mb.basis.size, mb.z, mb.shape, mb.what);
    const w = new Float64Array(prepared.data.x.length).fill(1);
    const capped = irls(rows, system, prepared.data.y, w, poissonFamily, undefined, { maxIterations: 1, tolerance: 1e-10 });
    assert.equal(capped.converged, false);
    assert.match(capped.problem ?? '', /still changing after 1 iterations/);
    const full = irls(rows, system, prepared.data.y, w, poissonFamily);
    assert.ok(full.converged && full.iterations <= 25 && full.problem === undefined);
  });

  it('a binomial outcome that separates along x is fitted with a note that the curve is too steep there', () => {
    // 0/1 outcomes that switch once, between x = 5 and x = 6: complete separation.
    const x = Float64Array.from({ length: 10 }, (_, i) => i + 1);
    const y = Float64Array.from(x, (v) => (v > 5 ? 1 : 0));
    const fit = fitCurve({ x, y }, { kind: 'natural-spline', df: 2, outcome: 'proportions' });
    assert.match(fit.notes.join(' '), /fitted probabilities numerically 0 or 1/);
  });

  it('an overdispersed count outcome reports its Pearson dispersion, judged once by the residual checks (seeded negative-binomial-like counts)', () => {
    // Counts with extra-Poisson scatter: round(exp(2 + 0.8 z)) with z seeded normal.
    const z = seededNormals(4, 200);
    const x = Float64Array.from({ length: 200 }, (_, i) => i);
    const y = Float64Array.from(z, (v) => Math.round(Math.exp(2 + 0.8 * v)));
    const fit = fitCurve({ x, y }, { kind: 'natural-spline', df: 3, outcome: 'counts' });
    assert.ok((fit.model?.glm?.dispersion as number) > 1.5);
    // The fit's notes leave it to the checks, so the panel and the report say it once.
    assert.doesNotMatch(fit.notes.join(' '), /dispersion/i);
    const checks = diagnose({ x, y }, fit);
    assert.equal(checks.dispersion?.verdict, 'over');
    assert.equal(checks.warnings.filter((w) => /dispersion/i.test(w)).length, 1);
  });
});

/** Sum over rows of log choose(m, s): the binomial coefficients the 0/1 likelihood lacks. */
function binomialConstant(d: { y: number[]; trials: number[] }): number {
  let s = 0;
  d.y.forEach((k, i) => {
    const m = d.trials[i] as number;
    for (let j = 1; j <= k; j++) s += Math.log((m - k + j) / j);
  });
  return s;
}
