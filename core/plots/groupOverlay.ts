/**
 * Figure: every group's fitted curve over its own data range in one frame, so groups that
 * run apart stand out; the selected group is drawn last and bold. With many groups the
 * lines are thin (class kw-group-many), so the bundle reads as a band and the selected one
 * stays visible.
 */
import { plotFrame } from './frame';
import { extent } from './scale';
import { linePath, num, reading, svgDocument } from './svg';

/** Groups above this many are drawn with thin lines. */
export const MANY_GROUPS = 12;

/** One group's curve: values at evenly spaced x from lo to hi (names may come from the CSV; they are escaped). */
export interface OverlayCurve {
  readonly name: string;
  readonly lo: number;
  readonly hi: number;
  readonly y: readonly number[];
}

/** Inputs of groupOverlaySvg. */
export interface GroupOverlaySpec {
  readonly id: string;
  readonly curves: readonly OverlayCurve[];
  /** Index of the highlighted group; undefined: none. */
  readonly selected?: number | undefined;
  readonly xLabel: string;
  readonly yLabel: string;
  /** What a group is called (the group column's label). */
  readonly groupLabel: string;
  /** How to read the figure, the closing sentences of its description. */
  readonly reading?: string | undefined;
}

/** The x of point k of `c`. */
function xAt(c: OverlayCurve, k: number): number {
  const m = c.y.length;
  return m <= 1 ? c.lo : k === m - 1 ? c.hi : c.lo + ((c.hi - c.lo) * k) / (m - 1);
}

/**
 * SVG text of the overlay figure. O(total points).
 * Example: groupOverlaySvg({ id: 'fig-groups', curves, selected: 0, xLabel: 'conc', yLabel: 'uptake', groupLabel: 'plant' }).
 */
export function groupOverlaySvg(spec: GroupOverlaySpec): string {
  const { curves } = spec;
  const xs = curves.flatMap((c) => [c.lo, c.hi]);
  const frame = plotFrame({
    id: spec.id,
    xDomain: extent([xs], 0.02),
    yDomain: extent(curves.map((c) => c.y)),
    xLabel: spec.xLabel,
    yLabel: spec.yLabel,
  });
  const many = curves.length > MANY_GROUPS;
  const path = (c: OverlayCurve, i: number, cls: string): string =>
    `<path class="${cls}" data-group="${i}" d="${linePath(
      c.y.map((_, k) => frame.sx(xAt(c, k))),
      c.y.map((v) => frame.sy(v)),
    )}"/>`;
  let lines = '';
  for (const [i, c] of curves.entries()) if (i !== spec.selected) lines += path(c, i, many ? 'kw-group-curve kw-group-many' : 'kw-group-curve');
  const chosen = spec.selected !== undefined ? curves[spec.selected] : undefined;
  // The selected group last, so it lies on top of the others.
  if (chosen && spec.selected !== undefined) lines += path(chosen, spec.selected, 'kw-group-curve kw-group-selected');
  const body = frame.clipDef + frame.axes + `<g clip-path="${frame.clip}">${lines}</g>`;
  const lo = Math.min(...xs);
  const hi = Math.max(...xs);
  const [ylo, yhi] = extent(
    curves.map((c) => c.y),
    0,
  );
  const label = spec.groupLabel;
  return svgDocument(
    spec.id,
    {
      title: `The fitted curves of ${curves.length} groups by ${label}, ${spec.yLabel} against ${spec.xLabel}`,
      desc:
        `${curves.length} curves, each over its own group's range of ${spec.xLabel}, together from ${num(lo)} to ${num(hi)}; ` +
        `the curves run from ${spec.yLabel} ${num(ylo)} to ${num(yhi)}.` +
        (chosen ? ` The curve of ${label} ${chosen.name} is drawn bold.` : '') +
        reading(spec.reading),
    },
    body,
  );
}
