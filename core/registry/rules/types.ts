/**
 * What a selection rule is: its words, its text form, and how it picks a df from the
 * tuned candidates. One module per rule, listed once in core/registry/rules/index.ts.
 */
import type { ErrorSummary, Metric, RuleSpec } from '../../tune/types';

/** A candidate the rules can compare: its df and its error summary (finite mean). */
export interface Usable {
  readonly df: number;
  readonly e: ErrorSummary;
}

/** What a rule picked, the threshold it used, and one sentence saying why. */
export interface Pick {
  readonly chosen: Usable;
  readonly threshold?: number;
  readonly sentence: string;
}

/** Facts every rule's sentence starts from. */
export interface PickContext {
  /** Usable candidates, by increasing df. */
  readonly list: readonly Usable[];
  /** The candidate with the least mean error (ties to the smaller df). */
  readonly best: Usable;
  readonly metric: Metric;
  /** The metric's name in sentences ('RMSE'). */
  readonly metricName: string;
  /** "Least mean RMSE 0.301 at df 7 (SE 0.012)." */
  readonly head: string;
  /** A mean error or threshold as the sentence prints it: digits that tell the compared values apart (core/tune/rules.ts errorDigits). */
  readonly num: (value: number) => string;
  /**
   * How the sentences name a candidate (a surface's pair: 'df 5 × 4'); default `df ${df}`,
   * and then "the smallest df" keeps its curve wording. With a label the rules say "the
   * simplest <noun>" instead, since the order of simplicity is the caller's, not df's.
   */
  readonly label?: ((df: number) => string) | undefined;
  /** What a candidate is called with a label ('pair'); default 'candidate'. */
  readonly noun?: string | undefined;
}

/** A selection rule. `R` is its spec type (a member of RuleSpec). */
export interface SelectionRule<R extends RuleSpec = RuleSpec> {
  readonly id: R['kind'];
  /** Text form for the command line, e.g. 'simplest-within:<percent>'. */
  readonly syntax: string;
  /** A regular expression (no anchors) for the text form, for schemas. */
  readonly pattern: string;
  /** Label in the panel's rule chooser. */
  readonly label: string;
  /** One line for help texts and settings descriptions. */
  readonly description: string;
  /** True for the rules an editor setting may name (not the person's own pick, which is a per-file choice). */
  readonly setting: boolean;
  parse(text: string): R | undefined;
  format(rule: R): string;
  /** The rule in words, as explanations name it. */
  words(rule: R): string;
  pick(rule: R, ctx: PickContext): Pick;
}
