/**
 * The routing and checks of core/fit/model.ts (resolveModel, isPlainModel, parseOutcome)
 * and of fitCurve with model options: which combinations are accepted, what the messages
 * say, and that plain options leave fitCurve's least-squares path untouched. Data:
 * datasets::cars (Ezekiel 1930) from test/reference/fixtures/physics.json.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import { isPlainModel } from '../../../core/fit/model';
import { modelReportJson, modelSpecJson } from '../../../core/fit/modelJson';
import { checkResiduals } from '../../../core/fit/modelResiduals';
import { parseOutcome } from '../../../core/registry/outcomes/index';
import { resolveModel } from '../../../core/registry/curves/index';

const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'physics.json'), 'utf8')) as {
  datasets: Record<string, { x: number[]; y: number[] }>;
};
const cars = fixture.datasets.cars as { x: number[]; y: number[] };
const data = { x: Float64Array.from(cars.x), y: Float64Array.from(cars.y) };

describe('model options (outcome, shape, robust)', () => {
  it('isPlainModel is true only for Gaussian least squares without shapes', () => {
    assert.ok(isPlainModel(undefined) && isPlainModel({}) && isPlainModel({ outcome: 'continuous', shape: [], robust: false }));
    assert.ok(!isPlainModel({ outcome: 'counts' }) && !isPlainModel({ shape: ['convex'] }) && !isPlainModel({ robust: true }));
  });

  it('resolveModel fills defaults and the Huber constant 1.345', () => {
    assert.deepEqual(resolveModel('natural-spline', {}), { outcome: 'continuous', shape: [], robustK: undefined });
    assert.deepEqual(resolveModel('natural-spline', { robust: true, shape: ['convex', 'increasing'] }), { outcome: 'continuous', shape: ['increasing', 'convex'], robustK: 1.345 });
    assert.deepEqual(resolveModel('polynomial', { outcome: 'proportions' }), { outcome: 'proportions', shape: [], robustK: undefined });
  });

  it('resolveModel refuses combinations it cannot fit, saying why', () => {
    const refuse = (f: () => unknown, re: RegExp): void => assert.throws(f, (e: unknown) => e instanceof InputError && re.test(e.message));
    refuse(
      () => resolveModel('smoothing-spline', { outcome: 'counts' }),
      /cubic smoothing spline takes continuous readings only; counts need a curve that supports them \(natural-spline, polynomial\)/,
    );
    refuse(() => resolveModel('smoothing-spline', { robust: true }), /cubic smoothing spline has no robust fit/);
    refuse(() => resolveModel('polynomial', { shape: ['increasing'] }), /polynomial \(orthogonal basis\) takes no shape constraints/);
    refuse(() => resolveModel('natural-spline', { outcome: 'proportions', robust: true }), /robust fitting applies to continuous readings only/);
    refuse(() => resolveModel('natural-spline', { robust: { k: -1 } }), /above 0 and at most 100/);
    refuse(() => resolveModel('natural-spline', { outcome: 'gamma' as 'counts' }), /unknown outcome "gamma"/);
    refuse(() => parseOutcome('normal'), /use continuous, counts, proportions/);
    assert.equal(parseOutcome(' Counts '), 'counts');
    // The distribution names are no outcome values (nothing was released, so there are no aliases).
    for (const old of ['gaussian', 'poisson', 'binomial']) refuse(() => parseOutcome(old), /unknown outcome/);
  });

  it('fitCurve with plain options returns the least-squares fit without a model report', () => {
    const a = fitCurve(data, { kind: 'natural-spline', df: 4 });
    const b = fitCurve(data, { kind: 'natural-spline', df: 4, outcome: 'continuous', shape: [], robust: false });
    assert.equal(b.model, undefined);
    assert.deepEqual(Array.from(b.fitted), Array.from(a.fitted));
  });

  it('a non-negative shape on a Poisson outcome is implied and noted, not imposed', () => {
    const fit = fitCurve(data, { kind: 'natural-spline', df: 4, outcome: 'counts', shape: ['nonnegative'] });
    assert.match(fit.notes.join(' '), /"nonnegative" is implied by the counts outcome/);
    assert.equal(fit.model?.constraints, undefined);
    assert.doesNotMatch(fit.notes.join(' '), /Shape: /);
  });

  it('modelSpecJson and modelReportJson describe what was used, with the link', () => {
    assert.deepEqual(modelSpecJson({ outcome: 'proportions' }, 'Total'), { outcome: 'proportions', link: 'logit', shape: [], robust: null, trials: 'Total' });
    assert.deepEqual(modelSpecJson({ robust: true, shape: ['increasing'] }), { outcome: 'continuous', link: 'identity', shape: ['increasing'], robust: { k: 1.345 }, trials: null });
    assert.equal(modelReportJson(undefined), null);
    const fit = fitCurve(data, { kind: 'natural-spline', df: 4, outcome: 'counts' });
    const j = modelReportJson(fit.model) as Record<string, unknown>;
    assert.equal(j.outcome, 'counts');
    assert.equal(j.link, 'log');
    assert.equal(typeof j.deviance, 'number');
    assert.equal((j.devianceResiduals as unknown[]).length, cars.x.length);
  });

  it('checkResiduals gives deviance residuals (no Gaussian checks) for Poisson fits and sqrt(w) r otherwise', () => {
    const pois = fitCurve(data, { kind: 'natural-spline', df: 3, outcome: 'counts' });
    const c = checkResiduals(pois, undefined);
    assert.equal(c.kind, 'deviance');
    assert.equal(c.gaussianChecks, false);
    assert.equal(c.residuals, pois.model?.glm?.devianceResiduals);
    const w = Float64Array.from(cars.x, (v) => 1 / v);
    const ls = fitCurve({ ...data, w }, { kind: 'natural-spline', df: 3, robust: true });
    const g = checkResiduals(ls, w);
    assert.equal(g.kind, 'weighted');
    assert.equal(g.scale, ls.model?.robust?.scale);
    // Tolerance: exact up to one rounding of the square root and product.
    for (let i = 0; i < w.length; i++) assert.ok(Math.abs((g.residuals[i] as number) - (ls.residuals[i] as number) * Math.sqrt(w[i] as number)) <= 1e-12 * Math.abs(ls.residuals[i] as number));
  });
});
