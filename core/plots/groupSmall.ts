/**
 * Figure: one group's readings and fitted curve, small, for a grid of such figures (small
 * multiples). Every figure of the grid takes the same x and y ranges, so the groups compare
 * at a glance; the axes carry only their end values. Readings are one path of zero-length
 * segments (class kw-small-dots, drawn as round dots by the stylesheet), so a grid of many
 * figures stays light.
 */
import { linearScale } from './scale';
import { coord, escapeXml, linePath, num, svgDocument } from './svg';

/** Outer size of a small figure in SVG user units. */
export const SMALL_WIDTH = 200;
export const SMALL_HEIGHT = 130;
const MARGIN = { left: 34, right: 6, top: 6, bottom: 18 };
/** Padding of the shared ranges, as a share of their span. */
const PAD = 0.05;

/** Inputs of groupSmallSvg (name and labels may come from the CSV; they are escaped). */
export interface GroupSmallSpec {
  readonly id: string;
  readonly name: string;
  /** Some of the group's readings. */
  readonly x: readonly number[];
  readonly y: readonly number[];
  /** The curve: values at evenly spaced x from lo to hi. */
  readonly lo: number;
  readonly hi: number;
  readonly curve: readonly number[];
  readonly df: number;
  /** Rows of the group (the readings shown may be fewer). */
  readonly rows: number;
  /** The data ranges every figure of the grid shares (each figure pads them a little and labels their ends). */
  readonly xRange: readonly [number, number];
  readonly yRange: readonly [number, number];
  readonly xLabel: string;
  readonly yLabel: string;
  readonly groupLabel: string;
}

/**
 * SVG text of one small figure. O(points).
 * Example: groupSmallSvg({ id: 'kw-small-0', name: 'Qn1', x, y, lo: 95, hi: 1000, curve, df: 3, rows: 7, xRange: [95, 1000], yRange: [7.7, 45.5], xLabel: 'conc', yLabel: 'uptake', groupLabel: 'plant' }).
 */
export function groupSmallSvg(spec: GroupSmallSpec): string {
  const left = MARGIN.left;
  const right = SMALL_WIDTH - MARGIN.right;
  const top = MARGIN.top;
  const bottom = SMALL_HEIGHT - MARGIN.bottom;
  const pad = (r: readonly [number, number]): [number, number] => {
    const span = r[1] - r[0];
    return span > 0 ? [r[0] - span * PAD, r[1] + span * PAD] : [r[0] - 1, r[1] + 1];
  };
  const sx = linearScale(pad(spec.xRange), [left, right]);
  const sy = linearScale(pad(spec.yRange), [bottom, top]);
  let dots = '';
  for (let i = 0; i < spec.x.length; i++) {
    const x = spec.x[i] as number;
    const y = spec.y[i] as number;
    if (Number.isFinite(x) && Number.isFinite(y)) dots += `M${coord(sx(x))} ${coord(sy(y))}h0`;
  }
  const m = spec.curve.length;
  const cx = spec.curve.map((_, k) => sx(m <= 1 ? spec.lo : k === m - 1 ? spec.hi : spec.lo + ((spec.hi - spec.lo) * k) / (m - 1)));
  const [x0, x1] = spec.xRange;
  const [y0, y1] = spec.yRange;
  // The ends of the shared ranges, labelled where they lie.
  const axes =
    `<g class="kw-axis" aria-hidden="true"><rect class="kw-box" x="${left}" y="${top}" width="${right - left}" height="${bottom - top}"/>` +
    `<text class="kw-tick" x="${coord(sx(x0))}" y="${SMALL_HEIGHT - 5}" text-anchor="start">${escapeXml(num(x0, 3))}</text>` +
    `<text class="kw-tick" x="${coord(sx(x1))}" y="${SMALL_HEIGHT - 5}" text-anchor="end">${escapeXml(num(x1, 3))}</text>` +
    `<text class="kw-tick" x="${left - 3}" y="${coord(sy(y0))}" text-anchor="end">${escapeXml(num(y0, 3))}</text>` +
    `<text class="kw-tick" x="${left - 3}" y="${coord(sy(y1) + 8)}" text-anchor="end">${escapeXml(num(y1, 3))}</text></g>`;
  const body = axes + (dots ? `<path class="kw-small-dots" d="${dots}"/>` : '') + `<path class="kw-curve kw-small-curve" d="${linePath(cx, spec.curve.map(sy))}"/>`;
  const first = spec.curve[0] ?? NaN;
  const last = spec.curve[m - 1] ?? NaN;
  return svgDocument(
    spec.id,
    {
      title: `${spec.groupLabel} ${spec.name}: ${spec.yLabel} against ${spec.xLabel}, df ${num(spec.df)}`,
      desc:
        `${spec.x.length < spec.rows ? `${spec.x.length} of the ${spec.rows} readings` : `The ${spec.rows} readings`} of ${spec.groupLabel} ${spec.name} and its fitted curve with df ${num(spec.df)}, ` +
        `from ${spec.xLabel} ${num(spec.lo)} to ${num(spec.hi)}, from ${num(first)} to ${num(last)}; on the ranges all the small figures share.`,
    },
    body,
    SMALL_WIDTH,
    SMALL_HEIGHT,
  );
}
