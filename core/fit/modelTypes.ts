/**
 * The shapes that model fits (core/fit/model.ts) and the curve kinds (core/registry/curves/)
 * share: checked model options and a candidate's row basis. Types only, so both sides can
 * import them without importing each other.
 */
import type { RowBasis } from '../basis/rowBasis';
import type { Outcome, Shape } from '../types';
import type { ShapeRows } from './shape';

/** Model options after checking: every field present. */
export interface ResolvedModel {
  readonly outcome: Outcome;
  readonly shape: readonly Shape[];
  /** Huber tuning constant, or undefined for least squares. */
  readonly robustK: number | undefined;
}

/** The row basis of one candidate, with its natural-spline restriction and shape rows. */
export interface ModelBasis {
  readonly basis: RowBasis;
  /** Null-space restriction of the coefficients (the natural spline's boundary conditions), or undefined. */
  readonly z: Float64Array | undefined;
  readonly shape: ShapeRows | undefined;
  readonly knots: Float64Array;
  readonly lower: number;
  readonly upper: number;
  readonly notes: readonly string[];
  /** The candidate in words, for messages ('natural spline with df 6'). */
  readonly what: string;
}
