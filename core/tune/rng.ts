import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';
import { uniformInt } from 'pure-rand/distribution/uniformInt';
import type { RandomGenerator } from 'pure-rand/types/RandomGenerator';

/**
 * Seeded random stream: xoroshiro128+ (Blackman & Vigna 2018, "Scrambled linear
 * pseudorandom number generators") from the pure-rand library, with unbiased integer
 * ranges. Streams are derived from (seed, stream index) so that every resample has its
 * own sequence whatever the number of worker threads, and results are identical on every
 * platform. Example: new RandomStream(42, 3).int(10) is in 0..9.
 */
export class RandomStream {
  private readonly g: RandomGenerator;
  constructor(seed: number, stream = 0) {
    if (!Number.isSafeInteger(seed)) throw new Error(`seed must be a whole number; got ${seed}`);
    // Mix the stream index into the 32-bit seed with a fixed odd multiplier (golden-ratio
    // constant), then skip a few outputs to decorrelate nearby seeds.
    const mixed = (Math.imul((seed | 0) ^ Math.imul(stream + 1, 0x9e3779b9), 0x85ebca6b) ^ (Math.floor(seed / 2 ** 32) | 0)) | 0;
    this.g = xoroshiro128plus(mixed);
    for (let i = 0; i < 8; i++) this.g.next();
  }

  /** Uniform integer in 0..n-1. */
  int(n: number): number {
    return uniformInt(this.g, 0, n - 1);
  }
}
