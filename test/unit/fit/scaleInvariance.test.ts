/**
 * Scale and offset invariance of every curve kind (docs/design.md, "Input"): fitting x = s u
 * for any scale s from 1e-150 to 1e150, or x = c + u for a large offset c, gives the curve
 * of u itself, and y = c + v gives the curve of v shifted by c. Checked for the natural
 * spline, the polynomial, the smoothing spline, a Poisson fit, a shape-constrained fit and
 * a robust fit: fitted values, residuals, leverage, df, sigma, the confidence and prediction
 * bands and predictions at new x (extrapolation included) in the units of y, coefficients,
 * knots and lambda in the units of x, and the tuning path (tuneCurve with bootstrap and
 * folds: the chosen df and every candidate's resampled errors).
 *
 * Source: an identity of the methods. Every basis is affine invariant (B-splines depend on
 * ratios of differences of x and knots; the orthogonal polynomials are built on x mapped to
 * [-1, 1]; the smoothing spline's penalty scales as 1 / s^3 and lambda with it), and least
 * squares, IRLS and Huber's estimate are equivariant under y -> y - c. So the fits at scale s
 * must equal the fit at s = 1 up to rounding; the fit at s = 1 itself is checked against R
 * elsewhere (test/reference/).
 *
 * Data: open datasets shipped with R, from the fixtures of test/reference/r/: MASS::mcycle
 * (Silverman 1985; times -> accel, 133 rows, tied x), datasets::cars (Ezekiel 1930; speed ->
 * dist, 50 rows, tied x) and datasets::quakes (1000 Fiji earthquakes; magnitude -> stations
 * reporting, counts, tied x).
 *
 * Tolerances. Multiplying by s rounds each x by up to half an ulp (1.1e-16 relative), and the
 * fits amplify such perturbations by their condition (below 1e4 here), so quantities in the
 * units of y agree within REL = 1e-9 of max |y| and dimensionless ones (leverage, df)
 * within REL; knots within 1e-13 of s times the x range. The smoothing spline matches its
 * trace to the asked df within DF_TOLERANCE = 1e-9 on each side, so its numbers agree within
 * SMOOTH_REL = 1e-7. Shape-constrained fits stop their non-negative least squares at
 * tolerances of 1e-10 or so relative, so they agree within SHAPE_REL = 1e-7. Offsets are
 * compared with the data as double precision holds it: x = c + u against u' = (c + u) - c,
 * y = c + v against v' = (c + v) - c, so that only the arithmetic of the fit differs. With
 * an offset of x the knots (quantiles of x, kept in the units of x) and the polynomial's
 * centre are themselves numbers near c, rounded to ulp(c), so those fits agree within
 * OFFSET_ULPS = 100 ulp(c) / (x range) of max |y| more (2e-7 for c = 1e9 on MASS::mcycle's
 * range of 55), and the knots within 2 ulp(c).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { InputError } from '../../../core/errors';
import { bandsAt } from '../../../core/fit/bands';
import { fitCurve, prepareData } from '../../../core/fit/index';
import { MAX_X_MAGNITUDE, MIN_WEIGHT, MIN_X_RANGE } from '../../../core/fit/prepared';
import { naturalSpline } from '../../../core/registry/curves/naturalSpline';
import { tuneCurve } from '../../../core/tune/tune';
import type { ResampleSpec } from '../../../core/tune/types';
import type { FitResult, FitSpec, XYData } from '../../../core/types';

interface Dataset {
  readonly x: number[];
  readonly y: number[];
}
const fits = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: Record<string, Dataset> };
const physics = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'physics.json'), 'utf8')) as { datasets: Record<string, Dataset> };

function data(d: Dataset): XYData {
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y) };
}
const mcycle = data(fits.datasets.mcycle as Dataset);
const cars = data(fits.datasets.cars as Dataset);
const quakes = data(physics.datasets.quakes as Dataset);

const SCALES = [1e-150, 1e-100, 1e-78, 1e-20, 1, 1e20, 1e78, 1e100, 1e150];
const X_OFFSETS = [1e9, -1e6, 1e12];
const REL = 1e-9;
const SMOOTH_REL = 1e-7;
const SHAPE_REL = 1e-7;
const KNOT_REL = 1e-13;
const OFFSET_ULPS = 100;

/** The spacing of doubles near c (ulp(c)); 0 for c = 0. */
function ulp(c: number): number {
  return c === 0 ? 0 : 2 ** (Math.floor(Math.log2(Math.abs(c))) - 52);
}

/** Spread of x. */
function spread(x: Float64Array): number {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of x) {
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  return hi - lo;
}

/** The tolerance of a fit at x = c + s u: rel, plus OFFSET_ULPS ulp(c) relative to the spread of x when c is large. */
function offsetRel(rel: number, c: number, xSpread: number): number {
  return rel + (OFFSET_ULPS * ulp(c)) / xSpread;
}

/** One fit of the table: its name, data, spec and tolerance. */
interface Case {
  readonly name: string;
  readonly data: XYData;
  readonly spec: FitSpec;
  readonly rel: number;
}
const CASES: readonly Case[] = [
  { name: 'natural spline df 8 (MASS::mcycle)', data: mcycle, spec: { kind: 'natural-spline', df: 8 }, rel: REL },
  { name: 'natural spline df 2, the straight line (MASS::mcycle)', data: mcycle, spec: { kind: 'natural-spline', df: 2 }, rel: REL },
  { name: 'polynomial df 6 (MASS::mcycle)', data: mcycle, spec: { kind: 'polynomial', df: 6 }, rel: REL },
  { name: 'polynomial df 1, the mean (datasets::cars)', data: cars, spec: { kind: 'polynomial', df: 1 }, rel: REL },
  { name: 'smoothing spline df 8 (MASS::mcycle)', data: mcycle, spec: { kind: 'smoothing-spline', df: 8 }, rel: SMOOTH_REL },
  { name: 'smoothing spline df 2, the straight line (datasets::cars)', data: cars, spec: { kind: 'smoothing-spline', df: 2 }, rel: REL },
  { name: 'Poisson natural spline df 5 (datasets::quakes)', data: quakes, spec: { kind: 'natural-spline', df: 5, outcome: 'counts' }, rel: REL },
  { name: 'increasing, convex natural spline df 6 (datasets::cars)', data: cars, spec: { kind: 'natural-spline', df: 6, shape: ['increasing', 'convex'] }, rel: SHAPE_REL },
  { name: 'increasing natural spline df 8 (MASS::mcycle)', data: mcycle, spec: { kind: 'natural-spline', df: 8, shape: ['increasing'] }, rel: SHAPE_REL },
  { name: 'increasing smoothing spline df 5 (datasets::cars)', data: cars, spec: { kind: 'smoothing-spline', df: 5, shape: ['increasing'] }, rel: SHAPE_REL },
  { name: 'robust natural spline df 8 (MASS::mcycle)', data: mcycle, spec: { kind: 'natural-spline', df: 8, robust: true }, rel: REL },
];

function maxAbs(v: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < v.length; i++) m = Math.max(m, Math.abs(v[i] as number));
  return m;
}

/** |a_i - b_i| <= tol for every i (NaN only where both are NaN). */
function assertClose(what: string, a: ArrayLike<number>, b: ArrayLike<number>, tol: number): void {
  assert.equal(a.length, b.length, `${what}: lengths`);
  for (let i = 0; i < a.length; i++) {
    const u = a[i] as number;
    const v = b[i] as number;
    if (Number.isNaN(u) && Number.isNaN(v)) continue;
    assert.ok(Math.abs(u - v) <= tol, `${what} [${i}]: ${u} vs ${v} (tolerance ${tol})`);
  }
}

/** x mapped by m, each value rounded once, as data at that scale would be. */
function mapX(d: XYData, m: (u: number) => number): XYData {
  return { ...d, x: Float64Array.from(d.x, m) };
}

/** Grid over the data range widened by a quarter on each side (extrapolation on both ends), in the units of u. */
function gridOf(x: Float64Array): Float64Array {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of x) {
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
  }
  const pad = (hi - lo) / 4;
  return Float64Array.from({ length: 41 }, (_, i) => lo - pad + ((hi - lo + 2 * pad) * i) / 40);
}

/**
 * Checks that `got`, fitted to x = map(u), is the fit `ref` to u: every quantity in the units
 * of y within rel max |y|, leverage and df within rel, knots (x units) mapped, lambda scaled,
 * and the bands at the mapped grid equal to those at the grid in u.
 */
function assertSameFit(where: string, got: FitResult, ref: FitResult, y: Float64Array, map: (u: number) => number, scale: number, rel: number, grid: Float64Array, offset = 0): void {
  const ys = rel * maxAbs(y);
  assert.ok(Math.abs(got.df - ref.df) <= rel * Math.max(1, ref.df), `${where}: df ${got.df} vs ${ref.df}`);
  assertClose(`${where}: fitted`, got.fitted, ref.fitted, ys);
  assertClose(`${where}: residuals`, got.residuals, ref.residuals, ys);
  assertClose(`${where}: leverage`, got.leverage, ref.leverage, rel);
  assert.ok(Math.abs(got.sigma - ref.sigma) <= rel * ref.sigma, `${where}: sigma ${got.sigma} vs ${ref.sigma}`);
  assert.ok(Math.abs(got.r2 - ref.r2) <= rel, `${where}: R^2 ${got.r2} vs ${ref.r2}`);
  // Coefficients: B-spline and orthogonal-polynomial coefficients are in the units of y whatever the units of x.
  assertClose(`${where}: coefficients`, got.coefficients, ref.coefficients, rel * maxAbs(ref.coefficients));
  // Knots in the units of x: the mapped knots of u.
  const span = Math.abs(map(ref.curve.upper) - map(ref.curve.lower));
  assertClose(`${where}: knots`, got.knots, Float64Array.from(ref.knots, map), KNOT_REL * span + 2 * ulp(offset));
  if (ref.lambdaScaled !== undefined) {
    const ls = got.lambdaScaled as number;
    assert.ok(ls === ref.lambdaScaled || Math.abs(ls / ref.lambdaScaled - 1) <= rel, `${where}: lambdaScaled ${ls} vs ${ref.lambdaScaled}`);
    // lambda in x units is lambdaScaled range^3: s^3 times that of u where that is a double, else NaN (the note says why).
    const expected = (ref.lambda as number) * scale * scale * scale;
    if (ref.lambda === Infinity) assert.equal(got.lambda, Infinity, `${where}: the line's lambda`);
    else if (Number.isFinite(expected) && expected > 1e-300) assert.ok(Math.abs((got.lambda as number) / expected - 1) <= rel, `${where}: lambda ${got.lambda} vs ${expected}`);
    else assert.ok(Number.isNaN(got.lambda) && got.notes.some((n) => /beyond the range of double precision/.test(n)), `${where}: lambda ${got.lambda} should be NaN with a note`);
  }
  const b = bandsAt(got, Float64Array.from(grid, map));
  const r = bandsAt(ref, grid);
  // Beyond the data a polynomial's bands grow far above max |y|: relative to the larger of the two.
  for (const key of ['fit', 'se', 'ciLower', 'ciUpper', 'piLower', 'piUpper'] as const) assertClose(`${where}: band ${key}`, b[key], r[key], Math.max(ys, rel * maxAbs(r[key])));
  assert.deepEqual(Array.from(b.extrapolated), Array.from(r.extrapolated), `${where}: extrapolated flags`);
}

describe('scale and offset invariance of every curve kind (x = s u, x = c + u, y = c + v)', () => {
  for (const c of CASES) {
    it(`${c.name}: the fit at x = s u for s = 1e-150 .. 1e150 is the fit at u`, () => {
      const ref = fitCurve(c.data, c.spec);
      const grid = gridOf(c.data.x);
      for (const s of SCALES) {
        const got = fitCurve(
          mapX(c.data, (u) => s * u),
          c.spec,
        );
        assertSameFit(`${c.name}, s = ${s}`, got, ref, c.data.y, (u) => s * u, s, c.rel, grid);
      }
    });

    it(`${c.name}: the fit at x = c + u for large offsets c is the fit at (c + u) - c`, () => {
      for (const offset of X_OFFSETS) {
        const shifted = mapX(c.data, (u) => offset + u);
        const held = mapX(shifted, (x) => x - offset);
        const ref = fitCurve(held, c.spec);
        const got = fitCurve(shifted, c.spec);
        assertSameFit(`${c.name}, x = ${offset} + u`, got, ref, c.data.y, (u) => u + offset, 1, offsetRel(c.rel, offset, spread(held.x)), gridOf(held.x), offset);
      }
    });
  }

  it('a seeded property: natural spline, polynomial and smoothing spline at x = 10^e u + c for random e in [-150, 150] and offsets c', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -150, max: 150, noNaN: true }),
        fc.constantFrom(0, 1, -1),
        fc.constantFrom(...CASES.filter((k) => k.spec.outcome === undefined && k.spec.shape === undefined && k.spec.robust === undefined)),
        (e, sign, c) => {
          const s = 10 ** e;
          // An offset of 1e6 times the spread of x at this scale (0, +, -).
          const offset = sign * 1e6 * s * 60;
          const mapped = mapX(c.data, (u) => offset + s * u);
          const held = mapX(mapped, (x) => (x - offset) / s);
          const ref = fitCurve(held, c.spec);
          const got = fitCurve(mapped, c.spec);
          assertSameFit(`${c.name}, x = ${offset} + ${s} u`, got, ref, c.data.y, (u) => offset + s * u, s, offsetRel(c.rel, offset, s * spread(held.x)), gridOf(held.x), offset);
        },
      ),
      { numRuns: 30, seed: 20260110 },
    );
  });
});

describe('y = c + small signal keeps the digits of the signal', () => {
  // The residual SD of the fit to y = 1e14 + v must be that of the fit to v' = (1e14 + v) - 1e14,
  // the signal as double precision holds it: 1e14 has an ulp of 0.016, mcycle's accel a
  // residual SD of about 23, so any loss shows far above rel = 1e-9.
  const OFFSET = 1e14;
  for (const c of CASES.filter((k) => k.spec.outcome === undefined)) {
    it(`${c.name}: residual SD, residuals and the bands minus the offset match the fit to the signal`, () => {
      const y = Float64Array.from(c.data.y, (v) => OFFSET + v);
      const signal = Float64Array.from(y, (v) => v - OFFSET);
      const got = fitCurve({ x: c.data.x, y }, c.spec);
      const ref = fitCurve({ x: c.data.x, y: signal }, c.spec);
      // Non-negativity is not equivariant under shifts of y; no case here asks for it.
      assert.ok(Math.abs(got.sigma - ref.sigma) <= c.rel * ref.sigma, `${c.name}: sigma ${got.sigma} vs ${ref.sigma} (relative ${got.sigma / ref.sigma - 1})`);
      assertClose(`${c.name}: residuals`, got.residuals, ref.residuals, c.rel * maxAbs(signal));
      assertClose(`${c.name}: leverage`, got.leverage, ref.leverage, c.rel);
      // Fitted values and bands are numbers near 1e14: equal to the signal's plus the offset within a few ulp of 1e14.
      const ulps = 4 * 2 ** (Math.floor(Math.log2(OFFSET)) - 52);
      const grid = gridOf(c.data.x);
      const b = bandsAt(got, grid);
      const r = bandsAt(ref, grid);
      for (const key of ['fit', 'ciLower', 'ciUpper', 'piLower', 'piUpper'] as const) {
        assertClose(
          `${c.name}: band ${key}`,
          Float64Array.from(b[key], (v) => v - OFFSET),
          r[key],
          ulps + c.rel * maxAbs(signal),
        );
      }
      assertClose(`${c.name}: se`, b.se, r.se, c.rel * maxAbs(signal));
    });
  }

  it('the natural spline fitted for tuning from power sums (all candidates at once) keeps them too', () => {
    const y = Float64Array.from(mcycle.y, (v) => OFFSET + v);
    const signal = Float64Array.from(y, (v) => v - OFFSET);
    const got = naturalSpline.fitAll?.(prepareData({ x: mcycle.x, y }), [4, 8, 12]);
    const ref = naturalSpline.fitAll?.(prepareData({ x: mcycle.x, y: signal }), [4, 8, 12]);
    for (const df of [4, 8, 12]) {
      const g = got?.get(df) as FitResult;
      const r = ref?.get(df) as FitResult;
      assert.ok(Math.abs(g.sigma - r.sigma) <= REL * r.sigma, `df ${df}: sigma ${g.sigma} vs ${r.sigma}`);
    }
  });
});

describe('the tuning path is scale and offset invariant (tuneCurve, bootstrap and folds)', () => {
  const SCHEMES: readonly ResampleSpec[] = [
    { kind: 'bootstrap', resamples: 20 },
    { kind: 'folds', folds: 5, repeats: 1 },
  ];
  const KINDS = [
    { kind: 'natural-spline', rel: REL, options: {} },
    { kind: 'polynomial', rel: REL, options: {} },
    { kind: 'smoothing-spline', rel: SMOOTH_REL, options: {} },
    { kind: 'natural-spline', rel: SHAPE_REL, options: { shape: ['increasing' as const] } },
  ];

  /** Chosen df equal, every candidate's resampled RMSE, MAE and maximum error (mean and SE) within rel, in the units of y. */
  async function assertSameTuning(where: string, d: XYData, ref: XYData, kind: string, scheme: ResampleSpec, rel: number, options: object): Promise<void> {
    const opts = { kind, resample: scheme, rule: { kind: 'one-se' as const }, seed: 7, ...options };
    const a = await tuneCurve(prepareData(d), opts);
    const b = await tuneCurve(prepareData(ref), opts);
    assert.equal(a.result.selected.df, b.result.selected.df, `${where}: chosen df`);
    const scale = maxAbs(ref.y);
    a.result.candidates.forEach((c, k) => {
      const r = b.result.candidates[k];
      assert.equal(c.df, r?.df, `${where}: candidate ${k}`);
      assert.equal(c.skipped, r?.skipped, `${where}: df ${c.df} skipped`);
      for (const m of ['rmse', 'mae', 'maxAbs'] as const) {
        const e = c.errors[m];
        const f = r?.errors[m];
        if (!e || !f) continue;
        assert.ok(Math.abs(e.mean - f.mean) <= rel * scale, `${where}: df ${c.df} ${m} mean ${e.mean} vs ${f.mean}`);
        if (Number.isFinite(f.se)) assert.ok(Math.abs(e.se - f.se) <= rel * scale, `${where}: df ${c.df} ${m} SE ${e.se} vs ${f.se}`);
      }
    });
  }

  for (const { kind, rel, options } of KINDS) {
    const label = `${kind}${'shape' in options ? ' (increasing)' : ''}`;
    it(`${label} on MASS::mcycle: the same chosen df and errors at x = s u (s = 1e-150 .. 1e150) and x = 1e9 + u`, async () => {
      for (const scheme of SCHEMES) {
        for (const s of SCALES) {
          if (s === 1) continue;
          await assertSameTuning(
            `${label}, ${scheme.kind}, s = ${s}`,
            mapX(mcycle, (u) => s * u),
            mcycle,
            kind,
            scheme,
            rel,
            options,
          );
        }
        const shifted = mapX(mcycle, (u) => 1e9 + u);
        await assertSameTuning(
          `${label}, ${scheme.kind}, x = 1e9 + u`,
          shifted,
          mapX(shifted, (x) => x - 1e9),
          kind,
          scheme,
          offsetRel(rel, 1e9, spread(mcycle.x)),
          options,
        );
      }
    });
  }

  it('natural spline on MASS::mcycle with y = 1e14 + v: the same chosen df and errors as for v', async () => {
    const y = Float64Array.from(mcycle.y, (v) => 1e14 + v);
    const signal = Float64Array.from(y, (v) => v - 1e14);
    for (const kind of ['natural-spline', 'polynomial', 'smoothing-spline']) {
      for (const scheme of SCHEMES)
        await assertSameTuning(`${kind}, ${scheme.kind}, y = 1e14 + v`, { x: mcycle.x, y }, { x: mcycle.x, y: signal }, kind, scheme, kind === 'smoothing-spline' ? SMOOTH_REL : REL, {});
    }
  });

  it('Poisson natural spline on datasets::quakes: the same chosen df and mean deviances at x = s u', async () => {
    for (const s of [1e-150, 1e-78, 1e78, 1e150]) {
      await assertSameTuning(
        `counts, s = ${s}`,
        mapX(quakes, (u) => s * u),
        quakes,
        'natural-spline',
        { kind: 'folds', folds: 5, repeats: 1 },
        REL,
        { outcome: 'counts', candidates: [2, 3, 4, 5, 6] },
      );
    }
  });
});

describe('the limits that remain are stated, never a stack trace or a silent wrong answer', () => {
  it(`x beyond ${MAX_X_MAGNITUDE} in magnitude is refused with an InputError naming the limit and the line`, () => {
    const x = Float64Array.from(mcycle.x, (u) => u * 1e299);
    assert.throws(
      () => fitCurve({ ...mcycle, x, lines: Int32Array.from(x, (_, i) => i + 2) }, { kind: 'natural-spline', df: 5 }),
      (e: unknown) => e instanceof InputError && /magnitudes up to 1e\+300 are supported/.test(e.message) && e.place.line !== undefined,
    );
  });

  it(`x spread over less than ${MIN_X_RANGE} is refused with an InputError naming the spread; x near 1e-300 itself fits`, () => {
    const tiny = Float64Array.from(mcycle.x, (u) => 1e-300 + u * 1e-310);
    assert.throws(
      () => fitCurve({ x: tiny, y: mcycle.y }, { kind: 'smoothing-spline', df: 5 }),
      (e: unknown) => e instanceof InputError && /spread over only/.test(e.message),
    );
    // mcycle's times scaled to about 1e-300 (spread 5.5e-299): every kind fits, and equals the fit at u.
    const ref = fitCurve(mcycle, { kind: 'natural-spline', df: 8 });
    const got = fitCurve(
      mapX(mcycle, (u) => u * 1e-300),
      { kind: 'natural-spline', df: 8 },
    );
    assertClose('x = 1e-300 u: fitted', got.fitted, ref.fitted, REL * maxAbs(mcycle.y));
    for (const kind of ['polynomial', 'smoothing-spline'])
      assert.ok(
        Number.isFinite(
          fitCurve(
            mapX(mcycle, (u) => u * 1e-300),
            { kind, df: 6 },
          ).sigma,
        ),
        kind,
      );
  });

  it(`weights below ${MIN_WEIGHT} are refused with an InputError naming the limit; weights at any other scale give the same curve`, () => {
    const w = Float64Array.from(cars.x, (u) => 1 / u);
    assert.throws(
      () => fitCurve({ ...cars, w: Float64Array.from(w, (v) => v * 1e-160) }, { kind: 'natural-spline', df: 4 }),
      (e: unknown) => e instanceof InputError && /weights from 1e-150 up are supported/.test(e.message),
    );
    const ref = fitCurve({ ...cars, w }, { kind: 'natural-spline', df: 4 });
    for (const k of [1e-140, 1e140]) {
      const got = fitCurve({ ...cars, w: Float64Array.from(w, (v) => v * k) }, { kind: 'natural-spline', df: 4 });
      assertClose(`weights x ${k}: fitted`, got.fitted, ref.fitted, REL * maxAbs(cars.y));
      assertClose(`weights x ${k}: leverage`, got.leverage, ref.leverage, REL);
    }
  });
});
