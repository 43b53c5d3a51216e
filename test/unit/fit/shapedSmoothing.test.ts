/**
 * Shape-constrained cubic smoothing spline (core/fit/shapedSmoothing/), through its own
 * functions, fitCurve, the resampling engine and the command line.
 *
 * External checks:
 * - R 4.2 with quadprog (Goldfarb & Idnani's dual active-set method) solving the same
 *   penalised problem built independently from splines::splineDesign, on R's open datasets
 *   cars, Puromycin, airquality, pressure and trees: fixture
 *   test/reference/fixtures/shapedSmoothing.json from test/reference/r/shapedSmoothing.R
 *   (regenerate with `Rscript test/reference/r/shapedSmoothing.R`). Both sides are exact
 *   finite algorithms on a problem of condition number below 1e5 (see the script), so
 *   coefficients, fitted values and leverages are compared at 1e-8 relative to their scale.
 * - The state-space smoother of core/fit/smoothingSpline/ (itself checked against R's
 *   smooth.spline in test/reference/smooth.test.ts): the unconstrained minimiser computed by
 *   the banded QR here must equal it (1e-8 relative), and a fit whose constraints are
 *   inactive must be the unconstrained fit (1e-8).
 * Properties on seeded data (test/unit/stats/seededNormal.ts) around stated monotone,
 * convex, concave and non-negative curves whose unconstrained fit breaks the shape: the
 * shape holds on a dense grid (4001 points) up to 1e-10 times the curve's scale.
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { FitError } from '../../../core/errors';
import { bandsAt } from '../../../core/fit/bands';
import { fitCurve, prepareData } from '../../../core/fit/index';
import { checkShapedSmoothingSize, fitShapedSmoothingSpline, MAX_SHAPED_SMOOTHING_DISTINCT, penalisedCoefficients, shapedSmoothingSplineAtLambda } from '../../../core/fit/shapedSmoothing';
import { SHAPES } from '../../../core/fit/shape';
import { fitSmoothingSpline, lambdaForDf } from '../../../core/fit/smoothingSpline';
import { ERRORS_PER_CANDIDATE, ResampleEngine } from '../../../core/tune/engine';
import { foldLabels } from '../../../core/registry/resampling/index';
import { orderByX } from '../../../core/tune/plan';
import { tuneCurve } from '../../../core/tune/tune';
import type { FitResult, Shape, XYData } from '../../../core/types';
import { runMain } from '../node/runMain';
import { seededNormals } from '../stats/seededNormal';

interface RCase {
  readonly name: string;
  readonly source: string;
  readonly x: number[];
  readonly y: number[];
  readonly w: number[] | null;
  readonly shapes: Shape[];
  readonly df: number;
  /** null for df = 2 (lambda = infinity, the straight line). */
  readonly lambda: number | null;
  readonly rows: number;
  readonly rank: number;
  readonly coefficients: number[];
  readonly fitted: number[];
  readonly leverage: number[];
  readonly effectiveDf: number;
}
const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'shapedSmoothing.json'), 'utf8')) as { cases: RCase[] };

function caseData(c: RCase): XYData {
  return { x: Float64Array.from(c.x), y: Float64Array.from(c.y), ...(c.w ? { w: Float64Array.from(c.w) } : {}) };
}

/** n rows with x spread unevenly on [0, 10] (distinct) and y = truth(x) + sd * noise, seeded. */
function noisy(seed: number, n: number, truth: (x: number) => number, sd: number): XYData {
  const u = seededNormals(seed, 2 * n);
  const x = Float64Array.from({ length: n }, (_, i) => 10 * (0.5 + 0.5 * Math.tanh(0.8 * (u[i] as number))));
  const y = Float64Array.from(x, (xi, i) => truth(xi) + sd * (u[n + i] as number));
  return { x, y };
}

/** The curve on `m` points from lower to upper, widened by `out` times the range at each end. */
function dense(fit: FitResult, out = 0, m = 4001): Float64Array {
  const { lower, upper } = fit.curve;
  const a = lower - out * (upper - lower);
  const b = upper + out * (upper - lower);
  return Float64Array.from({ length: m }, (_, k) => fit.curve.value(a + ((b - a) * k) / (m - 1)));
}

function maxAbs(v: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < v.length; i++) s = Math.max(s, Math.abs(v[i] as number));
  return s;
}

/** Largest violation of `shape` by the grid values (0 when it holds), relative to the values' scale. */
function violation(v: Float64Array, shape: Shape): number {
  let worst = 0;
  for (let k = 0; k < v.length; k++) {
    const d1 = k + 1 < v.length ? (v[k + 1] as number) - (v[k] as number) : 0;
    const d2 = k + 2 < v.length ? (v[k + 2] as number) - 2 * (v[k + 1] as number) + (v[k] as number) : 0;
    const bad = shape === 'increasing' ? -d1 : shape === 'decreasing' ? d1 : shape === 'convex' ? -d2 : shape === 'concave' ? d2 : -(v[k] as number);
    worst = Math.max(worst, bad);
  }
  return worst / Math.max(maxAbs(v), 1e-300);
}

const GRID_TOLERANCE = 1e-10;

function assertClose(what: string, got: ArrayLike<number>, want: ArrayLike<number>, tol: number): void {
  assert.equal(got.length, want.length, `${what}: length`);
  const scale = Math.max(maxAbs(want), 1e-300);
  for (let i = 0; i < want.length; i++) {
    const d = Math.abs((got[i] as number) - (want[i] as number));
    assert.ok(d <= tol * scale, `${what}[${i}]: ${got[i]} vs ${want[i]} (difference ${d.toExponential(2)}, allowed ${(tol * scale).toExponential(2)})`);
  }
}

describe('penalisedCoefficients (banded QR of the penalised least-squares problem)', () => {
  it('penalisedCoefficients equals the state-space smoother of core/fit/smoothingSpline/ (two routes to one minimiser)', () => {
    for (const [seed, n] of [
      [1, 30],
      [2, 300],
      [3, 900],
    ] as const) {
      const d = noisy(seed, n, (x) => Math.sin(x), 0.3);
      for (const df of [2.5, 4, 9, 20]) {
        const unconstrained = fitSmoothingSpline(d, df);
        assertClose(`seed ${seed}, n ${n}, df ${df}`, penalisedCoefficients(d, unconstrained.lambda as number), unconstrained.coefficients, 1e-8);
      }
    }
  });

  it('penalisedCoefficients pools tied x and honours prior weights as the smoother does', () => {
    // datasets::cars (tied speeds) with prior weights 1 / speed, from the R fixture.
    const c = fixture.cases.find((k) => k.w !== null) as RCase;
    const d = caseData(c);
    const unconstrained = fitSmoothingSpline(d, 6);
    assertClose('cars weighted', penalisedCoefficients(d, unconstrained.lambda as number), unconstrained.coefficients, 1e-8);
  });
});

describe('fitShapedSmoothingSpline against R (quadprog::solve.QP on the same penalised problem)', () => {
  for (const c of fixture.cases) {
    it(`shapedSmoothingSplineAtLambda matches R for ${c.name} (${c.source})`, () => {
      const fit = shapedSmoothingSplineAtLambda(caseData(c), c.lambda ?? Infinity, c.shapes);
      const cons = fit.model?.constraints;
      assert.ok(cons, 'constraint report');
      assert.equal(cons.total, c.rows, 'number of inequality rows');
      assert.ok(c.rank > 0, 'the R fixture has active constraints (so the check is not vacuous)');
      assert.equal(cons.active, c.rank, 'independent active constraints');
      assertClose('B-spline coefficients (R: solve.QP)', fit.coefficients, c.coefficients, 1e-8);
      assertClose('fitted values', fit.fitted, c.fitted, 1e-8);
      // Leverage at the active set (R: H - H A_a'(A_a H A_a')^+ A_a H); compared at 1e-8 absolute.
      assertClose('leverage', fit.leverage, c.leverage, 1e-8 / Math.max(maxAbs(c.leverage), 1e-300));
      assert.ok(Math.abs(cons.effectiveDf - c.effectiveDf) <= 1e-8, `effectiveDf ${cons.effectiveDf}, R ${c.effectiveDf}`);
      assert.ok(cons.effectiveDf < fit.df, 'active constraints lower the trace below the candidate df');
    });
  }

  it("fitShapedSmoothingSpline finds the lambda R finds for each df and then R's fit (lambda within 1e-6)", () => {
    for (const c of fixture.cases) {
      const fit = fitShapedSmoothingSpline(caseData(c), c.df, c.shapes);
      if (c.lambda === null) {
        assert.equal(fit.lambda, Infinity, `${c.name}: df 2 is the straight line`);
      } else {
        // docs/design.md, "Cubic smoothing spline": the trace matches df within 1e-6; R's root search is independent.
        assert.ok(Math.abs((fit.lambda as number) / c.lambda - 1) <= 1e-6, `${c.name}: lambda ${fit.lambda}, R ${c.lambda}`);
        assert.ok(Math.abs(lambdaForDf(caseData(c), c.df) / c.lambda - 1) <= 1e-6, `${c.name}: lambdaForDf`);
      }
      assertClose(`${c.name}: coefficients`, fit.coefficients, c.coefficients, 1e-6);
      assert.ok(Math.abs(fit.df - c.df) <= 1e-6, `${c.name}: df stays the candidate's unconstrained trace`);
    }
  });
});

describe('fitShapedSmoothingSpline: the shape on a dense grid', () => {
  // Truths: saturating rise, exponential growth, decreasing concave parabola, a hinge at 0.
  const cases: { name: string; truth: (x: number) => number; sd: number; shapes: Shape[]; df: number; out: number }[] = [
    { name: 'saturating rise 1 - exp(-x/2), increasing', truth: (x) => 1 - Math.exp(-x / 2), sd: 0.08, shapes: ['increasing'], df: 10, out: 0.2 },
    { name: 'exp(x/3)/10, convex', truth: (x) => Math.exp(x / 3) / 10, sd: 0.3, shapes: ['convex'], df: 10, out: 0.2 },
    { name: 'exp(x/3)/10, increasing and convex', truth: (x) => Math.exp(x / 3) / 10, sd: 0.3, shapes: ['increasing', 'convex'], df: 12, out: 0.2 },
    { name: '3 - 0.05 x^2, decreasing and concave', truth: (x) => 3 - 0.05 * x * x, sd: 0.3, shapes: ['decreasing', 'concave'], df: 9, out: 0.2 },
    { name: 'max(0, x - 6)^2 / 4, non-negative', truth: (x) => Math.max(0, x - 6) ** 2 / 4, sd: 0.3, shapes: ['nonnegative'], df: 12, out: 0 },
    { name: 'max(0, x - 6)^2 / 4, non-negative and increasing', truth: (x) => Math.max(0, x - 6) ** 2 / 4, sd: 0.3, shapes: ['increasing', 'nonnegative'], df: 12, out: 0 },
  ];
  for (const c of cases) {
    it(`fitCurve(smooth, shape) keeps the shape everywhere for ${c.name}`, () => {
      const d = noisy(7, 150, c.truth, c.sd);
      const free = fitSmoothingSpline(d, c.df);
      // Second differences on the grid are of order h^2 f'', so real bends show at 1e-6 here; rounding stays near 1e-15.
      assert.ok(
        c.shapes.some((s) => violation(dense(free, c.out), s) > 100 * GRID_TOLERANCE),
        'the unconstrained fit breaks the shape (so the check is not vacuous)',
      );
      const fit = fitCurve(d, { kind: 'smoothing-spline', df: c.df, shape: c.shapes });
      // Within the data range always; beyond it (linear continuation) for monotone and convex/concave shapes.
      for (const s of c.shapes) assert.ok(violation(dense(fit, c.out), s) <= GRID_TOLERANCE, `${s} breaks by ${violation(dense(fit, c.out), s)}`);
      const cons = fit.model?.constraints;
      assert.ok(cons && cons.active > 0 && cons.effectiveDf < c.df);
      assert.equal(fit.lambda, free.lambda, 'lambda stays that of the unconstrained df');
      assert.ok(fit.rss >= free.rss, 'the constrained fit cannot fit the rows better');
    });
  }

  it('a constrained fit never breaks its shape on seeded data (property, every single shape and df 3..14)', () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 1_000_000 }), fc.integer({ min: 3, max: 14 }), fc.constantFrom(...SHAPES), (seed, df, shape) => {
        const d = noisy(seed, 60, (x) => Math.sin(x / 2) + 1, 0.4);
        const fit = fitShapedSmoothingSpline(d, df, [shape]);
        return violation(dense(fit, 0, 1001), shape) <= GRID_TOLERANCE;
      }),
      { numRuns: 40, seed: 11 },
    );
  });

  it('bands of a constrained fit are finite, non-negative and sum of leverages is the reported effectiveDf', () => {
    const d = noisy(3, 120, (x) => 1 - Math.exp(-x / 2), 0.1);
    const fit = fitCurve(d, { kind: 'smoothing-spline', df: 9, shape: ['increasing'] });
    const cons = fit.model?.constraints;
    assert.ok(cons && cons.active > 0);
    let trace = 0;
    for (const h of fit.leverage) trace += h;
    assert.ok(Math.abs(trace - cons.effectiveDf) <= 1e-12 * cons.effectiveDf);
    const xs = Float64Array.from({ length: 201 }, (_, k) => fit.curve.lower + ((fit.curve.upper - fit.curve.lower) * k) / 200);
    const b = bandsAt(fit, xs);
    for (let k = 0; k < xs.length; k++) {
      assert.ok(Number.isFinite(b.se[k] as number) && (b.se[k] as number) >= 0, `se at ${xs[k]}`);
      assert.ok((b.ciLower[k] as number) <= (b.fit[k] as number) && (b.fit[k] as number) <= (b.ciUpper[k] as number));
    }
  });
});

describe('fitShapedSmoothingSpline: inactive constraints and limits', () => {
  it('with inactive constraints the fit is the unconstrained smoothing spline (coefficients, fitted, leverage, bands at 1e-8)', () => {
    // A steep rise with little noise: the unconstrained fit is already increasing, non-negative and convex.
    const d = noisy(5, 80, (x) => 5 + x + 0.05 * x * x, 0.02);
    for (const df of [2, 4, 7]) {
      const free = fitSmoothingSpline(d, df);
      const fit = fitCurve(d, { kind: 'smoothing-spline', df, shape: ['increasing', 'nonnegative', 'convex'] });
      assert.deepEqual(fit.model?.constraints, { total: fit.model?.constraints?.total, active: 0, effectiveDf: free.df });
      assert.ok(Math.abs(fit.df - free.df) <= 1e-8 && fit.lambda === free.lambda);
      assertClose(`df ${df}: coefficients`, fit.coefficients, free.coefficients, 1e-8);
      assertClose(`df ${df}: fitted`, fit.fitted, free.fitted, 1e-8);
      assertClose(`df ${df}: leverage`, fit.leverage, free.leverage, 1e-8);
      const xs = Float64Array.of(-1, 0.5, 3, 9.99, 12);
      assertClose(`df ${df}: confidence band`, bandsAt(fit, xs).ciUpper, bandsAt(free, xs).ciUpper, 1e-8);
      assert.ok(fit.notes.some((n) => /none is active/.test(n)));
    }
  });

  it('fitShapedSmoothingSpline without shapes is the unconstrained fit', () => {
    const d = noisy(6, 40, (x) => Math.cos(x), 0.2);
    const free = fitSmoothingSpline(d, 5);
    assertClose('coefficients', fitShapedSmoothingSpline(d, 5, []).coefficients, free.coefficients, 0);
  });

  it(`refuses more than ${MAX_SHAPED_SMOOTHING_DISTINCT} distinct x with the limit and the alternative, before any work`, () => {
    const n = MAX_SHAPED_SMOOTHING_DISTINCT + 1;
    const d = { x: Float64Array.from({ length: n }, (_, i) => i), y: Float64Array.from({ length: n }, (_, i) => Math.sqrt(i)) };
    const message = new RegExp(`limited to ${MAX_SHAPED_SMOOTHING_DISTINCT} distinct x values.*the data has ${n}\\. Use the shape-constrained natural spline \\(--curve natural-spline\\)`);
    assert.throws(
      () => fitCurve(d, { kind: 'smoothing-spline', df: 5, shape: ['increasing'] }),
      (e: unknown) => e instanceof FitError && message.test(e.message),
    );
    assert.throws(() => checkShapedSmoothingSize(n), FitError);
    checkShapedSmoothingSize(MAX_SHAPED_SMOOTHING_DISTINCT);
    // Without a shape the smoothing spline has no such limit.
    assert.ok(fitCurve(d, { kind: 'smoothing-spline', df: 5 }).df > 4.99);
  });

  it('contradictory or unknown shapes and non-least-squares options are refused with the reason', () => {
    const d = noisy(2, 30, (x) => x, 0.1);
    assert.throws(() => fitCurve(d, { kind: 'smoothing-spline', df: 4, shape: ['increasing', 'decreasing'] }), /only allow a constant/);
    assert.throws(() => fitShapedSmoothingSpline(d, 4, ['wiggly' as Shape]), /unknown shape "wiggly"/);
    assert.throws(() => fitCurve(d, { kind: 'smoothing-spline', df: 4, shape: ['convex'], robust: true }), /cubic smoothing spline has no robust fit/);
  });
});

describe('tuning shape-constrained smoothing splines', () => {
  const cars = caseData(fixture.cases[0] as RCase); // datasets::cars (Ezekiel 1930), 19 distinct speeds

  it("ResampleEngine refits each fold at the candidate's full-data lambda: errors equal direct refits (1e-10)", () => {
    const dfs = [3, 6, 9];
    const lambdas = dfs.map((df) => lambdaForDf(cars, df));
    // The engine takes each candidate's lambda for x scaled to [0, 1] over the range of all rows (FitResult.lambdaScaled).
    const scaled = dfs.map((df) => fitSmoothingSpline(cars, df).lambdaScaled as number);
    const shape: Shape[] = ['increasing', 'convex'];
    const folds = 5;
    const engine = new ResampleEngine({
      x: cars.x,
      y: cars.y,
      kind: 'smoothing-spline',
      dfs,
      params: scaled,
      resample: { kind: 'folds', folds, repeats: 1 },
      seed: 3,
      order: orderByX(cars.x),
      model: { shape },
    });
    const labels = new Uint16Array(cars.x.length);
    foldLabels(orderByX(cars.x), folds, 3, 0, labels);
    let anyActive = false;
    for (let fold = 0; fold < folds; fold++) {
      const out = new Float64Array(dfs.length * ERRORS_PER_CANDIDATE);
      engine.run(fold, out);
      const train = [...labels.keys()].filter((i) => labels[i] !== fold);
      const test = [...labels.keys()].filter((i) => labels[i] === fold);
      dfs.forEach((df, k) => {
        const fit = shapedSmoothingSplineAtLambda({ x: Float64Array.from(train, (i) => cars.x[i] as number), y: Float64Array.from(train, (i) => cars.y[i] as number) }, lambdas[k] as number, shape);
        if ((fit.model?.constraints?.active ?? 0) > 0) anyActive = true;
        let sse = 0;
        for (const i of test) sse += ((cars.y[i] as number) - fit.curve.value(cars.x[i] as number)) ** 2;
        const rmse = Math.sqrt(sse / test.length);
        assert.ok(Math.abs((out[k] as number) - rmse) <= 1e-10 * rmse, `fold ${fold}, df ${df}: engine ${out[k]}, refit ${rmse}`);
      });
    }
    assert.ok(anyActive, 'some refit has active constraints');
  });

  it('tuneCurve tunes a shape-constrained smoothing spline and refuses an oversized one once, with the limit', async () => {
    const { result, fits } = await tuneCurve(prepareData(cars), { kind: 'smoothing-spline', shape: ['increasing'], resample: { kind: 'bootstrap', resamples: 10 }, rule: { kind: 'one-se' }, seed: 1 });
    assert.ok(result.candidates.every((c) => c.skipped === undefined && Number.isFinite(c.errors.rmse?.mean)));
    assert.ok(fits.get(result.selected.df)?.model?.constraints, 'the chosen fit carries its constraint report');
    const n = MAX_SHAPED_SMOOTHING_DISTINCT + 1;
    const big = prepareData({ x: Float64Array.from({ length: n }, (_, i) => i), y: Float64Array.from({ length: n }, (_, i) => i) });
    await assert.rejects(
      tuneCurve(big, { kind: 'smoothing-spline', shape: ['increasing'], resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1 }),
      (e: unknown) => e instanceof FitError && /limited to/.test(e.message) && !/df 2:/.test(e.message),
    );
  });
});

describe('knotwise fit --curve smoothing-spline --shape', () => {
  let dir = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-shaped-smooth-'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('knotwise fit --curve smoothing-spline --shape increasing tunes and reports the constraints (exit 0)', async () => {
    const c = fixture.cases[0] as RCase; // datasets::cars
    const file = join(dir, 'cars.csv');
    writeFileSync(file, `speed,dist\n${c.x.map((x, i) => `${x},${c.y[i]}`).join('\n')}\n`);
    const r = await runMain('fit', file, '--x', 'speed', '--y', 'dist', '--curve', 'smoothing-spline', '--shape', 'increasing', '--resampling', 'folds:5', '--print-only', '--json');
    assert.equal(r.code, 0, r.stderr);
    const j = JSON.parse(r.stdout) as { model: { shape: string[] }; fit: { curve: string; model: { constraints: { total: number; active: number; effectiveDf: number } } } };
    assert.deepEqual(j.model.shape, ['increasing']);
    assert.equal(j.fit.curve, 'smoothing-spline');
    assert.equal(j.fit.model.constraints.total, 20, '19 distinct speeds: 21 coefficients, 20 differences');
    // A single df with active constraints: datasets::cars at df 8 (R fixture: 3 active).
    const one = await runMain('fit', file, '--x', 'speed', '--y', 'dist', '--curve', 'smoothing-spline', '--shape', 'increasing', '--df', '8', '--print-only', '--json');
    assert.equal(one.code, 0, one.stderr);
    const k = JSON.parse(one.stdout) as { fit: { model: { constraints: { active: number; effectiveDf: number } } } };
    assert.equal(k.fit.model.constraints.active, c.rank);
    assert.ok(Math.abs(k.fit.model.constraints.effectiveDf - c.effectiveDf) <= 1e-6);
  });

  it(`refuses more than ${MAX_SHAPED_SMOOTHING_DISTINCT} distinct x with exit 2 and a message naming the limit and the natural spline`, async () => {
    const file = join(dir, 'big.csv');
    const n = MAX_SHAPED_SMOOTHING_DISTINCT + 500;
    writeFileSync(file, `x,y\n${Array.from({ length: n }, (_, i) => `${i / 10},${Math.log1p(i)}`).join('\n')}\n`);
    const r = await runMain('fit', file, '--x', 'x', '--y', 'y', '--curve', 'smoothing-spline', '--shape', 'increasing', '--print-only');
    assert.equal(r.code, 2, r.stderr);
    assert.doesNotMatch(r.stderr, /internal error/);
    assert.match(r.stderr, new RegExp(`limited to ${MAX_SHAPED_SMOOTHING_DISTINCT} distinct x values`));
    assert.match(r.stderr, new RegExp(`the data has ${n}`));
    assert.match(r.stderr, /--curve natural-spline/);
  });
});
