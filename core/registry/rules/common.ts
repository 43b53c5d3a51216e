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

/** The candidate just simpler than `u` (the one before it by df), if any: the one the threshold turned away. */
export function simplerThan(list: readonly Usable[], u: Usable): Usable | undefined {
  return list[list.indexOf(u) - 1];
}

/** " The next simpler candidate, df 4, has 0.33, above it." when there is one, else ''. */
export function aboveText(list: readonly Usable[], chosen: Usable, num: (v: number) => string): string {
  const above = simplerThan(list, chosen);
  return above ? ` The next simpler candidate, df ${above.df}, has ${num(above.e.mean)}, above it.` : '';
}
