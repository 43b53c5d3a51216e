/**
 * What moved when a file's analysis ran again on changed data: the df chosen before and
 * now, and the largest change of the chosen curve over the x range both fits cover. No
 * vscode import.
 */
import type { Analysis } from '../core/analysis/types';
import { selectDf } from '../core/tune/rules';
import type { RuleSpec } from '../core/tune/types';
import type { RefitView } from '../core/view/model';

/** Points at which the two curves are compared, evenly over the common x range. */
const COMPARE_POINTS = 401;

/** The df `rule` chooses from an analysis's candidates, or undefined when it cannot choose. */
export function chosenDf(analysis: Analysis, rule: RuleSpec): number | undefined {
  try {
    return selectDf(analysis.tune.candidates, rule, analysis.tune.metric).df;
  } catch {
    return undefined;
  }
}

/** `rule` when it can still choose among the analysis's candidates (a picked df must have been fitted), else undefined. */
export function stillValid(analysis: Analysis, rule: RuleSpec | undefined): RuleSpec | undefined {
  return rule && chosenDf(analysis, rule) !== undefined ? rule : undefined;
}

/**
 * Compares the curve `ruleBefore` chose from `before` with the one `ruleNow` chooses from
 * `now` at COMPARE_POINTS evenly spaced x over the range both were fitted to (undefined
 * when a rule cannot choose or the ranges do not overlap).
 */
export function whatMoved(before: Analysis, ruleBefore: RuleSpec, now: Analysis, ruleNow: RuleSpec, ruleDropped: boolean, reason: RefitView['reason']): RefitView | undefined {
  const dfBefore = chosenDf(before, ruleBefore);
  const dfNow = chosenDf(now, ruleNow);
  if (dfBefore === undefined || dfNow === undefined) return undefined;
  const a = before.fits.get(dfBefore)?.curve;
  const b = now.fits.get(dfNow)?.curve;
  if (!a || !b) return undefined;
  const lo = Math.max(a.lower, b.lower);
  const hi = Math.min(a.upper, b.upper);
  if (!(Number.isFinite(lo) && Number.isFinite(hi) && hi >= lo)) return undefined;
  let largestChange = 0;
  let atX = lo;
  for (let i = 0; i < COMPARE_POINTS; i++) {
    const x = hi === lo ? lo : lo + ((hi - lo) * i) / (COMPARE_POINTS - 1);
    const d = Math.abs(b.value(x) - a.value(x));
    if (d > largestChange) {
      largestChange = d;
      atX = x;
    }
  }
  if (!Number.isFinite(largestChange)) return undefined;
  let yMin = Infinity;
  let yMax = -Infinity;
  for (const y of now.data.y) {
    if (!Number.isFinite(y)) continue;
    if (y < yMin) yMin = y;
    if (y > yMax) yMax = y;
  }
  const ySpread = yMax >= yMin ? yMax - yMin : 0;
  return { reason, rowsBefore: before.data.x.length, rowsNow: now.data.x.length, dfBefore, dfNow, ruleDropped, largestChange, atX, ySpread };
}
