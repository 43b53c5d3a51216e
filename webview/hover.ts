/**
 * Pointing at a mark of a figure (a reading, a density cell, a candidate of the error
 * figure, a point of an influence figure), or moving the keyboard focus to one, marks it
 * on the figure and shows its values beside it; the same text goes to the figure's
 * readout, a polite live region for screen readers.
 */

/** The marks that carry values in their <title>. */
const MARKS = 'svg circle, svg rect.kw-bin, svg path.kw-err-point';
/** Gap between a mark and its values, in CSS pixels. */
const GAP = 10;

/** Follows the pointer and the focus over the figures inside `root`. */
export function attachHover(root: HTMLElement): void {
  root.addEventListener('mouseover', (e) => point(e.target));
  root.addEventListener('focusin', (e) => point(e.target));
  root.addEventListener('mouseout', (e) => {
    const from = (e.target as Element | null)?.closest?.('figure');
    const to = (e.relatedTarget as Element | null)?.closest?.('figure');
    if (from && from !== to) clear(from);
  });
  root.addEventListener('focusout', (e) => {
    const figure = (e.target as Element | null)?.closest?.('figure');
    if (figure && !figure.contains(e.relatedTarget as Node | null)) clear(figure);
  });
}

function point(target: EventTarget | null): void {
  const t = target as Element | null;
  const mark = t?.closest?.(MARKS);
  const figure = t?.closest?.('figure');
  if (!mark || !figure) return;
  const text = mark.querySelector(':scope > title')?.textContent ?? '';
  // Legend swatches and other marks without values say nothing.
  if (text === '') return;
  for (const m of Array.from(figure.querySelectorAll('.kw-hovered'))) if (m !== mark) m.classList.remove('kw-hovered');
  mark.classList.add('kw-hovered');
  const readout = figure.querySelector('.kw-readout');
  if (readout) readout.textContent = text;
  const tip = figure.querySelector<HTMLElement>('.kw-tip');
  if (!tip) return;
  tip.textContent = text;
  tip.hidden = false;
  place(tip, mark.getBoundingClientRect(), figure.getBoundingClientRect());
}

/** Puts the values beside the mark: to its right, or to its left when they would leave the figure. */
function place(tip: HTMLElement, mark: DOMRect, figure: DOMRect): void {
  const width = tip.offsetWidth;
  const height = tip.offsetHeight;
  let left = mark.right - figure.left + GAP;
  if (left + width > figure.width) left = Math.max(0, mark.left - figure.left - GAP - width);
  const top = Math.max(0, Math.min(figure.height - height, mark.top - figure.top + mark.height / 2 - height / 2));
  tip.style.left = `${Math.round(left)}px`;
  tip.style.top = `${Math.round(top)}px`;
}

function clear(figure: Element): void {
  for (const m of Array.from(figure.querySelectorAll('.kw-hovered'))) m.classList.remove('kw-hovered');
  const tip = figure.querySelector<HTMLElement>('.kw-tip');
  if (tip) tip.hidden = true;
}
