/**
 * The explanation the panel shows beside the chosen df, agreeing with its inputs. The panel
 * chooses with core's selectDf at the tolerance its box shows (listTolerance), and core
 * returns the explanation in parts: the rule's own sentences, what the other rules would
 * choose (the simplest-within rule at that tolerance) and the caveats after them. The panel
 * shows the parts in their own places and never parses the explanation's text.
 */
import type { RuleSpec, Selection } from '../core/tune/types';

/** What another rule would choose. */
export interface OtherChoice {
  readonly rule: RuleSpec;
  readonly df: number;
}

/** The reason for the choice, what follows it in core's explanation, and what the other rules would choose. */
export interface Explanation {
  /** The rule's own sentences. */
  readonly reason: string;
  /** What core's explanation says after the other rules (candidates skipped, a choice at an end of the candidates); may be ''. */
  readonly more: string;
  readonly others: readonly OtherChoice[];
}

/** The explanation of `sel` (chosen with the panel's tolerance) in the parts the panel shows. O(1). */
export function explain(sel: Selection): Explanation {
  return { reason: sel.ruleReason, more: sel.caveats, others: sel.alternatives };
}
