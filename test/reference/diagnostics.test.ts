/**
 * External reference check of the residual diagnostics and distribution functions in
 * core/stats against R, fixture test/reference/fixtures/diagnostics.json written by
 * test/reference/r/diagnostics.R (regenerate with `Rscript test/reference/r/diagnostics.R`
 * from the repository root). The R and package versions (stats, splines, MASS, lmtest)
 * are read from the fixture and named in the test titles.
 *
 * Data: R's built-in open datasets cars, women, faithful, pressure, trees, precip, rivers,
 * quakes and MASS::mcycle, sorted by x; fits lm(y ~ x) and lm(y ~ splines::ns(x, df = k)).
 *
 * Tolerances (stated per check): statistics 1e-8 relative; p-values 1e-6 absolute for
 * Shapiro-Wilk and the exact Durbin-Watson (R: lmtest's Fortran "pan", Farebrother 1980
 * AS 153; here: Imhof 1961), 1e-8 absolute for the others; distribution functions 1e-10
 * relative.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { breuschPagan } from '../../core/stats/breuschPagan';
import { binnedDensity } from '../../core/stats/density';
import { denseDesign } from '../../core/stats/design';
import { durbinWatsonAndBreuschPagan } from '../../core/stats/designTests';
import { lgamma, pbeta, pchisq, pf, pgamma, pnorm, pt, qnorm, qt } from '../../core/stats/distributions';
import { durbinWatson } from '../../core/stats/durbinWatson';
import { lackOfFit } from '../../core/stats/lackOfFit';
import { normalQuantiles } from '../../core/stats/normalQuantiles';
import { quantileType7 } from '../../core/stats/quantile';
import { shapiroWilk } from '../../core/stats/shapiroWilk';

const STAT_REL = 1e-8;
const P_ABS_APPROX = 1e-6; // Shapiro-Wilk and exact Durbin-Watson
const P_ABS = 1e-8;
const DIST_REL = 1e-10;

interface TestRecord {
  readonly statistic: number;
  readonly pValue: number;
}
interface FitRecord {
  readonly n: number;
  readonly p: number;
  readonly design: number[];
  readonly residuals: number[];
  readonly rss: number;
  readonly shapiroWilk: TestRecord;
  readonly durbinWatson: TestRecord & { readonly method: 'exact' | 'normal'; readonly pValuePan100: number | null };
  readonly breuschPagan: TestRecord & { readonly df: number };
  readonly lackOfFit: {
    readonly F: number;
    readonly df1: number;
    readonly df2: number;
    readonly pValue: number;
    readonly pureErrorSS: number;
    readonly lackOfFitSS: number;
    readonly replicatedLevels: number;
  } | null;
}
interface Fixture {
  readonly r: string;
  readonly packages: Readonly<Record<'lmtest' | 'MASS' | 'splines' | 'stats', string>>;
  readonly distributions: {
    readonly qt: { p: number[]; df: number[]; lower: number[]; upper: number[] };
    readonly pt: { q: number[]; df: number[]; lower: number[]; upper: number[] };
    readonly pchisq: { q: number[]; df: number[]; lower: number[]; upper: number[] };
    readonly pf: { q: number[]; df1: number[]; df2: number[]; lower: number[]; upper: number[] };
    readonly pnorm: { q: number[]; lower: number[]; upper: number[] };
    readonly qnorm: { p: number[]; lower: number[]; upper: number[] };
    readonly lgamma: { x: number[]; value: number[] };
    readonly pbeta: { x: number[]; a: number[]; b: number[]; lower: number[]; upper: number[] };
    readonly pgamma: { x: number[]; a: number[]; lower: number[]; upper: number[] };
  };
  readonly cases: readonly {
    readonly name: string;
    readonly source: string;
    readonly x: number[];
    readonly y: number[];
    readonly fits: readonly { readonly model: string; readonly record: FitRecord }[];
  }[];
  readonly shapiroWilk: readonly { name: string; x: number[]; statistic: number; pValue: number }[];
  readonly quantiles: readonly { name: string; sorted: number[]; probs: number[]; type7: number[] }[];
  readonly ppoints: readonly { n: number; theoretical: number[] }[];
  readonly density: { name: string; nx: number; ny: number; counts: number[] };
}

const fixture = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'diagnostics.json'), 'utf8')) as Fixture;
const R = `${fixture.r.replace(/ \(.*$/, '').replace('R version ', 'R ')}`;
const LMTEST = `${R}, lmtest ${fixture.packages.lmtest}`;

function rel(actual: number, expected: number, tol: number, what: string): void {
  // Values R underflows to 0 (or that are exactly 0) are compared absolutely at 1e-300.
  const ok = expected === 0 ? Math.abs(actual) <= 1e-300 : Math.abs(actual - expected) <= tol * Math.abs(expected);
  assert.ok(ok, `${what}: got ${actual}, R gives ${expected} (relative tolerance ${tol})`);
}
function abs(actual: number, expected: number, tol: number, what: string): void {
  assert.ok(Math.abs(actual - expected) <= tol, `${what}: got ${actual}, R gives ${expected} (absolute tolerance ${tol})`);
}

describe(`distributions against ${R} (stats ${fixture.packages.stats})`, () => {
  const d = fixture.distributions;
  it('qt matches R qt in both tails to 1e-10 relative (df 1 .. 1e5, non-integer df, p 1e-12 .. 0.9999)', () => {
    d.qt.p.forEach((p, i) => {
      const df = d.qt.df[i] as number;
      rel(qt(p, df), d.qt.lower[i] as number, DIST_REL, `qt(${p}, ${df})`);
      rel(qt(p, df, false), d.qt.upper[i] as number, DIST_REL, `qt(${p}, ${df}, upper)`);
    });
  });
  it('pt matches R pt in both tails to 1e-10 relative', () => {
    d.pt.q.forEach((q, i) => {
      const df = d.pt.df[i] as number;
      rel(pt(q, df), d.pt.lower[i] as number, DIST_REL, `pt(${q}, ${df})`);
      rel(pt(q, df, false), d.pt.upper[i] as number, DIST_REL, `pt(${q}, ${df}, upper)`);
    });
  });
  it('pchisq matches R pchisq in both tails to 1e-10 relative (df 0.5 .. 5000)', () => {
    d.pchisq.q.forEach((q, i) => {
      const df = d.pchisq.df[i] as number;
      rel(pchisq(q, df), d.pchisq.lower[i] as number, DIST_REL, `pchisq(${q}, ${df})`);
      rel(pchisq(q, df, false), d.pchisq.upper[i] as number, DIST_REL, `pchisq(${q}, ${df}, upper)`);
    });
  });
  it('pf matches R pf in both tails to 1e-10 relative', () => {
    d.pf.q.forEach((q, i) => {
      const df1 = d.pf.df1[i] as number;
      const df2 = d.pf.df2[i] as number;
      rel(pf(q, df1, df2), d.pf.lower[i] as number, DIST_REL, `pf(${q}, ${df1}, ${df2})`);
      rel(pf(q, df1, df2, false), d.pf.upper[i] as number, DIST_REL, `pf(${q}, ${df1}, ${df2}, upper)`);
    });
  });
  it('pnorm, qnorm, lgamma, pbeta and pgamma match R to 1e-10 relative', () => {
    d.pnorm.q.forEach((q, i) => {
      rel(pnorm(q), d.pnorm.lower[i] as number, DIST_REL, `pnorm(${q})`);
      rel(pnorm(q, false), d.pnorm.upper[i] as number, DIST_REL, `pnorm(${q}, upper)`);
    });
    d.qnorm.p.forEach((p, i) => {
      rel(qnorm(p), d.qnorm.lower[i] as number, DIST_REL, `qnorm(${p})`);
      rel(qnorm(p, false), d.qnorm.upper[i] as number, DIST_REL, `qnorm(${p}, upper)`);
    });
    d.lgamma.x.forEach((x, i) => rel(lgamma(x), d.lgamma.value[i] as number, DIST_REL, `lgamma(${x})`));
    d.pbeta.x.forEach((x, i) => {
      const [a, b] = [d.pbeta.a[i] as number, d.pbeta.b[i] as number];
      rel(pbeta(x, a, b), d.pbeta.lower[i] as number, DIST_REL, `pbeta(${x}, ${a}, ${b})`);
      rel(pbeta(x, a, b, false), d.pbeta.upper[i] as number, DIST_REL, `pbeta(${x}, ${a}, ${b}, upper)`);
    });
    d.pgamma.x.forEach((x, i) => {
      const a = d.pgamma.a[i] as number;
      rel(pgamma(x, a), d.pgamma.lower[i] as number, DIST_REL, `pgamma(${x}, ${a})`);
      rel(pgamma(x, a, false), d.pgamma.upper[i] as number, DIST_REL, `pgamma(${x}, ${a}, upper)`);
    });
  });
});

for (const c of fixture.cases) {
  for (const { model, record: r } of c.fits) {
    describe(`diagnostics of ${c.source}, ${model}, n = ${r.n}, against ${LMTEST}`, () => {
      const residuals = Float64Array.from(r.residuals);
      const design = denseDesign(Float64Array.from(r.design), r.p);

      it('shapiroWilk matches shapiro.test (W 1e-8 relative, p 1e-6 absolute)', () => {
        const sw = shapiroWilk(residuals);
        rel(sw.statistic, r.shapiroWilk.statistic, STAT_REL, 'W');
        abs(sw.pValue, r.shapiroWilk.pValue, P_ABS_APPROX, 'p');
      });

      it(`durbinWatson matches lmtest::dwtest (${r.durbinWatson.method}; d 1e-8 relative, p ${r.durbinWatson.method === 'exact' ? '1e-6' : '1e-8'} absolute)`, () => {
        const dw = durbinWatson(residuals, design);
        assert.equal(dw.method, r.durbinWatson.method);
        rel(dw.statistic, r.durbinWatson.statistic, STAT_REL, 'DW');
        abs(dw.pValue, r.durbinWatson.pValue, r.durbinWatson.method === 'exact' ? P_ABS_APPROX : P_ABS, 'p');
      });

      it('breuschPagan matches lmtest::bptest (studentized; statistic 1e-8 relative, p 1e-8 absolute)', () => {
        const bp = breuschPagan(residuals, design);
        rel(bp.statistic, r.breuschPagan.statistic, STAT_REL, 'BP');
        assert.equal(bp.df, r.breuschPagan.df);
        abs(bp.pValue, r.breuschPagan.pValue, P_ABS, 'p');
      });

      it('durbinWatsonAndBreuschPagan matches lmtest::dwtest and lmtest::bptest (same tolerances as above)', () => {
        const both = durbinWatsonAndBreuschPagan(residuals, design);
        rel(both.durbinWatson.statistic, r.durbinWatson.statistic, STAT_REL, 'DW');
        abs(both.durbinWatson.pValue, r.durbinWatson.pValue, r.durbinWatson.method === 'exact' ? P_ABS_APPROX : P_ABS, 'DW p');
        rel(both.breuschPagan.statistic, r.breuschPagan.statistic, STAT_REL, 'BP');
        abs(both.breuschPagan.pValue, r.breuschPagan.pValue, P_ABS, 'BP p');
      });

      it('lackOfFit matches anova(fit, lm(y ~ factor(x))) (F and sums of squares 1e-8 relative, p 1e-8 absolute)', () => {
        const lof = lackOfFit(Float64Array.from(c.x), Float64Array.from(c.y), undefined, r.rss, r.p);
        const ref = r.lackOfFit;
        if (ref === null) {
          assert.equal(lof, undefined);
          return;
        }
        assert.ok(lof, 'expected a lack-of-fit test');
        rel(lof.F, ref.F, STAT_REL, 'F');
        assert.equal(lof.df1, ref.df1);
        assert.equal(lof.df2, ref.df2);
        abs(lof.pValue, ref.pValue, P_ABS, 'p');
        rel(lof.pureErrorSS, ref.pureErrorSS, STAT_REL, 'pure error SS');
        rel(lof.lackOfFitSS, ref.lackOfFitSS, STAT_REL, 'lack-of-fit SS');
        assert.equal(lof.replicatedLevels, ref.replicatedLevels);
      });
    });
  }
}

describe(`shapiroWilk on raw samples against ${R} shapiro.test (W 1e-8 relative, p 1e-6 absolute)`, () => {
  for (const s of fixture.shapiroWilk) {
    it(`shapiroWilk(${s.name}), n = ${s.x.length}`, () => {
      const sw = shapiroWilk(Float64Array.from(s.x));
      rel(sw.statistic, s.statistic, STAT_REL, 'W');
      abs(sw.pValue, s.pValue, P_ABS_APPROX, 'p');
    });
  }
});

describe(`quantiles, plotting positions and binned counts against ${R}`, () => {
  it('quantileType7 matches quantile(x, probs, type = 7) to 1e-12 relative', () => {
    for (const q of fixture.quantiles) {
      const got = quantileType7(Float64Array.from(q.sorted), q.probs);
      q.type7.forEach((v, k) => rel(got[k] as number, v, 1e-12, `${q.name} at ${q.probs[k]}`));
    }
  });

  it('normalQuantiles positions match qnorm(ppoints(n)) to 1e-12 relative (n = 3, 8, 10, 11, 50)', () => {
    for (const { n, theoretical } of fixture.ppoints) {
      const got = normalQuantiles(Float64Array.from({ length: n }, (_, i) => i)).theoretical;
      theoretical.forEach((v, k) => {
        if (v === 0) abs(got[k] as number, 0, 1e-15, `n = ${n}, point ${k + 1}`);
        else rel(got[k] as number, v, 1e-12, `n = ${n}, point ${k + 1}`);
      });
    }
  });

  it('binnedDensity matches table(cut(..., right = FALSE, include.lowest = TRUE)) on faithful', () => {
    const faithful = fixture.cases.find((c) => c.name === 'faithful');
    assert.ok(faithful);
    const { nx, ny, counts } = fixture.density;
    // The faithful case stores eruptions as x and waiting as y.
    const g = binnedDensity(Float64Array.from(faithful.x), Float64Array.from(faithful.y), nx, ny);
    assert.deepEqual(Array.from(g.counts), counts);
  });
});
