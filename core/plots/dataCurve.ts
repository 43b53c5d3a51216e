/**
 * Figure: the readings with the fitted curve, its 95 % confidence band for the mean and
 * the 95 % prediction band for a new reading. A density grid lies beneath the bands and the
 * curve, with its legend under the axes; dots lie on top, where each can be pointed at.
 */
import type { Cloud, CurveView } from '../view/model';
import { cloudMarks, cloudRanges, cloudWords, densityLegend, LEGEND_HEIGHT } from './cloud';
import { plotFrame } from './frame';
import { extent } from './scale';
import { bandPath, FIGURE_HEIGHT, FIGURE_WIDTH, linePath, num, reading, svgDocument } from './svg';

/** Inputs of dataCurveSvg. Labels may come from the CSV; they are escaped. */
export interface DataCurveSpec {
  readonly id: string;
  readonly data: Cloud;
  readonly grid: readonly number[];
  readonly curve: CurveView;
  readonly xLabel: string;
  readonly yLabel: string;
  /** How to read the figure, the closing sentences of its description (the figure catalogue's text, core/view/figureCatalogue.ts). */
  readonly reading?: string | undefined;
}

/** SVG text of the data-and-curve figure. Example: dataCurveSvg({ id: 'fig-data', data, grid, curve, xLabel: 'x', yLabel: 'y' }). */
export function dataCurveSvg(spec: DataCurveSpec): string {
  const { curve, grid } = spec;
  const r = cloudRanges(spec.data);
  const frame = plotFrame({
    id: spec.id,
    xDomain: extent([r.x, grid], 0.02),
    yDomain: extent([r.y, curve.piLower, curve.piUpper]),
    xLabel: spec.xLabel,
    yLabel: spec.yLabel,
  });
  const px = grid.map((v) => frame.sx(v));
  const map = (a: readonly number[]) => a.map((v) => frame.sy(v));
  const readings = cloudMarks(spec.data, frame, { x: spec.xLabel, y: spec.yLabel });
  const density = spec.data.kind === 'bins';
  const body =
    frame.clipDef +
    frame.axes +
    // A density grid first, so the bands and the curve are drawn over it and stay visible.
    (density ? readings : '') +
    `<g clip-path="${frame.clip}">` +
    `<path class="kw-band-pi" d="${bandPath(px, map(curve.piLower), map(curve.piUpper))}"/>` +
    `<path class="kw-band-ci" d="${bandPath(px, map(curve.ciLower), map(curve.ciUpper))}"/>` +
    `<path class="kw-curve" d="${linePath(px, map(curve.fit))}"/>` +
    `</g>` +
    // Dots last, so each stays on top for hovering and clicking.
    (density ? densityLegend(spec.data) : readings);
  const lo = grid[0] ?? NaN;
  const hi = grid[grid.length - 1] ?? NaN;
  return svgDocument(
    spec.id,
    {
      title: `${spec.yLabel} against ${spec.xLabel} with the fitted curve (df ${num(curve.df)})`,
      desc:
        `${cloudWords(spec.data)}. The fitted curve with df ${num(curve.df)} runs from ${spec.xLabel} ${num(lo)} to ${num(hi)}, ` +
        `from ${num(curve.fit[0] ?? NaN)} to ${num(curve.fit[curve.fit.length - 1] ?? NaN)}.` +
        reading(spec.reading),
    },
    body,
    FIGURE_WIDTH,
    FIGURE_HEIGHT + (density ? LEGEND_HEIGHT : 0),
  );
}
