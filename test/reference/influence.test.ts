/**
 * External reference check of the influence rules (core/stats/influence.ts, applied by
 * core/analysis/influence.ts), the effect sizes of the residual checks
 * (core/stats/effects.ts) and the F quantile (core/stats/distributions.ts qf) against R,
 * fixture test/reference/fixtures/influence.json written by test/reference/r/influence.R
 * (regenerate with `Rscript test/reference/r/influence.R` from the repository root).
 *
 * Data: open datasets shipped with R (cars, women, faithful, MASS::mcycle, MASS::hills,
 * stackloss, discoveries), sorted by x. R computes hatvalues, cooks.distance, rstudent
 * (rstudent.glm for the Poisson fits), the thresholds qt / qnorm at 0.05 / (2n), qf(0.5, p,
 * n - p) and max(0.5, 3p/n), the rows above each, and the effect sizes with its own
 * functions (acf, rle, pnorm) or the formulas written out in R.
 *
 * Tolerances: quantiles 1e-10 relative; studentized residuals 1e-7 relative (they carry the
 * fit's agreement with R, about 1e-9); effect sizes on R's own residuals 1e-10 relative.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { influenceOf } from '../../core/analysis/influence';
import { fitCurve } from '../../core/fit/index';
import { qf } from '../../core/stats/distributions';
import { lag1Correlation, moments, runsTest, spreadRatio } from '../../core/stats/effects';
import { influenceThresholds } from '../../core/stats/influence';
import type { XYData } from '../../core/types';

interface Case {
  readonly name: string;
  readonly dataset: string;
  readonly outcome: 'continuous' | 'counts';
  readonly df: number;
  readonly rCall: string;
  readonly hat: number[];
  readonly cooks: number[];
  readonly studentized: number[];
  readonly outlierLimit: number;
  readonly cooksLimit: number;
  readonly leverageLimit: number;
  readonly outliers: number[];
  readonly cooksRows: number[];
  readonly leverageRows: number[];
  readonly residuals?: number[];
  readonly lag1?: number;
  readonly skewness?: number;
  readonly excessKurtosis?: number;
  readonly spreadRatio?: number;
  readonly runs?: { runs: number; expected: number; z: number; pValue: number };
}
interface Fixture {
  readonly rVersion: string;
  readonly datasets: Record<string, { source: string; x: number[]; y: number[] }>;
  readonly qf: { p: number[]; df1: number[]; df2: number[]; lower: number[]; upper: number[] };
  readonly qfInfinite: { p: number[]; df1: number[]; lower: number[] };
  readonly bonferroni: { n: number[]; df: number[]; t: number[]; z: number[] };
  readonly lm: Case[];
  readonly glm: Case[];
}

const fixture = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'influence.json'), 'utf8')) as Fixture;
const R = fixture.rVersion;

function rel(actual: number, expected: number, tol: number, what: string): void {
  assert.ok(Math.abs(actual - expected) <= tol * Math.max(1, Math.abs(expected)), `${what}: ${actual} vs R ${expected} (tolerance ${tol} relative)`);
}

describe(`qf and the influence thresholds against ${R}`, () => {
  it('qf matches qf(p, df1, df2) in both tails to 1e-10 relative, df2 up to 999992', () => {
    const q = fixture.qf;
    q.p.forEach((p, i) => {
      const [a, b] = [q.df1[i] as number, q.df2[i] as number];
      rel(qf(p, a, b), q.lower[i] as number, 1e-10, `qf(${p}, ${a}, ${b})`);
      rel(qf(p, a, b, false), q.upper[i] as number, 1e-10, `qf(${p}, ${a}, ${b}, upper)`);
    });
    fixture.qfInfinite.p.forEach((p, i) => rel(qf(p, fixture.qfInfinite.df1[i] as number, Infinity), fixture.qfInfinite.lower[i] as number, 1e-10, `qf(${p}, df2 = Inf)`));
  });

  it('influenceThresholds: the Bonferroni critical values match qt and qnorm at 0.05 / (2n), n up to 1,000,000', () => {
    const b = fixture.bonferroni;
    b.n.forEach((n, i) => {
      const df = b.df[i] as number;
      rel(influenceThresholds(n, df, 'student')[0]?.value as number, b.t[i] as number, 1e-10, `t, n = ${n}`);
      rel(influenceThresholds(n, df, 'normal')[0]?.value as number, b.z[i] as number, 1e-10, `z, n = ${n}`);
    });
  });
});

function dataOf(c: Case): XYData {
  const d = fixture.datasets[c.dataset] as { x: number[]; y: number[] };
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y) };
}

for (const c of [...fixture.lm, ...fixture.glm]) {
  describe(`influence of ${c.name} (${c.rCall}) against ${R}`, () => {
    const data = dataOf(c);
    const fit = fitCurve(data, { kind: 'natural-spline', df: c.df, ...(c.outcome === 'counts' ? { outcome: 'counts' as const } : {}) });
    const report = influenceOf(fit, data);

    it("the thresholds are R's qt (or qnorm), qf(0.5, p, n - p) and max(0.5, 3p/n)", () => {
      const [t, d, h] = report.thresholds;
      rel(t?.value as number, c.outlierLimit, 1e-10, 'outlier limit');
      rel(d?.value as number, c.cooksLimit, 1e-10, "Cook's limit");
      rel(h?.value as number, c.leverageLimit, 1e-12, 'leverage limit');
    });

    it('flags exactly the rows R puts above each threshold', () => {
      const byRule = (rule: string): number[] =>
        report.rows
          .filter((r) => r.exceeds.includes(rule as 'outlier'))
          .map((r) => r.index)
          .sort((a, b) => a - b);
      assert.deepEqual(byRule('outlier'), c.outliers, 'outliers');
      assert.deepEqual(byRule('cooks'), c.cooksRows, "Cook's distance");
      assert.deepEqual(byRule('leverage'), c.leverageRows, 'leverage');
      assert.equal(report.total, new Set([...c.outliers, ...c.cooksRows, ...c.leverageRows]).size);
    });

    it(`the flagged rows' studentized residuals equal R's ${c.outcome === 'counts' ? 'rstudent.glm' : 'rstudent'} (1e-7 relative)`, () => {
      for (const r of report.rows) rel(r.studentized, c.studentized[r.index] as number, 1e-7, `row ${r.index}`);
      for (const r of report.rows) rel(r.cooksDistance, c.cooks[r.index] as number, 1e-7, `Cook's distance of row ${r.index}`);
    });
  });
}

describe(`effect sizes on R's lm residuals against ${R}`, () => {
  for (const c of fixture.lm) {
    it(`${c.name}: lag-1 correlation (acf), skewness, excess kurtosis, spread ratio and runs (1e-10 relative)`, () => {
      const e = Float64Array.from(c.residuals as number[]);
      rel(lag1Correlation(e), c.lag1 as number, 1e-10, 'lag-1 correlation');
      const m = moments(e);
      rel(m.skewness, c.skewness as number, 1e-10, 'skewness');
      rel(m.excessKurtosis, c.excessKurtosis as number, 1e-10, 'excess kurtosis');
      rel(spreadRatio(e), c.spreadRatio as number, 1e-10, 'spread ratio');
      const runs = runsTest(e);
      const r = c.runs as NonNullable<Case['runs']>;
      assert.equal(runs.runs, r.runs);
      rel(runs.expected, r.expected, 1e-12, 'expected runs');
      rel(runs.z, r.z, 1e-10, 'runs z');
      rel(runs.pValue, r.pValue, 1e-10, 'runs p');
    });
  }
});
