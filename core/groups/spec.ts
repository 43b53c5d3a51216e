/**
 * What a grouped fit was asked for (part of the fit plan), its command-line words, and the
 * group record's format name. No imports, so the plan and the ownership rule can read it.
 */

/** Format name of the group record (core/groups/deliver.ts). */
export const GROUP_RECORD_FORMAT = 'knotwise-group-record';
/** Version of the group record; raised when a key changes meaning, goes away or is added. */
export const GROUP_RECORD_VERSION = 2;

/** How the rows were grouped, and how the groups' outputs are laid out (part of the plan). */
export interface GroupSpec {
  /** The column naming each row's group; undefined with channels. */
  readonly by?: string | undefined;
  /** Several reading columns against x, one group each (then plan.columns.y is the first). */
  readonly channels?: readonly string[] | undefined;
  /** One df for all groups from the pooled resampled error (else each group's own). */
  readonly sharedDf: boolean;
  /** One long table with a group column instead of one table per group. */
  readonly longTable: boolean;
}

/** The command-line words of a group spec (for the regenerate command). */
export function groupFlags(g: GroupSpec, quote: (text: string) => string): string[] {
  const w: string[] = [];
  if (g.by !== undefined) w.push('--per', quote(g.by));
  if (g.channels !== undefined) w.push('--channels', quote(g.channels.join(',')));
  if (g.sharedDf) w.push('--shared-df');
  if (g.longTable) w.push('--long-table');
  return w;
}
