import { binomialFamily } from '../../fit/glm';
import type { OutcomeKind } from './types';

/** Proportions or pass/fail readings: binomial with logit link, by iteratively reweighted least squares. */
export const proportions: OutcomeKind<'proportions'> = {
  id: 'proportions',
  label: 'Proportions or pass/fail (binomial, logit link)',
  description: 'proportions from 0 to 1 or pass/fail (0/1) readings, or successes out of a trials column: binomial distribution, logit link, fitted by iteratively reweighted least squares',
  distribution: 'binomial',
  link: 'logit',
  glm: binomialFamily,
  metric: 'deviance',
  explainedName: 'deviance explained',
  words: (_k, trialsLabel) =>
    trialsLabel !== undefined
      ? `proportions (binomial, logit link), successes out of the trials in column \u201c${trialsLabel}\u201d`
      : 'proportions (binomial, logit link), readings as 0/1 or proportions',
};
