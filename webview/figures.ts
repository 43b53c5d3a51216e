/**
 * The panel's figures for one choice of df, straight from the figure catalogue
 * (core/view/figureCatalogue.ts): each section asks for the figures the catalogue places in
 * it; each SVG text is parsed as XML and placed in a <figure> with the catalogue's title as
 * caption, the values of the mark pointed at beside it (webview/hover.ts), or a placeholder
 * while the residual details load.
 */
import { FIGURE_CATALOGUE, type CatalogueFigure, type FigureKey, type FigureView, type PanelSection } from '../core/view/figureCatalogue';
import type { Selection } from '../core/tune/types';
import type { FitDetail, PanelPayload } from '../core/view/model';
import { el, svgFromText } from './dom';

/** The view the catalogue draws from: the payload's readings and curves at the selected df. */
export function panelFigureView(payload: PanelPayload, selection: Selection, detail: FitDetail | undefined, errorRange: 'decision' | 'all'): FigureView {
  return {
    xLabel: payload.source.xLabel,
    yLabel: payload.source.yLabel,
    df: selection.df,
    data: payload.data,
    grid: payload.grid,
    curve: payload.curves.find((c) => c.df === selection.df),
    tuning: { metric: payload.metric, candidates: payload.candidates, rule: selection.rule, threshold: selection.threshold, tolerancePercent: selection.otherRulesTolerance },
    detail,
    errorRange,
  };
}

/** What the panel shows in place of a figure it cannot draw yet (undefined: leave the figure out). */
function placeholder(f: CatalogueFigure, v: FigureView): string | undefined {
  switch (f.needs) {
    case 'curve':
      return `No curve was fitted at df ${v.df}.`;
    case 'detail':
      // With the details in, a figure without its data (drift in row order, say) is left out.
      return v.detail ? undefined : 'Computing the residual details for this df…';
    case 'tuning':
      return undefined;
  }
}

/** The <figure> of one catalogue entry, or undefined when the view has nothing to show for it. */
export function figureElement(f: CatalogueFigure, v: FigureView): HTMLElement | undefined {
  const svg = f.svg(v);
  const waiting = svg === undefined ? placeholder(f, v) : undefined;
  if (svg === undefined && waiting === undefined) return undefined;
  const body = svg !== undefined ? svgFromText(svg) : el('p', { class: 'kw-placeholder' }, waiting);
  return el(
    'figure',
    { class: 'kw-figure', id: f.id },
    body,
    el('figcaption', {}, f.title(v)),
    // Beside the mark pointed at; the readout below says the same to screen readers.
    el('div', { class: 'kw-tip', 'aria-hidden': 'true', hidden: true }),
    el('p', { class: 'kw-readout', 'aria-live': 'polite' }),
  );
}

/** The <figure> elements the catalogue places in `section`, in its order. */
export function sectionFigures(section: PanelSection, v: FigureView): HTMLElement[] {
  const out: HTMLElement[] = [];
  for (const f of FIGURE_CATALOGUE) {
    if (f.section !== section) continue;
    const e = figureElement(f, v);
    if (e) out.push(e);
  }
  return out;
}

/** The <figure> of the catalogue entry `key` (for a section that places its figures among its controls). */
export function keyedFigure(key: FigureKey, v: FigureView): HTMLElement | undefined {
  const f = FIGURE_CATALOGUE.find((c) => c.key === key);
  if (!f) throw new Error(`no figure ${key} in the catalogue`);
  return figureElement(f, v);
}
