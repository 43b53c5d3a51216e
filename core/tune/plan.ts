import { InputError } from '../errors';
import { argsortStable } from '../stats/argsort';
import { RandomStream } from './rng';
import type { ResampleSpec } from './types';

/** Number of resamples a resampling spec produces (bootstrap B, or K folds x R repeats). */
export function resampleCount(spec: ResampleSpec): number {
  switch (spec.kind) {
    case 'boot':
      return spec.resamples;
    case 'cv':
      return spec.folds * spec.repeats;
    default:
      return 0;
  }
}

/** Checks the numbers of a resampling spec against the row count; throws InputError. */
export function checkResampleSpec(spec: ResampleSpec, n: number): void {
  if (spec.kind === 'boot' && (!Number.isInteger(spec.resamples) || spec.resamples < 2 || spec.resamples > 100000)) {
    throw new InputError(`bootstrap needs a whole number of resamples from 2 to 100000; got ${spec.resamples}`);
  }
  if (spec.kind === 'cv') {
    if (!Number.isInteger(spec.folds) || spec.folds < 2 || spec.folds > 1000) throw new InputError(`cross-validation needs from 2 to 1000 folds; got ${spec.folds}`);
    if (spec.folds > n) throw new InputError(`cross-validation with ${spec.folds} folds needs at least ${spec.folds} rows; there are ${n}`);
    if (!Number.isInteger(spec.repeats) || spec.repeats < 1 || spec.repeats > 1000) throw new InputError(`cross-validation repeats must be from 1 to 1000; got ${spec.repeats}`);
  }
}

/** Row indices sorted by x (ties by row index), by the stable radix argsort `argsortStable`; O(n). */
export function orderByX(x: Float64Array): Int32Array {
  return argsortStable(x);
}

/**
 * Bootstrap resample b: n rows drawn with replacement (Efron & Tibshirani 1993, An
 * Introduction to the Bootstrap, chapter 6); writes each row's multiplicity into `counts`.
 * Rows with count 0 are out of bag. Seeded per (seed, b), so independent of threads. O(n).
 */
export function bootstrapCounts(n: number, seed: number, b: number, counts: Uint32Array): void {
  counts.fill(0);
  const rng = new RandomStream(seed, 1 + b);
  for (let i = 0; i < n; i++) {
    const j = rng.int(n);
    counts[j] = (counts[j] as number) + 1;
  }
}

/**
 * Fold labels for repeat r of K-fold cross-validation, stratified by x: rows in x order
 * are cut into consecutive blocks of K and each block gets a random permutation of the K
 * labels, so every fold spans the whole x range (common practice for regression
 * stratification). O(n). `order` is orderByX(x).
 */
export function foldLabels(order: Int32Array, folds: number, seed: number, repeat: number, out: Uint16Array): void {
  const n = order.length;
  const rng = new RandomStream(seed, 1_000_000 + repeat);
  const perm = new Uint16Array(folds);
  for (let start = 0; start < n; start += folds) {
    for (let k = 0; k < folds; k++) perm[k] = k;
    for (let k = folds - 1; k > 0; k--) {
      const j = rng.int(k + 1);
      const t = perm[k] as number;
      perm[k] = perm[j] as number;
      perm[j] = t;
    }
    const end = Math.min(n, start + folds);
    for (let i = start; i < end; i++) out[order[i] as number] = perm[i - start] as number;
  }
}

/**
 * Held-out check set, stratified by x: rows in x order are cut into round(fraction n)
 * equal strata and one random row of each is held out. Returns a mask (1 = held out).
 * Throws InputError for a fraction outside (0, 0.5]. O(n).
 */
export function holdoutMask(order: Int32Array, fraction: number, seed: number): Uint8Array {
  const n = order.length;
  if (!(fraction > 0 && fraction <= 0.5)) throw new InputError(`the held-out fraction must be above 0 and at most 0.5; got ${fraction}`);
  const m = Math.round(fraction * n);
  if (m < 1) throw new InputError(`a held-out fraction of ${fraction} leaves no row out of ${n}`);
  const mask = new Uint8Array(n);
  const rng = new RandomStream(seed, 2_000_000);
  for (let s = 0; s < m; s++) {
    const lo = Math.floor((s * n) / m);
    const hi = Math.floor(((s + 1) * n) / m);
    mask[order[lo + rng.int(hi - lo)] as number] = 1;
  }
  return mask;
}
