/**
 * Exactness properties of fitSurface (core/surface/fit.ts) on seeded invented data (fixed
 * seeds, so every run sees the same cases). Each property is a theorem about weighted
 * least squares in a fixed linear space, so it needs no fixture; the source is named beside
 * each check.
 */
import { strict as assert } from 'node:assert';
import { FitError, InputError } from '../../../core/errors';
import { bandsAt } from '../../../core/fit/bands';
import { fitCurve } from '../../../core/fit/index';
import { fitSurface, fitSurfaceBasis, prepareSurface, surfaceBasis, type SurfaceData } from '../../../core/surface/index';

/** Seeded uniform numbers in [0, 1) (a 32-bit xorshift; only reproducibility matters here). */
function stream(seed: number): () => number {
  let s = seed >>> 0 || 1;
  return () => {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return s / 4294967296;
  };
}

/** n readings scattered over [10, 30] x [-2, 5] with y = f(u, v) (+ noise), and optional weights. */
function scattered(n: number, seed: number, f: (u: number, v: number) => number, noise = 0, weighted = false): SurfaceData {
  const r = stream(seed);
  const u = new Float64Array(n);
  const v = new Float64Array(n);
  const y = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    u[i] = 10 + 20 * r();
    v[i] = -2 + 7 * r();
    y[i] = f(u[i] as number, v[i] as number) + noise * (r() - 0.5);
    w[i] = 0.5 + 2 * r();
  }
  return { u, v, y, ...(weighted ? { w } : {}) };
}

const maxAbs = (a: ArrayLike<number>): number => Array.from(a).reduce((m, x) => Math.max(m, Math.abs(x)), 0);

function close(what: string, actual: number, expected: number, tol: number): void {
  assert.ok(Math.abs(actual - expected) <= tol, `${what}: got ${actual}, expected ${expected} (tolerance ${tol})`);
}

const PAIRS: [number, number][] = [];
for (let a = 2; a <= 6; a++) for (let b = 2; b <= 6; b++) PAIRS.push([a, b]);

describe('fitSurface', () => {
  it('reproduces a plane a + b u + c v exactly for every df pair from (2, 2) to (6, 6), weighted or not, on and beyond the data', () => {
    // Source: least squares reproduces any function in the span; a natural spline of df >= 2 in
    // each input spans 1, u, v and uv (the df-2 straight line in each), and continues linearly beyond the boundary knots (docs/design.md, "Natural cubic regression spline").
    const plane = (u: number, v: number): number => 3.5 - 0.75 * u + 2.25 * v;
    for (const weighted of [false, true]) {
      const data = scattered(150, 11 + (weighted ? 1 : 0), plane, 0, weighted);
      for (const [a, b] of PAIRS) {
        const fit = fitSurface(data, { dfU: a, dfV: b });
        const scale = maxAbs(data.y);
        assert.ok(maxAbs(fit.residuals) <= 1e-11 * scale, `df ${a} x ${b}: residuals up to ${maxAbs(fit.residuals)}`);
        for (const [u, v] of [
          [15.5, 0.25],
          [2, -4],
          [40, 9],
        ] as const)
          close(`df ${a} x ${b} at (${u}, ${v})`, fit.predict(u, v), plane(u, v), 1e-10 * scale);
      }
    }
  });

  it('reproduces a product of straight lines (a + b u)(c + d v) exactly for every df pair from (2, 2) to (6, 6)', () => {
    // Source: (a + b u)(c + d v) lies in the tensor product of the two df-2 spaces, which every
    // pair >= (2, 2) contains (tensor-product spline spaces; de Boor 2001, A Practical Guide to Splines, chapter XVII).
    const product = (u: number, v: number): number => (1.5 + 0.4 * u) * (-2 + 3 * v);
    const data = scattered(120, 23, product, 0, true);
    const scale = maxAbs(data.y);
    for (const [a, b] of PAIRS) {
      const fit = fitSurface(data, { dfU: a, dfV: b });
      assert.ok(maxAbs(fit.residuals) <= 1e-11 * scale, `df ${a} x ${b}: residuals up to ${maxAbs(fit.residuals)}`);
      close(`df ${a} x ${b} beyond the data`, fit.predict(35, 7), product(35, 7), 1e-10 * scale);
    }
  });

  it('has leverage summing to dfU x dfV (the trace of the hat matrix)', () => {
    // Source: the trace of a projection onto a space of dimension q is q (Hoaglin & Welsch 1978, "The hat matrix in regression and ANOVA").
    const data = scattered(90, 5, (u, v) => Math.sin(u / 3) * v, 0.3, true);
    for (const [a, b] of [
      [1, 1],
      [3, 1],
      [1, 4],
      [4, 5],
    ] as const) {
      const fit = fitSurface(data, { dfU: a, dfV: b });
      close(
        `trace at df ${a} x ${b}`,
        fit.leverage.reduce((s, h) => s + h, 0),
        a * b,
        1e-9,
      );
      assert.equal(fit.df, a * b);
    }
  });

  it('at (k, 1) equals the natural-spline curve of u at df k: fitted values, leverage, residual SD, AIC, BIC and bands', () => {
    // Source: with df 1 in v the basis is the curve's natural-spline basis of u times the constant 1, the same space (docs/design.md, "Surfaces").
    const data = scattered(80, 31, (u) => Math.log(u) * 4, 0.5, true);
    for (const k of [2, 3, 5, 7]) {
      const surface = fitSurface(data, { dfU: k, dfV: 1 });
      const curve = fitCurve({ x: data.u, y: data.y, w: data.w }, { kind: 'natural-spline', df: k });
      const sy = maxAbs(data.y);
      for (let i = 0; i < data.u.length; i++) {
        close(`fitted[${i}]`, surface.fitted[i] as number, curve.fitted[i] as number, 1e-11 * sy);
        close(`leverage[${i}]`, surface.leverage[i] as number, curve.leverage[i] as number, 1e-11);
      }
      close('sigma', surface.sigma, curve.sigma, 1e-11 * sy);
      close('aic', surface.aic, curve.aic, 1e-9);
      close('bic', surface.bic, curve.bic, 1e-9);
      close('looRmse', surface.looRmse, curve.looRmse, 1e-11 * sy);
      assert.deepEqual(Array.from(surface.knotsU), Array.from(curve.knots));
      const xs = [8, 12.5, 20, 29.9, 33];
      const sb = surface.bands(
        xs,
        xs.map(() => 1.25),
        0.9,
      );
      const cb = bandsAt(curve, xs, 0.9);
      for (let i = 0; i < xs.length; i++) {
        close(`fit at ${xs[i]}`, sb.fit[i] as number, cb.fit[i] as number, 1e-11 * sy);
        close(`ciUpper at ${xs[i]}`, sb.ciUpper[i] as number, cb.ciUpper[i] as number, 1e-10 * sy);
        close(`piLower at ${xs[i]}`, sb.piLower[i] as number, cb.piLower[i] as number, 1e-10 * sy);
      }
    }
  });

  it('with integer weights equals the fit to the rows repeated that many times', () => {
    // Source: a row of weight m adds the same terms to X'WX and X'Wy as m copies of it (weighted least squares, Weisberg 2014, section 7.1).
    const base = scattered(60, 41, (u, v) => u * Math.cos(v), 0.8);
    const r = stream(7);
    const counts = Float64Array.from(base.u, () => 1 + Math.floor(r() * 4));
    const weighted = { ...base, w: counts };
    const rep = (a: Float64Array): Float64Array => Float64Array.from(Array.from(a).flatMap((x, i) => Array<number>(counts[i] as number).fill(x)));
    const repeated = { u: rep(base.u), v: rep(base.v), y: rep(base.y) };
    // The knots are quantiles of all rows, so the repeated data place them where the weights do not:
    // compare at df pairs whose knots are boundary knots only (df 2) or with df 1.
    for (const [a, b] of [
      [2, 2],
      [1, 2],
      [2, 1],
    ] as const) {
      const fw = fitSurface(weighted, { dfU: a, dfV: b });
      const fr = fitSurface(repeated, { dfU: a, dfV: b });
      const sy = maxAbs(base.y);
      close('rss', fw.rss, fr.rss, 1e-10 * sy * sy);
      for (const [u, v] of [
        [12, 0],
        [25, 4],
      ] as const) {
        close(`predict(${u}, ${v})`, fw.predict(u, v), fr.predict(u, v), 1e-11 * sy);
        close(`varianceFactor(${u}, ${v})`, fw.varianceFactor(u, v), fr.varianceFactor(u, v), 1e-12);
      }
    }
  });

  it('with integer weights equals the rows repeated that many times at the same interior knots', () => {
    // Source: as above (Weisberg 2014, section 7.1), with the knots of the weighted data given to both fits.
    const base = scattered(70, 43, (u, v) => Math.sqrt(u) * v, 0.4);
    const r = stream(9);
    const counts = Float64Array.from(base.u, () => 1 + Math.floor(r() * 3));
    const rows = Array.from(base.u, (_, i) => i).flatMap((i) => Array<number>(counts[i] as number).fill(i));
    const pick = (a: Float64Array): Float64Array => Float64Array.from(rows, (i) => a[i] as number);
    const pw = prepareSurface({ ...base, w: counts });
    const pr = prepareSurface({ u: pick(base.u), v: pick(base.v), y: pick(base.y) });
    const basis = surfaceBasis(pw, { dfU: 5, dfV: 4 });
    const fw = fitSurfaceBasis(pw, basis);
    const fr = fitSurfaceBasis(pr, basis);
    const sy = maxAbs(base.y);
    close('rss', fw.rss, fr.rss, 1e-10 * sy * sy);
    for (let k = 0; k < rows.length; k++) {
      const i = rows[k] as number;
      close(`fitted[${k}]`, fr.fitted[k] as number, fw.fitted[i] as number, 1e-11 * sy);
      // Each copy has 1 / m of the leverage of the row of weight m (h = w b'(X'WX)^-1 b).
      close(`leverage[${k}]`, (counts[i] as number) * (fr.leverage[k] as number), fw.leverage[i] as number, 1e-11);
    }
  });

  it('is unchanged by a change of scale and offset of either input', () => {
    // Source: type-7 quantiles and B-spline values are equivariant under x -> s x + c (docs/design.md, "Input", "Range and scale").
    const data = scattered(100, 53, (u, v) => Math.exp(u / 15) + v * v, 0.2, true);
    const moved = { ...data, u: Float64Array.from(data.u, (u) => 1e6 + 1000 * u), v: Float64Array.from(data.v, (v) => 1e-4 * v - 3) };
    for (const [a, b] of [
      [4, 3],
      [6, 6],
      [1, 5],
    ] as const) {
      const f0 = fitSurface(data, { dfU: a, dfV: b });
      const f1 = fitSurface(moved, { dfU: a, dfV: b });
      const sy = maxAbs(data.y);
      for (let i = 0; i < data.u.length; i++) {
        close(`fitted[${i}]`, f1.fitted[i] as number, f0.fitted[i] as number, 1e-9 * sy);
        close(`leverage[${i}]`, f1.leverage[i] as number, f0.leverage[i] as number, 1e-9);
      }
      close('predict', f1.predict(1e6 + 1000 * 17, 1e-4 * 2 - 3), f0.predict(17, 2), 1e-9 * sy);
    }
  });

  it('refuses a reading that is not a finite number, naming the column and the CSV line', () => {
    // Source: docs/design.md, "Input" (bad input gets a message naming what and where).
    const data = scattered(10, 3, (u, v) => u + v);
    const v = Float64Array.from(data.v);
    v[4] = NaN;
    assert.throws(
      () => fitSurface({ ...data, v, lines: Int32Array.from({ length: 10 }, (_, i) => i + 2), names: { v: 'load [%]' } }, { dfU: 2, dfV: 2 }),
      (e: unknown) => e instanceof InputError && e.place.line === 6 && e.place.column === 'load [%]' && /load \[%\] value NaN is not a finite number/.test(e.message),
    );
    assert.throws(() => fitSurface({ ...data, y: data.y.subarray(0, 9) }, { dfU: 2, dfV: 2 }), /u, v, y must have the same length/);
  });

  it('refuses a df above the distinct values of an input, naming the input', () => {
    // Source: docs/design.md, "df": a curve with k coefficients needs at least k distinct values.
    const data = { ...scattered(40, 61, (u, v) => u + v), names: { u: 'temperature', v: 'speed' } };
    const v = Float64Array.from(data.v, (x) => Math.round(x / 3)); // values -1, 0, 1, 2
    assert.throws(
      () => fitSurface({ ...data, v }, { dfU: 3, dfV: 5 }),
      (e: unknown) => e instanceof FitError && /df 5 in speed needs at least 5 distinct values of speed; the data has 4/.test(e.message),
    );
  });

  it('refuses an empty corner of the region, saying where', () => {
    // Source: a tensor B-spline no reading reaches has an all-zero Gram row (de Boor 2001, chapter XVII): its coefficient is not determined.
    const r = stream(71);
    const u: number[] = [];
    const v: number[] = [];
    const y: number[] = [];
    while (u.length < 400) {
      const a = r() * 10;
      const b = r() * 10;
      if (a > 6 && b > 6) continue; // no readings in the upper right corner
      u.push(a);
      v.push(b);
      y.push(a + b);
    }
    assert.throws(
      () => fitSurface({ u: Float64Array.from(u), v: Float64Array.from(v), y: Float64Array.from(y) }, { dfU: 8, dfV: 8 }),
      (e: unknown) => e instanceof FitError && /empty corner/.test(e.message) && /surface with df 8 × 8/.test(e.message),
    );
  });

  it('refuses inputs that move together, saying so', () => {
    // Source: with v = 2 u the products B_a(u) B_b(v) are functions of u alone, at most as many independent ones as distinct u allow on the line (rank deficiency).
    const r = stream(83);
    const u = Float64Array.from({ length: 200 }, () => r() * 5);
    const v = Float64Array.from(u, (x) => 2 * x);
    const y = Float64Array.from(u, (x) => x * x);
    assert.throws(
      () => fitSurface({ u, v, y }, { dfU: 3, dfV: 3 }),
      (e: unknown) => e instanceof FitError && /move together|empty corner/.test(e.message),
    );
  });
});
