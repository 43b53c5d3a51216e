import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { FitError } from '../../../core/errors';
import { fitNaturalSplineBatch } from '../../../core/fit/naturalSplineBatch';
import { fitNaturalSpline } from '../../../core/fit/naturalSpline';
import { prepareData } from '../../../core/fit/prepared';
import type { FitResult } from '../../../core/types';

// Data: MASS::mcycle (Silverman 1985) and datasets::cars with weights 1/speed, as exported
// by the committed R script test/reference/r/fits.R into test/reference/fixtures/fits.json.
const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as {
  datasets: Record<string, { x: number[]; y: number[]; w?: number[] | null }>;
  cases: { dataset: string; kind: string; df: number; fitted: number[]; hat: number[]; sigma: number }[];
};

function close(a: number, b: number, rel: number, what: string): void {
  assert.ok(Math.abs(a - b) <= rel * Math.max(1, Math.abs(b)), `${what}: ${a} vs ${b}`);
}

describe('fitNaturalSplineBatch', () => {
  for (const name of ['mcycle', 'cars_w']) {
    it(`equals fitNaturalSpline one df at a time on ${name} (fitted, leverage, sigma, AIC at 1e-10)`, () => {
      const d = fixture.datasets[name] as { x: number[]; y: number[]; w?: number[] | null };
      const prepared = prepareData({ x: Float64Array.from(d.x), y: Float64Array.from(d.y), w: d.w ? Float64Array.from(d.w) : undefined });
      const dfs = [2, 3, 4, 5, 6, 7, 8];
      const batch = fitNaturalSplineBatch(prepared, dfs);
      for (const df of dfs) {
        const one = fitNaturalSpline(prepared, df);
        const b = batch.get(df) as FitResult;
        assert.ok(!(b instanceof FitError));
        for (let i = 0; i < one.n; i++) {
          close(b.fitted[i] as number, one.fitted[i] as number, 1e-10, `fitted[${i}] df ${df}`);
          close(b.leverage[i] as number, one.leverage[i] as number, 1e-10, `leverage[${i}] df ${df}`);
        }
        close(b.sigma, one.sigma, 1e-10, `sigma df ${df}`);
        close(b.aic, one.aic, 1e-10, `aic df ${df}`);
        close(b.curve.value(30), one.curve.value(30), 1e-10, 'curve value');
        close(b.curve.varianceFactor(30), one.curve.varianceFactor(30), 1e-9, 'variance factor');
      }
    });
  }

  it('equals R lm(y ~ ns(x, df = k - 1)) fitted values on mcycle (fixture from test/reference/r/fits.R, 1e-8)', () => {
    const d = fixture.datasets.mcycle as { x: number[]; y: number[] };
    const batch = fitNaturalSplineBatch(prepareData({ x: Float64Array.from(d.x), y: Float64Array.from(d.y) }), [2, 5, 8]);
    for (const c of fixture.cases.filter((k) => k.dataset === 'mcycle' && k.kind === 'natural-spline' && [2, 5, 8].includes(k.df))) {
      const b = batch.get(c.df) as FitResult;
      c.fitted.forEach((f, i) => close(b.fitted[i] as number, f, 1e-8, `R fitted[${i}] df ${c.df}`));
      c.hat.forEach((h, i) => close(b.leverage[i] as number, h, 1e-8, `R hat[${i}] df ${c.df}`));
      close(b.sigma, c.sigma, 1e-8, 'R sigma');
    }
  });

  it('returns the FitError for a df above the number of distinct x, keeping the others', () => {
    const prepared = prepareData({ x: Float64Array.of(1, 2, 3, 4, 5), y: Float64Array.of(1, 4, 9, 16, 25) });
    const batch = fitNaturalSplineBatch(prepared, [2, 5, 6]);
    assert.ok(batch.get(6) instanceof FitError);
    assert.match((batch.get(6) as FitError).message, /needs at least 6 distinct x values; the data has 5/);
    assert.ok(!(batch.get(5) instanceof FitError));
  });
});
