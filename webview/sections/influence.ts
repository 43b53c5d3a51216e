/**
 * Influential rows, a folding section: the influence figures the catalogue places here and
 * the rows over a threshold, each opening its CSV line: the first ten, and every listed row
 * on request (a toggle the panel remembers); rows beyond the listed ones are counted, and
 * the fit record lists them all.
 */
import { sig } from '../../core/tune/format';
import type { FitDetail, PanelPayload } from '../../core/view/model';
import { el, replaceChildren } from '../dom';
import { fold } from '../fold';
import { sectionFigures } from '../figures';
import type { PanelActions, Section } from './section';

/** A table cell with a button that reveals a CSV line (handled by the panel's data-line click), or a dash. */
export function lineCell(line: number): HTMLElement {
  return el('td', {}, line > 0 ? el('button', { type: 'button', class: 'kw-link', 'data-line': line, title: `Show line ${line} in the CSV` }, `line ${line}`) : '–');
}

/** Builds the influential rows section, open when `open`. */
export function influenceSection(open: boolean, actions: PanelActions): Section {
  const f = fold('influential-rows', 'Influential rows', open, (id, o) => actions.foldToggled(id, o));
  const figures = el('div', { class: 'kw-figures' });
  const body = el('div', { id: 'kw-influence-body' });
  f.body.append(body, figures);
  return {
    element: f.element,
    show(c) {
      replaceChildren(body, ...influenceTable(c.payload, c.detail, c.allInfluential, (all) => actions.setAllInfluential(all)));
      replaceChildren(figures, ...sectionFigures('influential-rows', c.view));
      f.note.textContent = c.detail ? `${c.detail.influentialTotal} row${c.detail.influentialTotal === 1 ? '' : 's'} over a threshold` : 'computing…';
    },
  };
}

/** The table of influential rows (the first `influentialShown`, or every listed one when `all`), the toggle between the two, and what is not listed. */
function influenceTable(p: PanelPayload, detail: FitDetail | undefined, all: boolean, setAll: (all: boolean) => void): HTMLElement[] {
  if (!detail) return [el('p', { class: 'kw-muted' }, 'Computing…')];
  if (detail.influential.length === 0) return [el('p', { class: 'kw-muted' }, 'No row exceeds the leverage or Cook\u2019s distance threshold.')];
  const listed = detail.influential.length;
  const total = detail.influentialTotal;
  const first = Math.min(detail.influentialShown, listed);
  const rows = all ? detail.influential : detail.influential.slice(0, first);
  // The studentized residual is shown when the details carry it (the outlier test's measure).
  const studentized = detail.influential.some((r) => r.studentized !== undefined);
  const table = el(
    'table',
    { class: 'kw-table' },
    el(
      'caption',
      {},
      `${total} row${total === 1 ? '' : 's'} over a threshold${total > rows.length ? `; the ${rows.length} furthest past one are listed here` : ''}` +
        `: Cook's distance over ${sig(detail.cooksThreshold, 3)}, leverage over ${sig(detail.leverageThreshold, 3)}` +
        (detail.outlierThreshold !== undefined ? `, |studentized residual| over ${sig(detail.outlierThreshold, 3)}` : ''),
    ),
    el(
      'thead',
      {},
      el('tr', {}, ...['CSV line', p.source.xLabel, p.source.yLabel, "Cook's distance", 'leverage', ...(studentized ? ['studentized residual'] : []), 'why'].map((h) => el('th', { scope: 'col' }, h))),
    ),
  );
  const tbody = el('tbody');
  for (const r of rows) {
    tbody.append(
      el(
        'tr',
        {},
        lineCell(r.line),
        el('td', {}, sig(r.x, 6)),
        el('td', {}, sig(r.y, 6)),
        el('td', {}, sig(r.cooksDistance, 3)),
        el('td', {}, sig(r.leverage, 3)),
        studentized ? el('td', {}, r.studentized !== undefined ? sig(r.studentized, 3) : '–') : null,
        el('td', {}, r.exceeds.join('; ')),
      ),
    );
  }
  table.append(tbody);
  const out: HTMLElement[] = [table];
  if (listed > first) {
    const toggle = el(
      'button',
      { type: 'button', id: 'kw-influence-all', class: 'kw-link', 'aria-expanded': all ? 'true' : 'false', 'aria-controls': 'kw-influence-body' },
      all ? `Show the first ${first}` : total > listed ? `Show the first ${listed}` : `Show all ${total}`,
    );
    toggle.addEventListener('click', () => setAll(!all));
    out.push(el('p', { class: 'kw-influence-more' }, toggle));
  }
  if (total > listed && (all || listed === first)) {
    const rest = total - listed;
    out.push(
      el(
        'p',
        { id: 'kw-influence-unlisted', class: 'kw-muted' },
        `${rest} more row${rest === 1 ? '' : 's'} over a threshold ${rest === 1 ? 'is' : 'are'} not listed here; the fit record lists them all.`,
      ),
    );
  }
  return out;
}
