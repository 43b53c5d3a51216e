/**
 * What a resampling scheme is: its words, its text form and limits, and (for schemes that
 * draw resamples) the rows of resample r. One module per scheme, listed once in
 * core/registry/resampling/index.ts; nobody else switches on a scheme's name.
 */
import type { ResampleSpec } from '../../tune/types';

/** One set of limits for the command line and the editor settings. */
export interface Limit {
  readonly min: number;
  readonly max: number;
}

/** Engine state a drawing scheme fills for resample r (see core/tune/engine.ts). */
export interface DrawState {
  readonly n: number;
  readonly seed: number;
  /** Row indices in x order (for stratified folds, and the rows of the bootstrap's drawn ranks). */
  readonly order: Int32Array;
  /** Prior weights, or undefined for all 1. */
  readonly w: Float64Array | undefined;
  /**
   * Training weight of every row (multiplicity times prior weight; 0 = not trained on);
   * undefined on the power-sum path, whose trainers read the sums only.
   */
  readonly weights: Float64Array | undefined;
  /** Indices of the test rows; the scheme returns how many it wrote. */
  readonly testIdx: Int32Array;
  /** Power-sum fast path: adds row i with weight wi into `sums` (a training or test buffer). */
  readonly powerSums: PowerSumAccess | undefined;
  /** Scratch the scheme may keep between resamples (bootstrap counts, fold labels and fold sums). */
  scratch: Record<string, unknown>;
}

/** The natural spline's power-sum buffers, as a drawing scheme sees them. */
export interface PowerSumAccess {
  /** Training sums of this resample (filled by the scheme). */
  readonly train: Float64Array;
  /** Test sums of this resample (filled by the scheme). */
  readonly test: Float64Array;
  /** Adds row i with weight wi to `target` (absent when the rows are kept grouped by cell: addByLabel then serves). */
  add?(target: Float64Array, i: number, wi: number): void;
  /**
   * Fills consecutive blocks of `out` (one per label, train.length entries each) with the
   * rows of each label, weight w_i; the same sums as `add` row by row in x order. One of add
   * and addByLabel is there. The labels are by row, or by x rank when `labelsByRank`.
   */
  addByLabel?(labels: Uint16Array, out: Float64Array): void;
  /**
   * True when addByLabel and heldOutByLabel take their labels by x rank (labels[k] belongs
   * to row order[k]): the rows are kept in x order, which then reads the labels in order.
   */
  readonly labelsByRank?: boolean;
  /**
   * Fills `train` with every row at its multiplicity times its prior weight and `test` with
   * the rows of multiplicity 0 (the bootstrap's draw; counts by x rank, counts[k] for row
   * order[k]), the same sums as `add` row by row in x order, and keeps those rows as the
   * held-out rows itself (testIdx is then left as it is). Returns their number.
   */
  fromCounts?(counts: Uint32Array): number;
  /**
   * Keeps the rows whose label is `label` as the held-out rows itself (testIdx is then left
   * as it is; `train` and `test` are the scheme's to fill). `key` names the labelling: while
   * it stays the same, the labels must not change (k-fold: the repeat). Returns their number.
   */
  heldOutByLabel?(labels: Uint16Array, labelCount: number, key: number, label: number): number;
}

/** A resampling scheme. `S` is its spec type (a member of ResampleSpec). */
export interface ResamplingScheme<S extends ResampleSpec = ResampleSpec> {
  /** The spec's kind tag, the first word of its text form. */
  readonly id: S['kind'];
  /** Text form as the command line and settings take it, e.g. 'bootstrap:<resamples>'. */
  readonly syntax: string;
  /** A regular expression (no anchors) for the text form, for the settings schema. */
  readonly pattern: string;
  /** One line for help texts and settings descriptions. */
  readonly description: string;
  /** Numeric limits, named after the spec's fields. */
  readonly limits: Readonly<Record<string, Limit>>;
  /** Reads the text form; undefined when the text is not this scheme. Throws InputError when it is but a number is out of its limits. */
  parse(text: string): S | undefined;
  /** The text form of a spec (parse(format(s)) equals s). */
  format(spec: S): string;
  /** The scheme in words, with its seed where it matters. */
  words(spec: S, seed: number): string;
  /** Checks the spec against the row count; throws InputError. */
  check(spec: S, n: number): void;
  /** How errors are obtained: by drawing resamples, from the hat diagonal (exact leave-one-out), or from the fit itself (GCV). */
  readonly method: 'resamples' | 'leverage' | 'fit';
  /** Number of resamples (0 for the schemes that draw none). */
  count(spec: S): number;
  /** Draws resample r: fills state.weights, state.testIdx and, on the power-sum path, the sums; returns the number of test rows. */
  draw?(spec: S, r: number, state: DrawState): number;
}
