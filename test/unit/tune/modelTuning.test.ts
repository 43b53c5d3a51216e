/**
 * Tuning with an outcome family, shape constraints or robust fitting: the resampling
 * engine's trainers (core/tune/modelTrainer.ts via core/tune/engine.ts) and tuneCurve
 * (core/tune/tune.ts).
 *
 * Each resample's errors are recomputed by brute force: the candidate is refitted with
 * fitCurve on the training rows alone (a bootstrap multiplicity c as c copies of the row,
 * which for a robust fit is not the same as a prior weight c), and its
 * held-out errors and mean deviance (sum of w d(y, mu) / sum of w over the held-out rows)
 * are computed here. The brute force builds its own basis on the training rows, so it is
 * used where the basis space does not depend on the rows: polynomials (any rows span the
 * same polynomials) and the natural spline with df 2 (a straight line). Agreement: 1e-6
 * relative (both sides stop IRLS at a 1e-10 relative deviance change, and the robust
 * iteration at a 1e-10 relative residual change).
 *
 * Data: datasets::discoveries (counts), MASS::Pima.tr (0/1), datasets::cars and
 * MASS::mcycle from test/reference/fixtures/physics.json.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { binomialFamily, poissonFamily, type OutcomeFamily } from '../../../core/fit/glm';
import { fitCurve } from '../../../core/fit/index';
import { prepareData } from '../../../core/fit/prepared';
import { workerRunner } from '../../../core/node/pool';
import { ERRORS_PER_CANDIDATE, ResampleEngine, type ResampleProblem } from '../../../core/tune/engine';
import { bootstrapCounts, foldLabels } from '../../../core/registry/resampling/index';
import { orderByX } from '../../../core/tune/plan';
import { inlineRunner, tuneCurve } from '../../../core/tune/tune';
import type { ResampleSpec } from '../../../core/tune/types';
import type { CurveKindId, ModelOptions } from '../../../core/types';

const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'physics.json'), 'utf8')) as {
  datasets: Record<string, { x: number[]; y: number[] }>;
};
function dataset(name: string): { x: Float64Array; y: Float64Array } {
  const d = fixture.datasets[name];
  if (!d) throw new Error(`dataset ${name} missing`);
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y) };
}

const REL = 1e-6;

/** Brute-force errors of resample r: [rmse, mae, maxAbs, mean deviance] per candidate. */
function bruteForce(d: { x: Float64Array; y: Float64Array }, kind: CurveKindId, dfs: number[], model: ModelOptions, resample: ResampleSpec, seed: number, r: number): number[][] {
  const n = d.x.length;
  const train = new Float64Array(n);
  if (resample.kind === 'bootstrap') {
    const counts = new Uint32Array(n);
    bootstrapCounts(n, seed, r, counts);
    counts.forEach((c, i) => (train[i] = c));
  } else if (resample.kind === 'folds') {
    const labels = new Uint16Array(n);
    foldLabels(orderByX(d.x), resample.folds, seed, Math.floor(r / resample.folds), labels);
    labels.forEach((l, i) => (train[i] = l === r % resample.folds ? 0 : 1));
  }
  // Training rows as copies: a bootstrap multiplicity c repeats the row c times.
  const idx: number[] = [];
  for (let i = 0; i < n; i++) for (let c = 0; c < (train[i] as number); c++) idx.push(i);
  const test = Array.from({ length: n }, (_, i) => i).filter((i) => train[i] === 0);
  const fam: OutcomeFamily | undefined = model.outcome === 'counts' ? poissonFamily : model.outcome === 'proportions' ? binomialFamily : undefined;
  return dfs.map((df) => {
    const fit = fitCurve({ x: Float64Array.from(idx, (i) => d.x[i] as number), y: Float64Array.from(idx, (i) => d.y[i] as number) }, { kind, df, ...model });
    let sse = 0;
    let sae = 0;
    let max = 0;
    let dev = 0;
    for (const i of test) {
      const mu = fit.curve.value(d.x[i] as number);
      const e = (d.y[i] as number) - mu;
      sse += e * e;
      sae += Math.abs(e);
      max = Math.max(max, Math.abs(e));
      dev += fam ? fam.deviance(d.y[i] as number, mu, 1) : e * e;
    }
    return [Math.sqrt(sse / test.length), sae / test.length, max, dev / test.length];
  });
}

function checkEngine(name: string, kind: CurveKindId, dfs: number[], model: ModelOptions, resample: ResampleSpec, resamples: number[]): void {
  const d = dataset(name);
  const problem: ResampleProblem = { x: d.x, y: d.y, kind, dfs, resample, seed: 3, order: orderByX(d.x), model };
  const engine = new ResampleEngine(problem);
  const C = dfs.length;
  for (const r of resamples) {
    const out = new Float64Array(C * ERRORS_PER_CANDIDATE);
    engine.run(r, out);
    const want = bruteForce(d, kind, dfs, model, resample, 3, r);
    dfs.forEach((df, k) => {
      ['RMSE', 'MAE', 'maximum absolute error', 'mean deviance'].forEach((label, m) => {
        const got = out[m * C + k] as number;
        const exp = (want[k] as number[])[m] as number;
        assert.ok(Math.abs(got - exp) <= REL * Math.abs(exp) + 1e-12, `${name} ${kind} df ${df} resample ${r} ${label}: engine ${got}, brute force ${exp}`);
      });
    });
  }
}

describe('ResampleEngine with outcome families, shapes and robust fitting', () => {
  it('Poisson polynomials: every resample error and mean deviance equal brute-force refits (bootstrap, datasets::discoveries)', () => {
    checkEngine('discoveries', 'polynomial', [1, 2, 3, 5], { outcome: 'counts' }, { kind: 'bootstrap', resamples: 4 }, [0, 1, 2, 3]);
  });

  it('binomial polynomials on 0/1 outcomes: errors and mean deviance equal brute-force refits (5-fold CV, MASS::Pima.tr)', () => {
    checkEngine('pima', 'polynomial', [2, 3], { outcome: 'proportions' }, { kind: 'folds', folds: 5, repeats: 1 }, [0, 1, 2, 3, 4]);
  });

  it('Huber polynomials and an increasing straight line: errors equal brute-force refits (MASS::mcycle, datasets::cars)', () => {
    checkEngine('mcycle', 'polynomial', [3, 5], { robust: true }, { kind: 'bootstrap', resamples: 3 }, [0, 1, 2]);
    checkEngine('cars', 'natural-spline', [2], { shape: ['increasing', 'nonnegative'] }, { kind: 'folds', folds: 4, repeats: 1 }, [0, 1, 2, 3]);
  });
});

describe('tuneCurve with outcome families, shapes and robust fitting', () => {
  it('a Poisson outcome is tuned on the mean deviance of the held-out rows, and every candidate reports it', async () => {
    const d = dataset('discoveries');
    const { result, fits } = await tuneCurve(prepareData(d), {
      kind: 'natural-spline',
      candidates: [2, 3, 4, 6],
      outcome: 'counts',
      resample: { kind: 'folds', folds: 5, repeats: 2 },
      rule: { kind: 'one-se' },
      seed: 1,
    });
    assert.equal(result.metric, 'deviance');
    for (const c of result.candidates) {
      assert.equal(c.skipped, undefined);
      assert.equal(c.errors.deviance?.values.length, 10);
      assert.ok((c.errors.deviance?.mean as number) > 0);
    }
    assert.match(result.selected.reason, /Least mean deviance/);
    assert.ok(fits.get(result.selected.df)?.model?.glm, 'the chosen fit is a Poisson fit');
  });

  it('a shape-constrained tuning refits each candidate with the constraints (and the chosen fit keeps the shape)', async () => {
    const d = dataset('cars');
    const { result, fits } = await tuneCurve(prepareData(d), {
      kind: 'natural-spline',
      candidates: [2, 3, 4, 5],
      shape: ['increasing'],
      resample: { kind: 'bootstrap', resamples: 20 },
      rule: { kind: 'least-error' },
      seed: 2,
    });
    assert.equal(result.metric, 'rmse');
    const fit = fits.get(result.selected.df);
    assert.ok(fit?.model?.constraints);
    let prev = -Infinity;
    for (let k = 0; k <= 1000; k++) {
      const v = fit.curve.value(4 + (21 * k) / 1000);
      assert.ok(v >= prev - 1e-9);
      prev = v;
    }
  });

  it('tuneCurve refuses exact leave-one-out for non-linear fits and the deviance metric for a Gaussian outcome', async () => {
    const p = prepareData(dataset('cars'));
    const base = { kind: 'natural-spline' as const, rule: { kind: 'one-se' as const }, seed: 1 };
    await assert.rejects(
      tuneCurve(p, { ...base, robust: true, resample: { kind: 'leave-one-out' } }),
      (e: unknown) => e instanceof InputError && /exact leave-one-out needs a plain least-squares fit/.test(e.message),
    );
    await assert.rejects(tuneCurve(p, { ...base, metric: 'deviance', resample: { kind: 'folds', folds: 5, repeats: 1 } }), /mean deviance is the error of counts and proportions/);
    await assert.rejects(tuneCurve(p, { ...base, kind: 'smoothing-spline', robust: true, resample: { kind: 'folds', folds: 5, repeats: 1 } }), /cubic smoothing spline has no robust fit/);
  });

  it('worker threads give the same Poisson resample errors as the inline runner', async function () {
    this.timeout(120_000);
    // 20000 rows (discoveries repeated 200 times with x shifted by a tiny amount per copy) x 10 resamples puts the run above the inline threshold.
    const base = dataset('discoveries');
    const n = 20_000;
    const x = Float64Array.from({ length: n }, (_, i) => (base.x[i % 100] as number) + Math.floor(i / 100) * 1e-4);
    const y = Float64Array.from({ length: n }, (_, i) => base.y[i % 100] as number);
    const problem: ResampleProblem = { x, y, kind: 'natural-spline', dfs: [3, 5], resample: { kind: 'bootstrap', resamples: 10 }, seed: 9, order: orderByX(x), model: { outcome: 'counts' } };
    const inline = await inlineRunner.run(problem, 10);
    const threaded = await workerRunner(2).run(problem, 10);
    for (let r = 0; r < 10; r++) assert.deepEqual(Array.from(threaded[r] as Float64Array), Array.from(inline[r] as Float64Array), `resample ${r}`);
  });
});
