import type { Usable } from './types';

/** Candidate with the least mean error; ties go to the smaller df. */
export function leastOf(list: readonly Usable[]): Usable {
  let best = list[0] as Usable;
  for (const u of list) if (u.e.mean < best.e.mean) best = u;
  return best;
}

/** Smallest df whose mean error is at or under the threshold (the least-error candidate always is). */
export function smallestUnder(list: readonly Usable[], threshold: number): Usable {
  for (const u of list) if (u.e.mean <= threshold) return u;
  return leastOf(list);
}
