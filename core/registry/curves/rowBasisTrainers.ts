import { modelTrainer } from '../../tune/modelTrainer';
import type { CurveKind, TrainerInput, TrainerSet } from './types';

/**
 * Trainers for outcomes, shapes and robust fits of a kind with a row basis: every
 * candidate is refitted on each resample's weighted rows through core/fit/model.ts's
 * machinery (the power sums need plain least squares).
 */
export function rowBasisModelTrainers(kind: CurveKind, input: TrainerInput): TrainerSet {
  const model = input.model;
  const rowBasis = kind.rowBasis;
  if (!model || !rowBasis) throw new Error(`${kind.name}: no row basis for model options`);
  return { trainers: input.dfs.map((df) => modelTrainer(input.prepared, input.y, rowBasis(input.prepared, df, model), model, input.ymean, input.yscale)) };
}

/** Whole numbers from a to b (empty when b < a). */
export function dfRange(a: number, b: number): number[] {
  return Array.from({ length: Math.max(0, b - a + 1) }, (_, i) => a + i);
}
