/**
 * The registry of curve kinds. The command line, the settings schema, the fit-record
 * schema, the view words and the engine read it; nobody else switches on a kind's name.
 * Adding a kind: write one module exporting a CurveKind and add it to BUILTIN_CURVES
 * (or, for a kind that lives outside the product, call registerCurveKind).
 */
import { InputError } from '../../errors';
import { resolveModelFor, type ResolvedModel } from '../../fit/model';
import type { ModelOptions } from '../../types';
import { naturalSpline } from './naturalSpline';
import { polynomial } from './polynomial';
import { smoothingSpline } from './smoothingSpline';
import type { CurveKind } from './types';

export type { CurveKind, CurveSupport, Trainer, TrainerInput, TrainerSet } from './types';

/** The built-in kinds, in the order help texts list them; the first is the default. */
export const BUILTIN_CURVES: readonly CurveKind[] = [naturalSpline, polynomial, smoothingSpline];

/** Default curve kind. */
export const DEFAULT_CURVE = naturalSpline.id;

const registry = new Map<string, CurveKind>(BUILTIN_CURVES.map((k) => [k.id, k]));

/** Adds a curve kind (tests, extensions of the product). Throws when the id is taken. */
export function registerCurveKind(kind: CurveKind): void {
  if (registry.has(kind.id)) throw new Error(`curve kind "${kind.id}" is registered already`);
  registry.set(kind.id, kind);
}

/** Removes a kind added by registerCurveKind (tests clean up with it); built-in kinds stay. */
export function unregisterCurveKind(id: string): void {
  if (BUILTIN_CURVES.some((k) => k.id === id)) throw new Error(`built-in curve kind "${id}" cannot be removed`);
  registry.delete(id);
}

/** Every registered kind. */
export function curveKinds(): readonly CurveKind[] {
  return [...registry.values()];
}

/** The kind with this id; throws InputError naming the kinds there are. */
export function curveKind(id: string): CurveKind {
  const k = registry.get(id);
  if (!k)
    throw new InputError(
      `unknown curve "${id}"; use ${curveKinds()
        .map((c) => c.id)
        .join(', ')}`,
    );
  return k;
}

/** Parses a curve kind's id as the command line and settings spell it. Example: parseCurve('smoothing-spline'). */
export function parseCurve(text: string): string {
  return curveKind(text.trim()).id;
}

/** The plain-language name of a kind: 'natural cubic regression spline'. */
export function curveWords(id: string): string {
  return curveKind(id).name;
}

/** Checks model options against a curve kind and normalises them (see resolveModelFor). */
export function resolveModel(id: string, m: ModelOptions | undefined): ResolvedModel {
  return resolveModelFor(curveKind(id), m, curveKinds());
}
