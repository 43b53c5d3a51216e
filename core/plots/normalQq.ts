/**
 * Figure: normal quantile plot of standardised residuals against standard normal
 * quantiles, with the identity line.
 */
import { plotFrame } from './frame';
import { extent } from './scale';
import { coord, escapeXml, linePath, num, reading, svgDocument } from './svg';

/** Inputs of normalQqSvg: matching theoretical and sample quantiles, both sorted. */
export interface NormalQqSpec {
  readonly id: string;
  readonly theoretical: readonly number[];
  readonly sample: readonly number[];
  readonly df: number;
  /** How to read the figure, the closing sentences of its description (the figure catalogue's text, core/view/figureCatalogue.ts). */
  readonly reading?: string | undefined;
}

/** SVG text of the normal quantile plot. Example: normalQqSvg({ id: 'fig-qq', theoretical, sample, df: 4 }). */
export function normalQqSvg(spec: NormalQqSpec): string {
  const dom = extent([spec.theoretical, spec.sample]);
  const frame = plotFrame({ id: spec.id, xDomain: extent([spec.theoretical]), yDomain: dom, xLabel: 'standard normal quantile', yLabel: 'standardised residual' });
  const { sx, sy } = frame;
  const lo = Math.max(frame.sx.domain[0], dom[0]);
  const hi = Math.min(frame.sx.domain[1], dom[1]);
  let marks = `<path class="kw-ref-line" d="${linePath([sx(lo), sx(hi)], [sy(lo), sy(hi)])}"/><g class="kw-points">`;
  for (let i = 0; i < spec.theoretical.length; i++) {
    const t = spec.theoretical[i] as number;
    const s = spec.sample[i] as number;
    marks += `<circle class="kw-point" cx="${coord(sx(t))}" cy="${coord(sy(s))}" r="2.4"><title>${escapeXml(`normal quantile ${num(t, 3)}, residual ${num(s, 4)}`)}</title></circle>`;
  }
  marks += '</g>';
  return svgDocument(
    spec.id,
    {
      title: `Normal quantile plot of residuals (df ${spec.df})`,
      desc: `${spec.theoretical.length} quantiles of the standardised residuals against standard normal quantiles.` + reading(spec.reading),
    },
    frame.clipDef + frame.axes + `<g clip-path="${frame.clip}">${marks}</g>`,
  );
}
