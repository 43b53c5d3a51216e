import { InputError } from '../errors';
import { leastOf } from '../registry/rules/common';
import { ruleWords, selectionRule, type Pick, type Usable } from '../registry/rules/index';
import { metricLabel, sig } from './format';
import type { CandidateResult, Metric, RuleSpec, Selection } from './types';

/** Tolerance used for the "other rules" line when the chosen rule is not a tolerance rule (a product default). */
export const DEFAULT_TOLERANCE_PERCENT = 2;

function usable(candidates: readonly CandidateResult[], metric: Metric): Usable[] {
  const out: Usable[] = [];
  for (const c of candidates) {
    const e = c.errors[metric];
    if (c.skipped === undefined && e && Number.isFinite(e.mean)) out.push({ df: c.df, e });
  }
  return out.sort((a, b) => a.df - b.df);
}

/** Applies one rule through its registry entry. */
function pick(list: readonly Usable[], rule: RuleSpec, metric: Metric): Pick {
  const metricName = metricLabel(metric);
  const best = leastOf(list);
  const head = `Least mean ${metricName} ${sig(best.e.mean)} at df ${best.df}` + (Number.isFinite(best.e.se) ? ` (SE ${sig(best.e.se, 2)}).` : '.');
  return selectionRule(rule).pick(rule, { list, best, metric, metricName, head });
}

/**
 * Applies a selection rule to tuned candidates and explains the choice in plain words.
 * - least-error: the least mean error;
 * - one-se: the smallest df whose mean error is at most (least mean + its SE) (Breiman,
 *   Friedman, Olshen & Stone 1984, Classification and Regression Trees, section 3.4.3;
 *   Hastie, Tibshirani & Friedman, The Elements of Statistical Learning, 2nd ed., 2009,
 *   section 7.10);
 * - simplest-within: the smallest df whose mean error is at most (1 + p/100) x the least;
 * - pick: the person's df, recorded as such.
 * Each rule's behaviour lives in its module under core/registry/rules/.
 * Ties go to the smaller df. Skipped candidates and non-finite errors are ignored. The
 * explanation also says what the other rules would have chosen. O(candidates).
 * Throws InputError when no candidate is usable or a picked df is not a candidate.
 * Example: selectDf(cands, { kind: 'one-se' }, 'rmse').df.
 */
export function selectDf(candidates: readonly CandidateResult[], rule: RuleSpec, metric: Metric): Selection {
  const list = usable(candidates, metric);
  if (list.length === 0) {
    const reasons = candidates.filter((c) => c.skipped).map((c) => `df ${c.df}: ${c.skipped}`);
    throw new InputError(`no candidate df could be evaluated${reasons.length ? ` (${reasons.join('; ')})` : ''}`);
  }
  const main = pick(list, rule, metric);
  const others: RuleSpec[] = [{ kind: 'least-error' }, { kind: 'one-se' }, { kind: 'simplest-within', percent: rule.kind === 'simplest-within' ? rule.percent : DEFAULT_TOLERANCE_PERCENT }].filter(
    (r) => r.kind !== rule.kind,
  ) as RuleSpec[];
  const alternatives = others.map((r) => ({ rule: r, df: pick(list, r, metric).chosen.df }));
  const altText = alternatives.map((a) => `${ruleWords(a.rule)} → df ${a.df}`).join('; ');
  const skipped = candidates.filter((c) => c.skipped !== undefined).length;
  const skippedText = skipped ? ` ${skipped} candidate${skipped > 1 ? 's were' : ' was'} skipped (see the candidate list).` : '';
  return {
    df: main.chosen.df,
    rule,
    metric,
    reason: `${main.sentence} Other rules: ${altText}.${skippedText}`,
    ...(main.threshold !== undefined ? { threshold: main.threshold } : {}),
    alternatives,
  };
}
