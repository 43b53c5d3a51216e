import type { RuleSpec } from '../../tune/types';
import { named } from './common';
import type { SelectionRule } from './types';

type LeastError = Extract<RuleSpec, { kind: 'least-error' }>;

/** The candidate with the least mean resampled error. */
export const leastError: SelectionRule<LeastError> = {
  id: 'least-error',
  syntax: 'least-error',
  pattern: 'least-error',
  label: 'Least resampled error',
  description: 'the df with the least mean resampled error',
  setting: true,
  parse: (text) => (text === 'least-error' ? { kind: 'least-error' } : undefined),
  format: () => 'least-error',
  words: () => 'least mean error',
  pick: (_r, ctx) => ({ chosen: ctx.best, sentence: `${ctx.head} Rule: least mean error, so ${named(ctx, ctx.best.df)} is chosen.` }),
};
