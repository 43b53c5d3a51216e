import { InputError } from '../errors';
import { metricLabel, ruleWords, sig } from './format';
import type { CandidateResult, ErrorSummary, Metric, RuleSpec, Selection } from './types';

/** Tolerance used for the "other rules" line when the chosen rule is not a tolerance rule (a product default). */
export const DEFAULT_TOLERANCE_PERCENT = 2;

interface Usable {
  readonly df: number;
  readonly e: ErrorSummary;
}

function usable(candidates: readonly CandidateResult[], metric: Metric): Usable[] {
  const out: Usable[] = [];
  for (const c of candidates) {
    const e = c.errors[metric];
    if (c.skipped === undefined && e && Number.isFinite(e.mean)) out.push({ df: c.df, e });
  }
  return out.sort((a, b) => a.df - b.df);
}

/** Candidate with the lowest mean error; ties go to the smaller df. */
function lowest(list: readonly Usable[]): Usable {
  let best = list[0] as Usable;
  for (const u of list) if (u.e.mean < best.e.mean) best = u;
  return best;
}

/** Smallest df whose mean error is at or under the threshold (the lowest-error candidate always is). */
function smallestUnder(list: readonly Usable[], threshold: number): Usable {
  for (const u of list) if (u.e.mean <= threshold) return u;
  return lowest(list);
}

interface Pick {
  readonly chosen: Usable;
  readonly threshold?: number;
  readonly sentence: string;
}

function pick(list: readonly Usable[], rule: RuleSpec, metric: Metric): Pick {
  const name = metricLabel(metric);
  const best = lowest(list);
  const head = `Lowest mean ${name} ${sig(best.e.mean)} at df ${best.df}` + (Number.isFinite(best.e.se) ? ` (SE ${sig(best.e.se, 2)}).` : '.');
  switch (rule.kind) {
    case 'lowest':
      return { chosen: best, sentence: `${head} Rule: lowest mean error, so df ${best.df} is chosen.` };
    case '1se': {
      if (!Number.isFinite(best.e.se)) {
        return { chosen: best, sentence: `${head} The one-standard-error rule needs a standard error, which ${name} does not have here, so the lowest mean error decides: df ${best.df}.` };
      }
      const threshold = best.e.mean + best.e.se;
      const c = smallestUnder(list, threshold);
      return { chosen: c, threshold, sentence: `${head} One-SE threshold ${sig(threshold)}. The smallest df at or under it is ${c.df} (${sig(c.e.mean)}), chosen.` };
    }
    case 'tol': {
      if (!(rule.percent >= 0) || !Number.isFinite(rule.percent)) throw new InputError(`tolerance must be a percentage of at least 0; got ${rule.percent}`);
      const threshold = best.e.mean * (1 + rule.percent / 100);
      const c = smallestUnder(list, threshold);
      return { chosen: c, threshold, sentence: `${head} Tolerance ${rule.percent} %: threshold ${sig(threshold)}. The smallest df at or under it is ${c.df} (${sig(c.e.mean)}), chosen.` };
    }
    case 'manual': {
      const c = list.find((u) => u.df === rule.df);
      if (!c) throw new InputError(`df ${rule.df} was chosen by hand but is not an evaluated candidate (candidates: ${list.map((u) => u.df).join(', ')})`);
      return { chosen: c, sentence: `${head} df ${c.df} was chosen by hand (mean ${name} ${sig(c.e.mean)}${Number.isFinite(c.e.se) ? `, SE ${sig(c.e.se, 2)}` : ''}).` };
    }
  }
}

/**
 * Applies a selection rule to tuned candidates and explains the choice in plain words.
 * - lowest: the lowest mean error;
 * - 1se: the smallest df whose mean error is at most (lowest mean + its SE) (Breiman,
 *   Friedman, Olshen & Stone 1984, Classification and Regression Trees, section 3.4.3;
 *   Hastie, Tibshirani & Friedman, The Elements of Statistical Learning, 2nd ed., 2009,
 *   section 7.10);
 * - tol: the smallest df whose mean error is at most (1 + p/100) x the lowest;
 * - manual: the person's df, recorded as such.
 * Ties go to the smaller df. Skipped candidates and non-finite errors are ignored. The
 * explanation also says what the other rules would have chosen. O(candidates).
 * Throws InputError when no candidate is usable or a manual df is not a candidate.
 * Example: selectDf(cands, { kind: '1se' }, 'rmse').df.
 */
export function selectDf(candidates: readonly CandidateResult[], rule: RuleSpec, metric: Metric): Selection {
  const list = usable(candidates, metric);
  if (list.length === 0) {
    const reasons = candidates.filter((c) => c.skipped).map((c) => `df ${c.df}: ${c.skipped}`);
    throw new InputError(`no candidate df could be evaluated${reasons.length ? ` (${reasons.join('; ')})` : ''}`);
  }
  const main = pick(list, rule, metric);
  const others: RuleSpec[] = [{ kind: 'lowest' }, { kind: '1se' }, { kind: 'tol', percent: rule.kind === 'tol' ? rule.percent : DEFAULT_TOLERANCE_PERCENT }].filter(
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
