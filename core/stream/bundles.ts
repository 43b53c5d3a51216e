/**
 * The bundle resampling of rows (docs/design.md, "Streaming"): every row is dealt into one
 * of B bundles by a seeded hash of its row number, and resample r draws B bundles with
 * replacement; a bundle's multiplicity becomes the training weight of each of its rows, and
 * the bundles not drawn are held out. Per bundle and cell the power sums are kept once, so a
 * resample costs O(B x cells) whatever the number of rows, and a file read in passes needs
 * one pass for every resample. The same arithmetic serves the in-memory engine (through
 * the scheme's draw, core/registry/resampling/bundles.ts) and the streamed fit
 * (core/stream/streamFit.ts), so both give the same numbers.
 */
import { RandomStream } from '../tune/rng';

/** Most bundles (fewer when there are fewer rows). */
export const MAX_BUNDLES = 1024;
/** First random stream of the bundles' draws: stream STREAM_BASE + r for resample r (the bootstrap uses 1 + r, the held-out split 2,000,000). */
const STREAM_BASE = 3_000_000;

/** Number of bundles for n rows: min(MAX_BUNDLES, n). */
export function bundleCount(n: number): number {
  return Math.max(1, Math.min(MAX_BUNDLES, n));
}

/**
 * The bundle of row `row` (0-based among the rows used) of B: the 32-bit finaliser of
 * MurmurHash3 (Appleby 2011, "fmix32") applied to the row number mixed with the seed, then
 * scaled to 0..B-1 by multiplication. O(1). Example: bundleOf(0, 1, 1024) is in 0..1023.
 */
export function bundleOf(row: number, seed: number, bundles: number): number {
  let h = (row ^ Math.imul(seed | 0, 0x9e3779b9) ^ (Math.floor(row / 2 ** 32) * 0x85ebca6b)) | 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return Math.floor(((h >>> 0) * bundles) / 4294967296);
}

/**
 * The multiplicities of resample r: B draws of the B bundles with replacement from the
 * seeded stream of (seed, r), as the bootstrap draws rows (Efron & Tibshirani 1993, chapter
 * 6). Writes counts (length B). O(B).
 */
export function bundleCounts(bundles: number, seed: number, r: number, counts: Uint32Array): void {
  counts.fill(0);
  new RandomStream(seed, STREAM_BASE + r).countDraws(bundles, bundles, counts);
}

/**
 * Training and held-out sums of one resample from the per-bundle sums (`perBundle`, bundle
 * after bundle, `size` numbers each): train = sum of counts[b] x bundle b, test = sum of the
 * bundles with count 0, in bundle order. O(B x size).
 */
export function combineBundles(perBundle: Float64Array, size: number, counts: Uint32Array, train: Float64Array, test: Float64Array): void {
  train.fill(0);
  test.fill(0);
  for (let b = 0; b < counts.length; b++) {
    const c = counts[b] as number;
    const o = b * size;
    if (c === 0) for (let k = 0; k < size; k++) test[k] = (test[k] as number) + (perBundle[o + k] as number);
    else for (let k = 0; k < size; k++) train[k] = (train[k] as number) + c * (perBundle[o + k] as number);
  }
}
