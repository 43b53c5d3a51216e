/**
 * Rank deficiency and the residual checks say what the data lacks (too few rows for the df,
 * too few distinct x, a gap between knots, weights too small), never only "rank deficient".
 *
 * Sources: the counting facts of least squares (a curve with q coefficients needs at least q
 * rows and q distinct x; a B-spline with no row in its support has no information), and the
 * invariance of the least-squares solution under a common factor of the weights, which makes
 * a fit that equal weights determine fail only through the spread of the weights. Data:
 * datasets::cars (Ezekiel 1930) from the fixture of test/reference/r/fits.R, and small
 * invented rows where a property needs a particular layout.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { diagnose } from '../../../core/analysis/diagnose';
import { ExtrapolatingBSplineBasis } from '../../../core/basis/naturalSpline';
import { FitError, InputError } from '../../../core/errors';
import { fitCurve, prepareData } from '../../../core/fit/index';
import { fitRowBasis } from '../../../core/fit/linearFit';
import { explainGram } from '../../../core/fit/linearSystem';
import { nullSpace } from '../../../core/linalg/nullSpace';
import { factorSpd } from '../../../core/linalg/spd';
import { denseDesign } from '../../../core/stats/design';
import { durbinWatson } from '../../../core/stats/durbinWatson';
import { tuneCurve } from '../../../core/tune/tune';

const fits = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: Record<string, { x: number[]; y: number[] }> };
const cars = { x: Float64Array.from(fits.datasets.cars?.x ?? []), y: Float64Array.from(fits.datasets.cars?.y ?? []) };

/** A FitError whose message matches every pattern. */
function fitErrorMatching(...patterns: RegExp[]): (e: unknown) => boolean {
  return (e) => e instanceof FitError && patterns.every((p) => p.test(e.message));
}

describe('rank deficiency names what the data lacks', () => {
  it('too few rows for the df: 5 rows with positive weight for 6 coefficients', () => {
    // cars' natural-spline basis at df 6, trained on 5 rows (the others weigh 0, as out-of-bag rows do in resampling).
    const basis = new ExtrapolatingBSplineBasis(4, 25, Float64Array.of(10, 14, 18, 21));
    const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
    const w = new Float64Array(cars.x.length);
    for (const i of [0, 10, 20, 30, 40]) w[i] = 1;
    assert.throws(() => fitRowBasis({ ...cars, w }, basis, z, 'natural spline with df 6'), fitErrorMatching(/^natural spline with df 6: too few rows for the df \(n = 5, df = 6\)/));
  });

  it('too few distinct x for the df: 8 rows on 3 distinct x for 4 coefficients', () => {
    const x = Float64Array.of(1, 1, 1, 2, 2, 2, 5, 5);
    const basis = new ExtrapolatingBSplineBasis(1, 5, Float64Array.of(2.5, 3.5));
    const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
    assert.throws(() => fitRowBasis({ x, y: x.map((v) => v * v) }, basis, z, 'natural spline with df 4'), fitErrorMatching(/too few distinct x values for the df \(3 distinct x, df = 4\)/));
  });

  it('a gap between knots: no rows where a basis function is nonzero, with its x range', () => {
    // Knots at 1, ..., 5 and no x strictly between 1 and 5: the cubic B-spline on [1, 5] sees no data.
    const x = Float64Array.of(0, 0.25, 0.5, 0.75, 1, 5, 5.25, 5.5, 5.75, 6);
    const basis = new ExtrapolatingBSplineBasis(0, 6, Float64Array.of(1, 2, 3, 4, 5));
    assert.throws(() => fitRowBasis({ x, y: x }, basis, undefined, 'spline'), fitErrorMatching(/no rows where basis function 5 of 9 is nonzero \(x from 1 to 5\)/));
  });

  it('weights too small: rows that equal weights would fit, with weights 1e-14 where the curve needs them', () => {
    const x = Float64Array.of(1, 2, 3, 4, 5, 6, 7, 8);
    const w = Float64Array.of(1, 1, 1e-14, 1e-14, 1e-14, 1, 1, 1);
    assert.throws(() => fitCurve({ x, y: x.map(Math.sqrt), w }, { kind: 'natural-spline', df: 6 }), fitErrorMatching(/weights too small/, /from 1e-14 \(at x = 3\) to 1/));
    // The same rows with equal weights fit, which is what the message says.
    assert.equal(fitCurve({ x, y: x.map(Math.sqrt) }, { kind: 'natural-spline', df: 6 }).df, 6);
  });

  it('the tuning path (all candidates at once from power sums) skips such a candidate with the same reason', async () => {
    const x = Float64Array.of(1, 2, 3, 4, 5, 6, 7, 8);
    const w = Float64Array.of(1, 1, 1e-14, 1e-14, 1e-14, 1, 1, 1);
    const { result } = await tuneCurve(prepareData({ x, y: x.map(Math.sqrt), w }), { kind: 'natural-spline', candidates: [3, 6], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    assert.match(result.candidates.find((c) => c.df === 6)?.skipped ?? '', /weights too small/);
  });

  it('factorSpd takes the reason from its caller, and describes the matrix without one', () => {
    const singular = Float64Array.of(1, 1, 1, 1);
    assert.throws(() => factorSpd(singular, 2, 'fit', () => 'the reason'), fitErrorMatching(/^fit: the reason$/));
    assert.throws(() => factorSpd(singular, 2, 'fit'), fitErrorMatching(/pivot 2 of 2 vanishes/));
    assert.throws(() => factorSpd(Float64Array.of(1, 0, 0, 0), 2, 'fit'), fitErrorMatching(/coefficient 2 of 2 is not determined/));
  });

  it('explainGram (reweighted fits) names a basis function without rows, or with weights too small', () => {
    const failure = { kind: 'pivot' as const, index: 1, size: 2, condition: NaN };
    assert.match(explainGram(Float64Array.of(1, 0, 0, 0), 2, failure), /no row with positive weight where basis function 2 of 2/);
    assert.match(explainGram(Float64Array.of(1, 0, 0, 1e-15), 2, failure), /weights too small: the rows where basis function 2 of 2 is nonzero carry 1\.00e-15/);
  });
});

describe('the residual checks say when there are too few rows for the df', () => {
  it('durbinWatson with as many design columns as rows: too few rows for the df (n = 3, df = 3)', () => {
    assert.throws(
      () => durbinWatson(Float64Array.of(1, -1, 1), denseDesign(Float64Array.of(1, 0, 0, 1, 1, 0, 1, 2, 4), 3)),
      (e: unknown) => e instanceof InputError && /too few rows for the df \(n = 3, df = 3\)/.test(e.message),
    );
  });

  it('diagnose skips the checks of an interpolating fit with that reason instead of failing', () => {
    // 5 rows of cars with distinct speeds, a polynomial with df 5 passes through all of them.
    const idx = [0, 3, 10, 20, 40];
    const d = { x: Float64Array.from(idx, (i) => cars.x[i] as number), y: Float64Array.from(idx, (i) => cars.y[i] as number) };
    const fit = fitCurve(d, { kind: 'polynomial', df: 5 });
    const checks = diagnose(d, fit);
    assert.equal(checks.durbinWatson, undefined);
    assert.equal(checks.shapiroWilk, undefined);
    assert.ok(
      checks.warnings.some((s) => /too few rows for the df \(n = 5, df = 5\)/.test(s)),
      checks.warnings.join('\n'),
    );
  });
});
