/**
 * Tests of the resampling engine (core/tune/engine.ts: ResampleEngine), its resampling plans
 * (core/tune/plan.ts: bootstrapCounts, foldLabels, orderByX) and its runners
 * (core/tune/tune.ts: inlineRunner; core/node/pool.ts: workerRunner).
 *
 * The natural-spline engine fits every candidate from per-cell weighted power sums
 * (docs/design.md, "Power sums"). Here each resample's errors are recomputed by brute force: a weighted
 * least-squares fit of the same natural-spline basis (knots from all rows), assembled row by
 * row with fitRowBasis, with the bootstrap multiplicities (or the fold mask) as weights, and
 * evaluated on the out-of-bag (or held-out fold) rows. Polynomials are refitted from scratch
 * on the training rows alone with fitPolynomial (its own orthogonal basis on the training x).
 * Agreement: 1e-9 relative, with an absolute floor of 1e-12 times the SD of y.
 *
 * Fixed data: MASS::mcycle (Silverman 1985) and datasets::cars (Ezekiel 1930) with prior
 * weights 1/speed, read from the R fixture test/reference/fixtures/fits.json (written by
 * test/reference/r/fits.R). Property tests use seeded fast-check data.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import workerThreads from 'node:worker_threads';
import fc from 'fast-check';
import { ExtrapolatingBSplineBasis, naturalKnots } from '../../../core/basis/naturalSpline';
import { CancelledError, FitError } from '../../../core/errors';
import { fitRowBasis } from '../../../core/fit/linearFit';
import { fitPolynomial } from '../../../core/fit/polynomial';
import { fitSmoothingSpline, lambdaForDf, smoothingSplineAtLambda } from '../../../core/fit/smoothingSpline';
import { prepareData } from '../../../core/fit/prepared';
import { nullSpace } from '../../../core/linalg/nullSpace';
import { startWorkersEarly, workerRunner } from '../../../core/node/pool';
import { ERRORS_PER_CANDIDATE, ResampleEngine, type ResampleProblem, sharedRows } from '../../../core/tune/engine';
import { bootstrapCounts, foldLabels, resamplingScheme, type DrawState, type PowerSumAccess } from '../../../core/registry/resampling/index';
import { accumulateByLabel, accumulateRow, buildCells, SUMS_PER_CELL } from '../../../core/fit/powerSums/cells';
import { orderByX } from '../../../core/tune/plan';
import { inlineRunner, tuneCurve } from '../../../core/tune/tune';
import type { Progress, ResampleSpec } from '../../../core/tune/types';
import type { CurveKindId } from '../../../core/types';

/** Runs f while counting the worker threads started (f sees the list as it grows). */
async function countingWorkers<T>(f: (created: readonly workerThreads.Worker[]) => Promise<T>): Promise<{ created: workerThreads.Worker[]; result: T }> {
  const created: workerThreads.Worker[] = [];
  const Original = workerThreads.Worker;
  workerThreads.Worker = class extends Original {
    constructor(...args: ConstructorParameters<typeof Original>) {
      super(...args);
      created.push(this);
    }
  };
  try {
    return { created, result: await f(created) };
  } finally {
    workerThreads.Worker = Original;
  }
}

const REL = 1e-9;
const ABS_FLOOR = 1e-12;

interface FixtureDataset {
  readonly source: string;
  readonly x: number[];
  readonly y: number[];
  readonly w: number[] | null;
}

const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as {
  datasets: Record<string, FixtureDataset>;
};

interface Data {
  readonly name: string;
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly w: Float64Array | undefined;
}

function dataset(name: string): Data {
  const d = fixture.datasets[name];
  if (!d) throw new Error(`dataset ${name} missing from fits.json`);
  return { name: `${name} (${d.source})`, x: Float64Array.from(d.x), y: Float64Array.from(d.y), w: d.w ? Float64Array.from(d.w) : undefined };
}

/** MASS::mcycle: 133 rows, 94 distinct times, ties. */
const MCYCLE = dataset('mcycle');
/** datasets::cars with prior weights 1 / speed: 50 rows, 19 distinct speeds. */
const CARS_W = dataset('cars_w');

function sd(v: Float64Array): number {
  let m = 0;
  for (const a of v) m += a;
  m /= v.length;
  let s = 0;
  for (const a of v) s += (a - m) ** 2;
  return Math.sqrt(s / v.length);
}

/** RMSE (weighted by the prior weights), MAE (weighted) and maximum absolute error over the test rows. */
function errorsOn(test: readonly number[], pred: (i: number) => number, d: Data): [number, number, number] {
  let sw = 0;
  let sse = 0;
  let sae = 0;
  let max = 0;
  for (const i of test) {
    const wi = d.w ? (d.w[i] as number) : 1;
    const e = (d.y[i] as number) - pred(i);
    sw += wi;
    sse += wi * e * e;
    sae += wi * Math.abs(e);
    max = Math.max(max, Math.abs(e));
  }
  return [Math.sqrt(sse / sw), sae / sw, max];
}

/**
 * Brute-force errors of one candidate: trains on `trainWeights` (0 = not in training) and
 * measures on `test`. NaN when the training rows cannot determine the fit (FitError).
 */
function bruteErrors(d: Data, kind: CurveKindId, df: number, trainWeights: Float64Array, test: readonly number[]): [number, number, number] {
  try {
    if (kind === 'natural-spline') {
      const all = prepareData({ x: d.x, y: d.y });
      const k = naturalKnots(all.sortedX, all.distinct, df);
      const basis = new ExtrapolatingBSplineBasis(k.lower, k.upper, k.interior);
      const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
      const fit = fitRowBasis({ x: d.x, y: d.y, w: trainWeights }, basis, z, `brute-force natural spline df ${df}`);
      return errorsOn(test, (i) => fit.fitted[i] as number, d);
    }
    // Polynomial and smoothing spline: a fresh fit on the training rows alone (with
    // multiplicities as weights); the smoothing spline keeps the lambda of the all-row fit.
    const idx: number[] = [];
    for (let i = 0; i < d.x.length; i++) if ((trainWeights[i] as number) > 0) idx.push(i);
    const pick = (a: Float64Array): Float64Array => Float64Array.from(idx, (i) => a[i] as number);
    const train = { x: pick(d.x), y: pick(d.y), w: pick(trainWeights) };
    const fit = kind === 'smoothing-spline' ? smoothingSplineAtLambda(train, lambdaForDf({ x: d.x, y: d.y, w: d.w }, df)) : fitPolynomial(prepareData(train), df);
    return errorsOn(test, (i) => fit.curve.value(d.x[i] as number), d);
  } catch (e) {
    if (e instanceof FitError) return [NaN, NaN, NaN];
    throw e;
  }
}

/** Training weights and test rows of resample r, built here from the plan functions. */
function resampleRows(d: Data, spec: ResampleSpec, seed: number, r: number): { train: Float64Array; test: number[] } {
  const n = d.x.length;
  const train = new Float64Array(n);
  const test: number[] = [];
  if (spec.kind === 'bootstrap') {
    const counts = new Uint32Array(n);
    bootstrapCounts(n, seed, r, counts);
    // The multiplicities are by x rank: rank k is row order[k].
    const order = orderByX(d.x);
    for (let k = 0; k < n; k++) {
      const i = order[k] as number;
      train[i] = (counts[k] as number) * (d.w ? (d.w[i] as number) : 1);
      if (counts[k] === 0) test.push(i);
    }
    test.sort((a, b) => a - b);
  } else if (spec.kind === 'folds') {
    const labels = new Uint16Array(n);
    foldLabels(orderByX(d.x), spec.folds, seed, Math.floor(r / spec.folds), labels);
    const fold = r % spec.folds;
    for (let i = 0; i < n; i++) {
      if (labels[i] === fold) test.push(i);
      else train[i] = d.w ? (d.w[i] as number) : 1;
    }
  }
  return { train, test };
}

function problemOf(d: Data, kind: CurveKindId, dfs: readonly number[], resample: ResampleSpec, seed: number): ResampleProblem {
  // The engine refits at each candidate's lambda for x scaled to [0, 1] over the range of all rows (FitResult.lambdaScaled).
  const lambdas = kind === 'smoothing-spline' ? dfs.map((df) => fitSmoothingSpline({ x: d.x, y: d.y, w: d.w }, df).lambdaScaled as number) : undefined;
  return { x: d.x, y: d.y, w: d.w, kind, dfs, params: lambdas, resample, seed, order: orderByX(d.x) };
}

/**
 * Runs every resample through the engine and through the brute force, and compares. Returns
 * the number of (resample, candidate) pairs compared and how many were rank deficient.
 */
function compareWithBruteForce(d: Data, kind: CurveKindId, dfs: readonly number[], resample: ResampleSpec, seed: number): { compared: number; deficient: number } {
  const engine = new ResampleEngine(problemOf(d, kind, dfs, resample, seed));
  const C = dfs.length;
  assert.equal(engine.size, C);
  const count = resample.kind === 'bootstrap' ? resample.resamples : resample.kind === 'folds' ? resample.folds * resample.repeats : 0;
  const out = new Float64Array(C * ERRORS_PER_CANDIDATE);
  const floor = ABS_FLOOR * sd(d.y);
  let compared = 0;
  let deficient = 0;
  for (let r = 0; r < count; r++) {
    engine.run(r, out);
    const { train, test } = resampleRows(d, resample, seed, r);
    dfs.forEach((df, k) => {
      const brute = bruteErrors(d, kind, df, train, test);
      const got = [out[k], out[C + k], out[2 * C + k]] as number[];
      const names = ['RMSE', 'MAE', 'max abs'];
      for (let m = 0; m < 3; m++) {
        const b = brute[m] as number;
        const g = got[m] as number;
        const where = `${d.name}, ${kind} df ${df}, ${resample.kind} resample ${r}, ${names[m]}`;
        if (Number.isNaN(b)) {
          assert.ok(Number.isNaN(g), `${where}: brute force is rank deficient but the engine gave ${g}`);
        } else {
          assert.ok(Math.abs(g - b) <= REL * Math.abs(b) + floor, `${where}: engine ${g}, brute force ${b} (tolerance ${REL} relative)`);
        }
      }
      compared++;
      if (Number.isNaN(brute[0])) deficient++;
    });
  }
  return { compared, deficient };
}

/** Seeded data for the property tests: x on a grid of `levels` values (so ties occur), y a wave plus noise. */
const dataArb = fc
  .record({
    n: fc.integer({ min: 30, max: 250 }),
    levels: fc.integer({ min: 12, max: 400 }),
    shift: fc.double({ min: -1000, max: 1000, noNaN: true }),
    scale: fc.constantFrom(1e-3, 1, 1e3),
    amplitude: fc.double({ min: 0, max: 100, noNaN: true }),
    noise: fc.double({ min: 0.01, max: 10, noNaN: true }),
    weighted: fc.boolean(),
    seed: fc.integer({ min: 0, max: 2 ** 31 - 1 }),
  })
  .chain((p) =>
    fc.tuple(
      fc.constant(p),
      fc.array(fc.nat({ max: p.levels - 1 }), { minLength: p.n, maxLength: p.n }),
      fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: p.n, maxLength: p.n }),
      fc.array(fc.double({ min: 0.2, max: 5, noNaN: true }), { minLength: p.n, maxLength: p.n }),
    ),
  )
  .map(([p, xi, e, wv]) => {
    const x = Float64Array.from(xi, (v) => p.shift + p.scale * v);
    const y = Float64Array.from(xi, (v, i) => p.amplitude * Math.sin((6 * v) / p.levels) + p.noise * (e[i] as number));
    const d: Data = { name: `seeded data n=${p.n}`, x, y, w: p.weighted ? Float64Array.from(wv) : undefined };
    return { d, seed: p.seed };
  });

describe('ResampleEngine (natural spline, power sums) against brute-force refits', () => {
  it('ResampleEngine(natural, boot) gives every resample and candidate the brute-force out-of-bag RMSE, MAE and max error (mcycle)', () => {
    const r = compareWithBruteForce(MCYCLE, 'natural-spline', [2, 3, 4, 5, 6, 7, 8, 9, 10, 12], { kind: 'bootstrap', resamples: 25 }, 2024);
    assert.equal(r.compared, 250);
    assert.equal(r.deficient, 0, 'mcycle supports df up to 12 in every resample');
  });

  it('ResampleEngine(natural, boot) agrees with brute force under prior weights and tied x (cars, w = 1/speed)', () => {
    compareWithBruteForce(CARS_W, 'natural-spline', [2, 3, 4, 5, 6], { kind: 'bootstrap', resamples: 30 }, 7);
  });

  it('ResampleEngine(natural, cv) gives every fold and candidate the brute-force held-out errors (mcycle 10-fold x 2, cars 5-fold)', () => {
    // Training sums are total minus fold (docs/design.md, "Power sums"); the brute force refits each fold.
    compareWithBruteForce(MCYCLE, 'natural-spline', [2, 4, 6, 8, 10], { kind: 'folds', folds: 10, repeats: 2 }, 99);
    compareWithBruteForce(CARS_W, 'natural-spline', [2, 3, 5], { kind: 'folds', folds: 5, repeats: 1 }, 3);
  });

  it('ResampleEngine(natural) agrees with brute force on seeded random data (boot and cv, with and without weights)', () => {
    fc.assert(
      fc.property(
        dataArb,
        fc.uniqueArray(fc.integer({ min: 2, max: 9 }), { minLength: 1, maxLength: 4 }),
        fc.constantFrom<ResampleSpec>({ kind: 'bootstrap', resamples: 4 }, { kind: 'folds', folds: 5, repeats: 1 }, { kind: 'folds', folds: 3, repeats: 2 }),
        ({ d, seed }, dfs, resample) => {
          const distinct = new Set(d.x).size;
          const usable = dfs.filter((df) => df <= distinct);
          fc.pre(usable.length > 0);
          compareWithBruteForce(d, 'natural-spline', usable, resample, seed);
        },
      ),
      { numRuns: 40, seed: 5150 },
    );
  });
});

describe('ResampleEngine: only the squared error when nothing else is read', () => {
  it('squaredOnly gives every resample and candidate the same RMSE and deviance bits and leaves MAE and the largest error out (mcycle, bootstrap); tuneCurve then reports RMSE only', async () => {
    const dfs = [3, 5, 8, 12];
    const spec: ResampleSpec = { kind: 'bootstrap', resamples: 6 };
    const full = new ResampleEngine(problemOf(MCYCLE, 'natural-spline', dfs, spec, 4));
    const squared = new ResampleEngine({ ...problemOf(MCYCLE, 'natural-spline', dfs, spec, 4), squaredOnly: true });
    const C = dfs.length;
    const a = new Float64Array(full.outputLength);
    const b = new Float64Array(squared.outputLength);
    for (let r = 0; r < 6; r++) {
      full.run(r, a);
      squared.run(r, b);
      for (let k = 0; k < C; k++) {
        assert.ok(Number.isFinite(a[k] as number) && Number.isFinite(a[C + k] as number), 'the full run measures every error');
        assert.equal(b[k], a[k], `resample ${r}, df ${dfs[k]}: the same RMSE`);
        assert.equal(b[3 * C + k], a[3 * C + k], 'the same mean squared error');
        assert.ok(Number.isNaN(b[C + k] as number) && Number.isNaN(b[2 * C + k] as number), 'MAE and the largest error left out');
      }
      assert.equal(b[4 * C], a[4 * C], 'the same scored rows');
    }
    const tuned = await tuneCurve(prepareData({ x: MCYCLE.x, y: MCYCLE.y }), { kind: 'natural-spline', candidates: dfs, resample: spec, rule: { kind: 'one-se' }, seed: 4, squaredOnly: true });
    const whole = await tuneCurve(prepareData({ x: MCYCLE.x, y: MCYCLE.y }), { kind: 'natural-spline', candidates: dfs, resample: spec, rule: { kind: 'one-se' }, seed: 4 });
    assert.deepEqual(
      tuned.result.candidates.map((c) => Object.keys(c.errors)),
      dfs.map(() => ['rmse']),
    );
    assert.deepEqual(
      tuned.result.candidates.map((c) => c.errors.rmse),
      whole.result.candidates.map((c) => c.errors.rmse),
    );
    assert.equal(tuned.result.selected.reason, whole.result.selected.reason);
  });
});

describe('ResampleEngine (polynomial) against fitPolynomial refits', () => {
  it('ResampleEngine(poly, boot) gives the errors of polynomials refitted on the bootstrap rows (mcycle, df 1..7)', () => {
    compareWithBruteForce(MCYCLE, 'polynomial', [1, 2, 3, 4, 5, 6, 7], { kind: 'bootstrap', resamples: 15 }, 31);
  });

  it('ResampleEngine(poly, cv) gives the errors of polynomials refitted without each fold (cars, w = 1/speed)', () => {
    compareWithBruteForce(CARS_W, 'polynomial', [1, 2, 3, 4], { kind: 'folds', folds: 5, repeats: 2 }, 8);
  });
});

describe('foldLabels and bootstrapCounts', () => {
  it('foldLabels stratifies by x: every block of K rows in x order holds each fold once, so each fold spans the data', () => {
    // Stratification for regression as described in the doc comment of foldLabels (common practice).
    fc.assert(
      fc.property(
        fc.array(fc.integer({ min: -50, max: 50 }), { minLength: 2, maxLength: 300 }),
        fc.integer({ min: 2, max: 20 }),
        fc.integer({ min: 0, max: 1e6 }),
        fc.integer({ min: 0, max: 5 }),
        (xs, folds, seed, repeat) => {
          fc.pre(folds <= xs.length);
          const x = Float64Array.from(xs);
          const order = orderByX(x);
          const labels = new Uint16Array(x.length);
          foldLabels(order, folds, seed, repeat, labels);
          const n = x.length;
          const full = Math.floor(n / folds) * folds;
          for (let start = 0; start < full; start += folds) {
            const seen = new Set<number>();
            for (let j = start; j < start + folds; j++) seen.add(labels[order[j] as number] as number);
            assert.equal(seen.size, folds, `block at ${start} holds every fold once`);
          }
          const sizes = new Array<number>(folds).fill(0);
          for (const l of labels) {
            assert.ok(l < folds);
            sizes[l] = (sizes[l] as number) + 1;
          }
          assert.ok(Math.max(...sizes) - Math.min(...sizes) <= 1, `fold sizes ${sizes.join(',')}`);
          // Each fold reaches into the lowest and the highest complete block of x.
          const sorted = Float64Array.from(x).sort();
          for (let k = 0; k < folds; k++) {
            const xk = Array.from(x).filter((_, i) => labels[i] === k);
            assert.ok(Math.min(...xk) <= (sorted[folds - 1] as number), `fold ${k} starts within the first block`);
            assert.ok(Math.max(...xk) >= (sorted[full - folds] as number), `fold ${k} ends within the last complete block`);
          }
        },
      ),
      { numRuns: 200, seed: 4242 },
    );
  });

  it('foldLabels spans the x range of mcycle in every fold (10 folds)', () => {
    const order = orderByX(MCYCLE.x);
    const labels = new Uint16Array(MCYCLE.x.length);
    foldLabels(order, 10, 1, 0, labels);
    const sorted = Float64Array.from(MCYCLE.x).sort();
    for (let k = 0; k < 10; k++) {
      const xk = Array.from(MCYCLE.x).filter((_, i) => labels[i] === k);
      assert.ok(Math.min(...xk) <= (sorted[9] as number) && Math.max(...xk) >= (sorted[120] as number), `fold ${k}: ${Math.min(...xk)}..${Math.max(...xk)}`);
    }
  });

  it('bootstrapCounts draws exactly n rows, depends only on (seed, resample) and changes with either', () => {
    const n = 500;
    const a = new Uint32Array(n);
    const b = new Uint32Array(n);
    bootstrapCounts(n, 5, 3, a);
    bootstrapCounts(n, 5, 3, b);
    assert.deepEqual(a, b);
    assert.equal(
      a.reduce((s, v) => s + v, 0),
      n,
    );
    // A row is out of bag with probability (1 - 1/n)^n (direct calculation: n independent draws
    // miss it), 0.3675 for n = 500; the share's SD is about sqrt(p (1 - p) / n) = 0.0216, so a
    // band of +-0.11 (5 SD) fails only for a broken sampler.
    const p = (1 - 1 / n) ** n;
    const oob = a.filter((v) => v === 0).length / n;
    assert.ok(Math.abs(oob - p) < 0.11, `out-of-bag share ${oob}, expected about ${p}`);
    bootstrapCounts(n, 6, 3, b);
    assert.notDeepEqual(a, b);
    bootstrapCounts(n, 5, 4, b);
    assert.notDeepEqual(a, b);
  });
});

/** Problem large enough for threads: 30,000 rows x 10 resamples (above the inline limit of the pool). */
function bigProblem(kind: CurveKindId, dfs: readonly number[], resamples: number, seed: number): ResampleProblem {
  const n = 30_000;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  // Deterministic scattered data (Weyl sequence for x, a smooth curve plus a bounded wiggle for y).
  for (let i = 0; i < n; i++) {
    x[i] = ((i * 0.6180339887498949) % 1) * 100;
    y[i] = Math.sin((x[i] as number) / 10) * 5 + 0.5 * Math.sin(i * 12.9898);
  }
  return { x, y, kind, dfs, resample: { kind: 'bootstrap', resamples }, seed, order: orderByX(x) };
}

function recorder(cancelAfter = Infinity): Progress & { reports: [number, number][] } {
  const reports: [number, number][] = [];
  return {
    reports,
    report(done, total) {
      reports.push([done, total]);
    },
    cancelled: () => reports.length >= cancelAfter,
  };
}

describe('runners', () => {
  it('inlineRunner gives identical results for the same seed and different ones for another seed', async () => {
    // Tolerance 0: the same operations on the same inputs must give the same doubles.
    const p = problemOf(MCYCLE, 'natural-spline', [3, 5, 7], { kind: 'folds', folds: 5, repeats: 2 }, 17);
    const a = await inlineRunner.run(p, 10);
    const b = await inlineRunner.run(p, 10);
    assert.deepEqual(a, b);
    const c = await inlineRunner.run({ ...p, seed: 18 }, 10);
    const differs = a.some((e, r) => e.some((v, j) => Math.abs(v - ((c[r] as Float64Array)[j] as number)) > 1e-6 * Math.abs(v)));
    assert.ok(differs, 'another seed gives other folds and other errors');
    const boot = problemOf(MCYCLE, 'natural-spline', [4], { kind: 'bootstrap', resamples: 5 }, 17);
    assert.deepEqual(await inlineRunner.run(boot, 5), await inlineRunner.run(boot, 5));
  });

  it('workerRunner gives results identical to inlineRunner on 30,000 rows x 10 resamples, in resample order, with progress', async function () {
    this.timeout(120_000);
    const p = bigProblem('natural-spline', [2, 3, 4, 5, 6, 7, 8, 9, 10, 11], 10, 77);
    const progress = recorder();
    // Count the threads the pool starts (it must not fall back to inline for this size).
    const { created, result: threaded } = await countingWorkers(() => workerRunner(2).run(p, 10, progress));
    assert.equal(created.length, 2, 'two worker threads');
    const inline = await inlineRunner.run(p, 10);
    // Tolerance 0: each resample depends only on (seed, index), so the doubles must be identical.
    assert.equal(threaded.length, 10);
    for (let r = 0; r < 10; r++) assert.deepEqual(Array.from(threaded[r] as Float64Array), Array.from(inline[r] as Float64Array), `resample ${r}`);
    assert.ok(
      threaded.every((e) => e.every((v) => Number.isFinite(v) && v > 0)),
      'all errors finite',
    );
    assert.deepEqual(
      progress.reports.map(([d]) => d),
      Array.from({ length: 10 }, (_, i) => i + 1),
    );
    assert.ok(progress.reports.every(([, t]) => t === 10));
  });

  it("workerRunner with this thread's share starts one worker fewer, and the two take every resample once with the results of inlineRunner (bootstrap and folds, weighted)", async function () {
    this.timeout(120_000);
    const w = Float64Array.from({ length: 30_000 }, (_, i) => 0.5 + ((i * 7) % 11) / 10);
    for (const p of [bigProblem('natural-spline', [2, 4, 6, 9], 12, 5), { ...bigProblem('natural-spline', [3, 5, 8], 12, 6), w, resample: { kind: 'folds', folds: 4, repeats: 3 } as const }]) {
      const progress = recorder();
      const { created, result: shared } = await countingWorkers(() => workerRunner(2, { mainThreadShare: true }).run(p, 12, progress));
      assert.equal(created.length, 1, 'one worker thread besides this one');
      const inline = await inlineRunner.run(p, 12);
      // Tolerance 0: each resample depends only on (seed, index), wherever it runs.
      for (let r = 0; r < 12; r++) assert.deepEqual(Array.from(shared[r] as Float64Array), Array.from(inline[r] as Float64Array), `${p.resample.kind}: resample ${r}`);
      assert.deepEqual(
        progress.reports.map(([d]) => d),
        Array.from({ length: 12 }, (_, i) => i + 1),
      );
    }
  });

  it('an engine given the rows prepared once in shared memory (sharedRows), without x and y, gives the results of one that prepares its own (bootstrap, folds, bundles; weighted or not)', () => {
    const base = bigProblem('natural-spline', [2, 3, 5, 8, 12], 6, 21);
    const w = Float64Array.from({ length: base.x.length }, (_, i) => 0.25 + ((i * 13) % 17) / 8);
    const schemes: ResampleSpec[] = [
      { kind: 'bootstrap', resamples: 6 },
      { kind: 'folds', folds: 3, repeats: 2 },
      { kind: 'bundles', resamples: 6 },
    ];
    for (const weights of [undefined, w])
      for (const resample of schemes) {
        const p: ResampleProblem = { ...base, w: weights, resample };
        const rows = sharedRows(p);
        assert.ok(rows && rows.layout.perm.buffer instanceof SharedArrayBuffer, 'the rows are in shared memory');
        const own = new ResampleEngine(p);
        const given = new ResampleEngine({ ...p, x: new Float64Array(0), y: new Float64Array(0), rows });
        const a = new Float64Array(own.outputLength);
        const b = new Float64Array(given.outputLength);
        for (let r = 0; r < 6; r++) {
          own.run(r, a);
          given.run(r, b);
          assert.deepEqual(Array.from(b), Array.from(a), `${resample.kind}${weights ? ', weighted' : ''}: resample ${r}`);
        }
      }
    // Kinds that refit on weighted rows have no such rows.
    assert.equal(sharedRows({ ...base, kind: 'polynomial', dfs: [2, 3] }), undefined);
  });

  it('workers started early take the next run, starting no others, with the same results as inline', async function () {
    this.timeout(120_000);
    // 30,000 rows x 10 resamples: above the size the pool runs inline.
    const p = bigProblem('natural-spline', [3, 5, 8], 10, 12);
    let startedEarly = 0;
    const { created, result: threaded } = await countingWorkers((made) => {
      startWorkersEarly(2);
      startedEarly = made.length;
      return workerRunner(2).run(p, 10);
    });
    assert.equal(startedEarly, 2, 'two workers started ahead of the run');
    assert.equal(created.length, 2, 'the run took the started workers');
    assert.equal(threaded.length, 10);
    const inline = await inlineRunner.run(p, 10);
    for (let r = 0; r < 10; r++) assert.deepEqual(Array.from(threaded[r] as Float64Array), Array.from(inline[r] as Float64Array), `resample ${r}`);
  });

  it('workerRunner rejects with CancelledError when cancelled and terminates its workers', async function () {
    this.timeout(120_000);
    // Polynomial refits are O(n p^2) per resample, so 200 resamples keep two threads busy for
    // seconds; the run is cancelled as soon as the first resample is reported.
    const p = bigProblem('polynomial', [1, 2, 3, 4, 5, 6, 7, 8], 200, 5);
    const exits: Promise<number>[] = [];
    const Original = workerThreads.Worker;
    workerThreads.Worker = class extends Original {
      constructor(...args: ConstructorParameters<typeof Original>) {
        super(...args);
        exits.push(new Promise((res) => this.once('exit', res)));
      }
    };
    const progress = recorder(1);
    try {
      await assert.rejects(workerRunner(2).run(p, 200, progress), CancelledError);
    } finally {
      workerThreads.Worker = Original;
    }
    assert.equal(exits.length, 2);
    const codes = await Promise.all(exits);
    // A worker that ran to its end exits with code 0; a terminated one with code 1 (Node worker_threads docs).
    assert.deepEqual(codes, [1, 1], `exit codes ${codes.join(', ')}`);
    assert.ok(progress.reports.length < 200, `${progress.reports.length} of 200 resamples reported`);
  });

  it('inlineRunner rejects with CancelledError when cancelled', async () => {
    const p = problemOf(MCYCLE, 'natural-spline', [3, 5], { kind: 'bootstrap', resamples: 20 }, 1);
    const progress = recorder(3);
    await assert.rejects(inlineRunner.run(p, 20, progress), CancelledError);
    assert.equal(progress.reports.length, 3);
  });
});

describe('ResampleEngine with the cubic smoothing spline', () => {
  it('ResampleEngine(smooth, boot) gives the errors of smoothing splines refitted at the all-row lambda on the bootstrap rows (mcycle, df 4 and 8)', () => {
    const r = compareWithBruteForce(MCYCLE, 'smoothing-spline', [4, 8], { kind: 'bootstrap', resamples: 4 }, 11);
    assert.ok(r.compared >= 8);
  });
  it('ResampleEngine(smooth, cv) gives the errors of smoothing splines refitted on the training folds (cars with weights 1/speed, df 3 and 5)', () => {
    const r = compareWithBruteForce(CARS_W, 'smoothing-spline', [3, 5], { kind: 'folds', folds: 5, repeats: 1 }, 2);
    assert.ok(r.compared >= 10);
  });
});

describe('resampling draws on the power-sum path', () => {
  it('folds draws fill the same sums and held-out rows, bit for bit, with the one-pass fold sums as with a call per row', () => {
    // The engine offers addByLabel (core/fit/powerSums/cells.ts); the folds scheme falls back to add() per row without it.
    const n = 2000;
    const x = Float64Array.from({ length: n }, (_, i) => Math.round(Math.sin(i * 0.37) * 300) / 100);
    const y = Float64Array.from({ length: n }, (_, i) => Math.cos(i) + (x[i] as number));
    const w = Float64Array.from({ length: n }, (_, i) => 0.5 + ((i * 7) % 5) / 4);
    const cells = buildCells(x, [Float64Array.of(-3, -1, 0.5, 3), Float64Array.of(-3, 0, 3)]);
    const len = (cells.breaks.length - 1) * SUMS_PER_CELL;
    const order = orderByX(x);
    const state = (kernels: boolean): DrawState => {
      const train = new Float64Array(len);
      const test = new Float64Array(len);
      const powerSums: PowerSumAccess = {
        train,
        test,
        add: (target, i, wi) => accumulateRow(target, cells.cell[i] as number, cells.t[i] as number, y[i] as number, wi),
        ...(kernels ? { addByLabel: (labels: Uint16Array, out: Float64Array) => accumulateByLabel(cells, y, w, labels, out, len) } : {}),
      };
      return { n, seed: 4, order, w, weights: undefined, testIdx: new Int32Array(n), powerSums, scratch: {} };
    };
    const spec = { kind: 'folds', folds: 5, repeats: 2 } as const;
    const scheme = resamplingScheme(spec);
    const [a, b] = [state(true), state(false)];
    // Resamples 0, 2, ..., 8: folds of both repeats.
    for (let r = 0; r < 10; r += 2) {
      const na = scheme.draw?.(spec, r, a);
      const nb = scheme.draw?.(spec, r, b);
      assert.equal(na, nb);
      assert.deepEqual(a.testIdx.subarray(0, na), b.testIdx.subarray(0, nb));
      for (const part of ['train', 'test'] as const) {
        const [sa, sb] = [a.powerSums?.[part] as Float64Array, b.powerSums?.[part] as Float64Array];
        for (let k = 0; k < len; k++) assert.ok(Object.is(sa[k], sb[k]), `resample ${r} ${part}[${k}]`);
      }
    }
  });
});
