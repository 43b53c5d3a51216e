/**
 * The curve-kind registry (core/registry/curves/): a kind added as one module is tuned end
 * to end without touching any other file, and unknown kinds are refused with the list.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../../core/analysis/analysis';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import { curveKind, curveKinds, parseCurve, registerCurveKind, unregisterCurveKind } from '../../../core/registry/curves/index';
import { curveTable } from '../../../core/table/curveTable';
import { linearSpline } from './linearSplineKind';

// datasets::cars (R), as written into the R reference fixture by test/reference/r/fits.R.
const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as {
  datasets: { cars: { x: number[]; y: number[] } };
  cases: { name: string; fitted: number[]; sigma: number }[];
};
const cars = { x: Float64Array.from(fixture.datasets.cars.x), y: Float64Array.from(fixture.datasets.cars.y) };

describe('curve registry', () => {
  before(() => registerCurveKind(linearSpline));
  after(() => unregisterCurveKind(linearSpline.id));

  it('a test-only kind registered from one module is parsed, fitted and tuned end to end', async () => {
    assert.equal(parseCurve(' test-linear-spline '), 'test-linear-spline');
    assert.ok(curveKinds().some((k) => k.id === 'test-linear-spline'));
    const analysis = await analyse(cars, { kind: 'test-linear-spline', resample: { kind: 'bootstrap', resamples: 20 }, rule: { kind: 'one-se' }, seed: 7 });
    assert.equal(analysis.tune.kind, 'test-linear-spline');
    // Default candidates 2..8 come from the module; every one is evaluated on 20 resamples.
    assert.deepEqual(
      analysis.tune.candidates.map((c) => c.df),
      [2, 3, 4, 5, 6, 7, 8],
    );
    for (const c of analysis.tune.candidates) {
      assert.equal(c.skipped, undefined, `df ${c.df}`);
      assert.equal(c.errors.rmse?.values.length, 20, `df ${c.df}`);
      assert.ok(Number.isFinite(c.errors.rmse?.mean), `df ${c.df}`);
    }
    assert.equal(analysis.chosen.kind, 'test-linear-spline');
    assert.match(analysis.tune.selected.reason, /One-SE threshold/);
    const table = curveTable(analysis.chosen, Float64Array.of(4, 10, 25));
    assert.equal(table.rows.length, 3);
  });

  it('the test kind at df 2 is the least-squares straight line (R: lm(dist ~ ns(speed, df = 1)), datasets::cars)', () => {
    // A natural spline with df 2 has no interior knot and is the straight line, as is a
    // piecewise-linear spline with two knots; R's fitted values are in the fits fixture.
    const r = fixture.cases.find((c) => c.name === 'cars natural df=2');
    assert.ok(r, 'R case cars natural df=2');
    const fit = fitCurve(cars, { kind: 'test-linear-spline', df: 2 });
    for (let i = 0; i < cars.x.length; i++) assert.ok(Math.abs((fit.fitted[i] as number) - (r.fitted[i] as number)) <= 1e-9, `row ${i} (tolerance 1e-9)`);
    assert.ok(Math.abs(fit.sigma - r.sigma) <= 1e-9, 'sigma (tolerance 1e-9)');
  });

  it('the kind can take outcomes and robust fits through the shared row-basis machinery', async () => {
    const analysis = await analyse(cars, {
      kind: 'test-linear-spline',
      candidates: [2, 3, 4],
      resample: { kind: 'folds', folds: 5, repeats: 1 },
      rule: { kind: 'least-error' },
      seed: 3,
      robust: true,
    });
    assert.ok(analysis.chosen.model?.robust, 'robust report present');
    assert.throws(() => fitCurve(cars, { kind: 'test-linear-spline', df: 3, shape: ['increasing'] }), /takes no shape constraints/);
  });

  it('unknown kinds and the old spellings are refused with the list of kinds', () => {
    for (const old of ['natural', 'poly', 'smooth', 'spline']) {
      assert.throws(
        () => parseCurve(old),
        (e: unknown) => e instanceof InputError && /unknown curve ".*"; use natural-spline, polynomial, smoothing-spline/.test(e.message),
        old,
      );
    }
    assert.throws(() => registerCurveKind(curveKind('polynomial')), /registered already/);
    assert.throws(() => unregisterCurveKind('polynomial'), /cannot be removed/);
  });
});
