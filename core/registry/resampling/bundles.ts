import { InputError } from '../../errors';
import { bundleCount, bundleCounts, bundleOf, combineBundles, MAX_BUNDLES } from '../../stream/bundles';
import type { ResampleSpec } from '../../tune/types';
import type { DrawState, ResamplingScheme } from './types';

type Bundles = Extract<ResampleSpec, { kind: 'bundles' }>;

const RESAMPLES = { min: 2, max: 5000 } as const;

/** What the scheme keeps between resamples. */
interface BundleScratch {
  bundle: Int32Array;
  counts: Uint32Array;
  /** Power sums per bundle and cell (the power-sum path only). */
  sums?: Float64Array;
}

/**
 * Bundles: the rows are dealt into min(1,024, n) bundles by a seeded hash of their row
 * number, and each resample draws that many bundles with replacement; the error is measured
 * on the bundles not drawn (core/stream/bundles.ts). A scheme of Knotwise's own, made for
 * data streamed from a file in passes (docs/design.md, "Streaming"): its per-bundle power
 * sums serve every resample, where the bootstrap needs every row in memory. Usable in memory
 * too, with the same numbers, so it can be compared with the bootstrap on the same data.
 */
export const bundles: ResamplingScheme<Bundles> = {
  id: 'bundles',
  syntax: 'bundles:<resamples>',
  pattern: 'bundles:\\d+',
  description: `bundles: deal the rows into ${MAX_BUNDLES.toLocaleString('en-US')} bundles by a seeded hash, draw bundles with replacement, measure the error on the bundles left out; for data streamed from the file (${RESAMPLES.min} to ${RESAMPLES.max} resamples)`,
  limits: { resamples: RESAMPLES },
  method: 'resamples',
  parse(text) {
    const m = /^bundles:(\d+)$/.exec(text);
    if (!m) return undefined;
    const resamples = Number(m[1]);
    if (resamples < RESAMPLES.min || resamples > RESAMPLES.max) throw new InputError(`bundles take ${RESAMPLES.min} to ${RESAMPLES.max} resamples; got ${resamples}`);
    return { kind: 'bundles', resamples };
  },
  format: (s) => `bundles:${s.resamples}`,
  words: (s, seed) =>
    `bundles, ${s.resamples} resamples: the rows dealt into up to ${MAX_BUNDLES.toLocaleString('en-US')} bundles by a seeded hash of their row number, bundles drawn with replacement, error on the bundles left out, seed ${seed}`,
  check(s) {
    if (!Number.isInteger(s.resamples) || s.resamples < RESAMPLES.min || s.resamples > RESAMPLES.max) {
      throw new InputError(`bundles take a whole number of resamples from ${RESAMPLES.min} to ${RESAMPLES.max}; got ${s.resamples}`);
    }
  },
  count: (s) => s.resamples,
  draw(_s, r, state: DrawState) {
    const { n, w, weights, testIdx, powerSums, seed, order } = state;
    const B = bundleCount(n);
    let scratch = state.scratch.bundles as BundleScratch | undefined;
    if (!scratch) {
      const bundle = new Int32Array(n);
      for (let i = 0; i < n; i++) bundle[i] = bundleOf(i, seed, B);
      scratch = { bundle, counts: new Uint32Array(B) };
      if (powerSums) {
        // Each bundle's power sums (the streamed fit adds its rows in file order, equal to rounding).
        const size = powerSums.train.length;
        const sums = new Float64Array(B * size);
        if (powerSums.addByLabel) powerSums.addByLabel(powerSums.labelsByRank ? Uint16Array.from(order, (i) => bundle[i] as number) : Uint16Array.from(bundle), sums);
        else {
          const add = powerSums.add as NonNullable<typeof powerSums.add>;
          for (let i = 0; i < n; i++) {
            const b = bundle[i] as number;
            add(sums.subarray(b * size, (b + 1) * size), i, w ? (w[i] as number) : 1);
          }
        }
        scratch.sums = sums;
      }
      state.scratch.bundles = scratch;
    }
    const { bundle, counts } = scratch;
    bundleCounts(B, seed, r, counts);
    if (powerSums && scratch.sums) combineBundles(scratch.sums, powerSums.train.length, counts, powerSums.train, powerSums.test);
    let nTest = 0;
    for (let i = 0; i < n; i++) {
      const c = counts[bundle[i] as number] as number;
      if (weights) weights[i] = c * (w ? (w[i] as number) : 1);
      if (c === 0) testIdx[nTest++] = i;
    }
    return nTest;
  },
};
