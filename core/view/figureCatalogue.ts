/**
 * The one catalogue of Knotwise's figures, read by the panel (webview/figures.ts) and the
 * review report (core/report/figures.ts): each figure's id, title, how to read it (the
 * closing sentences of its description for screen readers), and a builder from the view
 * model to the input of its SVG builder in core/plots. The panel draws every figure, each in
 * the section of the panel it names; the report draws those marked `inReport`, as
 * `<stem>.report.<key>.svg`.
 */
import { dataCurveSvg, type DataCurveSpec } from '../plots/dataCurve';
import { errorByDfSvg, type ErrorByDfSpec, type ErrorPoint } from '../plots/errorByDf';
import { influenceSvg, type InfluenceSpec } from '../plots/influence';
import { normalQqSvg, type NormalQqSpec } from '../plots/normalQq';
import { residualSvg, type ResidualSpec } from '../plots/residuals';
import { ruleWords } from '../registry/rules/index';
import { metricLabel } from '../tune/format';
import { errorFormat } from '../tune/rules';
import type { CandidateResult, Metric, RuleSpec } from '../tune/types';
import { decisionWindow, type ErrorWindow } from './errorFocus';
import type { Cloud, CurveView, FitDetail } from './model';

/** How the df was tuned, for the error figure. */
export interface FigureTuning {
  readonly metric: Metric;
  /** Every candidate as tuned; skipped ones and those without the metric are left out of the figure. */
  readonly candidates: readonly CandidateResult[];
  /** The rule that chose the df, and its error threshold when it has one. */
  readonly rule: RuleSpec;
  readonly threshold?: number | undefined;
  /** The tolerance the explanation lists the simplest-within rule with (Selection.otherRulesTolerance): it sets the printed digits of the means (errorFormat). */
  readonly tolerancePercent?: number | undefined;
}

/** What the figures of one df are drawn from (labels may come from the CSV; the SVG builders escape them). */
export interface FigureView {
  readonly xLabel: string;
  readonly yLabel: string;
  /** The df the figures show. */
  readonly df: number;
  /** The readings. */
  readonly data: Cloud;
  /** The x grid of `curve`. */
  readonly grid: readonly number[];
  /** The curve of `df` with both bands on `grid`; undefined when df was not fitted. */
  readonly curve: CurveView | undefined;
  /** The tuning; undefined for a df given outright (no error figure then). */
  readonly tuning: FigureTuning | undefined;
  /** Residual details of `df`; undefined while the panel waits for them. */
  readonly detail: FitDetail | undefined;
  /**
   * What the error figure shows: every candidate ('all', the default) or the window around
   * the decision ('decision', core/view/errorFocus.ts; the panel starts there).
   */
  readonly errorRange?: 'decision' | 'all' | undefined;
}

/**
 * Where the panel shows a figure: beside the answer (the curve and the error figure, with
 * the controls that change them), or in the folding section of residual checks or of
 * influential rows.
 */
export type PanelSection = 'decision' | 'residual-checks' | 'influential-rows';

/** Report file keys of the figures (`<stem>.report.<key>.svg`), also their names in code. */
export type FigureKey = 'curve' | 'error' | 'residuals-x' | 'residuals-fitted' | 'row-order' | 'normal-quantiles' | 'cooks' | 'leverage';

/** One figure of the catalogue. */
export interface CatalogueFigure {
  readonly key: FigureKey;
  /** Element id in the panel and id of the SVG (its title, description and clip ids derive from it). */
  readonly id: string;
  /** Part of `v` the figure is drawn from; without it there is no figure. */
  readonly needs: 'curve' | 'tuning' | 'detail';
  /** True when the review report draws it too. */
  readonly inReport: boolean;
  /** The panel's section that shows it. */
  readonly section: PanelSection;
  /** The caption: under the figure in the panel, alt text and caption in the report. */
  title(v: FigureView): string;
  /** How to read the figure, in a sentence or two: ends the SVG's description, for screen readers. */
  readonly description: string;
  /** The input of the figure's SVG builder, or undefined when `v` lacks what it needs. */
  input(v: FigureView): unknown;
  /** The figure's SVG text, or undefined when `v` lacks what it needs. */
  svg(v: FigureView): string | undefined;
}

/** A catalogue entry before its builder's input type is hidden. */
interface FigureDefinition<S> extends Omit<CatalogueFigure, 'input' | 'svg'> {
  input(v: FigureView): S | undefined;
  draw(spec: S): string;
}

function define<S>(d: FigureDefinition<S>): CatalogueFigure {
  const { draw, ...rest } = d;
  return {
    ...rest,
    svg(v) {
      const spec = d.input(v);
      return spec === undefined ? undefined : draw(spec);
    },
  };
}

/** The error points of the evaluated candidates for `metric` (skipped candidates left out). O(candidates). */
export function errorPoints(candidates: readonly CandidateResult[], metric: Metric): ErrorPoint[] {
  const out: ErrorPoint[] = [];
  for (const c of candidates) {
    const e = c.errors[metric];
    if (c.skipped === undefined && e) out.push({ df: c.df, mean: e.mean, se: e.se });
  }
  return out;
}

const hasThreshold = (t: FigureTuning): boolean => t.threshold !== undefined && Number.isFinite(t.threshold);

/**
 * The window the error figure shows for `v`: the one around the decision when `v` asks for
 * it and zooming in changes anything, else undefined (every candidate). O(candidates).
 */
export function errorWindowOf(v: FigureView): ErrorWindow | undefined {
  const t = v.tuning;
  if (!t || v.errorRange !== 'decision') return undefined;
  return decisionWindow(errorPoints(t.candidates, t.metric), v.df, t.threshold);
}
const residualName = (v: FigureView): string => (v.detail?.residualKind === 'deviance' ? 'Deviance residuals' : 'Residuals');
const CURVE_READING = 'The narrow shaded band is the 95 % confidence band of the mean curve, the wide one the 95 % prediction band for a new reading.';
const ERROR_READING = 'Bars show one standard error.';
const RESIDUAL_READING = 'Without structure they scatter evenly around the zero line.';
const ROW_ORDER_READING = 'A drift up or down along the file, or long runs on one side of the zero line, means the readings changed while they were taken.';
const QQ_READING = 'Points near the diagonal line mean roughly normal residuals; bends at the ends mean heavy or light tails.';
const INFLUENCE_READING = 'Marked points are over the threshold; select one, or press Enter on it, to open its line in the CSV.';

const curve = define<DataCurveSpec>({
  key: 'curve',
  id: 'fig-data',
  needs: 'curve',
  inReport: true,
  section: 'decision',
  title: (v) => (v.curve ? `Readings, fitted curve (df ${v.df}), 95 % confidence band (darker) and 95 % prediction band (lighter)` : 'Readings and fitted curve'),
  description: CURVE_READING,
  input: (v) => (v.curve ? { id: 'fig-data', data: v.data, grid: v.grid, curve: v.curve, xLabel: v.xLabel, yLabel: v.yLabel, reading: CURVE_READING } : undefined),
  draw: dataCurveSvg,
});

const error = define<ErrorByDfSpec>({
  key: 'error',
  id: 'fig-error',
  needs: 'tuning',
  inReport: true,
  section: 'decision',
  title(v) {
    const t = v.tuning;
    if (!t) return 'Resampled error against df';
    const bars = errorPoints(t.candidates, t.metric).some((p) => Number.isFinite(p.se) && p.se > 0);
    const w = errorWindowOf(v);
    return (
      `Resampled ${metricLabel(t.metric)} against df${bars ? ' with one-SE bars' : ''}` +
      `${hasThreshold(t) ? "; the dashed line is the rule's threshold" : ''}; the larger dot is the chosen df ${v.df} (${ruleWords(t.rule)})` +
      (w ? `; df ${w.df[0]} to ${w.df[1]}, around the decision` : '')
    );
  },
  description: ERROR_READING,
  input(v) {
    const t = v.tuning;
    if (!t) return undefined;
    const metricName = metricLabel(t.metric);
    return {
      id: 'fig-error',
      points: errorPoints(t.candidates, t.metric),
      chosenDf: v.df,
      threshold: t.threshold,
      metricName,
      ruleName: `the ${ruleWords(t.rule)}`,
      reading: ERROR_READING,
      window: errorWindowOf(v),
      format: errorFormat(t.candidates, t.metric, t.tolerancePercent),
    };
  },
  draw: errorByDfSvg,
});

const residualsX = define<ResidualSpec>({
  key: 'residuals-x',
  id: 'fig-resid-x',
  needs: 'detail',
  inReport: true,
  section: 'residual-checks',
  title: (v) => `${residualName(v)} against ${v.xLabel}`,
  description: RESIDUAL_READING,
  input: (v) => (v.detail ? { id: 'fig-resid-x', cloud: v.detail.residualsVsX, against: v.xLabel, df: v.df, kind: v.detail.residualKind, reading: RESIDUAL_READING } : undefined),
  draw: residualSvg,
});

const residualsFitted = define<ResidualSpec>({
  key: 'residuals-fitted',
  id: 'fig-resid-fit',
  needs: 'detail',
  inReport: true,
  section: 'residual-checks',
  title: (v) => `${residualName(v)} against fitted values`,
  description: RESIDUAL_READING,
  input: (v) => (v.detail ? { id: 'fig-resid-fit', cloud: v.detail.residualsVsFitted, against: 'fitted value', df: v.df, kind: v.detail.residualKind, reading: RESIDUAL_READING } : undefined),
  draw: residualSvg,
});

/** The residuals in the order of the file, when the checks computed them and the rows are not simply in x order (then residuals against x show the same). */
function rowOrderCloud(v: FigureView): Cloud | undefined {
  const r = v.detail?.rowOrder;
  if (!r || r.sameAsX) return undefined;
  return { kind: 'points', x: r.row, y: r.residual, lines: r.line };
}

const rowOrder = define<ResidualSpec>({
  key: 'row-order',
  id: 'fig-row-order',
  needs: 'detail',
  inReport: false,
  section: 'residual-checks',
  title: (v) => {
    const size = v.detail?.rowOrder?.blockSize ?? 1;
    return `${residualName(v)} in the order of the rows in the file${size > 1 ? ` (each point the mean of ${size} rows)` : ''}`;
  },
  description: ROW_ORDER_READING,
  input(v) {
    const cloud = rowOrderCloud(v);
    if (!v.detail || !cloud) return undefined;
    return { id: 'fig-row-order', cloud, against: 'row in the file', df: v.df, kind: v.detail.residualKind, reading: ROW_ORDER_READING };
  },
  draw: residualSvg,
});

const normalQuantiles = define<NormalQqSpec>({
  key: 'normal-quantiles',
  id: 'fig-qq',
  needs: 'detail',
  inReport: true,
  section: 'residual-checks',
  title: () => 'Normal quantile plot of standardised residuals',
  description: QQ_READING,
  input: (v) => (v.detail ? { id: 'fig-qq', theoretical: v.detail.qq.theoretical, sample: v.detail.qq.sample, df: v.df, reading: QQ_READING } : undefined),
  draw: normalQqSvg,
});

const cooks = define<InfluenceSpec>({
  key: 'cooks',
  id: 'fig-cooks',
  needs: 'detail',
  inReport: false,
  section: 'influential-rows',
  title: (v) => (v.detail ? `Cook's distance (threshold ${v.detail.cooksThreshold.toPrecision(3)}); select a marked point to open its line` : "Cook's distance"),
  description: INFLUENCE_READING,
  input(v) {
    const d = v.detail;
    if (!d) return undefined;
    return {
      id: 'fig-cooks',
      measure: "Cook's distance",
      x: d.cooks.x,
      value: d.cooks.d,
      lines: d.cooks.lines,
      binned: d.cooks.binned,
      threshold: d.cooksThreshold,
      xLabel: v.xLabel,
      df: v.df,
      reading: INFLUENCE_READING,
    };
  },
  draw: influenceSvg,
});

const leverage = define<InfluenceSpec>({
  key: 'leverage',
  id: 'fig-leverage',
  needs: 'detail',
  inReport: false,
  section: 'influential-rows',
  title: (v) => (v.detail ? `Leverage (threshold ${v.detail.leverageThreshold.toPrecision(3)})` : 'Leverage'),
  description: INFLUENCE_READING,
  input(v) {
    const d = v.detail;
    if (!d) return undefined;
    return {
      id: 'fig-leverage',
      measure: 'leverage',
      x: d.leverage.x,
      value: d.leverage.h,
      lines: d.leverage.lines,
      binned: d.leverage.binned,
      threshold: d.leverageThreshold,
      xLabel: v.xLabel,
      df: v.df,
      reading: INFLUENCE_READING,
    };
  },
  draw: influenceSvg,
});

/** Every figure, in the order the panel and the report show them. */
export const FIGURE_CATALOGUE: readonly CatalogueFigure[] = [curve, error, residualsX, residualsFitted, rowOrder, normalQuantiles, cooks, leverage];
