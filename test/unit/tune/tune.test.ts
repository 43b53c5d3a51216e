/**
 * Tests of tuneCurve and defaultCandidates (core/tune/tune.ts) and of the held-out check of
 * analyse (core/analysis/analysis.ts).
 *
 * Fixed data: MASS::mcycle (Silverman 1985) and datasets::cars (Ezekiel 1930), with R's
 * reference values from test/reference/fixtures/fits.json (written by
 * test/reference/r/fits.R with R 4.2: `lm` with `splines::ns`; leave-one-out RMSE there is
 * computed by brute-force refits, GCV as (rss/n) / (1 - df/n)^2). Compared at 1e-8 relative.
 * The held-out checks use seeded data from a small generator in this file.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse, HOLDOUT_WARN_RATIO } from '../../../core/analysis/analysis';
import { CancelledError, InputError } from '../../../core/errors';
import { prepareData } from '../../../core/fit/prepared';
import { holdoutMask, orderByX } from '../../../core/tune/plan';
import { defaultCandidates, inlineRunner, tuneCurve } from '../../../core/tune/tune';
import type { Progress } from '../../../core/tune/types';
import type { XYData } from '../../../core/types';

const REL = 1e-8;

interface FixtureCase {
  readonly dataset: string;
  /** The R basis of the case (test/reference/r/fits.R): 'natural' is splines::ns. */
  readonly family: string;
  readonly df: number;
  readonly looRmse: number;
  readonly gcv: number;
}

const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as {
  datasets: Record<string, { x: number[]; y: number[] }>;
  cases: FixtureCase[];
};

function dataset(name: string): XYData {
  const d = fixture.datasets[name];
  if (!d) throw new Error(`dataset ${name} missing from fits.json`);
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y) };
}

function rCase(dataset: string, df: number): FixtureCase {
  const c = fixture.cases.find((k) => k.dataset === dataset && k.family === 'natural' && k.df === df);
  if (!c) throw new Error(`no R case for ${dataset} natural df ${df}`);
  return c;
}

const close = (a: number, b: number, rel: number): boolean => Math.abs(a - b) <= rel * Math.abs(b);

/** MASS::mcycle (133 rows, 94 distinct times). */
const MCYCLE = dataset('mcycle');
/** datasets::cars (50 rows, 19 distinct speeds). */
const CARS = dataset('cars');

/** The rows of datasets::cars with speed <= 12: 15 rows, 7 distinct speeds (4, 7, 8, 9, 10, 11, 12). */
function carsUpTo12(): XYData {
  const keep = Array.from(CARS.x.keys()).filter((i) => (CARS.x[i] as number) <= 12);
  return { x: Float64Array.from(keep, (i) => CARS.x[i] as number), y: Float64Array.from(keep, (i) => CARS.y[i] as number) };
}

/** Seeded uniform generator (mulberry32, a small 32-bit mixing generator) and normal deviates by Box-Muller. */
function normals(seed: number, n: number): Float64Array {
  let s = seed >>> 0;
  const uniform = (): number => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
  return out;
}

function recorder(cancelAfter = Infinity): Progress & { reports: [number, number, string][] } {
  const reports: [number, number, string][] = [];
  return {
    reports,
    report(done, total, message) {
      reports.push([done, total, message]);
    },
    cancelled: () => reports.length >= cancelAfter,
  };
}

describe('tuneCurve', () => {
  it('tuneCurve keeps candidates above the distinct-x count as skipped, with the reason in words (cars, 19 distinct speeds)', async () => {
    // datasets::cars has 19 distinct speeds (R: length(unique(cars$speed))); docs/design.md, "df": a
    // candidate whose df exceeds the number of distinct x values is skipped with that reason.
    const { result, fits } = await tuneCurve(prepareData(CARS), {
      kind: 'natural-spline',
      candidates: [25, 2, 3, 20, 4],
      resample: { kind: 'bootstrap', resamples: 20 },
      rule: { kind: 'one-se' },
      seed: 3,
    });
    assert.deepEqual(
      result.candidates.map((c) => c.df),
      [2, 3, 4, 20, 25],
    );
    for (const df of [20, 25]) {
      const c = result.candidates.find((k) => k.df === df);
      assert.ok(c?.skipped !== undefined, `df ${df} skipped`);
      assert.match(c.skipped, new RegExp(`df ${df} needs at least ${df} distinct x values; the data has 19`));
      assert.deepEqual(c.errors, {});
      assert.equal(fits.has(df), false);
    }
    for (const df of [2, 3, 4]) {
      const c = result.candidates.find((k) => k.df === df);
      assert.equal(c?.skipped, undefined);
      assert.equal(c?.errors.rmse?.values.length, 20);
      assert.ok(Number.isFinite(c?.errors.rmse?.mean) && Number.isFinite(c?.errors.mae?.se) && Number.isFinite(c?.errors.maxAbs?.mean));
      assert.ok(Number.isFinite(c?.aic) && Number.isFinite(c?.bic));
    }
    assert.ok([2, 3, 4].includes(result.selected.df));
    assert.match(result.selected.reason, /2 candidates were skipped/);
  });

  it('tuneCurve resamples the natural spline while it fits all rows, with every candidate given the errors of a resampling started after the fits (cars, with a df that cannot be placed)', async () => {
    // The early start leaves out df 25 (19 distinct speeds) and must give 2, 3 and 4 the same
    // numbers as the engine alone over exactly the fitted candidates.
    const prepared = prepareData(CARS);
    const resample = { kind: 'folds', folds: 5, repeats: 2 } as const;
    const { result } = await tuneCurve(prepared, { kind: 'natural-spline', candidates: [25, 2, 3, 4], resample, rule: { kind: 'one-se' }, seed: 8 });
    const after = await inlineRunner.run({ x: CARS.x, y: CARS.y, kind: 'natural-spline', dfs: [2, 3, 4], resample, seed: 8, order: orderByX(CARS.x) }, 10);
    [2, 3, 4].forEach((df, k) => {
      const errors = result.candidates.find((c) => c.df === df)?.errors;
      assert.deepEqual(
        errors?.rmse?.values,
        after.map((e) => e[k]),
        `df ${df} RMSE`,
      );
      assert.deepEqual(
        errors?.mae?.values,
        after.map((e) => e[3 + k]),
        `df ${df} MAE`,
      );
    });
  });

  it('tuneCurve skips, with the reason in words, a candidate that most bootstrap resamples cannot determine', async () => {
    // 7 distinct speeds and df 7: a bootstrap sample that misses one of them cannot fit 7
    // coefficients. Speeds 8 and 9 occur once each among the 15 rows, and a sample misses a
    // given row with probability (1 - 1/15)^15 = 0.355, so most samples miss at least one speed.
    const { result } = await tuneCurve(prepareData(carsUpTo12()), {
      kind: 'natural-spline',
      candidates: [2, 3, 7],
      resample: { kind: 'bootstrap', resamples: 20 },
      rule: { kind: 'least-error' },
      seed: 1,
    });
    const c7 = result.candidates.find((c) => c.df === 7);
    assert.match(c7?.skipped ?? '', /could not determine the curve in \d+ of 20 resamples/);
    assert.equal(result.candidates.find((c) => c.df === 2)?.skipped, undefined);
  });

  it('tuneCurve(loo) puts the exact leave-one-out RMSE of each candidate into errors.rmse.mean (mcycle, against R brute-force refits)', async () => {
    const { result, fits } = await tuneCurve(prepareData(MCYCLE), {
      kind: 'natural-spline',
      candidates: [2, 3, 4, 5, 6, 7, 8],
      resample: { kind: 'leave-one-out' },
      rule: { kind: 'least-error' },
      seed: 1,
    });
    assert.equal(result.metric, 'rmse');
    for (const c of result.candidates) {
      const fit = fits.get(c.df);
      assert.ok(fit && c.errors.rmse, `df ${c.df} evaluated`);
      // Same number by definition (tolerance 1e-12 relative).
      assert.ok(close(c.errors.rmse.mean, fit.looRmse, 1e-12), `df ${c.df}: ${c.errors.rmse.mean} vs fit.looRmse ${fit.looRmse}`);
      // Source: R 4.2, refits without each row (test/reference/r/fits.R), 1e-8 relative.
      const r = rCase('mcycle', c.df);
      assert.ok(close(c.errors.rmse.mean, r.looRmse, REL), `df ${c.df}: ${c.errors.rmse.mean} vs R ${r.looRmse}`);
      assert.ok(Number.isFinite(c.errors.rmse.se) && c.errors.rmse.se > 0, 'delta-method SE');
      assert.ok(c.errors.mae && c.errors.maxAbs && c.errors.mae.mean <= c.errors.rmse.mean && c.errors.maxAbs.mean >= c.errors.rmse.mean, 'MAE <= RMSE <= max');
    }
    // Lowest R LOO RMSE among df 2..8 in the fixture is at df 8 (23.998, table in fits.json).
    assert.equal(result.selected.df, 8);
  });

  it('tuneCurve(gcv) fills errors.gcv.mean with fit.gcv and compares GCV scores (mcycle, against R)', async () => {
    const { result, fits } = await tuneCurve(prepareData(MCYCLE), { kind: 'natural-spline', candidates: [3, 5, 7], resample: { kind: 'gcv' }, rule: { kind: 'one-se' }, seed: 1 });
    assert.equal(result.metric, 'gcv');
    assert.equal(result.selected.metric, 'gcv');
    for (const c of result.candidates) {
      const fit = fits.get(c.df);
      assert.ok(fit && c.errors.gcv, `df ${c.df}`);
      assert.ok(close(c.errors.gcv.mean, fit.gcv, 1e-12), `df ${c.df}: ${c.errors.gcv.mean} vs fit.gcv ${fit.gcv}`);
      // Source: R 4.2 (rss/n)/(1 - df/n)^2 from lm with ns (test/reference/r/fits.R), 1e-8 relative.
      assert.ok(close(c.errors.gcv.mean, rCase('mcycle', c.df).gcv, REL), `df ${c.df} vs R`);
      assert.equal(c.errors.rmse, undefined);
    }
    await assert.rejects(
      tuneCurve(prepareData(MCYCLE), { kind: 'natural-spline', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1, metric: 'rmse' }),
      (e: unknown) => e instanceof InputError && /GCV score/.test(e.message),
    );
    await assert.rejects(
      tuneCurve(prepareData(MCYCLE), { kind: 'natural-spline', candidates: [3], resample: { kind: 'leave-one-out' }, rule: { kind: 'least-error' }, seed: 1, metric: 'gcv' }),
      (e: unknown) => e instanceof InputError && /only available with gcv resampling/.test(e.message),
    );
  });

  it('tuneCurve uses the default natural candidates 2..min(12, distinct x)', async () => {
    // Issue #3 item 1: "for the natural spline, 2 up to the smaller of 12 and the number of distinct x".
    assert.deepEqual(defaultCandidates('natural-spline', 94), [2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    assert.deepEqual(defaultCandidates('natural-spline', 7), [2, 3, 4, 5, 6, 7]);
    assert.deepEqual(defaultCandidates('natural-spline', 2), [2]);
    const many = await tuneCurve(prepareData(MCYCLE), { kind: 'natural-spline', resample: { kind: 'leave-one-out' }, rule: { kind: 'least-error' }, seed: 1 });
    assert.deepEqual(
      many.result.candidates.map((c) => c.df),
      [2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12],
    );
    const few = await tuneCurve(prepareData(carsUpTo12()), { kind: 'natural-spline', resample: { kind: 'leave-one-out' }, rule: { kind: 'least-error' }, seed: 1 });
    assert.deepEqual(
      few.result.candidates.map((c) => c.df),
      [2, 3, 4, 5, 6, 7],
    );
  });

  it('tuneCurve records the seed and gives the same result for the same seed', async () => {
    const opts = { kind: 'natural-spline', candidates: [3, 5, 7], resample: { kind: 'folds', folds: 5, repeats: 2 }, rule: { kind: 'one-se' }, seed: 12345 } as const;
    const a = await tuneCurve(prepareData(MCYCLE), opts);
    const b = await tuneCurve(prepareData(MCYCLE), opts);
    assert.equal(a.result.seed, 12345);
    // Tolerance 0: same seed, same operations.
    assert.deepEqual(a.result.candidates, b.result.candidates);
    assert.equal(a.result.candidates[0]?.errors.rmse?.values.length, 10);
  });

  it('tuneCurve reports progress per resample and raises CancelledError when cancelled', async () => {
    const progress = recorder();
    await tuneCurve(prepareData(MCYCLE), { kind: 'natural-spline', candidates: [3, 5], resample: { kind: 'bootstrap', resamples: 12 }, rule: { kind: 'one-se' }, seed: 2 }, undefined, progress);
    const resamples = progress.reports.filter(([, total]) => total === 12).map(([done]) => done);
    assert.deepEqual(
      resamples,
      Array.from({ length: 12 }, (_, i) => i + 1),
    );
    assert.ok(
      progress.reports.every(([, , m]) => m.length > 0),
      'every report has a message',
    );

    for (const after of [0, 1, 4]) {
      const cancelling = recorder(after);
      await assert.rejects(
        tuneCurve(prepareData(MCYCLE), { kind: 'natural-spline', candidates: [3, 5], resample: { kind: 'bootstrap', resamples: 12 }, rule: { kind: 'one-se' }, seed: 2 }, undefined, cancelling),
        CancelledError,
        `cancelled after ${after} reports`,
      );
      assert.ok(cancelling.reports.length <= after + 1, `${cancelling.reports.length} reports after cancelling at ${after}`);
    }
  });
});

describe('analyse (held-out check set)', () => {
  const n = 2000;
  const fraction = 0.2;
  const seed = 9;
  const x = Float64Array.from({ length: n }, (_, i) => ((i * 0.6180339887498949) % 1) * 10);
  const noise = normals(4242, n);
  const clean = Float64Array.from(x, (v, i) => Math.sin(v) + 0.3 * (noise[i] as number));
  const options = { kind: 'natural-spline', resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'one-se' }, seed, holdout: fraction } as const;

  it('analyse(holdout) reports the held-out errors of the chosen fit next to the resampled estimate, without a warning when they agree', async () => {
    const a = await analyse({ x, y: clean }, options);
    const h = a.tune.holdout;
    assert.ok(h, 'held-out report');
    assert.equal(h.rows, Math.round(fraction * n));
    assert.equal(a.n, n - h.rows);
    assert.equal(h.fraction, fraction);
    // Recompute the held-out errors from the chosen curve on the held-out rows (tolerance 1e-12 relative).
    const mask = holdoutMask(orderByX(x), fraction, seed);
    let sse = 0;
    let sae = 0;
    let m = 0;
    for (let i = 0; i < n; i++) {
      if (mask[i] !== 1) continue;
      const e = (clean[i] as number) - a.chosen.curve.value(x[i] as number);
      sse += e * e;
      sae += Math.abs(e);
      m++;
    }
    assert.equal(m, h.rows);
    assert.ok(close(h.rmse, Math.sqrt(sse / m), 1e-12) && close(h.mae, sae / m, 1e-12), `held-out RMSE ${h.rmse}`);
    const chosen = a.tune.candidates.find((c) => c.df === a.tune.selected.df);
    assert.equal(h.resampledRmse, chosen?.errors.rmse?.mean);
    // 400 held-out rows with noise SD 0.3: both estimates are near 0.3, well within the warning ratio.
    assert.ok(h.rmse > 0.25 && h.rmse < 0.35, `held-out RMSE ${h.rmse}`);
    assert.equal(h.warning, undefined);
  });

  it('holdoutMask never holds out the rows at the ends of the x range, for any seed, so the fitted range is the data range', () => {
    const order = orderByX(x);
    for (let s = 0; s < 200; s++) {
      for (const f of [0.05, 0.2, 0.5]) {
        const mask = holdoutMask(order, f, s);
        assert.equal(mask[order[0] as number], 0, `seed ${s}, fraction ${f}: smallest x kept`);
        assert.equal(mask[order[n - 1] as number], 0, `seed ${s}, fraction ${f}: largest x kept`);
        assert.ok(mask.reduce((a, b) => a + b, 0) >= Math.round(f * n) - 2, 'about fraction n rows held out');
      }
    }
    assert.throws(() => holdoutMask(orderByX(Float64Array.of(1, 2)), 0.5, 1), /too few to hold any out/);
  });

  it('analyse(holdout) warns when the held-out rows are clearly worse than the resampled estimate', async () => {
    // Construct the case: shift exactly the rows the stratified split will hold out (the same
    // holdoutMask the analysis uses) by 5 noise SDs, so tuning sees clean data and the check set does not.
    const mask = holdoutMask(orderByX(x), fraction, seed);
    const shifted = Float64Array.from(clean, (v, i) => (mask[i] === 1 ? v + 1.5 : v));
    const a = await analyse({ x, y: shifted }, options);
    const h = a.tune.holdout;
    assert.ok(h);
    assert.ok(h.rmse > HOLDOUT_WARN_RATIO * h.resampledRmse, `held-out ${h.rmse} vs resampled ${h.resampledRmse}`);
    assert.ok(h.warning !== undefined && /held-out RMSE/.test(h.warning) && /resampled estimate/.test(h.warning), h.warning);
    // The tuning itself saw only clean rows: its resampled RMSE stays near the noise SD 0.3.
    assert.ok(h.resampledRmse < 0.35, `resampled ${h.resampledRmse}`);
  });

  it('analyse refuses a held-out fraction outside (0, 0.5]', async () => {
    for (const bad of [0.6, -0.1]) {
      await assert.rejects(analyse({ x, y: clean }, { ...options, holdout: bad }), (e: unknown) => e instanceof InputError && /held-out fraction/.test(e.message));
    }
  });
});
