import type { ResampleSpec } from '../../tune/types';
import type { ResamplingScheme } from './types';

type LeaveOneOut = Extract<ResampleSpec, { kind: 'leave-one-out' }>;

/** Exact leave-one-out errors from the hat diagonal, e_i = r_i / (1 - h_i): no refits. */
export const leaveOneOut: ResamplingScheme<LeaveOneOut> = {
  id: 'leave-one-out',
  syntax: 'leave-one-out',
  pattern: 'leave-one-out',
  description: 'exact leave-one-out, from the hat diagonal (least-squares fits only)',
  limits: {},
  method: 'leverage',
  parse: (text) => (text === 'leave-one-out' ? { kind: 'leave-one-out' } : undefined),
  format: () => 'leave-one-out',
  words: () => 'exact leave-one-out',
  check: () => undefined,
  count: () => 0,
};
