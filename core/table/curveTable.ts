import { bandsAt } from '../fit/bands';
import type { FitResult } from '../types';

/** Column names of the curve table, in order (a public interface: see README). */
export const TABLE_COLUMNS = ['x', 'fit', 'se', 'ciLower', 'ciUpper', 'piLower', 'piUpper', 'extrapolated'] as const;
/** Columns added on request: `negative` (1 where the fit is below zero) for a quantity declared non-negative. */
export const OPTIONAL_COLUMNS = ['negative'] as const;
/** Columns that hold 0/1 flags and print as integers. */
export const FLAG_COLUMNS: readonly TableColumn[] = ['extrapolated', 'negative'];
export type TableColumn = (typeof TABLE_COLUMNS)[number] | (typeof OPTIONAL_COLUMNS)[number];

/** A curve table: columns and one row of numbers per grid point. */
export interface CurveTable {
  readonly columns: readonly TableColumn[];
  readonly rows: readonly (readonly number[])[];
}

/** Evaluates the fit and its 95 % bands at the grid points. O(points). */
export function curveTable(fit: FitResult, points: Float64Array, level = 0.95): CurveTable {
  const b = bandsAt(fit, points, level);
  const rows: number[][] = [];
  for (let i = 0; i < points.length; i++) {
    rows.push([b.x[i] as number, b.fit[i] as number, b.se[i] as number, b.ciLower[i] as number, b.ciUpper[i] as number, b.piLower[i] as number, b.piUpper[i] as number, b.extrapolated[i] as number]);
  }
  return { columns: TABLE_COLUMNS, rows };
}
