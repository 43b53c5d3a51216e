/**
 * Tests of core/analysis/analysis.ts beyond tuning itself: the rows an analysis tuned (`data`) and
 * held out (`heldOut`), residual checks run when first read, and withRule, which must give what a fresh analyse with that rule
 * gives (selection, chosen fit, residual checks, held-out check), without tuning again.
 * Data: datasets::cars (Ezekiel 1930) from test/e2e/fixtures/cars.csv (make-fixtures.R).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse, withRule } from '../../../core/analysis/analysis';
import type { AnalysisOptions } from '../../../core/analysis/types';
import type { RuleSpec } from '../../../core/tune/types';
import type { XYData } from '../../../core/types';

function cars(): XYData {
  const rows = readFileSync(join(__dirname, '..', '..', 'e2e', 'fixtures', 'cars.csv'), 'utf8')
    .trim()
    .split('\n')
    .slice(1);
  return {
    x: Float64Array.from(rows, (r) => Number(r.split(',')[0])),
    y: Float64Array.from(rows, (r) => Number(r.split(',')[1])),
    lines: Int32Array.from(rows, (_, i) => i + 2),
  };
}

const OPTIONS: AnalysisOptions = { kind: 'natural-spline', candidates: [2, 3, 4, 5, 6, 7], resample: { kind: 'folds', folds: 5, repeats: 2 }, rule: { kind: 'one-se' }, seed: 1, holdout: 0.2 };

describe('analyse and withRule', () => {
  const data = cars();

  it('analyse: `data` holds the tuned rows and `heldOut` the rest, each row once, in input order', async () => {
    const a = await analyse(data, OPTIONS);
    const held = a.heldOut as XYData;
    assert.ok(held, 'rows were held out');
    assert.equal(a.data.x.length, a.n);
    assert.equal(a.n + held.x.length, data.x.length);
    const lines = [...(a.data.lines as Int32Array), ...(held.lines as Int32Array)].sort((p, q) => p - q);
    assert.deepEqual(lines, Array.from(data.lines as Int32Array));
    const tuned = Array.from(a.data.lines as Int32Array);
    assert.deepEqual(
      tuned,
      [...tuned].sort((p, q) => p - q),
      'input order kept',
    );
    // Every fit's per-row arrays follow these rows.
    assert.equal(a.chosen.fitted.length, a.data.x.length);
    const none = await analyse(data, { ...OPTIONS, holdout: undefined });
    assert.equal(none.data, data);
    assert.equal(none.heldOut, undefined);
  });

  for (const rule of [{ kind: 'least-error' }, { kind: 'simplest-within', percent: 5 }, { kind: 'pick', df: 6 }, { kind: 'one-se' }] as RuleSpec[]) {
    it(`withRule(analysis, ${JSON.stringify(rule)}) equals analyse with that rule (selection, fit, checks, held-out check)`, async () => {
      const base = await analyse(data, OPTIONS);
      const fresh = await analyse(data, { ...OPTIONS, rule });
      const re = withRule(base, rule);
      // Precondition for the df chosen by hand: it differs from the base choice, so the fit, checks and held-out check are redone.
      if (rule.kind === 'pick') assert.notEqual(base.chosen.df, rule.df);
      assert.deepEqual(re.tune.selected, fresh.tune.selected);
      assert.equal(re.chosen.df, fresh.chosen.df);
      assert.deepEqual(Array.from(re.chosen.fitted), Array.from(fresh.chosen.fitted));
      assert.deepEqual(re.diagnostics, fresh.diagnostics);
      assert.deepEqual(re.tune.holdout, fresh.tune.holdout);
      assert.deepEqual(re.options, fresh.options);
    });
  }

  it("analyse with checks 'when-read' runs the same residual checks, once, on first read (the editor shows the curve first)", async () => {
    const now = await analyse(data, OPTIONS);
    const later = await analyse(data, OPTIONS, undefined, undefined, 'when-read');
    const descriptor = Object.getOwnPropertyDescriptor(later, 'diagnostics');
    assert.equal(typeof descriptor?.get, 'function', 'the checks wait for their first read');
    assert.equal(later.chosen.df, now.chosen.df);
    assert.deepEqual(later.diagnostics, now.diagnostics);
    assert.equal(later.diagnostics, later.diagnostics, 'computed once, then the same object');
    // A copy (as withRule makes) carries the checks as a value.
    assert.deepEqual({ ...later }.diagnostics, now.diagnostics);
  });

  it('withRule refuses a df by hand that is no candidate', async () => {
    const base = await analyse(data, { ...OPTIONS, holdout: undefined });
    assert.throws(() => withRule(base, { kind: 'pick', df: 11 }));
  });
});
