/**
 * Figure: an influence measure (Cook's distance or leverage) against x, with its
 * threshold; rows over the threshold are marked and carry their CSV line, so a click (or
 * Enter) can reveal the line.
 */
import { plotFrame } from './frame';
import { extent } from './scale';
import { coord, escapeXml, num, reading, svgDocument } from './svg';

/** Inputs of influenceSvg. */
export interface InfluenceSpec {
  readonly id: string;
  readonly measure: "Cook's distance" | 'leverage';
  readonly x: readonly number[];
  readonly value: readonly number[];
  /** 1-based CSV line of each point (0 when unknown). */
  readonly lines: readonly number[];
  /** True when each point is the largest value of an x cell rather than one row. */
  readonly binned: boolean;
  readonly threshold: number;
  readonly xLabel: string;
  readonly df: number;
  /** How to read the figure, the closing sentences of its description (the figure catalogue's text, core/view/figureCatalogue.ts). */
  readonly reading?: string | undefined;
}

/** SVG text of the influence figure. Example: influenceSvg({ id: 'fig-cook', measure: "Cook's distance", x, value, lines, binned: false, threshold: 0.08, xLabel: 'speed', df: 4 }). */
export function influenceSvg(spec: InfluenceSpec): string {
  const th = Number.isFinite(spec.threshold) ? [spec.threshold] : [];
  const frame = plotFrame({ id: spec.id, xDomain: extent([spec.x], 0.02), yDomain: extent([spec.value, th, [0]]), xLabel: spec.xLabel, yLabel: spec.measure });
  const { sx, sy } = frame;
  let marks = '';
  if (th.length) marks += `<path class="kw-threshold" d="M${frame.left} ${coord(sy(spec.threshold))}H${frame.right}"/>`;
  let over = 0;
  for (let i = 0; i < spec.x.length; i++) {
    const x = spec.x[i] as number;
    const v = spec.value[i] as number;
    if (!Number.isFinite(x) || !Number.isFinite(v)) continue;
    const line = spec.lines[i] ?? 0;
    const flagged = th.length > 0 && v > spec.threshold;
    if (flagged) over++;
    const tip = `${spec.measure} ${num(v, 4)} at ${spec.xLabel} ${num(x, 5)}${line > 0 ? `, CSV line ${line}` : ''}${spec.binned ? ' (largest in its x cell)' : ''}`;
    const focus = flagged && line > 0 ? ` tabindex="0" role="button" data-line="${line}"` : line > 0 ? ` data-line="${line}"` : '';
    marks +=
      `<path class="kw-stem${flagged ? ' kw-influential' : ''}" d="M${coord(sx(x))} ${coord(sy(0))}V${coord(sy(v))}"/>` +
      `<circle class="kw-point${flagged ? ' kw-influential' : ''}" cx="${coord(sx(x))}" cy="${coord(sy(v))}" r="${flagged ? 3.6 : 2}"${focus}><title>${escapeXml(tip)}</title></circle>`;
  }
  return svgDocument(
    spec.id,
    {
      title: `${spec.measure} against ${spec.xLabel} (df ${spec.df})`,
      desc:
        `${spec.binned ? `Largest ${spec.measure} in each of ${spec.x.length} x cells` : `${spec.measure} of ${spec.x.length} rows`}` +
        (th.length ? `; ${over} point${over === 1 ? '' : 's'} above the threshold ${num(spec.threshold, 3)}.` : '.') +
        reading(spec.reading),
    },
    frame.clipDef + frame.axes + `<g clip-path="${frame.clip}">${marks}</g>`,
  );
}
