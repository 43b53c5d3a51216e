/**
 * Figure: resampled error against df, with standard-error bars, the rule's threshold and
 * the chosen df marked; either every candidate or a window around the decision
 * (core/view/errorFocus.ts), where candidates whose mean lies outside the window's error
 * range are marked at its edge.
 */
import type { ErrorWindow } from '../view/errorFocus';
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
  /** Show only this window (df range and error range); default every candidate. */
  readonly window?: ErrorWindow | undefined;
  /**
   * How a mean error or the threshold prints in the hover texts and the description: the
   * tuning's one printer (core/tune/rules.ts errorFormat), so the figure reads as the
   * explanation and the candidates table; default 5 significant digits.
   */
  readonly format?: ((value: number) => string) | undefined;
}

/** Half the side of the triangle that marks a mean outside the window's error range. */
const EDGE_MARK = 5;

/** SVG text of the error-against-df figure. Example: errorByDfSvg({ id: 'fig-err', points, chosenDf: 5, metricName: 'RMSE', ruleName: 'least-error' }). */
export function errorByDfSvg(spec: ErrorByDfSpec): string {
  const all = [...spec.points].filter((p) => Number.isFinite(p.mean)).sort((a, b) => a.df - b.df);
  const win = spec.window;
  // The candidates drawn as points: all of them, or those inside the window's df range.
  const pts = win ? all.filter((p) => p.df >= win.df[0] && p.df <= win.df[1]) : all;
  const dfs = pts.map((p) => p.df);
  const lows = pts.map((p) => (Number.isFinite(p.se) ? p.mean - p.se : p.mean));
  const highs = pts.map((p) => (Number.isFinite(p.se) ? p.mean + p.se : p.mean));
  const th = spec.threshold !== undefined && Number.isFinite(spec.threshold) ? [spec.threshold] : [];
  const xDomain: [number, number] = dfs.length ? [Math.min(...dfs) - 0.5, Math.max(...dfs) + 0.5] : [0, 1];
  const yDomain: [number, number] = win ? [win.error[0], win.error[1]] : extent([lows, highs, th], 0.08);
  const integerDf = dfs.every((d) => Number.isInteger(d));
  const frame = plotFrame({
    id: spec.id,
    xDomain,
    yDomain,
    xLabel: 'df (effective degrees of freedom)',
    yLabel: `mean ${spec.metricName}`,
    ...(integerDf && dfs.length <= 24 ? { xTicks: dfs } : {}),
  });
  const { sx, sy } = frame;
  const fmt = spec.format ?? ((v: number): string => num(v, 5));
  // The line runs through every candidate; the clip keeps the part inside the window.
  let marks = `<path class="kw-err-line" d="${linePath(
    all.map((p) => sx(p.df)),
    all.map((p) => sy(p.mean)),
  )}"/>`;
  let outside = 0;
  for (const p of pts) {
    const x = coord(sx(p.df));
    const chosen = p.df === spec.chosenDf;
    const tip = `df ${num(p.df)}: mean ${spec.metricName} ${fmt(p.mean)}${Number.isFinite(p.se) ? `, SE ${num(p.se, 3)}` : ''}${chosen ? ' (chosen)' : ''}`;
    const above = p.mean > yDomain[1];
    if (above || p.mean < yDomain[0]) {
      // A mean beyond the window's error range: a triangle at the edge, pointing the way it lies.
      outside++;
      const edge = above ? frame.top : frame.bottom;
      const baseY = above ? edge + 2 * EDGE_MARK : edge - 2 * EDGE_MARK;
      const d = `M${x} ${coord(edge)}L${coord(sx(p.df) - EDGE_MARK)} ${coord(baseY)}L${coord(sx(p.df) + EDGE_MARK)} ${coord(baseY)}Z`;
      const where = above ? 'above' : 'below';
      marks += `<path class="kw-err-point kw-off-scale${chosen ? ' kw-chosen' : ''}" d="${d}" data-df="${num(p.df)}"><title>${escapeXml(`${tip}, ${where} the range shown`)}</title></path>`;
      continue;
    }
    if (Number.isFinite(p.se) && p.se > 0) {
      marks += `<path class="kw-err-bar" d="M${x} ${coord(sy(p.mean - p.se))}V${coord(sy(p.mean + p.se))}"/>`;
    }
    marks += `<circle class="kw-err-point${chosen ? ' kw-chosen' : ''}" cx="${x}" cy="${coord(sy(p.mean))}" r="${chosen ? 5.5 : 3.5}" data-df="${num(p.df)}"><title>${escapeXml(tip)}</title></circle>`;
  }
  if (th.length) {
    const y = coord(sy(th[0] as number));
    marks += `<path class="kw-threshold" d="M${frame.left} ${y}H${frame.right}"><title>${escapeXml(`threshold ${fmt(th[0] as number)}`)}</title></path>`;
  }
  const chosen = all.find((p) => p.df === spec.chosenDf);
  const best = all.reduce<ErrorPoint | undefined>((b, p) => (b === undefined || p.mean < b.mean ? p : b), undefined);
  const left = all.length - pts.length;
  const shown =
    win && pts.length > 0
      ? ` Shown: df ${num(dfs[0] as number)} to ${num(dfs[dfs.length - 1] as number)}, mean ${spec.metricName} from ${num(yDomain[0], 4)} to ${num(yDomain[1], 4)}, around the decision` +
        (left ? `; ${left} other candidate${left === 1 ? ' is' : 's are'} left out of this view` : '') +
        (outside ? `; ${outside} mean${outside === 1 ? ' lies' : 's lie'} outside the range and ${outside === 1 ? 'is' : 'are'} marked at its edge` : '') +
        '.'
      : '';
  const desc =
    all.length === 0
      ? 'No candidate could be evaluated.'
      : `Mean ${spec.metricName} of ${all.length} candidates from df ${num(all[0]?.df as number)} to ${num(all[all.length - 1]?.df as number)}` +
        (best ? `; lowest ${fmt(best.mean)} at df ${num(best.df)}` : '') +
        (th.length ? `; threshold ${fmt(th[0] as number)}` : '') +
        (chosen ? `; ${spec.ruleName} chooses df ${num(chosen.df)} (${fmt(chosen.mean)}).` : '.') +
        shown +
        reading(spec.reading);
  return svgDocument(spec.id, { title: `Resampled ${spec.metricName} against df`, desc }, frame.clipDef + frame.axes + `<g clip-path="${frame.clip}">${marks}</g>`);
}
