/**
 * The selection rules' label hook (core/registry/rules/types.ts PickContext.label): without
 * a label the sentences name a df as curves always did ("The smallest df at or under it is
 * 5"); with one, each candidate is named by it and "the simplest <noun>" replaces "the
 * smallest df". The chosen candidates are the same either way (the hook only names them).
 */
import { strict as assert } from 'node:assert';
import { selectionRule } from '../../../core/registry/rules/index';
import type { PickContext, Usable } from '../../../core/registry/rules/types';
import type { RuleSpec } from '../../../core/tune/types';

const list: Usable[] = [
  { df: 1, e: { mean: 1.3, se: 0.05, values: [] } },
  { df: 2, e: { mean: 1.05, se: 0.05, values: [] } },
  { df: 3, e: { mean: 1.0, se: 0.06, values: [] } },
];
const base: PickContext = { list, best: list[2] as Usable, metric: 'rmse', metricName: 'RMSE', head: 'Head.', num: (v) => v.toFixed(2) };
const names = ['df 2 × 2', 'df 3 × 2', 'df 4 × 4'];
const label = (df: number): string => names[df - 1] as string;

describe('selection rules: the label hook', () => {
  it('keeps the curve wording without a label', () => {
    // The wording of curves, as docs/design.md "Selection rules" gives it.
    const p = selectionRule({ kind: 'one-se' }).pick({ kind: 'one-se' }, base);
    assert.equal(p.sentence, 'Head. One-SE threshold 1.06. The smallest df at or under it is 2 (1.05), chosen. The next simpler candidate, df 1, has 1.30, above it.');
  });

  it('names every candidate by the label, with the noun, and chooses the same candidates', () => {
    const specs: RuleSpec[] = [{ kind: 'one-se' }, { kind: 'simplest-within', percent: 10 }, { kind: 'least-error' }, { kind: 'pick', df: 1 }];
    for (const spec of specs) {
      const plain = selectionRule(spec).pick(spec, base);
      const named = selectionRule(spec).pick(spec, { ...base, label, noun: 'pair' });
      assert.equal(named.chosen, plain.chosen, spec.kind);
      assert.doesNotMatch(named.sentence, /df \d\b(?! ×)/, `${spec.kind}: ${named.sentence}`);
    }
    const p = selectionRule({ kind: 'one-se' }).pick({ kind: 'one-se' }, { ...base, label, noun: 'pair' });
    assert.equal(p.sentence, 'Head. One-SE threshold 1.06. The simplest pair at or under it is df 3 × 2 (1.05), chosen. The next simpler pair, df 2 × 2, has 1.30, above it.');
    assert.throws(
      () => selectionRule({ kind: 'pick', df: 7 }).pick({ kind: 'pick', df: 7 }, { ...base, label: (d) => `pair ${d}` }),
      /pair 7 was picked but is not an evaluated candidate \(candidates: pair 1, pair 2, pair 3\)/,
    );
  });
});
