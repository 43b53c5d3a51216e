/**
 * The part of the error-against-df figure where a rule makes its decision. Over every
 * candidate, the stiffest curves often have errors several times the least, and the
 * threshold, the least error and the standard-error bars around them then share a few
 * pixels; this window zooms in on them. The panel shows it first and offers the whole range.
 */
import type { ErrorPoint } from '../plots/errorByDf';

/** A window of the error figure: the df range and the error range shown. */
export interface ErrorWindow {
  readonly df: readonly [number, number];
  readonly error: readonly [number, number];
}

/** How far the window reaches above the decision, in units of the decision's own spread (see decisionWindow). */
const ABOVE_UNITS = 3;
/** How far it reaches below the least error, in the same units. */
const BELOW_UNITS = 2;
/** Padding at both ends of the error range, as a fraction of it. */
const PAD = 0.08;

/**
 * The window around a decision: the candidates from the one before the smaller of (chosen
 * df, least-error df) to the one after the larger, and an error range covering their
 * means with one-SE bars and the threshold. The range is capped at ABOVE_UNITS units above
 * the highest of (threshold, chosen mean + SE, least mean + SE) and BELOW_UNITS units
 * below the lowest of (least mean - SE, chosen mean - SE), where a unit is the decision's
 * spread: the largest of (threshold - least mean), the least mean's SE and (chosen mean -
 * least mean). So a far-off neighbour cannot squeeze the threshold against the bars;
 * the figure marks what the cap leaves out at the window's edge.
 * Undefined when there is nothing to zoom: fewer than three usable candidates, the chosen
 * df not among them, no spread at all, or a window that shows every candidate whole anyway.
 * O(candidates).
 * Example: decisionWindow(points, 8, 23.4)?.df -> [7, 11] for mcycle's one-SE choice.
 */
export function decisionWindow(points: readonly ErrorPoint[], chosenDf: number, threshold?: number): ErrorWindow | undefined {
  const pts = points.filter((p) => Number.isFinite(p.df) && Number.isFinite(p.mean)).sort((a, b) => a.df - b.df);
  if (pts.length < 3) return undefined;
  const iChosen = pts.findIndex((p) => p.df === chosenDf);
  if (iChosen < 0) return undefined;
  let iBest = 0;
  pts.forEach((p, i) => {
    if (p.mean < (pts[iBest] as ErrorPoint).mean) iBest = i;
  });
  const chosen = pts[iChosen] as ErrorPoint;
  const best = pts[iBest] as ErrorPoint;
  const se = (p: ErrorPoint): number => (Number.isFinite(p.se) && p.se > 0 ? p.se : 0);
  const th = threshold !== undefined && Number.isFinite(threshold) ? threshold : undefined;

  const i0 = Math.max(0, Math.min(iChosen, iBest) - 1);
  const i1 = Math.min(pts.length - 1, Math.max(iChosen, iBest) + 1);
  const near = pts.slice(i0, i1 + 1);
  let unit = Math.max(th !== undefined ? th - best.mean : 0, se(best), chosen.mean - best.mean);
  if (!(unit > 0)) {
    // No threshold and no standard error (GCV with the least error chosen): the spread of the neighbours.
    const means = near.map((p) => p.mean);
    unit = (Math.max(...means) - Math.min(...means)) / 4;
  }
  if (!(unit > 0)) return undefined;

  const top = Math.max(th ?? -Infinity, chosen.mean + se(chosen), best.mean + se(best));
  const bottom = Math.min(best.mean - se(best), chosen.mean - se(chosen));
  let lo = th ?? Infinity;
  let hi = th ?? -Infinity;
  for (const p of near) {
    lo = Math.min(lo, p.mean - se(p));
    hi = Math.max(hi, p.mean + se(p));
  }
  lo = Math.max(lo, bottom - BELOW_UNITS * unit);
  hi = Math.min(hi, top + ABOVE_UNITS * unit);
  const pad = (hi - lo) * PAD;
  const window: ErrorWindow = { df: [(near[0] as ErrorPoint).df, (near[near.length - 1] as ErrorPoint).df], error: [lo - pad, hi + pad] };

  // Nothing gained when every candidate is in the window, mean and bar.
  const whole = pts.every((p) => p.mean - se(p) >= window.error[0] && p.mean + se(p) <= window.error[1]);
  return i0 === 0 && i1 === pts.length - 1 && whole ? undefined : window;
}
