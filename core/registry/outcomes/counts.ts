import { poissonFamily } from '../../fit/glm';
import type { OutcomeKind } from './types';

/** Counts of events (whole numbers from 0): Poisson with log link, by iteratively reweighted least squares. */
export const counts: OutcomeKind<'counts'> = {
  id: 'counts',
  label: 'Counts of events (Poisson, log link)',
  description: 'counts of events, whole numbers from 0: Poisson distribution, log link, fitted by iteratively reweighted least squares',
  distribution: 'Poisson',
  link: 'log',
  glm: poissonFamily,
  metric: 'deviance',
  explainedName: 'deviance explained',
  words: () => 'counts (Poisson, log link)',
};
