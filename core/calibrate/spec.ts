/**
 * What the person asks of the inverse table (core/calibrate/inverse.ts): its grid of
 * readings, how many readings are averaged, the reference standard's own uncertainty and
 * the widest interval they accept. One checked shape for the command line, the editor's
 * settings and the fit record.
 */
import { InputError } from '../errors';
import { formatGrid, type GridSpec } from '../table/grid';

/** The inverse table as asked for. */
export interface InverseSpec {
  /** Readings at which the table is evaluated; undefined: INVERSE_DEFAULT_POINTS over the readings the curve reaches. */
  readonly grid?: GridSpec | undefined;
  /** The reading to invert is the mean of this many readings (m >= 1). */
  readonly readingsAveraged: number;
  /** Standard uncertainty of the reference standard's values, in the quantity's (x) units; 0: none. */
  readonly referenceUncertainty: number;
  /** Rows whose interval is wider than this (x units) are flagged; undefined: none flagged. */
  readonly maxWidth?: number | undefined;
}

/** Limits of the inverse table's options. */
export const INVERSE_LIMITS = { readingsAveraged: { min: 1, max: 1000 } } as const;

/** Points of the default reading grid (as the curve table's default, DEFAULT_GRID_COUNT). */
export const INVERSE_DEFAULT_POINTS = 101;

/** The inverse table's defaults: one reading, no reference uncertainty, no width limit. */
export const DEFAULT_INVERSE: InverseSpec = { readingsAveraged: 1, referenceUncertainty: 0 };

/**
 * Checks an inverse spec, naming the option by `names` (the command line's flags or the
 * editor's settings). A `data` grid is refused: readings have no data grid of their own.
 * Throws InputError. Example: checkInverse({ readingsAveraged: 0, referenceUncertainty: 0 }, CLI_INVERSE_NAMES) throws.
 */
export function checkInverse(spec: InverseSpec, names: InverseOptionNames): InverseSpec {
  const m = spec.readingsAveraged;
  const { min, max } = INVERSE_LIMITS.readingsAveraged;
  if (!Number.isInteger(m) || m < min || m > max) throw new InputError(`${names.readingsAveraged} must be a whole number from ${min} to ${max}; got ${m}`);
  const u = spec.referenceUncertainty;
  if (!(u >= 0) || !Number.isFinite(u)) throw new InputError(`${names.referenceUncertainty} must be a number of at least 0 (a standard uncertainty in the units of x); got ${u}`);
  if (spec.maxWidth !== undefined && !(spec.maxWidth > 0 && Number.isFinite(spec.maxWidth)))
    throw new InputError(`${names.maxWidth} must be a positive number (a width in the units of x); got ${spec.maxWidth}`);
  if (spec.grid?.kind === 'data') throw new InputError(`${names.grid} "data" has no meaning for readings; give a count, a step, a list or auto:<tolerance in the units of x>`);
  return spec;
}

/** How a front end names the inverse table's options in messages. */
export interface InverseOptionNames {
  readonly grid: string;
  readonly readingsAveraged: string;
  readonly referenceUncertainty: string;
  readonly maxWidth: string;
}

/** The command line's names. */
export const CLI_INVERSE_NAMES: InverseOptionNames = {
  grid: '--inverse-grid',
  readingsAveraged: '--readings-averaged',
  referenceUncertainty: '--reference-uncertainty',
  maxWidth: '--max-interval-width',
};

/** The editor's names. */
export const EDITOR_INVERSE_NAMES: InverseOptionNames = {
  grid: 'the setting knotwise.inverse.grid',
  readingsAveraged: 'the setting knotwise.inverse.readingsAveraged',
  referenceUncertainty: 'the setting knotwise.inverse.referenceUncertainty',
  maxWidth: 'the setting knotwise.inverse.maxIntervalWidth',
};

/** The command-line words of a spec (options at their defaults left out), for the regenerate command. */
export function inverseFlags(spec: InverseSpec, quote: (text: string) => string): string[] {
  const w = ['--inverse'];
  if (spec.grid !== undefined) w.push('--inverse-grid', quote(formatGrid(spec.grid)));
  if (spec.readingsAveraged !== 1) w.push('--readings-averaged', String(spec.readingsAveraged));
  if (spec.referenceUncertainty !== 0) w.push('--reference-uncertainty', String(spec.referenceUncertainty));
  if (spec.maxWidth !== undefined) w.push('--max-interval-width', String(spec.maxWidth));
  return w;
}
