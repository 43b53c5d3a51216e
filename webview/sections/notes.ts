/**
 * Notes, a folding section: what the tuning and the fit noted (tied knots moved, candidates
 * skipped, ...).
 */
import { el, replaceChildren } from '../dom';
import { fold } from '../fold';
import type { PanelActions, Section } from './section';

/** Builds the notes section, open when `open`. */
export function notesSection(open: boolean, actions: PanelActions): Section {
  const f = fold('notes', 'Notes', open, (id, o) => actions.foldToggled(id, o));
  const list = el('ul', { id: 'kw-note-list', class: 'kw-list' });
  f.body.append(list);
  return {
    element: f.element,
    show(c) {
      const notes = [...c.payload.notes, ...(c.detail?.notes ?? [])];
      replaceChildren(list, ...(notes.length ? notes.map((n) => el('li', {}, n)) : [el('li', { class: 'kw-muted' }, 'No notes.')]));
      f.note.textContent = `${notes.length} note${notes.length === 1 ? '' : 's'}`;
    },
  };
}
