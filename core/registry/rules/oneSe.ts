import type { RuleSpec } from '../../tune/types';
import { aboveText, named, smallestText, smallestUnder } from './common';
import type { SelectionRule } from './types';

type OneSe = Extract<RuleSpec, { kind: 'one-se' }>;

/**
 * The one-standard-error rule: the smallest df whose mean error is at most the least mean
 * error plus its standard error (Breiman, Friedman, Olshen & Stone 1984, Classification and
 * Regression Trees, section 3.4.3; Hastie, Tibshirani & Friedman 2009, The Elements of
 * Statistical Learning, 2nd ed., section 7.10).
 */
export const oneSe: SelectionRule<OneSe> = {
  id: 'one-se',
  syntax: 'one-se',
  pattern: 'one-se',
  label: 'One-standard-error rule: simplest within one SE of the least error',
  description: 'the one-standard-error rule: the smallest df within one standard error of the least mean error',
  setting: true,
  parse: (text) => (text === 'one-se' ? { kind: 'one-se' } : undefined),
  format: () => 'one-se',
  words: () => 'one-standard-error rule',
  pick(_r, ctx) {
    const { list, best, head, metricName, num } = ctx;
    if (!Number.isFinite(best.e.se)) {
      return { chosen: best, sentence: `${head} The one-standard-error rule needs a standard error, which ${metricName} does not have here, so the least mean error decides: ${named(ctx, best.df)}.` };
    }
    const threshold = best.e.mean + best.e.se;
    const c = smallestUnder(list, threshold);
    return { chosen: c, threshold, sentence: `${head} One-SE threshold ${num(threshold)}. ${smallestText(ctx, c)} (${num(c.e.mean)}), chosen.${aboveText(list, c, num, ctx)}` };
  },
};
