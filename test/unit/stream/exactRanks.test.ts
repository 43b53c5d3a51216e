/**
 * Tests of the exact order statistics found in passes (core/stream/exactRanks.ts): the value
 * at every asked rank equals the sorted array's, whatever the spread, ties and clusters of
 * the values and however few values a pass may collect; the type-7 quantiles from them equal
 * core/stats/quantile.ts quantileType7 to the last bit. Reference: sorting (an exact
 * property). Data: seeded invented values (property tests).
 */
import { strict as assert } from 'node:assert';
import { ExactRanks, type7From, type7Ranks } from '../../../core/stream/exactRanks';
import { quantileType7 } from '../../../core/stats/quantile';
import { RandomStream } from '../../../core/tune/rng';

/** Runs passes over `values` until every rank is known; returns the finder and the passes taken. */
function find(values: Float64Array, ranks: number[], collectLimit: number): { finder: ExactRanks; passes: number } {
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    min = Math.min(min, v);
    max = Math.max(max, v);
  }
  const finder = new ExactRanks(values.length, ranks, min, max, collectLimit);
  let passes = 0;
  while (!finder.done) {
    for (const v of values) finder.offer(v);
    finder.endPass();
    passes++;
    assert.ok(passes < 20, 'the passes end');
  }
  return { finder, passes };
}

/** Seeded samples of several shapes. */
function samples(seed: number): { uniform: Float64Array; ties: Float64Array; cluster: Float64Array; signedZero: Float64Array; heavyTail: Float64Array } {
  const rng = new RandomStream(seed, 0);
  const u = (): number => rng.int(1 << 30) / (1 << 30);
  const n = 5000;
  return {
    uniform: Float64Array.from({ length: n }, () => u() * 100 - 50),
    ties: Float64Array.from({ length: n }, () => rng.int(10)),
    // A tight cluster far from a few outliers: the first bins hold nearly everything.
    cluster: Float64Array.from({ length: n }, (_, i) => (i % 500 === 0 ? 1e6 * (u() - 0.5) : 1e9 + u() * 1e-3)),
    signedZero: Float64Array.from({ length: n }, (_, i) => (i % 3 === 0 ? -0 : i % 3 === 1 ? 0 : u() - 0.5)),
    heavyTail: Float64Array.from({ length: n }, () => Math.tan(Math.PI * (u() - 0.5))),
  };
}

describe('ExactRanks', () => {
  it('finds the sorted value at every asked rank, with few values collected per pass (forcing several binned passes)', () => {
    for (const seed of [1, 2, 3]) {
      for (const [name, values] of Object.entries(samples(seed))) {
        const sorted = Float64Array.from(values, (v) => v + 0).sort();
        const n = values.length;
        const ranks = [0, 1, 2, 17, Math.floor(n / 3), Math.floor(n / 2), n - 2, n - 1];
        for (const limit of [8, 64, 1 << 22]) {
          const { finder } = find(values, ranks, limit);
          for (const r of ranks) assert.equal(Object.is(finder.value(r), sorted[r]), true, `${name}, seed ${seed}, limit ${limit}: rank ${r} is ${finder.value(r)}, sorted ${sorted[r]}`);
        }
      }
    }
  });

  it('counts distinct values exactly when the first pass collects them all, and never more than there are when it bins', () => {
    for (const [name, values] of Object.entries(samples(4))) {
      const truth = new Set(Array.from(values, (v) => v + 0)).size;
      const collected = find(values, [1], 1 << 22).finder;
      assert.equal(collected.distinctExact, true, name);
      assert.equal(collected.distinctAtLeast, truth, name);
      const binned = find(values, [1], 8).finder;
      assert.ok(binned.distinctAtLeast <= truth, `${name}: ${binned.distinctAtLeast} <= ${truth}`);
    }
  });

  it('needs no pass for values all equal, and knows the first and last rank from min and max', () => {
    const f = new ExactRanks(5, [0, 2, 4], 3, 3);
    assert.equal(f.done, true);
    assert.equal(f.value(2), 3);
    const g = new ExactRanks(5, [0, 4], 1, 9);
    for (const v of [9, 1, 5, 5, 2]) g.offer(v);
    g.endPass();
    assert.equal(g.done, true);
    assert.deepEqual([g.value(0), g.value(4)], [1, 9]);
  });

  it('stops with an error when a pass sees other values than the first (the file changed)', () => {
    const f = new ExactRanks(4, [1, 2], 0, 10, 1);
    for (const v of [0, 3, 7, 10]) f.offer(v);
    f.endPass();
    if (!f.done) {
      for (const v of [0, 3, 10]) f.offer(v);
      assert.throws(() => f.endPass(), /a pass saw/);
    }
  });
});

describe('type7From', () => {
  it('gives quantileType7 to the last bit at every natural-spline knot level from df 3 to 20 (Hyndman & Fan 1996, definition 7)', () => {
    const { uniform, ties } = samples(5);
    for (const values of [uniform, ties]) {
      const sorted = Float64Array.from(values, (v) => v + 0).sort();
      const n = sorted.length;
      for (let df = 3; df <= 20; df++) {
        const probs = Float64Array.from({ length: df - 2 }, (_, j) => (j + 1) / (df - 1));
        const ranks = type7Ranks(n, probs);
        const { finder } = find(values, ranks, 100);
        const streamed = type7From(n, probs, (r) => finder.value(r));
        assert.deepEqual(Array.from(streamed), Array.from(quantileType7(sorted, probs)), `df ${df}`);
      }
    }
  });
});
