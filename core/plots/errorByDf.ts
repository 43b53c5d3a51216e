/**
 * Figure: resampled error against df, with standard-error bars, the rule's threshold and
 * the chosen df marked.
 */
import { plotFrame } from './frame';
import { extent } from './scale';
import { coord, escapeXml, linePath, num, reading, svgDocument } from './svg';

/** One evaluated candidate (skipped candidates are left out by the caller). */
export interface ErrorPoint {
  readonly df: number;
  readonly mean: number;
  /** Standard error of the mean; NaN when there is none (e.g. GCV). */
  readonly se: number;
}

/** Inputs of errorByDfSvg. */
export interface ErrorByDfSpec {
  readonly id: string;
  readonly points: readonly ErrorPoint[];
  readonly chosenDf: number;
  /** Error threshold of the rule (one-SE or tolerance), if it has one. */
  readonly threshold?: number | undefined;
  /** Name of the error measure, e.g. "RMSE". */
  readonly metricName: string;
  /** The rule in words, for the description (e.g. "the one-standard-error rule"). */
  readonly ruleName: string;
  /** How to read the figure, the closing sentences of its description (the figure catalogue's text, core/view/figureCatalogue.ts). */
  readonly reading?: string | undefined;
}

/** SVG text of the error-against-df figure. Example: errorByDfSvg({ id: 'fig-err', points, chosenDf: 5, metricName: 'RMSE', ruleName: 'least-error' }). */
export function errorByDfSvg(spec: ErrorByDfSpec): string {
  const pts = [...spec.points].filter((p) => Number.isFinite(p.mean)).sort((a, b) => a.df - b.df);
  const dfs = pts.map((p) => p.df);
  const lows = pts.map((p) => (Number.isFinite(p.se) ? p.mean - p.se : p.mean));
  const highs = pts.map((p) => (Number.isFinite(p.se) ? p.mean + p.se : p.mean));
  const th = spec.threshold !== undefined && Number.isFinite(spec.threshold) ? [spec.threshold] : [];
  const xDomain: [number, number] = dfs.length ? [Math.min(...dfs) - 0.5, Math.max(...dfs) + 0.5] : [0, 1];
  const integerDf = dfs.every((d) => Number.isInteger(d));
  const frame = plotFrame({
    id: spec.id,
    xDomain,
    yDomain: extent([lows, highs, th], 0.08),
    xLabel: 'df (effective degrees of freedom)',
    yLabel: `mean ${spec.metricName}`,
    ...(integerDf && dfs.length <= 24 ? { xTicks: dfs } : {}),
  });
  const { sx, sy } = frame;
  let marks = `<path class="kw-err-line" d="${linePath(
    dfs.map(sx),
    pts.map((p) => sy(p.mean)),
  )}"/>`;
  for (const p of pts) {
    const x = coord(sx(p.df));
    if (Number.isFinite(p.se) && p.se > 0) {
      marks += `<path class="kw-err-bar" d="M${x} ${coord(sy(p.mean - p.se))}V${coord(sy(p.mean + p.se))}"/>`;
    }
    const chosen = p.df === spec.chosenDf;
    const tip = `df ${num(p.df)}: mean ${spec.metricName} ${num(p.mean, 5)}${Number.isFinite(p.se) ? `, SE ${num(p.se, 3)}` : ''}${chosen ? ' (chosen)' : ''}`;
    marks += `<circle class="kw-err-point${chosen ? ' kw-chosen' : ''}" cx="${x}" cy="${coord(sy(p.mean))}" r="${chosen ? 5.5 : 3.5}" data-df="${num(p.df)}"><title>${escapeXml(tip)}</title></circle>`;
  }
  if (th.length) {
    const y = coord(sy(th[0] as number));
    marks += `<path class="kw-threshold" d="M${frame.left} ${y}H${frame.right}"><title>${escapeXml(`threshold ${num(th[0] as number, 5)}`)}</title></path>`;
  }
  const chosen = pts.find((p) => p.df === spec.chosenDf);
  const best = pts.reduce<ErrorPoint | undefined>((b, p) => (b === undefined || p.mean < b.mean ? p : b), undefined);
  const desc =
    pts.length === 0
      ? 'No candidate could be evaluated.'
      : `Mean ${spec.metricName} of ${pts.length} candidates from df ${num(dfs[0] as number)} to ${num(dfs[dfs.length - 1] as number)}` +
        (best ? `; lowest ${num(best.mean, 4)} at df ${num(best.df)}` : '') +
        (th.length ? `; threshold ${num(th[0] as number, 4)}` : '') +
        (chosen ? `; ${spec.ruleName} chooses df ${num(chosen.df)} (${num(chosen.mean, 4)}).` : '.') +
        reading(spec.reading);
  return svgDocument(spec.id, { title: `Resampled ${spec.metricName} against df`, desc }, frame.clipDef + frame.axes + `<g clip-path="${frame.clip}">${marks}</g>`);
}
