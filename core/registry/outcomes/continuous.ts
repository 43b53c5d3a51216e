import type { OutcomeKind } from './types';

/** Continuous measurements with roughly constant, normal scatter: least squares (Gaussian, identity link). */
export const continuous: OutcomeKind<'continuous'> = {
  id: 'continuous',
  label: 'Continuous measurements (least squares)',
  description: 'continuous measurements with roughly constant scatter: least squares (Gaussian errors, identity link)',
  distribution: 'Gaussian',
  link: 'identity',
  glm: undefined,
  metric: 'rmse',
  explainedName: 'R²',
  words: (robustK) => (robustK !== undefined ? `robust least squares (Huber M-estimation, k = ${robustK})` : 'least squares'),
};
