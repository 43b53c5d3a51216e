/**
 * External reference check of inverseTable (core/calibrate/inverse.ts) against R 4.2,
 * fixture from test/reference/r/inverse.R (regenerate with `Rscript test/reference/r/inverse.R`
 * from the repository root).
 *
 * straight: lm(y ~ x) on datasets::cars (increasing) and datasets::mtcars wt -> mpg
 * (decreasing); the interval ends are the roots of
 * (y0 - a - b x0)^2 = t^2 s^2 (1/m + 1/n + (x0 - xbar)^2 / Sxx) in the closed form of
 * Draper & Smith (1998), Applied Regression Analysis, 3rd ed., section 3.2, for m = 1 and 3
 * and levels 0.95 and 0.90. A root outside the data range must come back as an open end
 * (NaN, flag set). Knotwise's straight lines: polynomial df 2, natural spline df 2 and
 * smoothing spline df 2 (docs/design.md: df = 2 is a straight line).
 *
 * spline: lm(y ~ ns(conc, df = 3)) on datasets::DNase run 1 (Knotwise's natural spline with
 * df 4), interval ends by brute force in R (grid and uniroot on the band inequality, slope
 * by central differences) for m = 1 and 3 and reference uncertainty u = 0 and 0.05 ng/ml.
 *
 * Tolerance: 1e-9 of the x range for the closed forms; for the spline 1e-8 with u = 0 and
 * 1e-6 with u > 0 (R's slope is a central difference with step 1e-6 of the range).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { INVERSE_COLUMNS, inverseTable } from '../../core/calibrate/inverse';
import { fitCurve } from '../../core/fit/index';

interface Dataset {
  readonly x: number[];
  readonly y: number[];
}

interface StraightCase {
  readonly dataset: string;
  readonly reading: number;
  readonly readingsAveraged: number;
  readonly level: number;
  readonly n: number;
  readonly t: number;
  readonly estimate: number;
  readonly rootLower: number;
  readonly rootUpper: number;
  readonly lowerInRange: boolean;
  readonly upperInRange: boolean;
}

interface SplineCase {
  readonly dataset: string;
  readonly df: number;
  readonly reading: number;
  readonly readingsAveraged: number;
  readonly referenceUncertainty: number;
  readonly level: number;
  readonly sigma: number;
  readonly t: number;
  readonly estimate: number | null;
  readonly lower: number | null;
  readonly upper: number | null;
  readonly knots: number[];
}

const fixture = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'inverse.json'), 'utf8')) as {
  datasets: Record<string, Dataset>;
  straight: StraightCase[];
  spline: SplineCase[];
};

const COL = Object.fromEntries(INVERSE_COLUMNS.map((c, i) => [c, i])) as Record<(typeof INVERSE_COLUMNS)[number], number>;

function data(name: string): { x: Float64Array; y: Float64Array } {
  const d = fixture.datasets[name];
  if (!d) throw new Error(`dataset ${name} missing`);
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y) };
}

function near(actual: number, expected: number, tol: number, what: string): void {
  assert.ok(Math.abs(actual - expected) <= tol, `${what}: ${actual} vs R ${expected} (tolerance ${tol})`);
}

/** An end from R (null or a root outside the range = open) against ours (NaN = open). */
function sameEnd(actual: number, expected: number | null, tol: number, what: string): void {
  if (expected === null) assert.ok(Number.isNaN(actual), `${what}: R has an open end; got ${actual}`);
  else near(actual, expected, tol, what);
}

describe('inverseTable against R: straight line, closed form (Draper & Smith 1998, section 3.2)', () => {
  for (const kind of ['polynomial', 'natural-spline', 'smoothing-spline'] as const) {
    it(`${kind} df 2 on cars and mtcars: estimate, ends, open and outside flags, t`, () => {
      for (const c of fixture.straight) {
        const d = data(c.dataset);
        const fit = fitCurve(d, { kind, df: 2 });
        const range = Math.max(...d.x) - Math.min(...d.x);
        const tol = 1e-9 * range;
        const table = inverseTable(fit, [c.reading], { readingsAveraged: c.readingsAveraged, level: c.level });
        const row = table.rows[0] as readonly number[];
        const what = `${kind} ${c.dataset} y0 = ${c.reading} m = ${c.readingsAveraged} level ${c.level}`;
        near(table.t, c.t, 1e-12 * c.t, `${what} t`);
        const inside = c.estimate >= Math.min(...d.x) && c.estimate <= Math.max(...d.x);
        assert.equal(row[COL.outside], inside ? 0 : 1, `${what} outside`);
        if (inside) near(row[COL.quantity] as number, c.estimate, tol, `${what} quantity`);
        else assert.ok(Number.isNaN(row[COL.quantity] as number), `${what} quantity`);
        sameEnd(row[COL.lower] as number, c.lowerInRange ? c.rootLower : null, tol, `${what} lower`);
        sameEnd(row[COL.upper] as number, c.upperInRange ? c.rootUpper : null, tol, `${what} upper`);
        assert.equal(row[COL.open], c.lowerInRange && c.upperInRange ? 0 : 1, `${what} open`);
      }
    });
  }

  it('the fixture exercises both open ends, outside readings and both directions', () => {
    const s = fixture.straight;
    assert.ok(s.some((c) => !c.lowerInRange) && s.some((c) => !c.upperInRange) && s.some((c) => c.lowerInRange && c.upperInRange));
    assert.ok(s.some((c) => c.dataset === 'mtcars') && s.some((c) => c.dataset === 'cars'));
  });
});

describe('inverseTable against R: natural spline, brute force in R', () => {
  it('DNase run 1, df 4: knots, sigma and t equal R, then estimate and ends for m = 1, 3 and u = 0, 0.05', () => {
    for (const c of fixture.spline) {
      const d = data(c.dataset);
      const fit = fitCurve(d, { kind: 'natural-spline', df: c.df });
      const what = `DNase y0 = ${c.reading} m = ${c.readingsAveraged} u = ${c.referenceUncertainty}`;
      assert.equal(fit.knots.length, c.knots.length);
      c.knots.forEach((k, i) => near(fit.knots[i] as number, k, 1e-12 * 12.5, `${what} knot ${i}`));
      near(fit.sigma, c.sigma, 1e-9 * c.sigma, `${what} sigma`);
      const table = inverseTable(fit, [c.reading], { readingsAveraged: c.readingsAveraged, referenceUncertainty: c.referenceUncertainty, level: c.level });
      near(table.t, c.t, 1e-12 * c.t, `${what} t`);
      const row = table.rows[0] as readonly number[];
      const range = Math.max(...d.x) - Math.min(...d.x);
      const tol = (c.referenceUncertainty > 0 ? 1e-6 : 1e-8) * range;
      sameEnd(row[COL.quantity] as number, c.estimate, 1e-9 * range, `${what} quantity`);
      assert.equal(row[COL.outside], c.estimate === null ? 1 : 0, `${what} outside`);
      sameEnd(row[COL.lower] as number, c.lower, tol, `${what} lower`);
      sameEnd(row[COL.upper] as number, c.upper, tol, `${what} upper`);
      assert.equal(row[COL.open], c.lower === null || c.upper === null ? 1 : 0, `${what} open`);
    }
  });
});
