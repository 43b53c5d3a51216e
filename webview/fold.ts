/**
 * A folding section of details (<details> with a <summary> heading): what the person sees
 * after the answer. Its open state goes to the panel, which keeps it in the webview's
 * saved state, so a new result or a reloaded webview opens the same sections.
 */
import type { FoldId } from '../core/protocol';
import { el } from './dom';

/** A folding section: its element, the note beside its title and its body. */
export interface Fold {
  readonly element: HTMLDetailsElement;
  /** Short text beside the title (a count, a warning); empty hides it. */
  readonly note: HTMLElement;
  readonly body: HTMLElement;
}

/**
 * Builds a folding section `kw-fold-<id>` titled `title`, open when `open`; `onToggle`
 * hears every change of its open state (by click, keyboard or script).
 */
export function fold(id: FoldId, title: string, open: boolean, onToggle: (id: FoldId, open: boolean) => void): Fold {
  const note = el('span', { class: 'kw-fold-note', id: `kw-fold-${id}-note` });
  const body = el('div', { class: 'kw-fold-body', id: `kw-fold-${id}-body` });
  const element = el('details', { class: 'kw-fold', id: `kw-fold-${id}`, 'data-fold': id, open }, el('summary', {}, el('h2', { id: `kw-fold-${id}-title` }, title), note), body);
  element.addEventListener('toggle', () => onToggle(id, element.open));
  return { element, note, body };
}
