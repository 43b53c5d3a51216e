import { InputError } from '../../errors';
import { RandomStream } from '../../tune/rng';
import type { ResampleSpec } from '../../tune/types';
import type { DrawState, ResamplingScheme } from './types';

type Folds = Extract<ResampleSpec, { kind: 'folds' }>;

const FOLDS = { min: 2, max: 100 } as const;
const REPEATS = { min: 1, max: 100 } as const;

/**
 * Fold labels for repeat r of K-fold cross-validation, stratified by x: rows in x order
 * are cut into consecutive blocks of K and each block gets a random permutation of the K
 * labels, so every fold spans the whole x range (common practice for regression
 * stratification). O(n). `order` is orderByX(x); `placement` 'row' writes the label of row
 * i at out[i], 'rank' the label of x rank k (row order[k]) at out[k], the same labelling.
 * Example: foldLabels(orderByX(x), 5, 1, 0, labels) gives labels 0..4, each about n/5 times.
 */
export function foldLabels(order: Int32Array, folds: number, seed: number, repeat: number, out: Uint16Array, placement: 'row' | 'rank' = 'row'): void {
  const byRank = placement === 'rank';
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
    for (let i = start; i < end; i++) out[byRank ? i : (order[i] as number)] = perm[i - start] as number;
  }
}

interface FoldScratch {
  repeat: number;
  /** By row, or by x rank when the power sums take them so (PowerSumAccess.labelsByRank). */
  labels: Uint16Array;
  /** Power-sum path: the sums of every fold, then their total, one after another. */
  foldSums: Float64Array | undefined;
}

/** Fold labels of one repeat and, on the power-sum path, the sums of every fold plus their total. */
function prepareRepeat(state: DrawState, folds: number, repeat: number): FoldScratch {
  const s = (state.scratch.folds ??= { repeat: -1, labels: new Uint16Array(state.n), foldSums: undefined }) as FoldScratch;
  if (s.repeat === repeat) return s;
  s.repeat = repeat;
  const ps = state.powerSums;
  foldLabels(state.order, folds, state.seed, repeat, s.labels, ps?.labelsByRank ? 'rank' : 'row');
  if (!ps) return s;
  const len = ps.train.length;
  s.foldSums ??= new Float64Array((folds + 1) * len);
  const fs = s.foldSums;
  fs.fill(0);
  const w = state.w;
  const views = Array.from({ length: folds }, (_, k) => fs.subarray(k * len, (k + 1) * len));
  if (ps.addByLabel) ps.addByLabel(s.labels, fs);
  else {
    const add = ps.add as NonNullable<typeof ps.add>;
    for (let k = 0; k < state.n; k++) {
      const i = ps.labelsByRank ? (state.order[k] as number) : k;
      add(views[s.labels[k] as number] as Float64Array, i, w ? (w[i] as number) : 1);
    }
  }
  const total = fs.subarray(folds * len, (folds + 1) * len);
  for (const v of views) for (let j = 0; j < len; j++) total[j] = (total[j] as number) + (v[j] as number);
  return s;
}

/** k-fold cross-validation, stratified by x, optionally repeated. */
export const folds: ResamplingScheme<Folds> = {
  id: 'folds',
  syntax: 'folds:<k>[x<repeats>]',
  pattern: 'folds:\\d+(x\\d+)?',
  description: `k-fold cross-validation stratified by x: ${FOLDS.min} to ${FOLDS.max} folds, repeated ${REPEATS.min} to ${REPEATS.max} times (folds:10x5)`,
  limits: { folds: FOLDS, repeats: REPEATS },
  method: 'resamples',
  parse(text) {
    const m = /^folds:(\d+)(?:x(\d+))?$/.exec(text);
    if (!m) return undefined;
    const spec: Folds = { kind: 'folds', folds: Number(m[1]), repeats: m[2] !== undefined ? Number(m[2]) : 1 };
    checkNumbers(spec);
    return spec;
  },
  format: (s) => (s.repeats > 1 ? `folds:${s.folds}x${s.repeats}` : `folds:${s.folds}`),
  words: (s, seed) => `${s.folds}-fold cross-validation${s.repeats > 1 ? `, repeated ${s.repeats} times` : ''}, folds stratified by x, seed ${seed}`,
  check(s, n) {
    checkNumbers(s);
    if (s.folds > n) throw new InputError(`cross-validation with ${s.folds} folds needs at least ${s.folds} rows; there are ${n}`);
  },
  count: (s) => s.folds * s.repeats,
  draw(s, r, state) {
    const fold = r % s.folds;
    const { labels, foldSums } = prepareRepeat(state, s.folds, Math.floor(r / s.folds));
    const { n, w, weights, testIdx, powerSums, order } = state;
    if (powerSums && foldSums) {
      // Training sums are the total minus the fold's own.
      const len = powerSums.train.length;
      const totalOff = s.folds * len;
      for (let j = 0; j < len; j++) {
        const test = foldSums[fold * len + j] as number;
        powerSums.test[j] = test;
        powerSums.train[j] = (foldSums[totalOff + j] as number) - test;
      }
    }
    // The power-sum path keeps every fold's rows of this repeat at once (no training weights to fill there).
    if (powerSums?.heldOutByLabel && !weights) return powerSums.heldOutByLabel(labels, s.folds, Math.floor(r / s.folds), fold);
    let nTest = 0;
    const byRank = powerSums?.labelsByRank === true;
    for (let k = 0; k < n; k++) {
      // Label k is row k's, or row order[k]'s when the labels are by x rank.
      const i = byRank ? (order[k] as number) : k;
      const inFold = labels[k] === fold;
      if (weights) weights[i] = inFold ? 0 : w ? (w[i] as number) : 1;
      if (inFold) testIdx[nTest++] = i;
    }
    return nTest;
  },
};

function checkNumbers(s: Folds): void {
  if (!Number.isInteger(s.folds) || s.folds < FOLDS.min || s.folds > FOLDS.max) throw new InputError(`cross-validation takes ${FOLDS.min} to ${FOLDS.max} folds; got ${s.folds}`);
  if (!Number.isInteger(s.repeats) || s.repeats < REPEATS.min || s.repeats > REPEATS.max)
    throw new InputError(`cross-validation repeats must be from ${REPEATS.min} to ${REPEATS.max}; got ${s.repeats}`);
}
