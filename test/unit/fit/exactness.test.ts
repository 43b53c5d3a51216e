/**
 * Exactness properties of fitCurve ('natural-spline' and 'polynomial') and bandsAt, checked with
 * fast-check on seeded random data (fixed seeds, so every run sees the same cases).
 *
 * Each property is a theorem about weighted least squares in a fixed linear space, so it
 * needs no fixture; the source of each is named beside it.
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { bandsAt } from '../../../core/fit/bands';
import { fitCurve } from '../../../core/fit/index';
import { InputError } from '../../../core/errors';
import type { XYData } from '../../../core/types';

const RUNS = 100;

function maxAbs(v: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < v.length; i++) m = Math.max(m, Math.abs(v[i] as number));
  return m;
}

/**
 * x values with ties: `distinct` unique integers scaled by 1/10 and shifted, then the rows
 * named by `repeats` appended again (each index taken modulo the number of unique values).
 */
function tiedX(unique: readonly number[], repeats: readonly number[], shift: number): Float64Array {
  const base = unique.map((u) => u / 10 + shift);
  const extra = repeats.map((r) => base[r % base.length] as number);
  return Float64Array.from([...base, ...extra]);
}

/** x arbitrary: minDistinct..maxDistinct distinct values, at least `minRows` rows, some ties. */
function tiedXArb(minDistinct: number, minRows: number, maxDistinct = minDistinct + 25): fc.Arbitrary<Float64Array> {
  return fc
    .record({
      unique: fc.uniqueArray(fc.integer({ min: -500, max: 500 }), { minLength: minDistinct, maxLength: maxDistinct }),
      repeats: fc.array(fc.nat({ max: 1000 }), { minLength: Math.max(0, minRows - minDistinct), maxLength: 15 }),
      shift: fc.double({ min: -1000, max: 1000, noNaN: true }),
    })
    .map(({ unique, repeats, shift }) => tiedX(unique, repeats, shift));
}

const finite = (min: number, max: number): fc.Arbitrary<number> => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });

describe('fitCurve exactness properties', () => {
  it("fitCurve('natural-spline', any df 2..8) reproduces a straight line exactly and its bands collapse", () => {
    // Source: natural cubic splines contain every linear function and are linear beyond the
    // boundary knots (Green & Silverman 1994, Nonparametric Regression and Generalized Linear
    // Models, section 2.1), so least squares reproduces a line with zero residuals, sigma = 0
    // and zero-width bands, inside the data and when extrapolating.
    // Tolerance: 1e-9 times max |y| over data and grid (rounding only).
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 8 }).chain((df) => fc.tuple(fc.constant(df), tiedXArb(df, df + 1))),
        finite(-100, 100),
        finite(-100, 100),
        fc.option(fc.array(finite(0.1, 10), { minLength: 60, maxLength: 60 }), { nil: undefined }),
        ([df, x], a, b, wPool) => {
          const n = x.length;
          const y = x.map((xi) => a + b * xi);
          const w = wPool ? Float64Array.from({ length: n }, (_, i) => wPool[i % wPool.length] as number) : undefined;
          const fit = fitCurve({ x, y, w }, { kind: 'natural-spline', df });
          const lo = Math.min(...x);
          const hi = Math.max(...x);
          const grid = Float64Array.from({ length: 13 }, (_, i) => lo - 0.2 * (hi - lo) + (i * 1.4 * (hi - lo)) / 12);
          const truth = grid.map((g) => a + b * g);
          const tol = 1e-9 * Math.max(maxAbs(y), maxAbs(truth), 1e-300);
          assert.ok(maxAbs(fit.residuals) <= tol, `residuals up to ${maxAbs(fit.residuals)} (tolerance ${tol})`);
          assert.ok(fit.sigma <= tol, `sigma ${fit.sigma}`);
          const bands = bandsAt(fit, grid);
          for (let i = 0; i < grid.length; i++) {
            assert.ok(Math.abs((bands.fit[i] as number) - (truth[i] as number)) <= tol, `fit at ${grid[i]}: ${bands.fit[i]} vs ${truth[i]}`);
            assert.ok((bands.se[i] as number) <= tol, `se at ${grid[i]}: ${bands.se[i]}`);
            assert.ok((bands.ciUpper[i] as number) - (bands.ciLower[i] as number) <= tol, `confidence band width at ${grid[i]}`);
            assert.ok((bands.piUpper[i] as number) - (bands.piLower[i] as number) <= tol, `prediction band width at ${grid[i]}`);
          }
        },
      ),
      { numRuns: RUNS, seed: 20240611 },
    );
  });

  it("fitCurve('polynomial', df = d + 1) reproduces degree-d data exactly and its bands collapse", () => {
    // Source: least squares reproduces any response that lies in the column space (the
    // polynomials of degree <= d); Seber & Lee 2003, Linear Regression Analysis, 2nd ed.,
    // section 3.1 (y in the range of X gives residual 0).
    // Tolerance: 1e-9 times the size of the largest term, sum |c_j| max|x|^j.
    fc.assert(
      fc.property(
        fc
          .integer({ min: 1, max: 5 })
          .chain((d) =>
            fc.tuple(fc.array(finite(-5, 5), { minLength: d + 1, maxLength: d + 1 }), fc.uniqueArray(fc.integer({ min: -300, max: 300 }), { minLength: d + 2, maxLength: 40 }), finite(-10, 10)),
          ),
        ([coef, ints, shift]) => {
          const d = coef.length - 1;
          const x = Float64Array.from(ints, (v) => v / 100 + shift);
          const poly = (t: number): number => coef.reduceRight((acc, c) => acc * t + c, 0);
          const y = x.map(poly);
          const fit = fitCurve({ x, y }, { kind: 'polynomial', df: d + 1 });
          const xMax = Math.max(maxAbs(x), 1) * 1.2;
          const scale = coef.reduce((s, c, j) => s + Math.abs(c) * xMax ** j, 0);
          const tol = 1e-9 * Math.max(scale, 1e-300);
          assert.ok(maxAbs(fit.residuals) <= tol, `degree ${d}: residuals up to ${maxAbs(fit.residuals)} (tolerance ${tol})`);
          const lo = Math.min(...x);
          const hi = Math.max(...x);
          const grid = [lo - 0.1 * (hi - lo), lo, (lo + hi) / 2, hi, hi + 0.1 * (hi - lo)];
          const bands = bandsAt(fit, grid);
          grid.forEach((g, i) => {
            assert.ok(Math.abs((bands.fit[i] as number) - poly(g)) <= tol, `fit at ${g}`);
            assert.ok((bands.piUpper[i] as number) - (bands.piLower[i] as number) <= tol, `prediction band width at ${g}`);
          });
        },
      ),
      { numRuns: RUNS, seed: 20240612 },
    );
  });

  it("fitCurve('polynomial') exact leave-one-out RMSE equals brute-force refits without each row", () => {
    // Source: the deleted residual y_i - f_(-i)(x_i) = r_i / (1 - h_ii) for least squares in a
    // fixed space (Cook & Weisberg 1982, Residuals and Influence in Regression, section 2.2);
    // the brute force here refits through fitCurve n times. Weighted: sqrt(sum w e^2 / sum w).
    // Only the polynomial family is refitted this way: the polynomial space of degree df - 1
    // does not depend on the data, whereas fitCurve places natural-spline knots at quantiles
    // of the rows it is given, so a refit without row i uses other knots (another space) and
    // need not match the fixed-knot formula. The natural spline's fixed-knot brute force is
    // checked against R in test/reference/fits.test.ts.
    // Tolerance: 1e-8 relative.
    fc.assert(
      fc.property(
        fc
          .integer({ min: 1, max: 5 })
          .chain((df) =>
            fc.tuple(
              fc.constant(df),
              fc.uniqueArray(fc.integer({ min: -300, max: 300 }), { minLength: df + 2, maxLength: 25 }),
              fc.array(finite(-100, 100), { minLength: 25, maxLength: 25 }),
              fc.option(fc.array(finite(0.1, 10), { minLength: 25, maxLength: 25 }), { nil: undefined }),
            ),
          ),
        ([df, ints, yPool, wPool]) => {
          const n = ints.length;
          const x = Float64Array.from(ints, (v) => v / 100);
          const y = Float64Array.from({ length: n }, (_, i) => yPool[i] as number);
          const w = wPool ? Float64Array.from({ length: n }, (_, i) => wPool[i] as number) : undefined;
          const fit = fitCurve({ x, y, w }, { kind: 'polynomial', df });
          // Rows of leverage within 1e-3 of 1 make r / (1 - h) lose up to 1e3 times the
          // rounding of h, and the implementation treats 1 - h <= 1e-10 as leverage 1; such
          // near-degenerate designs are outside this identity check.
          fc.pre(Math.max(...fit.leverage) <= 1 - 1e-3);
          let sse = 0;
          let sw = 0;
          for (let i = 0; i < n; i++) {
            const keep = (_: number, j: number): boolean => j !== i;
            const sub: XYData = { x: x.filter(keep), y: y.filter(keep), w: w ? w.filter(keep) : undefined };
            const e = (y[i] as number) - fitCurve(sub, { kind: 'polynomial', df }).curve.value(x[i] as number);
            const wi = w ? (w[i] as number) : 1;
            sse += wi * e * e;
            sw += wi;
          }
          const brute = Math.sqrt(sse / sw);
          assert.ok(Math.abs(fit.looRmse - brute) <= 1e-8 * brute, `df ${df}: looRmse ${fit.looRmse} vs brute force ${brute}`);
        },
      ),
      { numRuns: RUNS, seed: 20240613 },
    );
  });

  for (const kind of ['natural-spline', 'polynomial'] as const) {
    it(`fitCurve('${kind}') leverage sums to df, and fitted + residuals = y`, () => {
      // Source: trace of the hat matrix of a full-rank regression = number of coefficients
      // (docs/design.md, "df"; Hoaglin & Welsch 1978, "The hat matrix in regression
      // and ANOVA", Am. Stat. 32(1)), with or without weights. Residuals are y - fitted by
      // definition. Tolerance: 1e-9 df for the trace, 1e-12 max|y| for the sum.
      fc.assert(
        fc.property(
          fc.integer({ min: 2, max: kind === 'natural-spline' ? 8 : 6 }).chain((df) => fc.tuple(fc.constant(df), tiedXArb(df, df + 1))),
          fc.array(finite(-1e3, 1e3), { minLength: 60, maxLength: 60 }),
          fc.option(fc.array(finite(0.1, 10), { minLength: 60, maxLength: 60 }), { nil: undefined }),
          ([df, x], yPool, wPool) => {
            const n = x.length;
            const y = Float64Array.from({ length: n }, (_, i) => yPool[i % yPool.length] as number);
            const w = wPool ? Float64Array.from({ length: n }, (_, i) => wPool[i % wPool.length] as number) : undefined;
            const fit = fitCurve({ x, y, w }, { kind, df });
            let trace = 0;
            for (const h of fit.leverage) trace += h;
            assert.ok(Math.abs(trace - df) <= 1e-9 * df, `sum of leverage ${trace} vs df ${df}`);
            assert.equal(fit.df, df);
            const tol = 1e-12 * Math.max(maxAbs(y), 1e-300);
            for (let i = 0; i < n; i++) {
              const back = (fit.fitted[i] as number) + (fit.residuals[i] as number);
              assert.ok(Math.abs(back - (y[i] as number)) <= tol, `row ${i}: fitted + residual = ${back}, y = ${y[i]}`);
            }
          },
        ),
        { numRuns: RUNS, seed: 20240614 },
      );
    });

    it(`fitCurve('${kind}') with df above the number of distinct x throws, naming that number`, () => {
      // Source: a regression space of dimension df is identifiable only on at least df
      // distinct x (docs/design.md, "df": such a candidate is skipped with that reason; STYLE.md
      // message form "... needs at least 9 distinct x values; the data has 6").
      fc.assert(
        fc.property(
          fc.integer({ min: 2, max: 6 }).chain((m) => fc.tuple(tiedXArb(m, m + 3, m), fc.integer({ min: m + 1, max: m + 4 }))),
          ([x, df]) => {
            const m = new Set(x).size;
            const y = x.map((v, i) => v * 0.5 + (i % 3));
            assert.throws(
              () => fitCurve({ x, y }, { kind, df }),
              (err: unknown) => err instanceof InputError && new RegExp(`(^|\\D)${m}(\\D|$)`).test(err.message) && /distinct/i.test(err.message),
              `df ${df} on ${m} distinct x`,
            );
          },
        ),
        { numRuns: RUNS, seed: 20240615 },
      );
    });

    it(`fitCurve('${kind}') on constant x throws`, () => {
      // Source: with one distinct x no curve of df >= 2 is identifiable (docs/design.md, "df").
      const x = new Float64Array(12).fill(3.5);
      const y = Float64Array.from({ length: 12 }, (_, i) => i);
      for (let df = 2; df <= 6; df++) {
        assert.throws(() => fitCurve({ x, y }, { kind, df }), InputError, `df ${df}`);
      }
    });

    it(`fitCurve('${kind}') rejects NaN and infinite input, naming the CSV line`, () => {
      // Source: docs/design.md ("Input") / project rules: bad input gets a clear error that says what and where.
      const n = 12;
      const x = Float64Array.from({ length: n }, (_, i) => i);
      const y = Float64Array.from({ length: n }, (_, i) => Math.sin(i));
      const w = new Float64Array(n).fill(1);
      const lines = Int32Array.from({ length: n }, (_, i) => i + 2);
      const bad: Array<[string, XYData]> = [];
      for (const [col, value] of [
        ['x', NaN],
        ['y', NaN],
        ['w', NaN],
        ['x', Infinity],
        ['y', -Infinity],
      ] as const) {
        const data = { x: x.slice(), y: y.slice(), w: w.slice(), lines };
        data[col][7] = value;
        bad.push([`${col} = ${value} at row 7`, data]);
      }
      for (const [what, data] of bad) {
        assert.throws(
          () => fitCurve(data, { kind, df: 3 }),
          (err: unknown) => err instanceof InputError && err.place.line === 9,
          what,
        );
      }
    });
  }
});
