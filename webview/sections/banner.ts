/**
 * The banner about changed data (it stays in view while the panel scrolls) and the note
 * about a file followed on disk: whether the analysis shown is of the data as it is now,
 * and what happens next.
 */
import type { DataChangeView, DataStateView } from '../../core/view/model';
import { el } from '../dom';

/** The banner, hidden until the data changes; its button refits. */
export function bannerElement(refit: () => void): HTMLElement {
  const button = el('button', { type: 'button', id: 'kw-refit', class: 'kw-secondary' }, 'Refit now');
  button.addEventListener('click', refit);
  return el('div', { class: 'kw-banner', id: 'kw-banner', role: 'status', hidden: true }, el('p', { id: 'kw-banner-text' }), button);
}

/** Shows `state` (undefined: the data is as analysed) in the banner and the follow note inside `root`. */
export function showDataState(root: HTMLElement, state: DataStateView | undefined, fileName: string): void {
  const banner = root.querySelector<HTMLElement>('#kw-banner');
  const text = root.querySelector<HTMLElement>('#kw-banner-text');
  const refit = root.querySelector<HTMLElement>('#kw-refit');
  const note = root.querySelector<HTMLElement>('#kw-follow-note');
  if (!banner || !text || !refit || !note) return;
  const words = state ? bannerText(state, fileName) : '';
  banner.hidden = words === '';
  text.textContent = words;
  refit.hidden = !(state?.change && state.change.where !== 'missing');
  note.hidden = !state?.followedOnDisk;
  note.textContent = state?.followedOnDisk
    ? `${fileName} is too large (about 50 MB or more) for the editor to hand its text to extensions, so Knotwise follows the file on disk: edits show here once saved.`
    : '';
}

/** "2 rows added, 1 row changed" (or that no data row changed). */
function changeCounts(c: DataChangeView): string {
  const rows = (n: number, what: string): string => `${n} row${n === 1 ? '' : 's'} ${what}`;
  const parts = [c.header ? 'the header line changed' : '', c.added ? rows(c.added, 'added') : '', c.removed ? rows(c.removed, 'removed') : '', c.changed ? rows(c.changed, 'changed') : ''].filter(
    (t) => t !== '',
  );
  return parts.length ? parts.join(', ') : 'no data row changed (only blank lines, spacing or line endings)';
}

/** The banner's sentence about the data, or '' when the analysis is of the data as it is now. */
export function bannerText(state: DataStateView, fileName: string): string {
  const c = state.change;
  if (!c) {
    return state.analysed === 'unsaved'
      ? `This analysis read unsaved edits of ${fileName}. Review it here; a curve table is saved only from data on disk, so saving first saves ${fileName} and refits.`
      : '';
  }
  if (c.where === 'missing') return `${fileName} is no longer on disk. This analysis stays for review; nothing can be saved from it.`;
  const next =
    state.refit === 'asked'
      ? ' The file is large, so Knotwise asks before refitting (knotwise.refit.askAboveRows).'
      : state.refit === 'automatic'
        ? c.where === 'editor'
          ? ` Saving ${fileName} refits the curve.`
          : ' Refitting follows.'
        : '';
  const where = c.where === 'editor' ? `Unsaved edits in ${fileName} since this analysis` : `${fileName} changed on disk since this analysis`;
  return `${where}: ${changeCounts(c)}.${next}`;
}
