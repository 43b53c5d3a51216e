import type { ResampleSpec } from '../../tune/types';
import type { ResamplingScheme } from './types';

type Gcv = Extract<ResampleSpec, { kind: 'gcv' }>;

/** Generalised cross-validation (Craven & Wahba 1979): (rss/n) / (1 - df/n)^2 of each candidate's fit. */
export const gcv: ResamplingScheme<Gcv> = {
  id: 'gcv',
  syntax: 'gcv',
  pattern: 'gcv',
  description: 'generalised cross-validation (GCV) score of each fit, no resamples',
  limits: {},
  method: 'fit',
  parse: (text) => (text === 'gcv' ? { kind: 'gcv' } : undefined),
  format: () => 'gcv',
  words: () => 'generalised cross-validation (GCV)',
  check: () => undefined,
  count: () => 0,
};
