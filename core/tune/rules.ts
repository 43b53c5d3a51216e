import { InputError } from '../errors';
import { leastOf, smallestUnder } from '../registry/rules/common';
import { ruleWords, selectionRule, type Pick, type Usable } from '../registry/rules/index';
import { atPlace, placeForSe, placeToTell } from '../words/numbers';
import { opt, renderOptions, type Audience } from '../words/options';
import { MAX_CANDIDATES } from './candidates';
import { metricLabel, sig } from './format';
import type { CandidateEdge, CandidateResult, Metric, RuleSpec, Selection } from './types';

/** Tolerance used for the "other rules" line when the chosen rule is not a tolerance rule (a product default). */
export const DEFAULT_TOLERANCE_PERCENT = 2;

/** Below this df nothing simpler is worth trying: df 2 is the straight line (docs/design.md, "df"). */
const SIMPLEST_DF = 2;

function usable(candidates: readonly CandidateResult[], metric: Metric): Usable[] {
  const out: Usable[] = [];
  for (const c of candidates) {
    const e = c.errors[metric];
    if (c.skipped === undefined && e && Number.isFinite(e.mean)) out.push({ df: c.df, e });
  }
  return out.sort((a, b) => a.df - b.df);
}

/**
 * The decimal place of a tuning's mean errors and thresholds, one rule for the CLI's
 * candidate list, the report's candidate table, the panel and the explanation (so the same
 * mean reads the same everywhere; print with atPlace): the least mean to the second
 * significant digit of its standard error and at least 3 significant digits (placeForSe,
 * after JCGM 100:2008 section 7.2.6), and finer where needed so that every comparison a rule
 * makes prints as different numbers when the values differ (placeToTell): the least mean
 * against the runner-up, and each threshold (one-SE, and the tolerance's at
 * `tolerancePercent`) against the mean of the df it chose and of the next simpler
 * candidate. At most 15 significant digits. O(candidates log candidates).
 * Example: errorPlace(cands, 'rmse') -> -6 for a least mean of 0.300012 with SE 4.1e-5.
 */
export function errorPlace(candidates: readonly CandidateResult[], metric: Metric, tolerancePercent = DEFAULT_TOLERANCE_PERCENT): number {
  return comparisonPlace(usable(candidates, metric), tolerancePercent);
}

/**
 * The printer of a tuning's mean errors and thresholds: atPlace at errorPlace. Every
 * front end prints candidate means with it, so they read as in the explanation.
 * Example: errorFormat(cands, 'rmse')(0.978) -> '0.978'.
 */
export function errorFormat(candidates: readonly CandidateResult[], metric: Metric, tolerancePercent = DEFAULT_TOLERANCE_PERCENT): (value: number) => string {
  const place = errorPlace(candidates, metric, tolerancePercent);
  return (value) => atPlace(value, place);
}

/**
 * The significant digits of the least mean at errorPlace, for a caller that prints with
 * sig: exact for the least mean and for means of the same magnitude; errorFormat is exact
 * for every mean.
 */
export function errorDigits(candidates: readonly CandidateResult[], metric: Metric, tolerancePercent = DEFAULT_TOLERANCE_PERCENT): number {
  const list = usable(candidates, metric);
  if (list.length === 0) return 3;
  const best = leastOf(list).e.mean;
  const place = comparisonPlace(list, tolerancePercent);
  return best === 0 ? 3 : Math.min(15, Math.max(1, Math.floor(Math.log10(Math.abs(best))) - place + 1));
}

function comparisonPlace(list: readonly Usable[], tolerancePercent: number): number {
  if (list.length === 0) return 0;
  const best = leastOf(list);
  const values = [best.e.mean];
  let runnerUp: number | undefined;
  for (const u of list) if (u !== best && (runnerUp === undefined || u.e.mean < runnerUp)) runnerUp = u.e.mean;
  if (runnerUp !== undefined) values.push(runnerUp);
  const thresholds = [best.e.mean * (1 + tolerancePercent / 100)];
  if (Number.isFinite(best.e.se)) thresholds.push(best.e.mean + best.e.se);
  for (const t of thresholds) {
    const c = smallestUnder(list, t);
    const above = list[list.indexOf(c) - 1];
    values.push(t, c.e.mean);
    if (above) values.push(above.e.mean);
  }
  return placeToTell(values, placeForSe(best.e.mean, best.e.se));
}

/** Applies one rule through its registry entry, printing mean errors down to the decimal place 10^place. */
function pick(list: readonly Usable[], rule: RuleSpec, metric: Metric, place: number): Pick {
  const metricName = metricLabel(metric);
  const best = leastOf(list);
  const num = (v: number): string => atPlace(v, place);
  const head = `Least mean ${metricName} ${num(best.e.mean)} at df ${best.df}` + (Number.isFinite(best.e.se) ? ` (SE ${sig(best.e.se, 2)}).` : '.');
  return selectionRule(rule).pick(rule, { list, best, metric, metricName, head, num });
}

/**
 * Whether a choice sits at an end of the candidates, where the best df may lie beyond
 * them: the least mean error at the largest candidate, or at the smallest candidate above
 * df 2; or the rule's choice there (a df the person picked counts only through the least
 * error). An end where larger (or smaller) candidates exist but were skipped is no edge:
 * widening would not help. With fewer than two usable candidates there is nothing to
 * compare. `widen` doubles the largest df at the upper end and halves the smallest (not
 * below 2) at the lower end, within MAX_CANDIDATES candidates. O(candidates).
 * Example: candidates 2..10 with the least error at 10 -> { side: 'upper', df: 10, widen: '2..20', ... }.
 */
export function candidateEdge(candidates: readonly CandidateResult[], metric: Metric, selection: { readonly df: number; readonly rule: RuleSpec }): CandidateEdge | undefined {
  return edgeOf(usable(candidates, metric), candidates, selection.df, selection.rule);
}

function edgeOf(list: readonly Usable[], candidates: readonly CandidateResult[], df: number, rule: RuleSpec): CandidateEdge | undefined {
  if (list.length < 2) return undefined;
  const best = leastOf(list);
  const lo = list[0] as Usable;
  const hi = list[list.length - 1] as Usable;
  let allMin = Infinity;
  let allMax = -Infinity;
  for (const c of candidates) {
    allMin = Math.min(allMin, c.df);
    allMax = Math.max(allMax, c.df);
  }
  const ruled = rule.kind !== 'pick';
  const at = (u: Usable): { chosen: boolean; leastError: boolean } => ({ chosen: ruled && df === u.df, leastError: best === u });
  const up = hi.df >= allMax ? at(hi) : { chosen: false, leastError: false };
  const down = lo.df <= allMin && lo.df > SIMPLEST_DF ? at(lo) : { chosen: false, leastError: false };
  const upper = up.chosen || up.leastError;
  const lower = down.chosen || down.leastError;
  if (!upper && !lower) return undefined;
  const from = lower ? Math.max(SIMPLEST_DF, Math.floor(lo.df / 2)) : Math.floor(allMin);
  const to = Math.min(upper ? Math.ceil(2 * hi.df) : Math.ceil(allMax), from + MAX_CANDIDATES - 1);
  const [side, u, flags] = upper ? (['upper', hi, up] as const) : (['lower', lo, down] as const);
  return { side, df: u.df, ...flags, widen: `${from}..${to}` };
}

/** The edge in words, with the option named for `audience`. */
function edgeWords(edge: CandidateEdge, audience: Audience): string {
  const end = edge.side === 'upper' ? 'largest' : 'smallest';
  const subject = edge.chosen ? `df ${edge.df} is the ${end} candidate${edge.leastError ? ' and has the least error' : ''}` : `The least error is at df ${edge.df}, the ${end} candidate`;
  return renderOptions(`${subject}: the best df may lie beyond the candidates; widen them, e.g. ${opt('candidates')} ${edge.widen}.`, audience);
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
 * explanation also says what the other rules would have chosen, prints every mean and
 * threshold with errorPlace (so the compared numbers differ visibly when they differ), and
 * flags a choice at an end of the candidates (candidateEdge; `edge`), naming the option
 * that widens them in `audience`'s words (the command line's --df by default, the
 * editor's setting for 'editor'). `listTolerance` is the tolerance in percent the
 * simplest-within rule is listed with when it is not the rule in use (the panel passes its
 * tolerance box's); it also sets the printed digits (errorPlace). The explanation's parts
 * come separately too (ruleReason, alternatives, caveats), so no front end parses `reason`.
 * O(candidates).
 * Throws InputError when no candidate is usable or a picked df is not a candidate.
 * Example: selectDf(cands, { kind: 'one-se' }, 'rmse').df.
 */
export function selectDf(candidates: readonly CandidateResult[], rule: RuleSpec, metric: Metric, audience: Audience = 'cli', listTolerance: number = DEFAULT_TOLERANCE_PERCENT): Selection {
  const list = usable(candidates, metric);
  if (list.length === 0) {
    const reasons = candidates.filter((c) => c.skipped).map((c) => `df ${c.df}: ${c.skipped}`);
    throw new InputError(`no candidate df could be evaluated${reasons.length ? ` (${reasons.join('; ')})` : ''}`);
  }
  const percent = rule.kind === 'simplest-within' ? rule.percent : listTolerance;
  const place = comparisonPlace(list, percent);
  const main = pick(list, rule, metric, place);
  const others: RuleSpec[] = [{ kind: 'least-error' }, { kind: 'one-se' }, { kind: 'simplest-within', percent }].filter((r) => r.kind !== rule.kind) as RuleSpec[];
  const alternatives = others.map((r) => ({ rule: r, df: pick(list, r, metric, place).chosen.df }));
  const altText = alternatives.map((a) => `${ruleWords(a.rule)} → df ${a.df}`).join('; ');
  const skipped = candidates.filter((c) => c.skipped !== undefined).length;
  const skippedText = skipped ? ` ${skipped} candidate${skipped > 1 ? 's were' : ' was'} skipped (see the candidate list).` : '';
  const edge = edgeOf(list, candidates, main.chosen.df, rule);
  const caveats = `${skippedText}${edge ? ` ${edgeWords(edge, audience)}` : ''}`.trim();
  return {
    df: main.chosen.df,
    rule,
    metric,
    reason: `${main.sentence} Other rules: ${altText}.${skippedText}${edge ? ` ${edgeWords(edge, audience)}` : ''}`,
    ruleReason: main.sentence,
    caveats,
    otherRulesTolerance: percent,
    ...(main.threshold !== undefined ? { threshold: main.threshold } : {}),
    alternatives,
    ...(edge ? { edge } : {}),
  };
}
