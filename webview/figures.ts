/**
 * The panel's figures for one choice of df: SVG text from core/plots, parsed as XML and
 * placed in <figure> elements with captions.
 */
import { dataCurveSvg } from '../core/plots/dataCurve';
import { errorByDfSvg, type ErrorPoint } from '../core/plots/errorByDf';
import { influenceSvg } from '../core/plots/influence';
import { normalQqSvg } from '../core/plots/normalQq';
import { residualSvg } from '../core/plots/residuals';
import type { FitDetail, PanelPayload } from '../core/protocol';
import { metricLabel } from '../core/tune/format';
import type { Selection } from '../core/tune/types';
import { el, svgFromText } from './dom';
import { ruleWords } from '../core/registry/rules/index';

/** One figure: an id, a caption and its SVG text (or a placeholder text while details load). */
interface FigureSpec {
  readonly id: string;
  readonly caption: string;
  readonly svg?: string;
  readonly placeholder?: string;
}

/** The error points of a payload's evaluated candidates for its metric. */
export function errorPoints(payload: PanelPayload): ErrorPoint[] {
  const out: ErrorPoint[] = [];
  for (const c of payload.candidates) {
    const e = c.errors[payload.metric];
    if (c.skipped === undefined && e) out.push({ df: c.df, mean: e.mean, se: e.se });
  }
  return out;
}

function figureSpecs(payload: PanelPayload, selection: Selection, detail: FitDetail | undefined): FigureSpec[] {
  const { xLabel, yLabel } = payload.source;
  const df = selection.df;
  const curve = payload.curves.find((c) => c.df === df);
  const waiting = 'Computing the residual details for this df…';
  const specs: FigureSpec[] = [
    curve
      ? { id: 'fig-data', caption: `Readings, fitted curve (df ${df}) and 95 % bands`, svg: dataCurveSvg({ id: 'fig-data', data: payload.data, grid: payload.grid, curve, xLabel, yLabel }) }
      : { id: 'fig-data', caption: 'Readings and fitted curve', placeholder: `No curve was fitted at df ${df}.` },
    {
      id: 'fig-error',
      caption: `Resampled ${metricLabel(payload.metric)} against df with one-SE bars; the larger dot is df ${df} (${ruleWords(selection.rule)})`,
      svg: errorByDfSvg({ id: 'fig-error', points: errorPoints(payload), chosenDf: df, threshold: selection.threshold, metricName: metricLabel(payload.metric), ruleName: `the ${ruleWords(selection.rule)}` }),
    },
  ];
  if (!detail) {
    for (const [id, caption] of [
      ['fig-resid-x', `Residuals against ${xLabel}`],
      ['fig-resid-fit', 'Residuals against fitted values'],
      ['fig-qq', 'Normal quantile plot'],
      ['fig-cooks', "Cook's distance"],
      ['fig-leverage', 'Leverage'],
    ] as const) {
      specs.push({ id, caption, placeholder: waiting });
    }
    return specs;
  }
  specs.push(
    { id: 'fig-resid-x', caption: `Residuals against ${xLabel}`, svg: residualSvg({ id: 'fig-resid-x', cloud: detail.residualsVsX, against: xLabel, df, kind: detail.residualKind }) },
    { id: 'fig-resid-fit', caption: 'Residuals against fitted values', svg: residualSvg({ id: 'fig-resid-fit', cloud: detail.residualsVsFitted, against: 'fitted value', df, kind: detail.residualKind }) },
    { id: 'fig-qq', caption: 'Normal quantile plot of standardised residuals', svg: normalQqSvg({ id: 'fig-qq', theoretical: detail.qq.theoretical, sample: detail.qq.sample, df }) },
    {
      id: 'fig-cooks',
      caption: `Cook's distance (threshold ${detail.cooksThreshold.toPrecision(3)}); select a marked point to open its line`,
      svg: influenceSvg({ id: 'fig-cooks', measure: "Cook's distance", x: detail.cooks.x, value: detail.cooks.d, lines: detail.cooks.lines, binned: detail.cooks.binned, threshold: detail.cooksThreshold, xLabel, df }),
    },
    {
      id: 'fig-leverage',
      caption: `Leverage (threshold ${detail.leverageThreshold.toPrecision(3)})`,
      svg: influenceSvg({ id: 'fig-leverage', measure: 'leverage', x: detail.leverage.x, value: detail.leverage.h, lines: detail.leverage.lines, binned: detail.leverage.binned, threshold: detail.leverageThreshold, xLabel, df }),
    },
  );
  return specs;
}

/** Builds the <figure> elements for the current choice. */
export function renderFigures(payload: PanelPayload, selection: Selection, detail: FitDetail | undefined): HTMLElement[] {
  return figureSpecs(payload, selection, detail).map((f) => {
    const body = f.svg !== undefined ? svgFromText(f.svg) : el('p', { class: 'kw-placeholder' }, f.placeholder ?? '');
    return el('figure', { class: 'kw-figure', id: f.id }, body, el('figcaption', {}, f.caption), el('p', { class: 'kw-readout', 'aria-live': 'polite' }));
  });
}
