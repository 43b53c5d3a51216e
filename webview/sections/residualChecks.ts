/**
 * Residual checks, a folding section: the warnings of the choice, each check's statistic
 * and verdict, and the residual figures the catalogue places here.
 */
import { el, replaceChildren } from '../dom';
import { fold } from '../fold';
import { sectionFigures } from '../figures';
import { warningsOf } from './answer';
import type { PanelActions, Section } from './section';

/** Builds the residual checks section, open when `open`. */
export function residualChecksSection(open: boolean, actions: PanelActions): Section {
  const f = fold('residual-checks', 'Residual checks', open, (id, o) => actions.foldToggled(id, o));
  const warnings = el('ul', { id: 'kw-warning-list', class: 'kw-list' });
  const checks = el('ul', { id: 'kw-check-list', class: 'kw-list' });
  const figures = el('div', { class: 'kw-figures', id: 'kw-figures' });
  f.body.append(warnings, checks, figures);
  return {
    element: f.element,
    show(c) {
      const w = warningsOf(c);
      replaceChildren(warnings, ...(w.length ? w.map((t) => el('li', { class: 'kw-warning' }, t)) : [el('li', { class: 'kw-muted' }, 'No warnings for this df.')]));
      const list = c.detail?.checks ?? [];
      replaceChildren(checks, ...list.map((k) => el('li', { class: k.flagged ? 'kw-check kw-flagged' : 'kw-check' }, el('strong', {}, `${k.name}: `), k.text)));
      replaceChildren(figures, ...sectionFigures('residual-checks', c.view));
      const flagged = list.filter((k) => k.flagged).length;
      f.note.textContent = !c.detail
        ? 'computing…'
        : [w.length ? `${w.length} warning${w.length === 1 ? '' : 's'}` : 'no warnings', list.length ? `${flagged} of ${list.length} checks flag a problem` : ''].filter((t) => t !== '').join(', ');
      f.note.classList.toggle('kw-warning', w.length > 0);
    },
  };
}
