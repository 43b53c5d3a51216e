/**
 * What the readings are, shape constraints and robust fitting: changing one tunes again in
 * the host. The controls show the shown result's options and disable what the curve kind
 * and the readings do not allow.
 */
import { OUTCOME_LIST } from '../../core/registry/outcomes/index';
import type { Outcome, Shape } from '../../core/types';
import type { ModelChoice, PanelPayload } from '../../core/view/model';
import { el } from '../dom';

const SHAPE_CHOICES: readonly { readonly shape: Shape; readonly label: string; readonly opposite?: Shape }[] = [
  { shape: 'increasing', label: 'increasing', opposite: 'decreasing' },
  { shape: 'decreasing', label: 'decreasing', opposite: 'increasing' },
  { shape: 'nonnegative', label: 'non-negative' },
  { shape: 'convex', label: 'convex', opposite: 'concave' },
  { shape: 'concave', label: 'concave', opposite: 'convex' },
];

/** The model controls and how to set them back to a result's options. */
export interface ModelControls {
  readonly element: HTMLFieldSetElement;
  /** Sets the controls to the options of the result shown (after a refused change, for one). */
  sync(): void;
}

/** Builds the model controls of payload `p`; `changed` hears each change the person makes. */
export function modelControls(p: PanelPayload, changed: (model: ModelChoice) => void): ModelControls {
  const sup = p.model.supports;
  const outcome = el('select', { id: 'kw-outcome' });
  for (const o of OUTCOME_LIST) outcome.append(el('option', { value: o.id, disabled: !sup.outcomes.includes(o.id) }, o.label));
  const boxes = new Map<Shape, HTMLInputElement>();
  const shapes = el('div', { class: 'kw-shapes', role: 'group', 'aria-label': 'Shape the curve must have' });
  for (const c of SHAPE_CHOICES) {
    const id = `kw-shape-${c.shape}`;
    const box = el('input', { type: 'checkbox', id, value: c.shape });
    boxes.set(c.shape, box);
    shapes.append(el('span', { class: 'kw-check-item' }, box, el('label', { for: id }, c.label)));
  }
  const robust = el('input', { type: 'checkbox', id: 'kw-robust' });
  const missing = OUTCOME_LIST.filter((o) => !sup.outcomes.includes(o.id)).map((o) => o.id);
  const unsupported = [!sup.shapes ? 'shape constraints' : '', !sup.robust ? 'robust fitting' : '', missing.length ? `readings that are ${missing.join(' or ')}` : ''].filter((t) => t !== '');
  const element = el(
    'fieldset',
    { class: 'kw-model-controls', id: 'kw-model-controls' },
    el('legend', {}, 'Readings and shape (changing these tunes again)'),
    el('div', { class: 'kw-inputs' }, el('label', { for: 'kw-outcome' }, 'The readings are'), outcome),
    el('div', { class: 'kw-shape-row' }, el('span', { class: 'kw-muted' }, 'Shape: '), shapes),
    el('div', { class: 'kw-check-item' }, robust, el('label', { for: 'kw-robust' }, `Robust (Huber${p.model.robustK !== undefined ? `, k = ${p.model.robustK}` : ''}): down-weight outliers`)),
    unsupported.length ? el('p', { class: 'kw-muted kw-small' }, `The ${p.curveWords} does not support ${unsupported.join(', ')}.`) : null,
  );

  const choice = (): ModelChoice => {
    const o = outcome.value as Outcome;
    return { outcome: o, shape: SHAPE_CHOICES.filter((c) => boxes.get(c.shape)?.checked).map((c) => c.shape), robust: o === 'continuous' && robust.checked };
  };
  /** Disables the controls the current combination does not allow (opposite shapes, robust with counts, ...). */
  const enable = (): void => {
    const now = choice();
    for (const c of SHAPE_CHOICES) {
      const box = boxes.get(c.shape);
      if (box) box.disabled = !sup.shapes || (c.opposite !== undefined && now.shape.includes(c.opposite));
    }
    robust.disabled = !sup.robust || now.outcome !== 'continuous';
  };
  for (const input of [outcome, robust, ...boxes.values()]) {
    input.addEventListener('change', () => {
      enable();
      changed(choice());
    });
  }
  const sync = (): void => {
    outcome.value = p.model.outcome;
    for (const [shape, box] of boxes) box.checked = p.model.shape.includes(shape);
    robust.checked = p.model.robust;
    enable();
  };
  sync();
  return { element, sync };
}
