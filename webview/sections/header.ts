/**
 * The panel's header: what is plotted against what, from which file and rows, with which
 * curve, resampling and model; and the note about a file followed on disk.
 */
import type { PanelPayload } from '../../core/view/model';
import { el } from '../dom';

/** The header of payload `p`. */
export function headerSection(p: PanelPayload): HTMLElement {
  const s = p.source;
  const rows = `${p.rows.used} rows used` + (p.rows.rejected ? `, ${p.rows.rejected} rejected (see Problems)` : '') + (p.rows.heldOut ? `, ${p.rows.heldOut} held out` : '');
  return el(
    'header',
    { class: 'kw-header' },
    el('h1', {}, `${s.yLabel} against ${s.xLabel}`),
    el('p', { class: 'kw-meta' }, `${s.fileName} · ${rows}${s.weightsLabel ? ` · weights: ${s.weightsLabel}` : ''} · ${p.curveWords} · ${p.resamplingWords}`),
    el('p', { class: 'kw-meta', id: 'kw-model-words' }, `Model: ${p.model.words}${p.model.fromPanel ? ' (set in this panel; the settings say otherwise)' : ''}`),
    p.candidatesFromPanel !== undefined ? el('p', { class: 'kw-meta', id: 'kw-candidates-words' }, `Candidates: df ${p.candidatesFromPanel} (set in this panel; the settings say otherwise)`) : null,
    el('p', { class: 'kw-meta', id: 'kw-follow-note', hidden: true }),
  );
}
