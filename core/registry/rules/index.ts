/**
 * The registry of selection rules: every rule listed once. The parser, the settings
 * schema, the panel and the explanations read it; adding a rule is one module plus one
 * line here (and its member of RuleSpec in core/tune/types.ts).
 */
import { InputError } from '../../errors';
import type { RuleSpec } from '../../tune/types';
import { leastError } from './leastError';
import { oneSe } from './oneSe';
import { pickDf } from './pick';
import { simplestWithin } from './simplestWithin';
import type { SelectionRule } from './types';

export type { Pick, PickContext, SelectionRule, Usable } from './types';
export { checkTolerance, MAX_TOLERANCE_PERCENT } from './simplestWithin';

/** Every rule by its kind; a kind of RuleSpec without a rule is a compile error. */
export const RULES: { readonly [K in RuleSpec['kind']]: SelectionRule<Extract<RuleSpec, { kind: K }>> } = {
  'one-se': oneSe,
  'simplest-within': simplestWithin,
  'least-error': leastError,
  pick: pickDf,
};

/** The rules in the order help texts and the panel list them. */
export const RULE_LIST: readonly SelectionRule[] = Object.values(RULES) as SelectionRule[];

/** The rule of a spec. */
export function selectionRule<R extends RuleSpec>(rule: R): SelectionRule<R> {
  return RULES[rule.kind] as unknown as SelectionRule<R>;
}

/** Default rule of the command line and the settings. */
export const DEFAULT_RULE = 'one-se';

/**
 * Parses a rule: one-se, least-error, simplest-within:<percent> or pick:<df>.
 * Throws InputError naming the accepted forms. Example: parseRule('simplest-within:2').
 */
export function parseRule(text: string): RuleSpec {
  const t = text.trim();
  for (const r of RULE_LIST) {
    const spec = r.parse(t);
    if (spec) return spec;
  }
  throw new InputError(`rule "${text}" is not understood; use ${RULE_LIST.map((r) => r.syntax).join(', ')}`);
}

/** Text form of a rule, as the command line takes it. Example: formatRule({ kind: 'pick', df: 7 }) -> 'pick:7'. */
export function formatRule(rule: RuleSpec): string {
  return selectionRule(rule).format(rule);
}

/** A rule in words, as explanations name it. */
export function ruleWords(rule: RuleSpec): string {
  return selectionRule(rule).words(rule);
}

/** A regular expression that accepts exactly the texts parseRule accepts (up to numeric limits), for schemas. */
export const RULE_PATTERN = `^(${RULE_LIST.map((r) => r.pattern).join('|')})$`;
