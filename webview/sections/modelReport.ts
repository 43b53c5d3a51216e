/**
 * Model report, a folding section: how the fit was made (reweighting, deviance and
 * dispersion, active shape constraints) and the rows a robust fit down-weighted, each
 * opening its CSV line.
 */
import { sig } from '../../core/tune/format';
import { el, replaceChildren } from '../dom';
import { fold } from '../fold';
import { lineCell } from './influence';
import { capitalise, type PanelActions, type Section } from './section';

/** Builds the model report section, open when `open`. */
export function modelReportSection(open: boolean, actions: PanelActions): Section {
  const f = fold('model-report', 'Model report', open, (id, o) => actions.foldToggled(id, o));
  const body = el('div', { id: 'kw-model-body' });
  f.body.append(body);
  return {
    element: f.element,
    show(c) {
      const p = c.payload;
      const intro = el('p', {}, `${capitalise(p.model.words)}.`);
      f.note.textContent = p.model.words;
      const detail = c.detail;
      if (!detail) return replaceChildren(body, intro, el('p', { class: 'kw-muted' }, 'Computing…'));
      const m = detail.model;
      if (!m) return replaceChildren(body, intro, el('p', { class: 'kw-muted' }, 'One weighted least-squares solve: no reweighting, no shape constraints.'));
      const lines = el('ul', { class: 'kw-list', id: 'kw-model-lines' }, ...m.lines.map((l) => el('li', { class: m.converged ? undefined : 'kw-warning' }, l)));
      const parts: Node[] = [intro, lines];
      const rob = m.robust;
      if (rob && rob.rows.length > 0) {
        const table = el(
          'table',
          { class: 'kw-table', id: 'kw-downweighted' },
          el('caption', {}, `${rob.total} row${rob.total === 1 ? '' : 's'} down-weighted${rob.total > rob.rows.length ? `; the ${rob.rows.length} with the lowest weight` : ''}`),
          el('thead', {}, el('tr', {}, ...['CSV line', p.source.xLabel, p.source.yLabel, 'Huber weight'].map((h) => el('th', { scope: 'col' }, h)))),
        );
        const tbody = el('tbody');
        for (const r of rob.rows) tbody.append(el('tr', {}, lineCell(r.line), el('td', {}, sig(r.x, 6)), el('td', {}, sig(r.y, 6)), el('td', {}, sig(r.weight, 3))));
        table.append(tbody);
        parts.push(table);
      }
      replaceChildren(body, ...parts);
    },
  };
}
