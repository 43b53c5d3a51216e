/**
 * Huber M-estimation (core/fit/robust.ts through fitCurve) and its median kernel. The
 * median is checked against sorting (fast-check, with ties); the estimator against
 * properties of Huber's method (Huber 1964; Venables & Ripley, Modern Applied Statistics
 * with S, 4th ed., 2002, section 6.5): with a tuning constant larger than every
 * standardised residual it is least squares; gross outliers get weight below 1 and barely
 * move the curve. Values against MASS::rlm are in test/reference/physics.test.ts.
 * Data: seeded normal noise (test/unit/stats/seededNormal.ts) around stated curves.
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { fitCurve } from '../../../core/fit/index';
import { medianAbs } from '../../../core/fit/robust';
import { seededNormals } from '../stats/seededNormal';

function sortedMedian(values: number[]): number {
  const s = values.map(Math.abs).sort((a, b) => a - b);
  const m = s.length;
  return m % 2 === 1 ? (s[m >> 1] as number) : 0.5 * ((s[m / 2 - 1] as number) + (s[m / 2] as number));
}

describe('medianAbs (selection)', () => {
  it('medianAbs equals the median of |r| by sorting, with ties and rows of weight 0 left out', () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -20, max: 20 }), { minLength: 1, maxLength: 60 }), fc.array(fc.boolean(), { minLength: 60, maxLength: 60 }), (ints, drop) => {
        const r = Float64Array.from(ints, (v) => v / 4);
        const w = Float64Array.from(ints, (_, i) => (drop[i] && i > 0 ? 0 : 1));
        const kept = Array.from(r).filter((_, i) => (w[i] as number) > 0);
        assert.equal(medianAbs(r, w, new Float64Array(r.length)), sortedMedian(kept));
        assert.equal(medianAbs(r, undefined, new Float64Array(r.length)), sortedMedian(Array.from(r)));
      }),
      { seed: 5, numRuns: 500 },
    );
  });
});

describe('fitCurve with robust: true (Huber M-estimation)', () => {
  const n = 120;
  const z = seededNormals(17, n);
  const x = Float64Array.from({ length: n }, (_, i) => (10 * i) / (n - 1));
  const truth = (t: number): number => Math.sin(t / 2) * 3;
  const clean = Float64Array.from(x, (t, i) => truth(t) + 0.2 * (z[i] as number));
  const lines = Int32Array.from({ length: n }, (_, i) => i + 2);

  it('with a tuning constant above every standardised residual the robust fit is least squares', () => {
    const ls = fitCurve({ x, y: clean }, { kind: 'natural-spline', df: 6 });
    const rob = fitCurve({ x, y: clean }, { kind: 'natural-spline', df: 6, robust: { k: 50 } });
    assert.equal(rob.model?.robust?.downweighted.total, 0);
    // Tolerance 1e-10 relative to the scale of y (3).
    for (let i = 0; i < n; i++) assert.ok(Math.abs((rob.fitted[i] as number) - (ls.fitted[i] as number)) <= 3e-10, `row ${i}`);
  });

  it('gross outliers are down-weighted, listed first by their CSV line, and barely move the curve', () => {
    const y = Float64Array.from(clean);
    const planted = [15, 60, 61, 100];
    for (const i of planted) y[i] = (y[i] as number) + 25;
    const ls = fitCurve({ x, y, lines }, { kind: 'natural-spline', df: 6 });
    const rob = fitCurve({ x, y, lines }, { kind: 'natural-spline', df: 6, robust: true });
    const r = rob.model?.robust;
    assert.ok(r && rob.model?.converged);
    assert.equal(r.k, 1.345, 'default tuning constant');
    assert.deepEqual(
      r.downweighted.rows
        .slice(0, planted.length)
        .map((d) => d.line)
        .sort((a, b) => a - b),
      planted.map((i) => i + 2),
      'the planted rows have the lowest weights, named by line',
    );
    for (const d of r.downweighted.rows) assert.ok(d.weight < 1 && d.weight > 0);
    // Error against the truth at the data: the robust curve stays near the clean fit, least squares does not.
    const maxErr = (f: Float64Array): number => f.reduce((m, v, i) => Math.max(m, Math.abs(v - truth(x[i] as number))), 0);
    assert.ok(maxErr(rob.fitted) < 0.5 * maxErr(ls.fitted), `robust max error ${maxErr(rob.fitted)}, least squares ${maxErr(ls.fitted)}`);
    assert.match(rob.notes.join(' '), new RegExp(`${r.downweighted.total} of ${n} rows down-weighted \\(lowest weights at lines`));
    assert.equal(rob.sigma, r.scale, 'sigma is the robust scale');
  });

  it('a robust fit can also be shape constrained: the curve stays increasing on a dense grid', () => {
    const y = Float64Array.from(x, (t, i) => t + 0.5 * (z[i] as number) + (i === 50 ? -30 : 0));
    const fit = fitCurve({ x, y, lines }, { kind: 'natural-spline', df: 7, robust: true, shape: ['increasing'] });
    assert.equal(fit.model?.robust?.downweighted.rows[0]?.line, 52);
    let prev = -Infinity;
    for (let k = 0; k <= 2000; k++) {
      const v = fit.curve.value((10 * k) / 2000);
      assert.ok(v >= prev - 1e-9, `decreases at ${(10 * k) / 2000}`);
      prev = v;
    }
  });

  it('when more than half of the rows lie exactly on the curve the scale is 0, the outlier is ignored and a note says so', () => {
    const y = Float64Array.from(x, (t) => 2 * t + 1);
    y[3] = 100;
    const fit = fitCurve({ x, y }, { kind: 'natural-spline', df: 2, robust: true });
    assert.match(fit.notes.join(' '), /robust scale is 0/);
    assert.equal(fit.model?.robust?.scale, 0);
    assert.deepEqual(
      fit.model?.robust?.downweighted.rows.map((r) => r.line),
      [4],
      'only the outlier (row 4, no CSV lines given) is down-weighted',
    );
    // The other rows lie on the line y = 2 x + 1 (tolerance 1e-7: the iteration stops once the scale falls below 1e-9 of the least-squares residuals' RMS).
    for (let i = 0; i < n; i++) if (i !== 3) assert.ok(Math.abs((fit.fitted[i] as number) - (2 * (x[i] as number) + 1)) <= 1e-7, `row ${i}`);
  });

  it('robust fitting is refused for Poisson and binomial outcomes and a bad tuning constant', () => {
    assert.throws(() => fitCurve({ x, y: clean }, { kind: 'natural-spline', df: 4, outcome: 'counts', robust: true }), /robust fitting applies to continuous readings only/);
    assert.throws(() => fitCurve({ x, y: clean }, { kind: 'natural-spline', df: 4, robust: { k: 0 } }), /tuning constant must be above 0/);
  });
});
