import { InputError } from '../errors';
import { ruleWords, selectionRule, type Usable } from '../registry/rules/index';
import { leastOf } from '../registry/rules/common';
import { DEFAULT_TOLERANCE_PERCENT, errorFormat } from '../tune/rules';
import { metricLabel, sig } from '../tune/format';
import type { CandidateResult, ErrorSummary, RuleSpec } from '../tune/types';
import { pairWords } from './fit';

/** How a surface's df pair is chosen: the rules of curves, with a picked pair instead of a picked df. */
export type SurfaceRule = Exclude<RuleSpec, { kind: 'pick' }> | { readonly kind: 'pick'; readonly dfU: number; readonly dfV: number };

/** The error a surface's rules compare (no outcome families for surfaces yet). */
export type SurfaceMetric = 'rmse' | 'mae' | 'maxAbs' | 'gcv';

/** One candidate pair: its errors, or why it was skipped. */
export interface SurfaceCandidate {
  readonly dfU: number;
  readonly dfV: number;
  /** dfU x dfV. */
  readonly df: number;
  readonly skipped?: string;
  readonly errors: { readonly rmse?: ErrorSummary; readonly mae?: ErrorSummary; readonly maxAbs?: ErrorSummary; readonly gcv?: ErrorSummary };
  /** Information criteria of the fit to all rows (absent when skipped). */
  readonly aic?: number;
  readonly aicc?: number;
  readonly bic?: number;
}

/** The chosen pair with the words of the choice. */
export interface SurfaceSelection {
  readonly dfU: number;
  readonly dfV: number;
  readonly rule: SurfaceRule;
  readonly metric: SurfaceMetric;
  /** The whole explanation: ruleReason, the other rules, then caveats. */
  readonly reason: string;
  /** The rule's own sentences: what it compared and what it chose. */
  readonly ruleReason: string;
  /** Skipped candidates and a choice at the largest df of an input ('' when neither). */
  readonly caveats: string;
  /** The threshold of the one-SE and tolerance rules. */
  readonly threshold?: number;
  /** What each other rule would have chosen (the tolerance rule at DEFAULT_TOLERANCE_PERCENT unless it is the rule in use). */
  readonly alternatives: readonly { readonly rule: SurfaceRule; readonly dfU: number; readonly dfV: number }[];
  /** The inputs whose largest candidate df the choice or the least error sits at: the best df may lie beyond. */
  readonly edge: readonly ('u' | 'v')[];
}

/**
 * The order of simplicity of candidate pairs, which every rule's "smallest df" follows and
 * ties go towards: fewer coefficients dfU x dfV first (the surface's df, the trace of its hat
 * matrix); among equal products, fewer basis functions per input dfU + dfV (fewer knots
 * in all: 3 x 4 before 2 x 6); then the smaller dfU. Negative when a is simpler than b.
 * Example: [[6, 2], [3, 4], [2, 5]].sort(simplerFirst) -> [[2, 5], [3, 4], [6, 2]].
 */
export function simplerFirst(a: { readonly dfU: number; readonly dfV: number }, b: { readonly dfU: number; readonly dfV: number }): number {
  return a.dfU * a.dfV - b.dfU * b.dfV || a.dfU + a.dfV - (b.dfU + b.dfV) || a.dfU - b.dfU;
}

/**
 * Applies a rule of curves (core/registry/rules/) to surface candidates: the pairs in the
 * order of simplerFirst stand in for the df of curves by their rank (1 the simplest), so "the
 * smallest df within the threshold" becomes the simplest pair within it and ties go to the
 * simpler pair; the rules name each rank as its pair ('df 5 × 4') through their label hook
 * (PickContext.label, noun 'pair'). Numbers print as for curves (errorFormat). The explanation adds what the
 * other rules would choose, skipped candidates, and a choice at the largest candidate df of
 * an input (the best df may lie beyond it). O(candidates log candidates).
 * Throws InputError when no candidate is usable or a picked pair is not an evaluated candidate.
 * Example: selectPair(cands, { kind: 'one-se' }, 'rmse', { u: 'Temp', v: 'Wind' }).reason.
 */
export function selectPair(candidates: readonly SurfaceCandidate[], rule: SurfaceRule, metric: SurfaceMetric, names: { readonly u: string; readonly v: string }): SurfaceSelection {
  const ranked = [...candidates].sort(simplerFirst);
  const asCurves: CandidateResult[] = ranked.map((c, r) => ({ df: r + 1, errors: c.errors, ...(c.skipped !== undefined ? { skipped: c.skipped } : {}) }));
  const list: Usable[] = [];
  for (const c of asCurves) {
    const e = c.errors[metric];
    if (c.skipped === undefined && e && Number.isFinite(e.mean)) list.push({ df: c.df, e });
  }
  if (list.length === 0) {
    const reasons = candidates.filter((c) => c.skipped).map((c) => `${pairWords(c.dfU, c.dfV)}: ${c.skipped}`);
    throw new InputError(`no candidate df pair could be evaluated${reasons.length ? ` (${reasons.join('; ')})` : ''}`);
  }
  const pairOf = (rank: number): SurfaceCandidate => ranked[rank - 1] as SurfaceCandidate;
  const label = (rank: number): string => {
    const c = pairOf(rank);
    return pairWords(c.dfU, c.dfV);
  };
  const percent = rule.kind === 'simplest-within' ? rule.percent : DEFAULT_TOLERANCE_PERCENT;
  const num = errorFormat(asCurves, metric, percent);
  const best = leastOf(list);
  const metricName = metricLabel(metric);
  const head = `Least mean ${metricName} ${num(best.e.mean)} at ${label(best.df)}` + (Number.isFinite(best.e.se) ? ` (SE ${sig(best.e.se, 2)}).` : '.');
  const apply = (r: SurfaceRule) => {
    let spec: RuleSpec;
    if (r.kind === 'pick') {
      const rank = ranked.findIndex((c) => c.dfU === r.dfU && c.dfV === r.dfV) + 1;
      if (rank === 0 || !list.some((u) => u.df === rank)) {
        throw new InputError(`${pairWords(r.dfU, r.dfV)} was picked but is not an evaluated candidate (candidates: ${list.map((u) => pairWords(pairOf(u.df).dfU, pairOf(u.df).dfV)).join(', ')})`);
      }
      spec = { kind: 'pick', df: rank };
    } else spec = r;
    return selectionRule(spec).pick(spec, { list, best, metric, metricName, head, num, label, noun: 'pair' });
  };
  const main = apply(rule);
  const chosen = pairOf(main.chosen.df);
  const others = ([{ kind: 'least-error' }, { kind: 'one-se' }, { kind: 'simplest-within', percent }] as SurfaceRule[]).filter((r) => r.kind !== rule.kind);
  const alternatives = others.map((r) => {
    const c = pairOf(apply(r).chosen.df);
    return { rule: r, dfU: c.dfU, dfV: c.dfV };
  });
  const altText = alternatives.map((a) => `${ruleWords(a.rule as RuleSpec)} → ${pairWords(a.dfU, a.dfV)}`).join('; ');
  const skipped = candidates.filter((c) => c.skipped !== undefined).length;
  const skippedText = skipped ? `${skipped} candidate pair${skipped > 1 ? 's were' : ' was'} skipped (see the candidate list).` : '';
  const edge = edgeOf(
    candidates,
    list.map((u) => pairOf(u.df)),
    chosen,
    pairOf(best.df),
    rule.kind !== 'pick',
  );
  const edgeText = edge.length ? edgeWords(edge, chosen, pairOf(best.df), rule.kind !== 'pick', names) : '';
  const caveats = [skippedText, edgeText].filter((s) => s).join(' ');
  const ruleReason = main.sentence;
  return {
    dfU: chosen.dfU,
    dfV: chosen.dfV,
    rule,
    metric,
    reason: `${ruleReason} Other rules: ${altText}.${caveats ? ` ${caveats}` : ''}`,
    ruleReason,
    caveats,
    ...(main.threshold !== undefined ? { threshold: main.threshold } : {}),
    alternatives,
    edge,
  };
}

/** The inputs where the choice (by a rule) or the least error sits at the largest evaluated df, with no larger candidate skipped. */
function edgeOf(all: readonly SurfaceCandidate[], usable: readonly SurfaceCandidate[], chosen: SurfaceCandidate, best: SurfaceCandidate, ruled: boolean): ('u' | 'v')[] {
  if (usable.length < 2) return [];
  const out: ('u' | 'v')[] = [];
  for (const axis of ['u', 'v'] as const) {
    const df = (c: SurfaceCandidate): number => (axis === 'u' ? c.dfU : c.dfV);
    const top = Math.max(...usable.map(df));
    const allTop = Math.max(...all.map(df));
    if (top < allTop || Math.min(...usable.map(df)) === top) continue;
    if ((ruled && df(chosen) === top) || df(best) === top) out.push(axis);
  }
  return out;
}

function edgeWords(edge: readonly ('u' | 'v')[], chosen: SurfaceCandidate, best: SurfaceCandidate, ruled: boolean, names: { readonly u: string; readonly v: string }): string {
  const at = (c: SurfaceCandidate, axis: 'u' | 'v'): number => (axis === 'u' ? c.dfU : c.dfV);
  // The edge is the chosen pair's when a rule chose it there, else the least error's.
  const subjectOf = (axis: 'u' | 'v'): SurfaceCandidate => (ruled && at(chosen, axis) >= at(best, axis) ? chosen : best);
  const sentences: string[] = [];
  for (const subject of [chosen, best]) {
    const axes = edge.filter((axis) => subjectOf(axis) === subject);
    if (axes.length === 0 || (subject === best && best === chosen && sentences.length > 0)) continue;
    const who = subject === chosen ? `${pairWords(chosen.dfU, chosen.dfV)} uses` : `The least error, at ${pairWords(best.dfU, best.dfV)}, uses`;
    const which = axes.map((axis) => `${names[axis]} (${at(subject, axis)})`).join(' and of ');
    const beyond = axes.map((axis) => names[axis]).join(' and of ');
    sentences.push(`${who} the largest candidate df of ${which}: the best df of ${beyond} may lie beyond the candidates; widen them.`);
  }
  return sentences.join(' ');
}
