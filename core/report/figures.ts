/**
 * The review report's figures: the figures of the catalogue (core/view/figureCatalogue.ts)
 * marked for the report, drawn by the same core/plots builders as the panel from the same
 * view model (readings, curve with both bands, error against df with the rule's threshold,
 * residuals against x and against fitted values, the normal quantile plot), each as a
 * standalone SVG file.
 */
import type { Analysis, Diagnostics } from '../analysis/types';
import type { FitResult, XYData } from '../types';
import { cloudOf } from '../view/cloud';
import { fitDetail } from '../view/detail';
import { FIGURE_CATALOGUE, type FigureView } from '../view/figureCatalogue';
import { curveView, evenGrid, PANEL_GRID_POINTS } from '../view/payload';
import { standaloneSvg } from './figureStyle';
import type { CurveSample, Drift } from '../calibrate/drift';
import { driftSvg } from '../plots/drift';

/** One figure file of the report. */
export interface ReportFigure {
  /** File name, `<stem>.report.<key>.svg`. */
  readonly name: string;
  /** Caption, also the image's alt text. */
  readonly caption: string;
  /** How to read the figure (the catalogue's description), for the alt text beside the caption. */
  readonly description: string;
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

/**
 * The figures, each as a standalone SVG file named after `stem`; the error figure only when
 * the df was tuned. O(n log n) (normal quantiles) plus O(grid) per curve.
 * Example: reportFigures(input).map((f) => f.name) -> ['cal.report.curve.svg', 'cal.report.error.svg', ...].
 */
export function reportFigures(input: FigureInput): ReportFigure[] {
  const { fit, fitted, stem } = input;
  const lo = Math.min(fit.curve.lower, input.tableRange[0]);
  const hi = Math.max(fit.curve.upper, input.tableRange[1]);
  const grid = evenGrid(lo, hi, PANEL_GRID_POINTS);
  const sel = input.analysis?.tune.selected;
  const view: FigureView = {
    xLabel: input.xLabel,
    yLabel: input.yLabel,
    df: fit.df,
    data: cloudOf(fitted.x, fitted.y, fitted.lines),
    grid: Array.from(grid),
    curve: curveView(fit, grid),
    tuning:
      input.analysis && sel
        ? { metric: input.analysis.tune.metric, candidates: input.analysis.tune.candidates, rule: sel.rule, threshold: sel.threshold, tolerancePercent: sel.otherRulesTolerance }
        : undefined,
    detail: fitDetail(fit, fitted, { diagnostics: input.diagnostics }),
  };
  const out: ReportFigure[] = [];
  for (const f of FIGURE_CATALOGUE) {
    if (!f.inReport) continue;
    const svg = f.svg(view);
    if (svg !== undefined) out.push({ name: `${stem}.report.${f.key}.svg`, caption: f.title(view), description: f.description, svg: standaloneSvg(svg) });
  }
  return out;
}

/** How to read the drift figure (the panel shows the same text under it). */
export const DRIFT_READING =
  'The dashed line and the lighter band are the curve the fit record held and its 95 % band; the solid line and the darker band are the new curve and its band. The ring marks where they differ most relative to their combined standard error.';

/**
 * The drift figure of the report, `<stem>.report.drift.svg`: the baseline curve and the new
 * one with their bands (core/plots/drift.ts). O(sample points).
 */
export function reportDriftFigure(stem: string, recorded: CurveSample, current: CurveSample, drift: Drift, labels: { readonly x: string; readonly y: string }): ReportFigure {
  const svg = driftSvg({ id: 'kw-fig-drift', recorded, current, drift, xLabel: labels.x, yLabel: labels.y, reading: DRIFT_READING });
  return { name: `${stem}.report.drift.svg`, caption: 'The new curve over the recorded one, each with its 95 % band', description: DRIFT_READING, svg: standaloneSvg(svg) };
}
