/**
 * The inverse table as an output: its reading grid resolved (an automatic step measured in
 * the quantity's units), the rows computed (core/calibrate/inverse.ts), and what the record,
 * the report and the panel say of it. Pure: the caller formats and writes the CSV.
 */
import { InputError } from '../errors';
import { resolveGrid, type ResolvedGrid } from '../table/autoStep';
import { checkInRange, formatGrid, gridPoints, type GridSpec } from '../table/grid';
import type { Curve, FitResult } from '../types';
import { sig } from '../words/numbers';
import { inverseOf, inverseTable, readingRange, type InverseTable } from './inverse';
import { INVERSE_DEFAULT_POINTS, type InverseSpec } from './spec';

/** The inverse table built for a fit, with what the record keeps of it. */
export interface InverseOutput {
  readonly table: InverseTable;
  readonly grid: ResolvedGrid;
  readonly summary: InverseSummary;
}

/** The record's account of the inverse table (key `inverse`, with file and SHA-256 added). */
export interface InverseSummary {
  readonly columns: readonly string[];
  readonly points: number;
  /** The reading grid evaluated (an automatic step resolved to a count grid). */
  readonly grid: GridSpec;
  readonly direction: 'increasing' | 'decreasing';
  /** Readings the curve reaches over the data range. */
  readonly readingRange: readonly [number, number];
  readonly level: number;
  readonly readingsAveraged: number;
  readonly referenceUncertainty: number;
  readonly maxIntervalWidth: number | null;
  /** Rows with an open end, wider than the limit, and outside the readings the curve reaches. */
  readonly open: number;
  readonly wide: number;
  readonly outside: number;
  /** Widest finite interval and the reading where it occurs (null when no row has both ends). */
  readonly widest: { readonly reading: number; readonly width: number } | null;
  /** The automatic step's tolerance (x units) and the largest error it measured, when the grid asked for one. */
  readonly interpolation: { readonly maxError: number; readonly at: number; readonly tolerance: number; readonly step: number } | null;
  readonly method: string;
}

/** A Curve-shaped view of the inverse (reading to quantity) for the automatic step; it has no variance. */
function inverseCurve(fit: FitResult, range: readonly [number, number]): Curve {
  const inverse = inverseOf(fit);
  return {
    kind: fit.kind,
    df: fit.df,
    lower: range[0],
    upper: range[1],
    value: (r: number) => inverse.quantity(r),
    varianceFactor: () => NaN,
  };
}

/**
 * Builds the inverse table of `fit` as `spec` asks: the reading grid (default
 * INVERSE_DEFAULT_POINTS over the readings the curve reaches; `auto:<tol>` finds the
 * coarsest even step at which straight lines between the printed rows stay within tol,
 * in x units, of the exact inverse), then each row's quantity and interval. Grid readings
 * outside the reachable range are refused like extrapolated x in the curve table: the rows
 * would carry no quantity. Throws InputError for a curve that is not monotone (saying where
 * it turns), a fit on a link scale, or a bad grid. Cost: O(points x log pieces) plus the
 * automatic step's search.
 * Example: buildInverse(fit, { readingsAveraged: 1, referenceUncertainty: 0 }, (v) => v).summary.points -> 101.
 */
export function buildInverse(fit: FitResult, spec: InverseSpec, round: (v: number) => number): InverseOutput {
  const range = readingRange(fit);
  const [lo, hi] = range;
  const ends = Float64Array.of(lo, hi);
  let grid: ResolvedGrid;
  if (spec.grid === undefined) {
    const g: GridSpec = { kind: 'count', start: lo, stop: hi, count: INVERSE_DEFAULT_POINTS };
    grid = { spec: g, points: gridPoints(g, ends) };
  } else {
    grid = resolveGrid(spec.grid, ends, inverseCurve(fit, range), round);
  }
  try {
    checkInRange(grid.points, lo, hi, false);
  } catch {
    throw new InputError(
      `the inverse table's readings "${formatGrid(spec.grid ?? grid.spec)}" go beyond what the curve reaches over the data range (${sig(lo, 6)} to ${sig(hi, 6)}); no quantity can be estimated there`,
    );
  }
  const table = inverseTable(fit, grid.points, {
    readingsAveraged: spec.readingsAveraged,
    referenceUncertainty: spec.referenceUncertainty,
    ...(spec.maxWidth !== undefined ? { widthTolerance: spec.maxWidth } : {}),
  });
  const col = (name: string): number => (table.columns as readonly string[]).indexOf(name);
  const [iR, iL, iU, iO, iW, iX] = [col('reading'), col('lower'), col('upper'), col('open'), col('wide'), col('outside')];
  let widest: InverseSummary['widest'] = null;
  let open = 0;
  let wide = 0;
  let outside = 0;
  for (const r of table.rows) {
    if (r[iO] === 1) open++;
    if (r[iW] === 1) wide++;
    if (r[iX] === 1) outside++;
    const w = (r[iU] as number) - (r[iL] as number);
    if (Number.isFinite(w) && (widest === null || w > widest.width)) widest = { reading: r[iR] as number, width: w };
  }
  const auto = grid.auto;
  return {
    table,
    grid,
    summary: {
      columns: table.columns,
      points: table.rows.length,
      grid: grid.spec,
      direction: table.direction,
      readingRange: [lo, hi],
      level: 0.95,
      readingsAveraged: spec.readingsAveraged,
      referenceUncertainty: spec.referenceUncertainty,
      maxIntervalWidth: spec.maxWidth ?? null,
      open,
      wide,
      outside,
      widest,
      interpolation: auto ? { maxError: auto.maxError, at: auto.at, tolerance: auto.tolerance, step: auto.step } : null,
      method: table.method,
    },
  };
}

/**
 * The inverse table in a sentence or two for the summary, the report and the panel: rows,
 * direction, widest interval, and the rows flagged. Example: "101 rows from reading 0.2 to 3.1 (the curve rises) ...".
 */
export function inverseWords(s: InverseSummary): string {
  const parts = [
    `${s.points} rows from reading ${sig(s.readingRange[0], 6)} to ${sig(s.readingRange[1], 6)} (the curve ${s.direction === 'increasing' ? 'rises' : 'falls'} throughout the data range)`,
  ];
  if (s.widest) parts.push(`the widest 95 % interval is ${sig(s.widest.width, 3)} wide, at reading ${sig(s.widest.reading, 6)}`);
  const flags: string[] = [];
  if (s.open) flags.push(`${s.open} with an interval open at an end (the band does not close within the data range)`);
  if (s.wide) flags.push(`${s.wide} wider than ${sig(s.maxIntervalWidth ?? NaN, 6)}`);
  if (s.outside) flags.push(`${s.outside} outside the readings the curve reaches`);
  return `${parts.join('; ')}.${flags.length ? ` Flagged: ${flags.join('; ')}.` : ''}${s.readingsAveraged > 1 ? ` Each reading is the mean of ${s.readingsAveraged}.` : ''}${s.referenceUncertainty > 0 ? ` The reference values' standard uncertainty ${sig(s.referenceUncertainty, 4)} is included.` : ''}`;
}
