/**
 * The record's and `--json`'s form of "does one curve serve all groups?" (core/groups/common.ts).
 */

/** Plain JSON of the common-curve test: its numbers (non-finite as null) and its words. */
export type CommonCurveJson = Readonly<Record<string, unknown>> & { readonly words: string };
