/**
 * Calibration use, a folding section: the inverse table (from a reading back to the
 * quantity, with inverse-prediction intervals) in words or why the curve has none, a switch
 * that saves it with the curve table, and the drift from the curve of the fit record beside
 * the data, with its figure (core/view/calibration.ts).
 */
import { el, replaceChildren, svgFromText } from '../dom';
import { fold } from '../fold';
import type { PanelActions, Section } from './section';

/** Builds the calibration section, open when `open`. */
export function calibrationSection(open: boolean, actions: PanelActions): Section {
  const f = fold('calibration', 'Calibration use', open, (id, o) => actions.foldToggled(id, o));
  const box = el('input', { type: 'checkbox', id: 'kw-inverse-save' });
  box.addEventListener('change', () => actions.setInverseSaved(box.checked));
  const label = el('label', { class: 'kw-check', for: 'kw-inverse-save' }, box, ' Save the inverse table (reading → quantity) with the curve table');
  const inverse = el('div', { id: 'kw-inverse' });
  const drift = el('div', { id: 'kw-drift' });
  f.body.append(el('h3', {}, 'Inverse table'), label, inverse, el('h3', {}, 'Drift from the recorded curve'), drift);
  return {
    element: f.element,
    show(c) {
      const cal = c.detail?.calibration;
      if (!cal) {
        replaceChildren(inverse, el('p', { class: 'kw-muted' }, 'Computing…'));
        replaceChildren(drift);
        f.note.textContent = '';
        return;
      }
      box.checked = cal.inverseSaved;
      const inv = cal.inverse;
      if ('refused' in inv) replaceChildren(inverse, el('p', { class: 'kw-warning', id: 'kw-inverse-refused' }, `No inverse table: ${inv.refused}`));
      else replaceChildren(inverse, el('p', { id: 'kw-inverse-words' }, inv.words), el('p', { class: 'kw-muted' }, inv.method));
      if (cal.drift) {
        const words = el('p', { id: 'kw-drift-words' }, cal.drift.words);
        let svg: SVGSVGElement | undefined;
        try {
          svg = svgFromText(cal.drift.svg);
        } catch {
          // The words stand without the figure.
        }
        const figure = svg ? el('figure', { class: 'kw-figure', id: 'kw-fig-drift-box' }, svg, el('figcaption', {}, 'The new curve over the recorded one, each with its 95 % band')) : undefined;
        replaceChildren(drift, words, ...(figure ? [el('div', { class: 'kw-figures' }, figure)] : []));
      } else
        replaceChildren(drift, el('p', { class: 'kw-muted', id: 'kw-drift-words' }, cal.driftNote ?? 'No fit record of this data yet: the first save writes the curve later fits are compared with.'));
      f.note.textContent = [
        'refused' in inv ? 'no inverse table (the curve turns)' : cal.inverseSaved ? 'inverse table saved' : 'inverse table not saved',
        cal.drift ? (cal.drift.within === true ? 'within the recorded band' : cal.drift.within === false ? 'moved beyond the recorded band' : 'drift not judged') : '',
      ]
        .filter((t) => t !== '')
        .join('; ');
    },
  };
}
