/**
 * How the df is chosen: one radio button per rule of the registry, the tolerance box beside
 * the simplest-within rule and the df chooser beside the person's own pick. The boxes
 * always show what the explanation uses: a valid tolerance applies as it is typed; an
 * invalid one changes nothing, says so beside the box and gives way to the tolerance in
 * effect when the box loses focus.
 */
import { MAX_TOLERANCE_PERCENT, RULE_LIST } from '../../core/registry/rules/index';
import { unreachable } from '../../core/protocol';
import type { RuleSpec } from '../../core/tune/types';
import type { PanelPayload } from '../../core/view/model';
import { el } from '../dom';
import type { Choice, PanelActions } from '../sections/section';

type RuleKind = RuleSpec['kind'];

/** The rule controls and how to show a choice in them. */
export interface RuleControls {
  readonly element: HTMLFieldSetElement;
  show(c: Choice): void;
}

/** A tolerance typed in the box, or undefined when the text is no percentage from 0 to MAX_TOLERANCE_PERCENT. */
export function parseTolerance(text: string): number | undefined {
  if (text.trim() === '') return undefined;
  const v = Number(text);
  return Number.isFinite(v) && v >= 0 && v <= MAX_TOLERANCE_PERCENT ? v : undefined;
}

/** Builds the rule controls of payload `p`. */
export function ruleControls(p: PanelPayload, actions: PanelActions): RuleControls {
  let current: Choice | undefined;
  const tolerance = el('input', {
    type: 'number',
    id: 'kw-tolerance',
    min: 0,
    max: MAX_TOLERANCE_PERCENT,
    step: 0.5,
    'aria-describedby': 'kw-tolerance-error',
  });
  const toleranceError = el('p', { id: 'kw-tolerance-error', class: 'kw-input-error', role: 'alert', hidden: true });
  const dfSelect = el('select', { id: 'kw-df' });
  for (const c of p.candidates) if (c.skipped === undefined) dfSelect.append(el('option', { value: c.df }, `df ${c.df}`));
  const beside: Partial<Record<RuleKind, HTMLElement>> = {
    'simplest-within': el('div', { class: 'kw-rule-input' }, el('label', { for: 'kw-tolerance' }, 'Tolerance (%)'), tolerance, toleranceError),
    pick: el('div', { class: 'kw-rule-input' }, el('label', { for: 'kw-df' }, 'The df I pick'), dfSelect),
  };
  const element = el('fieldset', { class: 'kw-rules', id: 'kw-rules' }, el('legend', {}, 'How the df is chosen'));
  for (const r of RULE_LIST) {
    const id = `kw-rule-${r.id}`;
    const radio = el('input', { type: 'radio', name: 'kw-rule', id, value: r.id });
    radio.addEventListener('change', () => pickKind(r.id));
    element.append(el('div', { class: 'kw-radio' }, radio, el('label', { for: id }, r.label)));
    const input = beside[r.id];
    if (input) element.append(input);
  }

  const inEffect = (): number => current?.tolerance ?? p.tolerancePercent;
  const refuse = (): void => {
    toleranceError.textContent = `The tolerance must be a percentage from 0 to ${MAX_TOLERANCE_PERCENT}; ${inEffect()} % stays in effect.`;
    toleranceError.hidden = false;
    tolerance.setAttribute('aria-invalid', 'true');
  };
  const accept = (): void => {
    toleranceError.hidden = true;
    toleranceError.textContent = '';
    tolerance.removeAttribute('aria-invalid');
  };
  tolerance.addEventListener('input', () => {
    // An emptied box, or a number half typed ("1."), is a person still typing: nothing to apply or refuse yet.
    if (tolerance.value === '') return;
    const v = parseTolerance(tolerance.value);
    if (v === undefined) return refuse();
    accept();
    actions.setTolerance(v);
  });
  tolerance.addEventListener('change', () => {
    if (parseTolerance(tolerance.value) !== undefined) return;
    refuse();
    // The box shows the tolerance the explanation uses again; the message says why.
    tolerance.value = String(inEffect());
    tolerance.removeAttribute('aria-invalid');
  });
  dfSelect.addEventListener('change', () => actions.setRule({ kind: 'pick', df: Number(dfSelect.value) }));

  function pickKind(kind: RuleKind): void {
    switch (kind) {
      case 'least-error':
      case 'one-se':
        return actions.setRule({ kind });
      case 'simplest-within':
        return actions.setRule({ kind: 'simplest-within', percent: inEffect() });
      case 'pick':
        return actions.setRule({ kind: 'pick', df: current?.selection.df ?? Number(dfSelect.value) });
      default:
        unreachable(kind);
    }
  }

  return {
    element,
    show(c) {
      current = c;
      for (const input of Array.from(element.querySelectorAll<HTMLInputElement>('input[name="kw-rule"]'))) input.checked = input.value === c.rule.kind;
      tolerance.disabled = c.rule.kind !== 'simplest-within';
      // Text the person is typing stays until the box loses focus; otherwise the box shows the tolerance in effect.
      const typing = document.activeElement === tolerance && parseTolerance(tolerance.value) === undefined;
      if (!typing && parseTolerance(tolerance.value) !== c.tolerance) tolerance.value = String(c.tolerance);
      dfSelect.value = String(c.selection.df);
    },
  };
}
