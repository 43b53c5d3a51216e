/**
 * The explanation the panel shows beside the chosen df, agreeing with its inputs. Core's
 * explanation (core/tune/rules.ts selectDf) ends with what the other rules would choose,
 * and for the simplest-within rule it assumes the default tolerance unless that rule is
 * the one in use; the panel's tolerance box may say otherwise. So the panel shows the
 * rule's own sentences as the reason and lists the other rules itself, the simplest-within
 * rule with the tolerance the box shows.
 */
import { ruleWords } from '../core/registry/rules/index';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec, Selection } from '../core/tune/types';
import type { PanelPayload } from '../core/view/model';

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

/**
 * The explanation of `sel` with the simplest-within rule at `tolerance` %: core's
 * explanation split around its list of other rules (which the panel lists itself, with the
 * box's tolerance). When core words that list otherwise than expected, its explanation is
 * the reason, whole, with core's own list, so nothing is ever cut wrongly. O(candidates).
 */
export function explain(p: PanelPayload, sel: Selection, tolerance: number): Explanation {
  const listed = sel.alternatives.map((a) => `${ruleWords(a.rule)} → df ${a.df}`).join('; ');
  const tail = ` Other rules: ${listed}.`;
  const at = sel.reason.indexOf(tail);
  if (at < 0) return { reason: sel.reason, more: '', others: sel.alternatives };
  const reason = sel.reason.slice(0, at);
  const more = sel.reason.slice(at + tail.length).trim();
  const others = sel.alternatives.map((a) => {
    if (a.rule.kind !== 'simplest-within' || a.rule.percent === tolerance) return a;
    const rule: RuleSpec = { kind: 'simplest-within', percent: tolerance };
    return { rule, df: selectDf(p.candidates, rule, p.metric, 'editor').df };
  });
  return { reason, more, others };
}
