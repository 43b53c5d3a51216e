/**
 * The seeded stream against the reference: pure-rand's xoroshiro128+ generator and its
 * unbiased integer draw (the npm package pure-rand 8, a general-purpose random-number
 * library), draw for draw, for the seeds, streams and ranges the resampling uses. Records
 * written before the stream was written out in core/tune/rng.ts drew from that library, so
 * equality here is what keeps their resamples, and `knotwise check` on them, unchanged.
 */
import assert from 'node:assert/strict';
import { uniformInt } from 'pure-rand/distribution/uniformInt';
import { xoroshiro128plus } from 'pure-rand/generator/xoroshiro128plus';
import { RandomStream } from '../../../core/tune/rng';

/** The reference stream, seeded as core/tune/rng.ts seeds its own. */
function reference(seed: number, stream: number): (n: number) => number {
  const mixed = (Math.imul((seed | 0) ^ Math.imul(stream + 1, 0x9e3779b9), 0x85ebca6b) ^ (Math.floor(seed / 2 ** 32) | 0)) | 0;
  const g = xoroshiro128plus(mixed);
  for (let i = 0; i < 8; i++) g.next();
  return (n) => uniformInt(g, 0, n - 1);
}

describe('seeded random stream (xoroshiro128+, reference: pure-rand)', function () {
  const seeds = [1, 0, -7, 42, 2 ** 31 - 1, 2 ** 40 + 3, -(2 ** 45)];
  const streams = [0, 1, 50, 1_000_000, 2_000_000];
  // Ranges from one value to 2^32, including those that reject many draws (just above a power of two).
  const ranges = [1, 2, 3, 10, 1000, 2 ** 31 + 1, 3 * 2 ** 30, 2 ** 32 - 1, 2 ** 32, 1_000_000];

  it('int(n) draws the same integers as the reference, for every seed, stream and range', function () {
    for (const seed of seeds)
      for (const stream of streams) {
        const ours = new RandomStream(seed, stream);
        const theirs = reference(seed, stream);
        for (let k = 0; k < 400; k++) {
          const n = ranges[k % ranges.length] as number;
          assert.equal(ours.int(n), theirs(n), `seed ${seed}, stream ${stream}, draw ${k}, range ${n}`);
        }
      }
  });

  it('countDraws counts the same rows as that many int(n) calls, and leaves the stream where they would', function () {
    for (const n of [1, 7, 1000, 5000]) {
      const draws = 3000;
      const ours = new RandomStream(11, 3);
      const counted = new Uint32Array(n);
      ours.countDraws(n, draws, counted);
      const theirs = reference(11, 3);
      const expected = new Uint32Array(n);
      for (let k = 0; k < draws; k++) {
        const j = theirs(n);
        expected[j] = (expected[j] as number) + 1;
      }
      assert.deepEqual(counted, expected, `range ${n}`);
      assert.equal(ours.int(n), theirs(n), `the next draw after countDraws, range ${n}`);
    }
  });

  it('refuses a range it cannot draw from uniformly', function () {
    const r = new RandomStream(1);
    for (const n of [0, -1, 0.5, 2 ** 32 + 1, NaN]) assert.throws(() => r.int(n), /1 to 2\^32/);
  });
});
