/**
 * Issue 14, item 4: residual checks that stay sensible at any n. Each case is invented,
 * seeded data (test/unit/stats/seededNormal.ts) whose truth is known, so the right verdict
 * is known without an outside program:
 * - effect sizes beside the p-values, and warnings only when the size matters (the
 *   thresholds are the module's constants, stated as common practice there);
 * - influential rows by a rule that flags a handful of clean rows at any n, and a planted
 *   outlier;
 * - a curve through every reading skips the residual checks;
 * - over- and under-dispersion of counts;
 * - drift of the residuals in row order.
 */
import { strict as assert } from 'node:assert';
import { diagnose } from '../../../core/analysis/diagnose';
import { fitCurve } from '../../../core/fit/index';
import { checkViews, modelReportLines } from '../../../core/view/words';
import type { ModelReport, XYData } from '../../../core/types';
import { seededNormals } from '../stats/seededNormal';

/** The humidity sensor's invented response of examples/generate.ts, with x in [0, 1] spread over 10..94 %RH. */
function humidity(x: number): number {
  const rh = 10 + 84 * x;
  return 0.3 + 2.6 * (1 - Math.exp(-rh / 40)) + 0.25 / (1 + Math.exp(-(rh - 78) / 4));
}

/** n evenly spaced x in [0, 1], y = truth + sd * seeded normal noise, lines from 2. */
function clean(n: number, sd: number, seed: number, truth: (x: number) => number = humidity): XYData {
  const e = seededNormals(seed, n);
  const x = Float64Array.from({ length: n }, (_, i) => i / (n - 1));
  return { x, y: Float64Array.from(x, (v, i) => truth(v) + sd * (e[i] as number)), lines: Int32Array.from(x, (_, i) => i + 2) };
}

/** Seeded Poisson draws by inversion (Knuth's product method is slow for large means; inversion of the CDF is exact). */
function poissonDraws(means: Float64Array, seed: number): Float64Array {
  const u = seededNormals(seed, means.length).map((z) => 0.5 * (1 + Math.tanh(z))); // any seeded uniform-like values in (0, 1)
  return means.map((mean, i) => {
    let k = 0;
    let p = Math.exp(-mean);
    let cdf = p;
    while ((u[i] as number) > cdf && k < 10000) {
      k++;
      p *= mean / k;
      cdf += p;
    }
    return k;
  });
}

describe('diagnose at large n: effect sizes decide the warnings', () => {
  it('100,000 clean rows at df 8 with a Durbin-Watson of 1.97 no longer warn of correlated residuals (issue 14)', () => {
    // Issue 14: "100,000 clean rows at df 8 warn 'positively correlated ... too stiff' for a DW
    // of 1.97". The df 8 curve misses the humidity curve's knee very slightly, so DW is
    // significant (p < 0.0001) while the lag-1 correlation is about 0.016.
    const data = clean(100_000, 0.025, 7);
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 8 }));
    const dw = d.durbinWatson;
    assert.ok(dw && dw.statistic > 1.96 && dw.statistic < 1.98 && dw.pValue < 1e-4, `precondition: DW ${dw?.statistic}, p ${dw?.pValue}`);
    // lag-1 correlation ~ 1 - DW / 2 (Durbin & Watson 1950, section 2).
    assert.ok(Math.abs((dw.lag1 as number) - (1 - dw.statistic / 2)) < 1e-3, `lag-1 ${dw.lag1}`);
    assert.equal(dw.sizeMatters, false);
    assert.equal(dw.flagged, false);
    assert.ok(!d.warnings.some((w) => /correlated|Durbin-Watson|too stiff/.test(w)), d.warnings.join('\n'));
    const view = checkViews(d).find((c) => c.name.startsWith('Durbin-Watson'));
    assert.ok(view && !view.flagged && /lag-1 correlation 0\.01\d/.test(view.text) && /too small to matter/.test(view.text), view?.text);
  });

  it('a truly correlated series still warns, with its lag-1 correlation beside the p-value', () => {
    // AR(1) noise with phi = 0.5 in x order: lag-1 correlation about 0.5 (Box & Jenkins 1976, the AR(1) autocorrelation is phi).
    const n = 2000;
    const e = seededNormals(11, n);
    const ar = new Float64Array(n);
    for (let i = 0; i < n; i++) ar[i] = (i ? 0.5 * (ar[i - 1] as number) : 0) + (e[i] as number);
    const x = Float64Array.from({ length: n }, (_, i) => i / (n - 1));
    const data = { x, y: Float64Array.from(x, (v, i) => humidity(v) + 0.02 * (ar[i] as number)) };
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 8 }));
    assert.ok(d.durbinWatson?.flagged && (d.durbinWatson.lag1 as number) > 0.4, JSON.stringify(d.durbinWatson));
    assert.ok(
      d.warnings.some((w) => /lag-1 correlation 0\.\d+/.test(w) && /DW = /.test(w)),
      d.warnings.join('\n'),
    );
  });

  it('Breusch-Pagan: a significant test on clean rows does not warn when the spread ratio is near 1; a real change of spread does', () => {
    const flat = clean(100_000, 0.1, 3, (v) => 1 / (1 + Math.exp(-(v - 0.7) * 20)));
    const d = diagnose(flat, fitCurve(flat, { kind: 'natural-spline', df: 8 }));
    assert.ok(d.breuschPagan && d.breuschPagan.pValue < 0.05, `precondition: BP p ${d.breuschPagan?.pValue}`);
    assert.ok((d.breuschPagan.spreadRatio as number) < 1.1, `spread ratio ${d.breuschPagan.spreadRatio}`);
    assert.equal(d.breuschPagan.flagged, false);
    assert.ok(!d.warnings.some((w) => /spread/.test(w)), d.warnings.join('\n'));
    // SD growing from 0.05 to 0.15 across x: the upper third's SD is about 2.2 times the lower's.
    const n = 3000;
    const e = seededNormals(5, n);
    const x = Float64Array.from({ length: n }, (_, i) => i / (n - 1));
    const grow = { x, y: Float64Array.from(x, (v, i) => humidity(v) + (0.05 + 0.1 * v) * (e[i] as number)) };
    const g = diagnose(grow, fitCurve(grow, { kind: 'natural-spline', df: 6 }));
    assert.ok(g.breuschPagan?.flagged && (g.breuschPagan.spreadRatio as number) > 1.8, JSON.stringify(g.breuschPagan));
    assert.ok(
      g.warnings.some((w) => /spread ratio \d/.test(w)),
      g.warnings.join('\n'),
    );
  });

  it('Shapiro-Wilk reports skewness and excess kurtosis of all residuals and warns only when they are large', () => {
    const data = clean(100_000, 0.1, 9);
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 8 }));
    const sw = d.shapiroWilk;
    // Normal noise: sample skewness and excess kurtosis have SEs sqrt(6/n) = 0.0077 and sqrt(24/n) = 0.015
    // (Kendall & Stuart, large-sample moments; from memory), so 0.05 and 0.1 are over 6 SEs.
    assert.ok(sw && Math.abs(sw.skewness as number) < 0.05 && Math.abs(sw.excessKurtosis as number) < 0.1, JSON.stringify(sw));
    assert.equal(sw.flagged, false);
    // Exponential noise (skewness 2, excess kurtosis 6: Johnson, Kotz & Balakrishnan 1994, chapter 19).
    const n = 3000;
    const u = seededNormals(13, n).map((z) => 0.5 * (1 + Math.tanh(z)));
    const x = Float64Array.from({ length: n }, (_, i) => i / (n - 1));
    const skew = { x, y: Float64Array.from(x, (v, i) => humidity(v) - 0.05 * Math.log(u[i] as number)) };
    const s = diagnose(skew, fitCurve(skew, { kind: 'natural-spline', df: 6 }));
    assert.ok(s.shapiroWilk?.flagged && (s.shapiroWilk.skewness as number) > 0.5, JSON.stringify(s.shapiroWilk));
    assert.ok(
      s.warnings.some((w) => /skewness \d/.test(w)),
      s.warnings.join('\n'),
    );
  });
});

describe('diagnose: influential rows at any n', () => {
  it('1,000,000 clean rows flag at most 50 rows, and a planted outlier is flagged and listed first', () => {
    // Issue 14: the 4 / n cut-off of Cook's distance flagged about 7 % of clean rows.
    const data = clean(1_000_000, 0.1, 21, (v) => Math.sin(2 * Math.PI * v));
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 8 }));
    // Issue 14's bound: at most 50 of 1,000,000 clean rows.
    assert.ok(d.influential.total <= 50, `${d.influential.total} clean rows flagged`);
    const planted = { ...data, y: Float64Array.from(data.y) };
    // 10 residual SDs: far above the Bonferroni critical value of about 5.45 at n = 1,000,000
    // (qt(0.05 / 2e6, 999991) in R; test/reference/fixtures/influence.json).
    planted.y[123_456] = (planted.y[123_456] as number) + 1;
    const p = diagnose(planted, fitCurve(planted, { kind: 'natural-spline', df: 8 }));
    assert.ok(p.influential.total <= 51, `${p.influential.total} rows flagged`);
    assert.equal(p.influential.rows[0]?.line, 123_458);
    assert.ok(
      p.influential.rows[0]?.exceeds.some((e) => /outlier/.test(e)),
      JSON.stringify(p.influential.rows[0]),
    );
  });

  it('a planted outlier among 50 clean rows is flagged by line; every flagged row is kept, the first ten are for display', () => {
    const data = clean(50, 0.1, 22, (v) => Math.sin(2 * Math.PI * v));
    const y = Float64Array.from(data.y);
    y[20] = (y[20] as number) + 1.5;
    const d = diagnose({ ...data, y }, fitCurve({ ...data, y }, { kind: 'natural-spline', df: 5 }));
    assert.ok(d.influential.rows.some((r) => r.line === 22));
    assert.ok(d.influential.total <= 3, `${d.influential.total} rows flagged`);
    // Contaminated noise (every 25th reading 20 SDs off, alternating in sign) flags many rows: all are kept, ten are shown.
    const n = 400;
    const z = seededNormals(23, n);
    const x = Float64Array.from({ length: n }, (_, i) => i / (n - 1));
    const heavy = { x, y: Float64Array.from(x, (v, i) => Math.sin(2 * Math.PI * v) + 0.1 * (z[i] as number) + (i % 25 === 0 ? (i % 50 === 0 ? 2 : -2) : 0)) };
    const h = diagnose(heavy, fitCurve(heavy, { kind: 'natural-spline', df: 5 }));
    assert.ok(h.influential.total > 10, `precondition: ${h.influential.total} flagged`);
    assert.equal(h.influential.rows.length, h.influential.total);
    assert.equal(h.influential.shown, 10);
  });
});

describe('diagnose: a curve through every reading', () => {
  it('a polynomial through exact cubic readings says so and runs no residual test', () => {
    const x = Float64Array.from({ length: 20 }, (_, i) => i / 2);
    const data = { x, y: x.map((v) => 1 + v - 0.3 * v * v + 0.02 * v * v * v), lines: Int32Array.from(x, (_, i) => i + 2) };
    const d = diagnose(data, fitCurve(data, { kind: 'polynomial', df: 4 }));
    assert.equal(d.exactFit?.reason, 'rounding');
    for (const k of ['shapiroWilk', 'durbinWatson', 'breuschPagan', 'lackOfFit', 'rowOrder'] as const) assert.equal(d[k], undefined, k);
    assert.equal(d.influential.total, 0);
    assert.ok(
      d.warnings.some((w) => /passes through every reading/.test(w)),
      d.warnings.join('\n'),
    );
    assert.ok(!d.warnings.some((w) => /do not look normal|correlated|Cook's distance/.test(w)), d.warnings.join('\n'));
  });
});

describe('diagnose: dispersion of counts', () => {
  const n = 400;
  const x = Float64Array.from({ length: n }, (_, i) => i / (n - 1));
  const means = x.map((v) => Math.exp(1 + 1.5 * v));

  it('Poisson counts read as dispersion about 1, without a warning', () => {
    const data = { x, y: poissonDraws(means, 31) };
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 4, outcome: 'counts' }));
    // Pearson chi-square / residual df is about 1 for Poisson counts (McCullagh & Nelder 1989, section 4.5), with an
    // SD of about sqrt(2 / 396) = 0.07 here (chi-square on 396 df), so 0.25 is over 3 SDs.
    assert.ok(d.dispersion && Math.abs(d.dispersion.ratio - 1) < 0.25 && d.dispersion.verdict === 'as-expected', JSON.stringify(d.dispersion));
    assert.ok(!d.warnings.some((w) => /dispersion/i.test(w)), d.warnings.join('\n'));
  });

  it('counts with a random-effect mean (overdispersed) read as dispersion well above 1, with what to do', () => {
    // Mean multiplied by a log-normal factor with SD 0.5: variance mu + 0.28 mu^2 (a gamma-Poisson-like mixture).
    const z = seededNormals(32, n);
    const data = {
      x,
      y: poissonDraws(
        means.map((m, i) => m * Math.exp(0.5 * (z[i] as number) - 0.125)),
        33,
      ),
    };
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 4, outcome: 'counts' }));
    assert.ok(d.dispersion && d.dispersion.ratio > 1.5 && d.dispersion.verdict === 'over', JSON.stringify(d.dispersion));
    assert.ok(
      d.warnings.some((w) => /dispersion \d/.test(w) && /too narrow/.test(w)),
      d.warnings.join('\n'),
    );
  });

  it('counts that vary less than Poisson counts read as under-dispersed', () => {
    const data = { x, y: means.map((m) => Math.round(m)) };
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 4, outcome: 'counts' }));
    assert.ok(d.dispersion && d.dispersion.ratio < 0.67 && d.dispersion.verdict === 'under', JSON.stringify(d.dispersion));
    assert.ok(
      d.warnings.some((w) => /too wide/.test(w)),
      d.warnings.join('\n'),
    );
  });
});

describe('diagnose: residuals in row order', () => {
  const n = 3000;
  // x in a shuffled order (a seeded permutation), so row order and x order differ.
  const key = seededNormals(41, n);
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => (key[a] as number) - (key[b] as number));
  const x = Float64Array.from(order, (i) => i / (n - 1));
  const e = seededNormals(42, n);

  it('a slow drift along the rows is flagged with its lag-1 correlation and runs test; clean rows are not', () => {
    const drift = { x, y: Float64Array.from(x, (v, r) => humidity(v) + 0.02 * (e[r] as number) + 0.04 * Math.sin((2 * Math.PI * r) / n)) };
    const d = diagnose(drift, fitCurve(drift, { kind: 'natural-spline', df: 8 }));
    assert.ok(d.rowOrder?.flagged && d.rowOrder.lag1 > 0.5 && d.rowOrder.runs.pValue < 1e-4, JSON.stringify({ ...d.rowOrder, series: undefined }));
    assert.ok(
      d.warnings.some((w) => /row order/.test(w)),
      d.warnings.join('\n'),
    );
    assert.ok(d.rowOrder.series.residual.length <= 500 && d.rowOrder.series.row.length === d.rowOrder.series.residual.length);
    const steady = { x, y: Float64Array.from(x, (v, r) => humidity(v) + 0.02 * (e[r] as number)) };
    const s = diagnose(steady, fitCurve(steady, { kind: 'natural-spline', df: 8 }));
    assert.equal(s.rowOrder?.flagged, false);
    assert.ok(!s.warnings.some((w) => /row order/.test(w)), s.warnings.join('\n'));
  });

  it('rows already in x order say that the row-order check is the Durbin-Watson check', () => {
    const data = clean(500, 0.02, 43);
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 6 }));
    assert.equal(d.rowOrder?.sameAsX, true);
    assert.equal(d.rowOrder?.flagged, false);
  });
});

describe('diagnose: one statistic, one printed form', () => {
  it('warnings and check texts never print the same statistic with different digits', () => {
    // Many checks fail at once: spread growing with x, correlated noise, an outlier.
    const n = 300;
    const e = seededNormals(51, n);
    const ar = new Float64Array(n);
    for (let i = 0; i < n; i++) ar[i] = (i ? 0.6 * (ar[i - 1] as number) : 0) + (e[i] as number);
    const x = Float64Array.from({ length: n }, (_, i) => i / (n - 1));
    const y = Float64Array.from(x, (v, i) => humidity(v) + (0.01 + 0.05 * v) * (ar[i] as number));
    y[150] = (y[150] as number) + 0.5;
    const data = { x, y, lines: Int32Array.from(x, (_, i) => i + 2) };
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 5 }));
    const texts = [...d.warnings, ...checkViews(d).map((c) => c.text)];
    const seen = new Map<string, Set<string>>();
    const pattern = /(DW|W|BP χ²\(\d+\)|F\(\d+, \d+\)|lag-1 correlation|spread ratio|skewness|excess kurtosis|dispersion) =? ?(-?[\d.]+(?:e[+-]\d+)?)/g;
    for (const t of texts) for (const m of t.matchAll(pattern)) (seen.get(m[1] as string) ?? seen.set(m[1] as string, new Set()).get(m[1] as string))?.add(m[2] as string);
    assert.ok(seen.size >= 3, `precondition: several statistics printed (${[...seen.keys()].join(', ')})`);
    for (const [name, forms] of seen) assert.equal(forms.size, 1, `${name} printed as ${[...forms].join(' and ')}`);
  });

  it('the dispersion of overdispersed counts reads the same in the warning, the check and the model report', () => {
    const n = 400;
    const x = Float64Array.from({ length: n }, (_, i) => i / (n - 1));
    const z = seededNormals(61, n);
    const data = {
      x,
      y: poissonDraws(
        x.map((v, i) => Math.exp(1 + 1.5 * v + 0.6 * (z[i] as number) - 0.18)),
        62,
      ),
    };
    const fit = fitCurve(data, { kind: 'natural-spline', df: 4, outcome: 'counts' });
    const d = diagnose(data, fit);
    const texts = [...d.warnings, ...checkViews(d).map((c) => c.text), ...modelReportLines(fit.model as ModelReport, fit.residualDf)];
    const forms = new Set([...texts.join('\n').matchAll(/dispersion ([\d.]+) from Pearson χ²\((\d+)\) = ([\d.]+)/g)].map((m) => m[0]));
    assert.equal(d.dispersion?.verdict, 'over');
    assert.equal(forms.size, 1, [...forms].join(' | '));
    assert.ok(texts.filter((t) => t.includes([...forms][0] as string)).length >= 3, 'warning, check and model report');
  });
});
