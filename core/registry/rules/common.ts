import type { PickContext, Usable } from './types';

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

/** A candidate as the sentences name it: the context's label, else 'df 4'. */
export function named(ctx: Pick<PickContext, 'label'>, df: number): string {
  return ctx.label ? ctx.label(df) : `df ${df}`;
}

/** "The smallest df at or under it is 5" (with a label: "The simplest pair at or under it is df 3 × 2"). */
export function smallestText(ctx: Pick<PickContext, 'label' | 'noun'>, c: Usable): string {
  return ctx.label ? `The simplest ${ctx.noun ?? 'candidate'} at or under it is ${ctx.label(c.df)}` : `The smallest df at or under it is ${c.df}`;
}

/** " The next simpler candidate, df 4, has 0.33, above it." when there is one, else ''. */
export function aboveText(list: readonly Usable[], chosen: Usable, num: (v: number) => string, ctx: Pick<PickContext, 'label' | 'noun'> = {}): string {
  const above = simplerThan(list, chosen);
  return above ? ` The next simpler ${ctx.label ? (ctx.noun ?? 'candidate') : 'candidate'}, ${named(ctx, above.df)}, has ${num(above.e.mean)}, above it.` : '';
}
