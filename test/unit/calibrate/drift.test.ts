/**
 * Tests of curve samples and drift (core/calibrate/drift.ts).
 *
 * Data (open, shipped with R): MASS::mcycle (Silverman 1985; tied x) split into its even
 * and odd rows, two independent sets of readings of one curve; datasets::pressure;
 * datasets::discoveries (counts) and MASS::menarche (proportions with trials). Fixtures:
 * test/reference/fixtures/fits.json (test/reference/r/fits.R) and physics.json
 * (test/reference/r/physics.R), whose grids hold 23 evenly spaced x over the data range
 * between one point beyond each end.
 *
 * Sources of the expected values, named beside each check: R's predict(se.fit = TRUE) from
 * the fixtures; brute-force loops in this file over the same points, and over 100,000
 * evenly spaced points for the sampling error; the linearity of least squares (fitted
 * values are H y, and H 1 = 1 when the basis holds the constants: Weisberg, Applied Linear
 * Regression, 4th ed., 2014, section 3.4, from memory) for shifted readings.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import {
  checkSample,
  curveSample,
  driftBetweenSamples,
  driftFromRecord,
  driftWords,
  interpolationBound,
  SAMPLE_POINTS,
  sampleAt,
  sampleBand,
  type CurveSample,
  type Drift,
} from '../../../core/calibrate/drift';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import type { CurveKindId, FitResult, XYData } from '../../../core/types';

const FIXTURES = join(__dirname, '..', '..', 'reference', 'fixtures');

interface FitsCase {
  readonly name: string;
  readonly dataset: string;
  readonly family: 'natural' | 'poly';
  readonly df: number;
  readonly grid: number[];
  readonly predFit: number[];
  readonly predSe: number[];
  readonly ciUpper: number[];
}
interface GlmCase {
  readonly name: string;
  readonly dataset: string;
  readonly outcome: 'poisson' | 'binomial';
  readonly df: number;
  readonly grid: number[];
  readonly ciLower: number[];
  readonly ciUpper: number[];
}
const FITS = JSON.parse(readFileSync(join(FIXTURES, 'fits.json'), 'utf8')) as {
  datasets: Record<string, { x: number[]; y: number[] }>;
  cases: FitsCase[];
};
const PHYSICS = JSON.parse(readFileSync(join(FIXTURES, 'physics.json'), 'utf8')) as {
  rVersion: string;
  datasets: Record<string, { x: number[]; y: number[]; trials: number[] | null }>;
  glm: GlmCase[];
};

const MCYCLE = FITS.datasets.mcycle as { x: number[]; y: number[] };

const xy = (x: readonly number[], y: readonly number[]): XYData => ({ x: Float64Array.from(x), y: Float64Array.from(y) });

/** The mcycle rows whose index has the given parity, or that pass `keep`. */
function mcycleRows(keep: (i: number, x: number) => boolean, shift = 0): XYData {
  const x: number[] = [];
  const y: number[] = [];
  MCYCLE.x.forEach((v, i) => {
    if (!keep(i, v)) return;
    x.push(v);
    y.push((MCYCLE.y[i] as number) + shift);
  });
  return xy(x, y);
}

const even = (i: number): boolean => i % 2 === 0;
const odd = (i: number): boolean => i % 2 === 1;

/** |a - b| <= tol, with a message naming the check and its source. */
function near(what: string, a: number, b: number, tol: number): void {
  assert.ok(Math.abs(a - b) <= tol, `${what}: got ${a}, expected ${b} (tolerance ${tol.toExponential(2)})`);
}

/** The standard error of the fitted mean at x from the curve's definition in core/types.ts: sigma sqrt(b'Vb). */
const seAt = (f: FitResult, x: number): number => f.sigma * Math.sqrt(Math.max(0, f.curve.varianceFactor(x)));

describe('curveSample', () => {
  for (const name of ['mcycle natural df=8', 'cars poly df=4', 'pressure natural df=6']) {
    it(`curveSample(${name}, 23) matches R's predict(se.fit = TRUE) at 23 evenly spaced x over the data range`, () => {
      const c = FITS.cases.find((k) => k.name === name) as FitsCase;
      const d = FITS.datasets[c.dataset] as { x: number[]; y: number[] };
      const kind: CurveKindId = c.family === 'natural' ? 'natural-spline' : 'polynomial';
      const s = curveSample(fitCurve(xy(d.x, d.y), { kind, df: c.df }), 23);
      // Source: test/reference/r/fits.R, grid = c(lo - span, seq(lo, hi, length.out = 23), hi + span).
      const inner = (a: number[]): number[] => a.slice(1, 24);
      const span = Math.max(...d.x) - Math.min(...d.x);
      const scale = Math.max(...c.predFit.map(Math.abs));
      inner(c.grid).forEach((x, i) => near(`${name} x[${i}] (R seq())`, s.x[i] as number, x, 1e-9 * span));
      // Tolerance: 1e-8 relative as test/reference/fits.test.ts, plus the 10 digits the sample keeps.
      inner(c.predFit).forEach((f, i) => near(`${name} fit[${i}] (R predict()$fit)`, s.fit[i] as number, f, 1e-8 * Math.abs(f) + 1e-10 * scale));
      inner(c.predSe).forEach((se, i) => near(`${name} se[${i}] (R predict()$se.fit)`, s.se[i] as number, se, 1e-8 * se));
      // R's band: fit + qt(0.975, n - df) se.
      inner(c.ciUpper).forEach((u, i) => {
        const got = (s.fit[i] as number) + (s.t as number) * (s.se[i] as number);
        near(`${name} fit + t se [${i}] (R fit + qt(0.975, df.residual) se.fit)`, got, u, 1e-8 * Math.abs(u) + 1e-10 * scale);
      });
    });
  }

  for (const name of ['discoveries poisson df=5', 'menarche binomial df=3']) {
    it(`sampleBand(curveSample(${name}, 23)) rebuilds R's link-scale band linkinv(eta +- z se) from fit, se and t`, () => {
      const c = PHYSICS.glm.find((k) => k.name === name) as GlmCase;
      const d = PHYSICS.datasets[c.dataset] as { x: number[]; y: number[]; trials: number[] | null };
      const fit = fitCurve(xy(d.x, d.y), {
        kind: 'natural-spline',
        df: c.df,
        outcome: c.outcome === 'poisson' ? 'counts' : 'proportions',
        ...(d.trials ? { trials: Float64Array.from(d.trials) } : {}),
      });
      const s = curveSample(fit, 23);
      const band = sampleBand(s);
      // Source: test/reference/r/physics.R (predict(type = "link", se.fit = TRUE), linkinv(fit -+ qnorm(0.975) se)),
      // tolerance 1e-7 relative as test/reference/physics.test.ts, plus the 10 digits kept.
      for (let i = 0; i < 23; i++) {
        near(`${name} band lower [${i}] (${PHYSICS.rVersion})`, band.lower[i] as number, c.ciLower[i + 1] as number, 1e-7 * (c.ciLower[i + 1] as number));
        near(`${name} band upper [${i}] (${PHYSICS.rVersion})`, band.upper[i] as number, c.ciUpper[i + 1] as number, 1e-7 * (c.ciUpper[i + 1] as number));
      }
      assert.equal(s.outcome, c.outcome === 'poisson' ? 'counts' : 'proportions');
    });
  }

  it(`curveSample keeps ${SAMPLE_POINTS} points with 10 significant digits, the same bytes on every run, in about 9 kB of JSON`, () => {
    const fit = fitCurve(
      mcycleRows(() => true),
      { kind: 'smoothing-spline', df: 8 },
    );
    const s = curveSample(fit);
    assert.equal(s.x.length, SAMPLE_POINTS);
    assert.equal(s.x[0], s.lower);
    assert.equal(s.x[SAMPLE_POINTS - 1], s.upper);
    // Source: String(Number(v.toPrecision(10))) is v when v has at most 10 significant digits (ECMA-262, Number.prototype.toPrecision).
    for (const a of [s.x, s.fit, s.se as number[]]) for (const v of a) assert.equal(Number(v.toPrecision(10)), v);
    // Evenly spaced: step (upper - lower) / 256 within the rounding of x.
    const h = (s.upper - s.lower) / (SAMPLE_POINTS - 1);
    s.x.forEach((x, i) => near(`x[${i}]`, x, s.lower + i * h, 1e-9 * (s.upper - s.lower)));
    const json = JSON.stringify(s);
    assert.equal(JSON.stringify(curveSample(fit)), json);
    assert.deepEqual(JSON.parse(json), s, 'plain JSON');
    assert.ok(json.length < 12000, `${json.length} characters (the SAMPLE_POINTS comment says about 9 kB)`);
  });

  it('curveSample keeps enough digits for x of 1.7e9 over a range of 1000 (epoch seconds)', () => {
    const data = mcycleRows(() => true);
    const shifted = { ...data, x: data.x.map((v) => 1.7e9 + v * 20) };
    const s = curveSample(fitCurve(shifted, { kind: 'natural-spline', df: 6 }));
    // Source: brute force; distinct, increasing x at the step (upper - lower) / 256.
    for (let i = 1; i < s.x.length; i++) assert.ok((s.x[i] as number) > (s.x[i - 1] as number), `x[${i}] increases`);
    near('step', (s.x[1] as number) - (s.x[0] as number), (s.upper - s.lower) / 256, 1e-6);
  });

  it('curveSample refuses fewer than 2 points and a level outside (0, 1) with InputError', () => {
    const fit = fitCurve(
      mcycleRows(() => true),
      { kind: 'natural-spline', df: 5 },
    );
    assert.throws(() => curveSample(fit, 1), InputError);
    assert.throws(() => curveSample(fit, 10.5), InputError);
    assert.throws(() => curveSample(fit, SAMPLE_POINTS, 1), InputError);
    assert.throws(() => curveSample(fit, SAMPLE_POINTS, 0), InputError);
  });

  it('checkSample refuses samples of unequal lengths, decreasing x or an unknown outcome', () => {
    const s = curveSample(
      fitCurve(
        mcycleRows(() => true),
        { kind: 'natural-spline', df: 5 },
      ),
      5,
    );
    assert.doesNotThrow(() => checkSample(s));
    assert.throws(() => checkSample({ ...s, se: s.se.slice(1) }), /same length/);
    assert.throws(() => checkSample({ ...s, x: [s.lower, 30, 20, 40, s.upper] }), /x must increase/);
    assert.throws(() => checkSample({ ...s, outcome: 'weights' as never }), /unknown outcome/);
    assert.throws(() => checkSample({ ...s, x: [0, ...s.x.slice(1)] }), /run from lower/);
  });
});

/** The brute-force drift: the same points and formulas written out as a plain loop. */
function bruteForce(recorded: CurveSample, current: FitResult) {
  const lo = Math.max(recorded.lower, current.curve.lower);
  const hi = Math.min(recorded.upper, current.curve.upper);
  const xs = [lo, ...recorded.x.filter((x) => x > lo && x < hi), hi];
  // Recorded values: the sample's own at its x; linear interpolation between its neighbours at the ends.
  const recordedAt = (x: number): [number, number] => {
    const j = recorded.x.indexOf(x);
    if (j >= 0) return [recorded.fit[j] as number, recorded.se[j] as number];
    let k = 0;
    while ((recorded.x[k + 1] as number) < x) k++;
    const w = (x - (recorded.x[k] as number)) / ((recorded.x[k + 1] as number) - (recorded.x[k] as number));
    const lerp = (a: readonly (number | null)[]): number => (a[k] as number) * (1 - w) + (a[k + 1] as number) * w;
    return [lerp(recorded.fit), lerp(recorded.se)];
  };
  let maxD = 0;
  let maxDx = NaN;
  let maxZ = -1;
  let maxZx = NaN;
  const outsideX: number[] = [];
  for (const x of xs) {
    const [rf, rs] = recordedAt(x);
    const cf = current.curve.value(x);
    const cs = seAt(current, x);
    const d = cf - rf;
    if (Math.abs(d) > maxD) [maxD, maxDx] = [Math.abs(d), x];
    const z = Math.abs(d) / Math.sqrt(rs * rs + cs * cs);
    if (z > maxZ) [maxZ, maxZx] = [z, x];
    if (Math.abs(d) > (recorded.t as number) * rs) outsideX.push(x);
  }
  return { lo, hi, points: xs.length, maxD, maxDx, maxZ, maxZx, outsideX, xs };
}

/** Largest |difference| and |difference| / combined se over 100,000 evenly spaced x of [lo, hi]. */
function dense(a: FitResult, b: FitResult, lo: number, hi: number): { d: number; z: number } {
  const n = 100_000;
  let d = 0;
  let z = 0;
  for (let i = 0; i < n; i++) {
    const x = lo + ((hi - lo) * i) / (n - 1);
    const diff = Math.abs(b.curve.value(x) - a.curve.value(x));
    d = Math.max(d, diff);
    z = Math.max(z, diff / Math.hypot(seAt(a, x), seAt(b, x)));
  }
  return { d, z };
}

const HALVES: readonly { kind: CurveKindId; df: number }[] = [
  { kind: 'natural-spline', df: 8 },
  { kind: 'smoothing-spline', df: 8 },
  { kind: 'polynomial', df: 6 },
];

describe('driftFromRecord', () => {
  for (const spec of HALVES) {
    const label = `${spec.kind} df ${spec.df}`;
    const A = fitCurve(mcycleRows(even), spec);
    const B = fitCurve(mcycleRows(odd), spec);
    const recorded = curveSample(A);

    it(`driftFromRecord (mcycle even rows recorded, odd rows new, ${label}) equals a brute-force loop over the same points`, () => {
      const d = driftFromRecord(recorded, B) as Drift;
      const bf = bruteForce(recorded, B);
      // Source: bruteForce above. Tolerance: the 10 digits kept by the sample (values up to about 150).
      const tol = 1e-8 * 150;
      assert.equal(d.points, bf.points);
      assert.equal(d.from, bf.lo);
      assert.equal(d.to, bf.hi);
      near(`${label} largest difference`, Math.abs(d.largest.difference), bf.maxD, tol);
      assert.equal(d.largest.x, bf.maxDx);
      const R = d.largestRelative as NonNullable<Drift['largestRelative']>;
      near(`${label} largest z`, R.z, bf.maxZ, 1e-8);
      assert.equal(R.x, bf.maxZx);
      assert.equal(d.withinRecordedBand, bf.outsideX.length === 0);
      const outsideX = bf.xs.filter((x) => d.outside.some((s) => x >= s.from && x <= s.to));
      assert.deepEqual(outsideX, bf.outsideX, 'the stretches outside the band cover exactly the points outside it');
      assert.equal(d.unjudged, 0);
    });

    it(`driftFromRecord (${label}): the sampled maxima lie within 0.2 % of those over 100,000 points (measures SAMPLE_POINTS)`, () => {
      const d = driftFromRecord(recorded, B) as Drift;
      const full = dense(A, B, d.from, d.to);
      // Source: brute force over 100,000 points; 0.2 % is the shortfall the SAMPLE_POINTS comment allows (five waves over the range).
      const shortD = 1 - Math.abs(d.largest.difference) / full.d;
      const shortZ = 1 - (d.largestRelative?.z ?? NaN) / full.z;
      assert.ok(Math.abs(shortD) <= 0.002, `${label}: sampled largest difference ${d.largest.difference} against ${full.d} (${(100 * shortD).toFixed(3)} % short)`);
      assert.ok(Math.abs(shortZ) <= 0.002, `${label}: sampled largest z ${d.largestRelative?.z} against ${full.z} (${(100 * shortZ).toFixed(3)} % short)`);
    });

    it(`driftBetweenSamples agrees with driftFromRecord within the stated interpolation bound (${label})`, () => {
      const current = curveSample(B);
      const exact = driftFromRecord(recorded, B) as Drift;
      const between = driftBetweenSamples(recorded, current) as Drift;
      assert.equal(between.points, exact.points);
      const bound = between.interpolationBound;
      assert.ok(bound > 0 && bound === interpolationBound(current) + interpolationBound(recorded), 'both samples interpolated: the new one everywhere, the recorded one at the common end');
      near(`${label} largest difference, interpolated against exact`, between.largest.difference, exact.largest.difference, bound);
      // z moves by at most bound / (combined se) at the point, plus the se's own interpolation (a few per cent of it here).
      const minSe = Math.min(...recorded.se.map((v) => v as number));
      near(`${label} largest z, interpolated against exact`, between.largestRelative?.z ?? NaN, exact.largestRelative?.z ?? NaN, (2 * bound) / minSe);
      assert.equal(between.withinRecordedBand, exact.withinRecordedBand);
    });

    it(`interpolationBound holds against 100,000 evaluations of the curve (${label})`, () => {
      const s = curveSample(B);
      const n = 100_000;
      let worst = 0;
      for (let i = 0; i < n; i++) {
        const x = s.lower + ((s.upper - s.lower) * i) / (n - 1);
        worst = Math.max(worst, Math.abs(sampleAt(s, x).fit - B.curve.value(x)));
      }
      // Source: brute force; the bound is an estimate of h^2 max|f''| / 8 (de Boor 1978, chapter II, from memory).
      const bound = interpolationBound(s);
      assert.ok(worst <= bound, `${label}: interpolation error ${worst} over the bound ${bound}`);
      assert.ok(worst >= bound / 4, `${label}: the bound ${bound} is not loose by more than 4 times (error ${worst})`);
    });
  }

  it('driftFromRecord of the same curve: difference 0 everywhere, within the band, in words', () => {
    for (const spec of HALVES) {
      const fit = fitCurve(
        mcycleRows(() => true),
        spec,
      );
      const d = driftFromRecord(curveSample(fit), fit) as Drift;
      // Source: identity; the new curve is rounded like the record before the comparison.
      assert.equal(d.largest.difference, 0, spec.kind);
      assert.equal(d.largestRelative?.z, 0);
      assert.equal(d.withinRecordedBand, true);
      assert.equal(d.points, SAMPLE_POINTS, 'the ends are sampled points');
      assert.equal(d.interpolationBound, 0);
      assert.equal(d.words, "The new curve stays within the recorded curve's 95 % band everywhere over x = 2.4 to 57.6; it equals the recorded curve at every compared point.");
      assert.equal(driftBetweenSamples(curveSample(fit), curveSample(fit))?.largest.difference, 0);
    }
    // x whose ends need more than 10 digits (x + 1/3): the ends are still the sampled ones, and the ranges read as equal.
    const third = mcycleRows(() => true);
    const thirdFit = fitCurve({ ...third, x: third.x.map((v) => v + 1 / 3) }, { kind: 'natural-spline', df: 8 });
    const dt = driftFromRecord(curveSample(thirdFit), thirdFit) as Drift;
    assert.equal(dt.largest.difference, 0);
    assert.equal(dt.points, SAMPLE_POINTS);
    assert.match(dt.words, /^The new curve stays within the recorded curve's 95 % band everywhere over x = 2\.7 to 57\.9; it equals/);
    // Counts: the same holds on the response scale.
    const disc = PHYSICS.datasets.discoveries as { x: number[]; y: number[] };
    const counts = fitCurve(xy(disc.x, disc.y), { kind: 'natural-spline', df: 5, outcome: 'counts' });
    const dc = driftFromRecord(curveSample(counts), counts) as Drift;
    assert.equal(dc.largest.difference, 0);
    assert.equal(dc.withinRecordedBand, true);
  });

  it('driftFromRecord of readings shifted by c: difference c everywhere, inside or outside the band as t se compares with c', () => {
    const spec = { kind: 'natural-spline', df: 8 } as const;
    const base = fitCurve(
      mcycleRows(() => true),
      spec,
    );
    const recorded = curveSample(base);
    const halfWidths = recorded.se.map((s) => (recorded.t as number) * (s as number));
    const minSe = Math.min(...recorded.se.map((s) => s as number));
    const sorted = [...halfWidths].sort((a, b) => a - b);
    // Below every half-width, between two middle ones (not on one: that point would be a tie), above every one.
    const middle = ((sorted[128] as number) + (sorted[129] as number)) / 2;
    for (const c of [0.5 * (sorted[0] as number), middle, -2 * (sorted[sorted.length - 1] as number)]) {
      const d = driftFromRecord(
        recorded,
        fitCurve(
          mcycleRows(() => true, c),
          spec,
        ),
      ) as Drift;
      // Source: linearity of least squares, fit(y + c) = fit(y) + c and se unchanged (H 1 = 1). Tolerance: 10 digits of values up to 150.
      near(`shift ${c}: largest difference`, d.largest.difference, c, 1e-8 * 150);
      near(`shift ${c}: largest z = |c| / (sqrt 2 min se)`, d.largestRelative?.z ?? NaN, Math.abs(c) / (Math.SQRT2 * minSe), 1e-6);
      const outsideX = recorded.x.filter((_, i) => Math.abs(c) > (halfWidths[i] as number));
      const reported = recorded.x.filter((x) => d.outside.some((s) => x >= s.from && x <= s.to));
      assert.deepEqual(reported, outsideX, `shift ${c}: outside exactly where |c| > t se`);
      assert.equal(d.withinRecordedBand, outsideX.length === 0);
    }
    const far = driftFromRecord(
      recorded,
      fitCurve(
        mcycleRows(() => true, -2 * (sorted[sorted.length - 1] as number)),
        spec,
      ),
    ) as Drift;
    assert.deepEqual(far.outside, [{ from: 2.4, to: 57.6 }]);
    assert.match(
      far.words,
      /^The new curve moves by up to [\d.]+ standard errors near x = [\d.]+ \([\d.]+ below the recorded curve\); it leaves the recorded curve's 95 % band for x = 2\.4 to 57\.6\.$/,
    );
  });

  it('driftFromRecord over a partial overlap compares the common range and says so', () => {
    const spec = { kind: 'natural-spline', df: 5 } as const;
    const early = mcycleRows((_, x) => x <= 30);
    const late = mcycleRows((_, x) => x >= 15);
    const d = driftFromRecord(curveSample(fitCurve(early, spec)), fitCurve(late, spec)) as Drift;
    // Source: the data: the common range runs from the smallest x of the late rows to the largest of the early ones.
    const lo = Math.min(...late.x);
    const hi = Math.max(...early.x);
    assert.equal(d.from, lo);
    assert.equal(d.to, hi);
    assert.ok(d.words.startsWith(`Over x = ${lo} to ${hi}, the range both curves cover (the recorded one 2.4 to ${hi}, the new one ${lo} to 57.6), the new curve `), d.words);
  });

  it('driftFromRecord and driftBetweenSamples without overlap return null', () => {
    const spec = { kind: 'natural-spline', df: 4 } as const;
    const a = fitCurve(
      mcycleRows((_, x) => x < 20),
      spec,
    );
    const b = fitCurve(
      mcycleRows((_, x) => x > 30),
      spec,
    );
    assert.equal(driftFromRecord(curveSample(a), b), null);
    assert.equal(driftBetweenSamples(curveSample(a), curveSample(b)), null);
  });

  it('driftFromRecord with a recorded se of 0 or missing says the difference cannot be judged instead of dividing by 0', () => {
    const spec = { kind: 'natural-spline', df: 8 } as const;
    const recorded = curveSample(fitCurve(mcycleRows(even), spec));
    const current = fitCurve(mcycleRows(odd), spec);
    // Edited samples (invented: a record whose se was lost or is 0).
    const none = driftFromRecord({ ...recorded, se: recorded.se.map(() => 0) }, current) as Drift;
    assert.equal(none.largestRelative, null);
    assert.equal(none.withinRecordedBand, null);
    assert.equal(none.unjudged, none.points);
    assert.match(none.words, /differs from the recorded curve by up to [\d.]+ at x = [\d.]+; the recorded curve's standard error is 0 or missing, so this cannot be judged against its uncertainty\.$/);
    const some = driftFromRecord({ ...recorded, se: recorded.se.map((s, i) => (i >= 10 && i < 13 ? null : s)) }, current) as Drift;
    assert.equal(some.unjudged, 3);
    assert.ok(some.largestRelative && Number.isFinite(some.largestRelative.z));
    assert.ok(some.words.endsWith(` At 3 of the ${some.points} compared points the recorded curve's standard error is 0 or missing; the difference there cannot be judged.`), some.words);
    const noT = driftFromRecord({ ...recorded, t: null }, current) as Drift;
    assert.equal(noT.withinRecordedBand, null);
  });
});

describe('driftWords', () => {
  /** A drift over x = 0.5 to 9.8 (invented numbers for the wording). */
  const base: Omit<Drift, 'words'> = {
    from: 0.5,
    to: 9.8,
    points: 257,
    level: 0.95,
    recordedRange: [0.5, 9.8],
    currentRange: [0.5, 9.8],
    largest: { x: 3.1, difference: 0.0123 },
    largestRelative: { x: 3.1, z: 0.81, difference: 0.0123 },
    withinRecordedBand: true,
    outside: [],
    unjudged: 0,
    interpolationBound: 0,
  };

  it('driftWords of a curve inside the band names the largest difference and its size in standard errors', () => {
    // Source: number style of core/words/numbers.ts (2 significant digits for sizes, 3 of the range's width for x).
    assert.equal(driftWords(base), "The new curve stays within the recorded curve's 95 % band everywhere over x = 0.5 to 9.8 (largest difference 0.012 at x = 3.1, 0.81 standard errors).");
    assert.equal(
      driftWords({ ...base, largestRelative: { x: 4.5, z: 0.9, difference: 0.01 } }),
      "The new curve stays within the recorded curve's 95 % band everywhere over x = 0.5 to 9.8 (largest difference 0.012 at x = 3.1; at most 0.9 standard errors, at x = 4.5).",
    );
  });

  it('driftWords lists up to 3 stretches outside the band and counts more', () => {
    const out = { ...base, withinRecordedBand: false, largest: { x: 8.2, difference: -0.41 }, largestRelative: { x: 8.2, z: 3.14, difference: -0.41 } };
    assert.equal(
      driftWords({ ...out, outside: [{ from: 7.5, to: 9.8 }] }),
      "The new curve moves by up to 3.1 standard errors near x = 8.2 (0.41 below the recorded curve); it leaves the recorded curve's 95 % band for x = 7.5 to 9.8.",
    );
    assert.match(
      driftWords({
        ...out,
        outside: [
          { from: 1, to: 1.5 },
          { from: 4, to: 4 },
          { from: 7.5, to: 9.8 },
        ],
      }),
      /band for x = 1 to 1\.5, 4 and 7\.5 to 9\.8\.$/,
    );
    assert.match(driftWords({ ...out, outside: [{ from: 8.2, to: 8.2 }] }), /band at x = 8\.2\.$/);
    const many = [1, 2, 3, 4, 5].map((v) => ({ from: v, to: v + 0.5 }));
    assert.match(driftWords({ ...out, outside: many }), /band in 5 stretches between x = 1 and 5\.5\.$/);
  });
});
