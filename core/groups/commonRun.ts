/**
 * When and at which df a grouped fit asks "does one curve serve all groups?"
 * (core/groups/common.ts): natural splines fitted by plain least squares to continuous
 * readings, at the shared df, or without one at the df most groups chose (the larger on a
 * tie). Groups too small for that df are left out by the test, which says so.
 */
import { InputError } from '../errors';
import { isPlainModel } from '../fit/model';
import { commonCurveTest } from './common';
import type { GroupAnalysis } from './analyse';
import type { CommonCurveJson } from './commonJson';
import type { GroupSplit } from './split';

/** The df most groups chose; the larger on a tie. */
export function commonDf(analysis: GroupAnalysis): number {
  if (analysis.shared) return analysis.shared.selection.df;
  const counts = new Map<number, number>();
  for (const g of analysis.groups) counts.set(g.analysis.chosen.df, (counts.get(g.analysis.chosen.df) ?? 0) + 1);
  let best = NaN;
  let most = 0;
  for (const [df, n] of counts) if (n > most || (n === most && df > best)) [best, most] = [df, n];
  return best;
}

/** The test as JSON with its words, or null when it does not apply (another curve kind or model) or cannot be made. */
export function commonCurveFor(split: GroupSplit, analysis: GroupAnalysis): CommonCurveJson | null {
  const options = analysis.groups[0]?.analysis.options;
  if (!options || options.kind !== 'natural-spline' || !isPlainModel(options)) return null;
  const df = commonDf(analysis);
  try {
    const t = commonCurveTest(
      split.groups.map((g) => ({ name: g.name, x: g.data.x, y: g.data.y, ...(g.data.w ? { w: g.data.w } : {}), ...(g.data.lines ? { lines: g.data.lines } : {}) })),
      df,
      { seed: options.seed, noun: split.groupLabel ?? 'channel' },
    );
    const finite = (v: number): number | null => (Number.isFinite(v) ? v : null);
    return {
      df: t.df,
      dfFrom: analysis.shared ? 'shared' : 'most groups',
      groups: t.groups,
      n: t.n,
      knots: t.knots,
      rssCommon: finite(t.rssCommon),
      rssSeparate: finite(t.rssSeparate),
      dfNum: t.dfNum,
      dfDen: t.dfDen,
      F: finite(t.F),
      p: finite(t.p),
      perGroup: t.perGroup.map((g) => ({ name: g.name, F: finite(g.F), p: finite(g.p), differs: g.differs })),
      named: t.stepDown.map((st) => ({ name: st.name, F: finite(st.F), p: finite(st.p), pAdjusted: finite(st.pAdjusted) })),
      namedCapped: t.stepDownCapped,
      cv: t.cv ? { folds: t.cv.folds, common: finite(t.cv.common), separate: finite(t.cv.separate) } : null,
      oneServesAll: t.oneServesAll,
      words: t.words,
      notes: t.notes,
    };
  } catch (e) {
    if (e instanceof InputError) return { df, words: `Whether one curve serves all groups could not be tested: ${e.raw}`, oneServesAll: null };
    throw e;
  }
}
