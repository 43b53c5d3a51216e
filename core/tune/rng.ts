/**
 * Seeded random stream: xoroshiro128+ (Blackman & Vigna 2018, "Scrambled linear
 * pseudorandom number generators") on four 32-bit state words, with unbiased integer
 * ranges by rejection. The sequence is the one of the pure-rand library's
 * `xoroshiro128plus` with `uniformInt` (test/unit/tune/rng.test.ts compares them draw for
 * draw), written out here so the bootstrap's inner loop runs without a call or an
 * allocation per draw. Streams are derived from (seed, stream index) so that every resample
 * has its own sequence whatever the number of worker threads, and results are identical on
 * every platform. Example: new RandomStream(42, 3).int(10) is in 0..9.
 */
export class RandomStream {
  // The state as the reference library orders it: s0 = (s01, s00), s1 = (s11, s10), high word first.
  private s01: number;
  private s00: number;
  private s11: number;
  private s10: number;

  constructor(seed: number, stream = 0) {
    if (!Number.isSafeInteger(seed)) throw new Error(`seed must be a whole number; got ${seed}`);
    // Mix the stream index into the 32-bit seed with a fixed odd multiplier (golden-ratio
    // constant), then skip a few outputs to decorrelate nearby seeds.
    const mixed = (Math.imul((seed | 0) ^ Math.imul(stream + 1, 0x9e3779b9), 0x85ebca6b) ^ (Math.floor(seed / 2 ** 32) | 0)) | 0;
    this.s01 = -1;
    this.s00 = ~mixed;
    this.s11 = mixed | 0;
    this.s10 = 0;
    for (let i = 0; i < 8; i++) this.next();
  }

  /** The next 32-bit output, as a signed 32-bit integer. */
  next(): number {
    const s00 = this.s00;
    const s01 = this.s01;
    const out = (s00 + this.s10) | 0;
    const a0 = this.s10 ^ s00;
    const a1 = this.s11 ^ s01;
    this.s00 = (s00 << 24) ^ (s01 >>> 8) ^ a0 ^ (a0 << 16);
    this.s01 = (s01 << 24) ^ (s00 >>> 8) ^ a1 ^ ((a1 << 16) | (a0 >>> 16));
    this.s10 = (a1 << 5) ^ (a0 >>> 27);
    this.s11 = (a0 << 5) ^ (a1 >>> 27);
    return out;
  }

  /** Uniform integer in 0..n-1, for n from 1 to 2^32. */
  int(n: number): number {
    if (!(n >= 1 && n <= 2 ** 32) || !Number.isInteger(n)) throw new Error(`a random integer range needs 1 to 2^32 values; got ${n}`);
    // Outputs at or above the largest multiple of n are redrawn, so every value is equally likely.
    const limit = n > 2 ? Math.floor(2 ** 32 / n) * n : 2 ** 32;
    let v = this.next() + 2 ** 31;
    while (v >= limit) v = this.next() + 2 ** 31;
    // v - floor(v / n) n is v mod n exactly: v < 2^32 and n <= 2^32 keep the quotient's rounding off any whole number.
    return v - Math.floor(v / n) * n;
  }

  /**
   * Adds one to counts[int(n)], `draws` times: the bootstrap's draw of `draws` rows out of
   * n with replacement, the same sequence as that many calls of int(n), in one loop.
   */
  countDraws(n: number, draws: number, counts: Uint32Array): void {
    if (!(n >= 1 && n <= 2 ** 32) || !Number.isInteger(n)) throw new Error(`a random integer range needs 1 to 2^32 values; got ${n}`);
    const limit = n > 2 ? Math.floor(2 ** 32 / n) * n : 2 ** 32;
    let s00 = this.s00;
    let s01 = this.s01;
    let s10 = this.s10;
    let s11 = this.s11;
    for (let k = 0; k < draws;) {
      const out = (s00 + s10) | 0;
      const a0 = s10 ^ s00;
      const a1 = s11 ^ s01;
      const t00 = s00;
      s00 = (s00 << 24) ^ (s01 >>> 8) ^ a0 ^ (a0 << 16);
      s01 = (s01 << 24) ^ (t00 >>> 8) ^ a1 ^ ((a1 << 16) | (a0 >>> 16));
      s10 = (a1 << 5) ^ (a0 >>> 27);
      s11 = (a0 << 5) ^ (a1 >>> 27);
      const v = out + 2 ** 31;
      if (v >= limit) continue;
      const j = v - Math.floor(v / n) * n;
      counts[j] = (counts[j] as number) + 1;
      k++;
    }
    this.s00 = s00;
    this.s01 = s01;
    this.s10 = s10;
    this.s11 = s11;
  }
}
