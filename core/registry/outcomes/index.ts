/**
 * The registry of outcomes: what the readings are. The parser, the settings schema, the
 * panel, the record and the fitting code read it; nobody else switches on an outcome's name.
 */
import { InputError } from '../../errors';
import type { Outcome } from '../../types';
import { continuous } from './continuous';
import { counts } from './counts';
import { proportions } from './proportions';
import type { OutcomeKind } from './types';

export type { OutcomeKind } from './types';

/** Every outcome by its id; an Outcome without an entry is a compile error. */
export const OUTCOMES: { readonly [O in Outcome]: OutcomeKind<O> } = { continuous, counts, proportions };

/** The outcomes in the order help texts and the panel list them. */
export const OUTCOME_LIST: readonly OutcomeKind[] = Object.values(OUTCOMES) as OutcomeKind[];

/** Default outcome. */
export const DEFAULT_OUTCOME: Outcome = 'continuous';

/** The registry entry of an outcome. */
export function outcomeKind(id: Outcome): OutcomeKind {
  return OUTCOMES[id] as OutcomeKind;
}

/** Parses an outcome: continuous, counts or proportions. Throws InputError. Example: parseOutcome('counts'). */
export function parseOutcome(text: string): Outcome {
  const t = text.trim().toLowerCase();
  const hit = OUTCOME_LIST.find((o) => o.id === t);
  if (!hit) throw new InputError(`unknown outcome "${text}"; use ${OUTCOME_LIST.map((o) => o.id).join(', ')}`);
  return hit.id;
}
