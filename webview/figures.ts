/**
 * The panel's figures for one choice of df: every figure of the catalogue
 * (core/view/figureCatalogue.ts), its SVG text parsed as XML and placed in a <figure> with
 * the catalogue's title as caption, or a placeholder while the residual details load.
 */
import { FIGURE_CATALOGUE, type CatalogueFigure, type FigureView } from '../core/view/figureCatalogue';
import type { Selection } from '../core/tune/types';
import type { FitDetail, PanelPayload } from '../core/view/model';
import { el, svgFromText } from './dom';

/** The view the catalogue draws from: the payload's readings and curves at the selected df. */
export function panelFigureView(payload: PanelPayload, selection: Selection, detail: FitDetail | undefined): FigureView {
  return {
    xLabel: payload.source.xLabel,
    yLabel: payload.source.yLabel,
    df: selection.df,
    data: payload.data,
    grid: payload.grid,
    curve: payload.curves.find((c) => c.df === selection.df),
    tuning: { metric: payload.metric, candidates: payload.candidates, rule: selection.rule, threshold: selection.threshold },
    detail,
  };
}

/** What the panel shows in place of a figure it cannot draw yet (undefined: leave the figure out). */
function placeholder(f: CatalogueFigure, v: FigureView): string | undefined {
  switch (f.needs) {
    case 'curve':
      return `No curve was fitted at df ${v.df}.`;
    case 'detail':
      return 'Computing the residual details for this df…';
    case 'tuning':
      return undefined;
  }
}

/** Builds the <figure> elements for the current choice. */
export function renderFigures(payload: PanelPayload, selection: Selection, detail: FitDetail | undefined): HTMLElement[] {
  const v = panelFigureView(payload, selection, detail);
  const out: HTMLElement[] = [];
  for (const f of FIGURE_CATALOGUE) {
    const svg = f.svg(v);
    const waiting = svg === undefined ? placeholder(f, v) : undefined;
    if (svg === undefined && waiting === undefined) continue;
    const body = svg !== undefined ? svgFromText(svg) : el('p', { class: 'kw-placeholder' }, waiting);
    out.push(el('figure', { class: 'kw-figure', id: f.id }, body, el('figcaption', {}, f.title(v)), el('p', { class: 'kw-readout', 'aria-live': 'polite' })));
  }
  return out;
}
