/**
 * Figure: residuals against x or against fitted values, with the zero line.
 */
import type { Cloud } from '../view/model';
import { cloudMarks, cloudRanges, cloudWords, densityLegend, LEGEND_HEIGHT } from './cloud';
import { plotFrame } from './frame';
import { extent } from './scale';
import { coord, FIGURE_HEIGHT, FIGURE_WIDTH, reading, svgDocument } from './svg';

/** Inputs of residualSvg. `against` names the horizontal quantity (a column label or "fitted value"). */
export interface ResidualSpec {
  readonly id: string;
  readonly cloud: Cloud;
  readonly against: string;
  readonly df: number;
  /** 'response' (default): reading minus fitted value; 'deviance': deviance residuals of a Poisson or binomial fit. */
  readonly kind?: 'response' | 'deviance' | undefined;
  /** How to read the figure, the closing sentences of its description (the figure catalogue's text, core/view/figureCatalogue.ts). */
  readonly reading?: string | undefined;
}

/** SVG text of a residual figure. Example: residualSvg({ id: 'fig-rx', cloud, against: 'speed', df: 4 }). */
export function residualSvg(spec: ResidualSpec): string {
  const r = cloudRanges(spec.cloud);
  const ys = extent([r.y, [0]]);
  const deviance = spec.kind === 'deviance';
  const yName = deviance ? 'deviance residual' : 'residual';
  const frame = plotFrame({ id: spec.id, xDomain: extent([r.x], 0.02), yDomain: ys, xLabel: spec.against, yLabel: yName });
  const y0 = coord(frame.sy(0));
  const density = spec.cloud.kind === 'bins';
  const body =
    frame.clipDef +
    frame.axes +
    `<path class="kw-zero" d="M${frame.left} ${y0}H${frame.right}"/>` +
    cloudMarks(spec.cloud, frame, { x: spec.against, y: yName }) +
    (spec.cloud.kind === 'bins' ? densityLegend(spec.cloud) : '');
  return svgDocument(
    spec.id,
    {
      title: `${deviance ? 'Deviance residuals' : 'Residuals'} against ${spec.against} (df ${spec.df})`,
      desc:
        `${cloudWords(spec.cloud)}; ${deviance ? "deviance residual = the signed square root of the row's contribution to the deviance" : 'residual = reading minus fitted value'}.` +
        reading(spec.reading),
    },
    body,
    FIGURE_WIDTH,
    FIGURE_HEIGHT + (density ? LEGEND_HEIGHT : 0),
  );
}
