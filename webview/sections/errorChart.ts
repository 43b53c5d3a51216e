/**
 * The error-against-df figure, first zoomed on the decision (the window of
 * core/view/errorFocus.ts) with a box that shows every candidate, and beside it the rule
 * controls that move the decision.
 */
import { errorWindowOf } from '../../core/view/figureCatalogue';
import type { PanelPayload } from '../../core/view/model';
import { ruleControls } from '../controls/ruleControls';
import { el, replaceChildren } from '../dom';
import { keyedFigure } from '../figures';
import type { PanelActions, Section } from './section';

/** Builds the error figure's section of payload `p`. */
export function errorSection(p: PanelPayload, actions: PanelActions): Section {
  const slot = el('div', { class: 'kw-error-figure' });
  const all = el('input', { type: 'checkbox', id: 'kw-error-all' });
  all.addEventListener('change', () => actions.setErrorRange(all.checked ? 'all' : 'decision'));
  const toggle = el('div', { class: 'kw-check-item kw-range-toggle' }, all, el('label', { for: 'kw-error-all' }, 'Show all candidates'));
  const rules = ruleControls(p, actions);
  const element = el(
    'section',
    { class: 'kw-error-section', id: 'kw-error-section', 'aria-label': 'Resampled error against df, and how the df is chosen' },
    el('div', { class: 'kw-error-main' }, slot, toggle),
    rules.element,
  );
  return {
    element,
    show(c) {
      replaceChildren(slot, keyedFigure('error', c.view));
      all.checked = c.view.errorRange === 'all';
      // The box is offered only where zooming in shows something other than the whole range.
      toggle.hidden = errorWindowOf({ ...c.view, errorRange: 'decision' }) === undefined;
      rules.show(c);
    },
  };
}
