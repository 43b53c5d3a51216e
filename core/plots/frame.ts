/**
 * The plotting area of a figure: margins, scales, grid lines, tick labels and axis titles.
 */
import { linearScale, niceTicks, type LinearScale } from './scale';
import { coord, escapeXml, FIGURE_HEIGHT, FIGURE_WIDTH, num } from './svg';

/** What a frame needs: data ranges and axis titles (axis titles may come from the CSV and are escaped here). */
export interface FrameSpec {
  readonly id: string;
  readonly xDomain: readonly [number, number];
  readonly yDomain: readonly [number, number];
  readonly xLabel: string;
  readonly yLabel: string;
  /** Explicit x tick values (e.g. integer df); default: nice ticks. */
  readonly xTicks?: readonly number[];
}

/** Scales, the inner plotting box and the SVG text of axes and grid. */
export interface Frame {
  readonly sx: LinearScale;
  readonly sy: LinearScale;
  readonly left: number;
  readonly right: number;
  readonly top: number;
  readonly bottom: number;
  /** Grid lines, axes, tick labels, axis titles. */
  readonly axes: string;
  /** clip-path attribute value that keeps marks inside the plotting box. */
  readonly clip: string;
  /** The <clipPath> definition to put in the figure. */
  readonly clipDef: string;
}

const MARGIN = { left: 62, right: 14, top: 12, bottom: 46 };

/** Builds the frame for a FIGURE_WIDTH x FIGURE_HEIGHT figure. */
export function plotFrame(spec: FrameSpec): Frame {
  const left = MARGIN.left;
  const right = FIGURE_WIDTH - MARGIN.right;
  const top = MARGIN.top;
  const bottom = FIGURE_HEIGHT - MARGIN.bottom;
  const sx = linearScale(spec.xDomain, [left, right]);
  const sy = linearScale(spec.yDomain, [bottom, top]);
  const xt = (spec.xTicks ?? niceTicks(spec.xDomain[0], spec.xDomain[1], 6)).filter((v) => v >= Math.min(...spec.xDomain) && v <= Math.max(...spec.xDomain));
  const yt = niceTicks(spec.yDomain[0], spec.yDomain[1], 5);
  let s = `<g class="kw-grid" aria-hidden="true">`;
  for (const v of xt) s += `<line x1="${coord(sx(v))}" x2="${coord(sx(v))}" y1="${top}" y2="${bottom}"/>`;
  for (const v of yt) s += `<line x1="${left}" x2="${right}" y1="${coord(sy(v))}" y2="${coord(sy(v))}"/>`;
  s += `</g><g class="kw-axis" aria-hidden="true">`;
  s += `<rect class="kw-box" x="${left}" y="${top}" width="${right - left}" height="${bottom - top}"/>`;
  for (const v of xt) s += `<text class="kw-tick" x="${coord(sx(v))}" y="${bottom + 16}" text-anchor="middle">${escapeXml(num(v, 4))}</text>`;
  for (const v of yt) s += `<text class="kw-tick" x="${left - 6}" y="${coord(sy(v) + 4)}" text-anchor="end">${escapeXml(num(v, 4))}</text>`;
  s += `<text class="kw-axis-title" x="${(left + right) / 2}" y="${FIGURE_HEIGHT - 8}" text-anchor="middle">${escapeXml(spec.xLabel)}</text>`;
  s += `<text class="kw-axis-title" transform="translate(14 ${(top + bottom) / 2}) rotate(-90)" text-anchor="middle">${escapeXml(spec.yLabel)}</text>`;
  s += `</g>`;
  const clipId = `${spec.id.replace(/[^A-Za-z0-9_-]/g, '')}-clip`;
  return {
    sx,
    sy,
    left,
    right,
    top,
    bottom,
    axes: s,
    clip: `url(#${clipId})`,
    clipDef: `<defs><clipPath id="${clipId}"><rect x="${left}" y="${top}" width="${right - left}" height="${bottom - top}"/></clipPath></defs>`,
  };
}
