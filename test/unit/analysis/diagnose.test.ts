import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { diagnose } from '../../../core/analysis/diagnose';
import { fitCurve } from '../../../core/fit/index';

// Reference: R 4.2 with lmtest, fixture test/reference/fixtures/diagnostics.json written by
// test/reference/r/diagnostics.R: shapiro.test, lmtest::dwtest, lmtest::bptest and
// anova(fit, lm(y ~ factor(x))) of lm(y ~ splines::ns(x, df = 3)) on open R datasets.
// Our natural spline with df 4 (intercept counted) spans the same space.
interface Case {
  name: string;
  x: number[];
  y: number[];
  fits: {
    model: string;
    record: {
      shapiroWilk: { statistic: number; pValue: number };
      durbinWatson: { statistic: number; pValue: number; method: string };
      breuschPagan: { statistic: number; df: number; pValue: number };
      lackOfFit: { F: number; df1: number; df2: number; pValue: number } | null;
    };
  }[];
}
const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'diagnostics.json'), 'utf8')) as { cases: Case[] };

function near(a: number, b: number, tol: number, what: string): void {
  assert.ok(Math.abs(a - b) <= tol * Math.max(1, Math.abs(b)), `${what}: ${a} vs R ${b}`);
}

describe('diagnose', () => {
  for (const c of fixture.cases) {
    const ref = c.fits.find((f) => f.model === 'y ~ splines::ns(x, df = 3)');
    if (!ref) continue;
    it(`diagnose(natural df 4) on ${c.name} equals R's shapiro.test, dwtest, bptest and lack-of-fit anova`, () => {
      const data = { x: Float64Array.from(c.x), y: Float64Array.from(c.y) };
      const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 4 }));
      const r = ref.record;
      near(d.shapiroWilk?.statistic as number, r.shapiroWilk.statistic, 1e-8, 'Shapiro-Wilk W');
      near(d.shapiroWilk?.pValue as number, r.shapiroWilk.pValue, 1e-6, 'Shapiro-Wilk p');
      near(d.durbinWatson?.statistic as number, r.durbinWatson.statistic, 1e-8, 'Durbin-Watson d');
      near(d.durbinWatson?.pValue as number, r.durbinWatson.pValue, 1e-6, 'Durbin-Watson p');
      assert.equal(d.durbinWatson?.method, r.durbinWatson.method);
      near(d.breuschPagan?.statistic as number, r.breuschPagan.statistic, 1e-8, 'Breusch-Pagan statistic');
      assert.equal(d.breuschPagan?.df, r.breuschPagan.df);
      if (r.lackOfFit) {
        near(d.lackOfFit?.F as number, r.lackOfFit.F, 1e-8, 'lack-of-fit F');
        near(d.lackOfFit?.pValue as number, r.lackOfFit.pValue, 1e-8, 'lack-of-fit p');
      } else {
        assert.equal(d.lackOfFit, undefined);
      }
      // A warning is given exactly for the checks that fail at the 5 % level (R's p-values)
      // and whose size matters (core/analysis/checks.ts).
      assert.equal(
        d.warnings.some((w) => w.includes('Shapiro-Wilk')),
        r.shapiroWilk.pValue < 0.05 && d.shapiroWilk?.sizeMatters,
      );
      assert.equal(
        d.warnings.some((w) => w.includes('Durbin-Watson')),
        r.durbinWatson.pValue < 0.05 && d.durbinWatson?.sizeMatters,
      );
    });
  }

  it('diagnose lists influential rows by CSV line and gives normal-quantile data', () => {
    const c = fixture.cases.find((k) => k.name === 'women') as Case;
    const lines = Int32Array.from(c.x, (_, i) => i + 2);
    const data = { x: Float64Array.from(c.x), y: Float64Array.from(c.y), lines };
    const d = diagnose(data, fitCurve(data, { kind: 'natural-spline', df: 4 }));
    // R: cooks.distance above qf(0.5, 4, 11) at rows 1 and 15 of women, and no other rule
    // (test/reference/fixtures/influence.json, case "women lm df=4": cooksRows [0, 14]).
    const flagged = d.influential.rows.map((r) => r.line).sort((a, b) => a - b);
    assert.deepEqual(flagged, [2, 16]);
    assert.ok(d.influential.rows.every((r) => r.exceeds.join() === 'cooks'));
    assert.ok(
      d.warnings.some((w) => /^2 rows stand out \(2 with Cook's distance above 0\.8\d+\): lines (2, 16|16, 2);/.test(w)),
      d.warnings.join('\n'),
    );
    assert.equal(d.normalQuantiles?.sample.length, 15);
  });
});
