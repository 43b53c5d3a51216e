/**
 * Candidates, a folding section: every candidate df with its resampled error (mean and
 * standard error), information criteria and status, the chosen one marked.
 */
import { metricLabel, sig } from '../../core/tune/format';
import { errorFormat } from '../../core/tune/rules';
import { el, replaceChildren } from '../dom';
import { fold } from '../fold';
import type { PanelActions, Section } from './section';

/** Builds the candidates section, open when `open`. */
export function candidatesSection(open: boolean, actions: PanelActions): Section {
  const f = fold('candidates', 'Candidates', open, (id, o) => actions.foldToggled(id, o));
  const body = el('div', { id: 'kw-candidate-body' });
  f.body.append(body);
  return {
    element: f.element,
    show(c) {
      const p = c.payload;
      const name = metricLabel(p.metric);
      // Means printed as the explanation prints them (at the tolerance it lists the simplest-within rule with).
      const mean = errorFormat(p.candidates, p.metric, c.selection.otherRulesTolerance);
      const table = el(
        'table',
        { class: 'kw-table' },
        el('caption', {}, `Every candidate df with its resampled ${name} (mean ± standard error) and information criteria`),
        el('thead', {}, el('tr', {}, ...['df', `mean ${name}`, 'SE', 'AIC', 'BIC', 'status'].map((h) => el('th', { scope: 'col' }, h)))),
      );
      const tbody = el('tbody');
      for (const k of p.candidates) {
        const e = k.errors[p.metric];
        const chosen = k.df === c.selection.df;
        tbody.append(
          el(
            'tr',
            { class: chosen ? 'kw-chosen-row' : undefined, 'aria-current': chosen ? 'true' : undefined },
            el('td', {}, String(k.df)),
            el('td', {}, e ? mean(e.mean) : '–'),
            el('td', {}, e && Number.isFinite(e.se) ? sig(e.se, 2) : '–'),
            el('td', {}, k.aic !== undefined ? sig(k.aic, 5) : '–'),
            el('td', {}, k.bic !== undefined ? sig(k.bic, 5) : '–'),
            el('td', {}, k.skipped !== undefined ? `skipped: ${k.skipped}` : chosen ? 'chosen' : ''),
          ),
        );
      }
      table.append(tbody);
      replaceChildren(body, table);
      const evaluated = p.candidates.filter((k) => k.skipped === undefined).length;
      f.note.textContent = `${evaluated} of ${p.candidates.length} evaluated, df ${c.selection.df} chosen`;
    },
  };
}
