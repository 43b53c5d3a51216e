/**
 * Figure: residuals against x or against fitted values, with the zero line.
 */
import type { Cloud } from '../protocol';
import { cloudMarks, cloudRanges, cloudWords } from './cloud';
import { plotFrame } from './frame';
import { extent } from './scale';
import { coord, svgDocument } from './svg';

/** Inputs of residualSvg. `against` names the horizontal quantity (a column label or "fitted value"). */
export interface ResidualSpec {
  readonly id: string;
  readonly cloud: Cloud;
  readonly against: string;
  readonly df: number;
}

/** SVG text of a residual figure. Example: residualSvg({ id: 'fig-rx', cloud, against: 'speed', df: 4 }). */
export function residualSvg(spec: ResidualSpec): string {
  const r = cloudRanges(spec.cloud);
  const ys = extent([r.y, [0]]);
  const frame = plotFrame({ id: spec.id, xDomain: extent([r.x], 0.02), yDomain: ys, xLabel: spec.against, yLabel: 'residual' });
  const y0 = coord(frame.sy(0));
  const body =
    frame.clipDef +
    frame.axes +
    `<path class="kw-zero" d="M${frame.left} ${y0}H${frame.right}"/>` +
    cloudMarks(spec.cloud, frame, { x: spec.against, y: 'residual' });
  return svgDocument(
    spec.id,
    {
      title: `Residuals against ${spec.against} (df ${spec.df})`,
      desc: `${cloudWords(spec.cloud)}; residual = reading minus fitted value. Without structure they scatter evenly around the zero line.`,
    },
    body,
  );
}
