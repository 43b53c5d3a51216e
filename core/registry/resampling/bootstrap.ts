import { InputError } from '../../errors';
import { RandomStream } from '../../tune/rng';
import type { ResampleSpec } from '../../tune/types';
import type { DrawState, ResamplingScheme } from './types';

type Bootstrap = Extract<ResampleSpec, { kind: 'bootstrap' }>;

const RESAMPLES = { min: 2, max: 5000 } as const;

/**
 * Bootstrap resample b: n rows drawn with replacement (Efron & Tibshirani 1993, An
 * Introduction to the Bootstrap, chapter 6), each draw an x rank; writes the multiplicity
 * of the row at each x rank into `counts` (counts[k] belongs to row order[k] of the x order,
 * orderByX). Drawing ranks instead of row indices draws the same distribution and lets the
 * resampling read the multiplicities in x order (resampling version 3). Rows with count 0
 * are out of bag. Seeded per (seed, b), so independent of threads. O(n).
 * Example: bootstrapCounts(5, 1, 0, new Uint32Array(5)) leaves counts summing to 5.
 */
export function bootstrapCounts(n: number, seed: number, b: number, counts: Uint32Array): void {
  counts.fill(0);
  new RandomStream(seed, 1 + b).countDraws(n, n, counts);
}

/** The bootstrap with the error measured on the out-of-bag rows. */
export const bootstrap: ResamplingScheme<Bootstrap> = {
  id: 'bootstrap',
  syntax: 'bootstrap:<resamples>',
  pattern: 'bootstrap:\\d+',
  description: `bootstrap: draw the rows with replacement, measure the error on the rows left out (${RESAMPLES.min} to ${RESAMPLES.max} resamples)`,
  limits: { resamples: RESAMPLES },
  method: 'resamples',
  parse(text) {
    const m = /^bootstrap:(\d+)$/.exec(text);
    if (!m) return undefined;
    const resamples = Number(m[1]);
    if (resamples < RESAMPLES.min || resamples > RESAMPLES.max) throw new InputError(`the bootstrap takes ${RESAMPLES.min} to ${RESAMPLES.max} resamples; got ${resamples}`);
    return { kind: 'bootstrap', resamples };
  },
  format: (s) => `bootstrap:${s.resamples}`,
  words: (s, seed) => `bootstrap, ${s.resamples} resamples, error on the out-of-bag rows, seed ${seed}`,
  check(s) {
    if (!Number.isInteger(s.resamples) || s.resamples < RESAMPLES.min || s.resamples > RESAMPLES.max) {
      throw new InputError(`the bootstrap takes a whole number of resamples from ${RESAMPLES.min} to ${RESAMPLES.max}; got ${s.resamples}`);
    }
  },
  count: (s) => s.resamples,
  draw(_s, r, state: DrawState) {
    const { n, w, weights, testIdx, powerSums, order } = state;
    const counts = (state.scratch.counts ??= new Uint32Array(n)) as Uint32Array;
    bootstrapCounts(n, state.seed, r, counts);
    // The power-sum path's own pass over its rows in x order (no training weights to fill there).
    if (powerSums?.fromCounts && !weights) return powerSums.fromCounts(counts);
    const add = powerSums?.add;
    if (powerSums && !add) throw new Error('bootstrap: the power sums take neither multiplicities nor single rows');
    if (powerSums) {
      powerSums.train.fill(0);
      powerSums.test.fill(0);
    }
    let nTest = 0;
    // Rank k's multiplicity is row order[k]'s; the out-of-bag rows are listed in x order.
    for (let k = 0; k < n; k++) {
      const i = order[k] as number;
      const c = counts[k] as number;
      const wi = w ? (w[i] as number) : 1;
      if (weights) weights[i] = c * wi;
      if (c === 0) testIdx[nTest++] = i;
      if (powerSums && add) add(c > 0 ? powerSums.train : powerSums.test, i, c > 0 ? c * wi : wi);
    }
    return nTest;
  },
};
