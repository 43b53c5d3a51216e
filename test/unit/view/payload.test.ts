/**
 * Tests of the panel message (core/view/payload.ts): Poisson candidates keep the deviance
 * they were tuned on, only the starting rule's df gets its residual details up front, and
 * the model options and what each curve family supports are described. Data:
 * datasets::discoveries (inventions per year 1860-1959) and MASS::mcycle (Silverman 1985),
 * both shipped with R, as stored in test/reference/fixtures/physics.json.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../../core/analysis/analysis';
import type { AnalysisOptions } from '../../../core/analysis/types';
import type { FitDetail } from '../../../core/view/model';
import { selectDf } from '../../../core/tune/rules';
import type { XYData } from '../../../core/types';
import { buildPanelPayload, detailFor, forEditor, modelView, startSelection } from '../../../core/view/payload';
import { opt } from '../../../core/words/options';

const physics = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'physics.json'), 'utf8')) as { datasets: Record<string, { x: number[]; y: number[] }> };

function data(name: string): XYData {
  const d = physics.datasets[name] as { x: number[]; y: number[] };
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y), lines: Int32Array.from(d.x, (_, i) => i + 2) };
}

const base = { runId: 7, source: { fileName: 'd.csv', xLabel: 'x', yLabel: 'y' }, rejected: 0, heldOut: 0, tolerancePercent: 2 };

describe('buildPanelPayload', () => {
  const poisson: AnalysisOptions = { kind: 'natural-spline', candidates: [3, 5, 7], resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1, outcome: 'counts' };

  it('buildPanelPayload keeps the deviance of Poisson candidates, so the panel chooses as the analysis did', async () => {
    const a = await analyse(data('discoveries'), poisson);
    const p = buildPanelPayload({ ...base, analysis: a });
    assert.equal(p.metric, 'deviance');
    for (const c of p.candidates) {
      const orig = a.tune.candidates.find((k) => k.df === c.df);
      assert.equal(c.errors.deviance?.mean, orig?.errors.deviance?.mean);
      assert.equal(c.errors.deviance?.se, orig?.errors.deviance?.se);
      assert.deepEqual(c.errors.deviance?.values, [], 'per-resample values are left out');
    }
    for (const rule of [{ kind: 'one-se' }, { kind: 'least-error' }, { kind: 'simplest-within', percent: 5 }] as const) {
      assert.equal(selectDf(p.candidates, rule, p.metric).df, selectDf(a.tune.candidates, rule, a.tune.metric).df, rule.kind);
    }
    assert.equal(p.model.outcome, 'counts');
    assert.equal(p.model.link, 'log');
    assert.match(p.model.words, /^counts \(Poisson, log link\)/);
  });

  it("buildPanelPayload sends the residual details of the starting rule's df only; others come from detailFor", async () => {
    const a = await analyse(data('mcycle'), { kind: 'natural-spline', candidates: [4, 6, 8, 10, 12], resample: { kind: 'folds', folds: 5, repeats: 2 }, rule: { kind: 'one-se' }, seed: 1 });
    const p = buildPanelPayload({ ...base, analysis: a });
    assert.deepEqual(
      p.details.map((d) => d.df),
      [a.chosen.df],
    );
    assert.deepEqual(p.rule, a.tune.selected.rule);
    // Precondition: the lowest-error rule chooses another df on these data.
    const lowest = selectDf(a.tune.candidates, { kind: 'least-error' }, a.tune.metric).df;
    assert.notEqual(lowest, a.chosen.df);
    const asked: number[] = [];
    const cache = (df: number): FitDetail | undefined => {
      asked.push(df);
      return detailFor(a, df);
    };
    const q = buildPanelPayload({ ...base, analysis: a, rule: { kind: 'least-error' }, detail: cache });
    assert.deepEqual(asked, [lowest], 'the host cache is asked for the one df shown');
    assert.deepEqual(
      q.details.map((d) => d.df),
      [lowest],
    );
    assert.deepEqual(q.rule, { kind: 'least-error' });
    assert.ok((q.details[0]?.checks.length ?? 0) > 0, 'another df gets its own residual checks');
    // A df by hand that is no candidate falls back to the analysis's own rule.
    assert.deepEqual(startSelection(a, { kind: 'pick', df: 5 }), a.tune.selected);
    assert.equal(detailFor(a, 5), undefined);
  });

  it('modelView says what each curve kind supports (core/fit/model.ts resolveModel)', async () => {
    const d = data('mcycle');
    const opts = { candidates: [4, 5], resample: { kind: 'gcv' as const }, rule: { kind: 'least-error' as const }, seed: 1 };
    const natural = modelView(await analyse(d, { kind: 'natural-spline', ...opts, robust: true }), undefined, true);
    assert.deepEqual(natural.supports, { outcomes: ['continuous', 'counts', 'proportions'], shapes: true, robust: true });
    assert.equal(natural.robust, true);
    assert.equal(natural.robustK, 1.345);
    assert.equal(natural.fromPanel, true);
    assert.deepEqual(modelView(await analyse(d, { kind: 'polynomial', ...opts }), undefined, false).supports, { outcomes: ['continuous', 'counts', 'proportions'], shapes: false, robust: true });
    assert.deepEqual(modelView(await analyse(d, { kind: 'smoothing-spline', ...opts }), undefined, false).supports, { outcomes: ['continuous'], shapes: true, robust: false });
  });

  it('buildPanelPayload names options as editor settings, never as command-line flags', async () => {
    const a = await analyse(data('mcycle'), { kind: 'natural-spline', candidates: [4, 6], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    const p = buildPanelPayload({ ...base, analysis: a, warnings: [`2 grid points lie outside the data (${opt('extrapolate')})`] });
    assert.equal(p.warnings[0], '2 grid points lie outside the data (the setting knotwise.table.extrapolate)');
    assert.equal(forEditor(`raise ${opt('digits')}`), 'raise the setting knotwise.table.significantDigits');
    assert.doesNotMatch(JSON.stringify(p), /\u27e6|--[a-z]/);
  });

  it('buildPanelPayload: the residual details carry the residuals in row order and the drift measure (issue 14, item 4)', async () => {
    // datasets::discoveries as counts: rows in year order, which is also x order.
    const a = await analyse(data('discoveries'), { kind: 'natural-spline', candidates: [3, 4, 5], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1, outcome: 'counts' });
    const p = buildPanelPayload({ ...base, analysis: a });
    const r = p.details[0]?.rowOrder;
    assert.ok(r, 'row-order data in the payload');
    assert.equal(r.residual.length, 100);
    assert.deepEqual(r.line.slice(0, 3), [2, 3, 4]);
    assert.equal(r.sameAsX, true);
    assert.equal(r.flagged, false, 'rows in x order never flag a drift of their own');
    // The same lag-1 correlation as the record's diagnostics (rounded to 5 digits for the panel).
    assert.ok(Math.abs(r.lag1 - (a.diagnostics.rowOrder?.lag1 as number)) <= 1e-5 * Math.max(1, Math.abs(r.lag1)));
  });
});
