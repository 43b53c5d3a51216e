/**
 * The review report's figures, built by the same core/plots functions as the panel: the
 * readings with the curve and both bands, error against df with the rule's threshold,
 * residuals against x and against fitted values, and the normal quantile plot.
 */
import type { Analysis, Diagnostics } from '../analysisTypes';
import { dataCurveSvg } from '../plots/dataCurve';
import { errorByDfSvg, type ErrorPoint } from '../plots/errorByDf';
import { normalQqSvg } from '../plots/normalQq';
import { residualSvg } from '../plots/residuals';
import { metricLabel } from '../tune/format';
import type { FitResult, XYData } from '../types';
import { cloudOf } from '../view/cloud';
import { fitDetail } from '../view/detail';
import { curveView, evenGrid, PANEL_GRID_POINTS } from '../view/payload';
import { standaloneSvg } from './figureStyle';
import { ruleWords } from '../registry/rules/index';

/** One figure file of the report. */
export interface ReportFigure {
  /** File name, `<stem>.report.<key>.svg`. */
  readonly name: string;
  /** Alt text and caption. */
  readonly caption: string;
  /** Standalone SVG text. */
  readonly svg: string;
}

/** What the figures need. */
export interface FigureInput {
  readonly stem: string;
  /** The rows the fit used, in the order of its per-row arrays. */
  readonly fitted: XYData;
  readonly fit: FitResult;
  readonly analysis?: Analysis | undefined;
  readonly diagnostics: Diagnostics;
  readonly xLabel: string;
  readonly yLabel: string;
  /** First and last x of the table (the curve is drawn over the data range and the table's). */
  readonly tableRange: readonly [number, number];
}

/** Error points of the evaluated candidates for the analysis's metric. */
function errorPoints(analysis: Analysis): ErrorPoint[] {
  const out: ErrorPoint[] = [];
  for (const c of analysis.tune.candidates) {
    const e = c.errors[analysis.tune.metric];
    if (c.skipped === undefined && e) out.push({ df: c.df, mean: e.mean, se: e.se });
  }
  return out;
}

/**
 * The figures, each as a standalone SVG file named after `stem`; the error figure only when
 * the df was tuned. O(n log n) (normal quantiles) plus O(grid) per curve.
 * Example: reportFigures(input).map((f) => f.name) -> ['cal.report.curve.svg', 'cal.report.error.svg', ...].
 */
export function reportFigures(input: FigureInput): ReportFigure[] {
  const { fit, fitted, stem } = input;
  const df = fit.df;
  const name = (key: string): string => `${stem}.report.${key}.svg`;
  const lo = Math.min(fit.curve.lower, input.tableRange[0]);
  const hi = Math.max(fit.curve.upper, input.tableRange[1]);
  const grid = evenGrid(lo, hi, PANEL_GRID_POINTS);
  const detail = fitDetail(fit, fitted, { diagnostics: input.diagnostics });
  const out: ReportFigure[] = [
    {
      name: name('curve'),
      caption: `Readings, fitted curve (df ${df}) with its 95 % confidence band (darker) and 95 % prediction band (lighter)`,
      svg: dataCurveSvg({ id: 'fig-curve', data: cloudOf(fitted.x, fitted.y, fitted.lines), grid: Array.from(grid), curve: curveView(fit, grid), xLabel: input.xLabel, yLabel: input.yLabel }),
    },
  ];
  const a = input.analysis;
  if (a) {
    const sel = a.tune.selected;
    out.push({
      name: name('error'),
      caption: `Resampled ${metricLabel(a.tune.metric)} against df with one-SE bars; the dashed line is the rule's threshold and the larger dot the chosen df ${sel.df} (${ruleWords(sel.rule)})`,
      svg: errorByDfSvg({ id: 'fig-error', points: errorPoints(a), chosenDf: sel.df, threshold: sel.threshold, metricName: metricLabel(a.tune.metric), ruleName: `the ${ruleWords(sel.rule)}` }),
    });
  }
  out.push(
    { name: name('residuals-x'), caption: `Residuals against ${input.xLabel}`, svg: residualSvg({ id: 'fig-resid-x', cloud: detail.residualsVsX, against: input.xLabel, df, kind: detail.residualKind }) },
    { name: name('residuals-fitted'), caption: 'Residuals against fitted values', svg: residualSvg({ id: 'fig-resid-fit', cloud: detail.residualsVsFitted, against: 'fitted value', df, kind: detail.residualKind }) },
    { name: name('normal-quantiles'), caption: 'Normal quantile plot of standardised residuals', svg: normalQqSvg({ id: 'fig-qq', theoretical: detail.qq.theoretical, sample: detail.qq.sample, df }) },
  );
  return out.map((f) => ({ ...f, svg: standaloneSvg(f.svg) }));
}
