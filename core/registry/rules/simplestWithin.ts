import { InputError } from '../../errors';
import type { RuleSpec } from '../../tune/types';
import { aboveText, smallestText, smallestUnder } from './common';
import type { SelectionRule } from './types';

type SimplestWithin = Extract<RuleSpec, { kind: 'simplest-within' }>;

/** Largest tolerance accepted, in percent of the least mean error. */
export const MAX_TOLERANCE_PERCENT = 100;

/** Checks a tolerance in percent; throws InputError naming the limits. */
export function checkTolerance(percent: number): void {
  if (!Number.isFinite(percent) || percent < 0 || percent > MAX_TOLERANCE_PERCENT) {
    throw new InputError(`the tolerance must be a percentage from 0 to ${MAX_TOLERANCE_PERCENT}; got ${percent}`);
  }
}

/** The simplest candidate whose mean error is within p % of the least mean error. */
export const simplestWithin: SelectionRule<SimplestWithin> = {
  id: 'simplest-within',
  syntax: 'simplest-within:<percent>',
  pattern: 'simplest-within:\\d+(\\.\\d+)?',
  label: 'Simplest within a tolerance of the least error',
  description: 'the smallest df whose mean error is within the tolerance (percent) of the least mean error',
  setting: true,
  parse(text) {
    const m = /^simplest-within:(\d+(?:\.\d+)?)%?$/.exec(text);
    if (!m) return undefined;
    const percent = Number(m[1]);
    checkTolerance(percent);
    return { kind: 'simplest-within', percent };
  },
  format: (r) => `simplest-within:${r.percent}`,
  words: (r) => `simplest within ${r.percent} % of the least error`,
  pick(r, ctx) {
    const { list, best, head, num } = ctx;
    checkTolerance(r.percent);
    const threshold = best.e.mean * (1 + r.percent / 100);
    const c = smallestUnder(list, threshold);
    return {
      chosen: c,
      threshold,
      sentence: `${head} Simplest within ${r.percent} %: threshold ${num(threshold)}. ${smallestText(ctx, c)} (${num(c.e.mean)}), chosen.${aboveText(list, c, num, ctx)}`,
    };
  },
};
