import { strict as assert } from 'node:assert';
import { argsortStable } from '../../../core/stats/argsort';
import { selectRanks } from '../../../core/stats/selectRanks';
import { seededNormals } from './seededNormal';

/** The reference: the whole stable order read at the ranks (argsortStable, itself checked against a comparison sort in argsort.test.ts). */
function reference(values: Float64Array, ranks: Uint32Array): number[] {
  const order = argsortStable(values);
  return Array.from(ranks, (r) => order[r] as number);
}

/** Both tails whole and evenly spaced ranks between, as the normal quantile plot keeps them. */
function plotRanks(n: number, kept: number): Uint32Array {
  const tail = Math.floor(kept / 10);
  const middle = kept - 2 * tail;
  const rank = new Uint32Array(kept);
  for (let k = 0; k < tail; k++) {
    rank[k] = k;
    rank[kept - 1 - k] = n - 1 - k;
  }
  for (let k = 0; k < middle; k++) rank[tail + k] = tail + Math.round((k * (n - 1 - 2 * tail)) / (middle - 1));
  return rank;
}

describe('selectRanks', () => {
  it('selectRanks equals the stable argsort read at the ranks (normal, skewed, and rounded values with many ties)', () => {
    const n = 50_000;
    const z = seededNormals(3, n);
    const skewed = z.map((v) => Math.exp(2 * v));
    const rounded = z.map((v) => Math.round(v * 20) / 20);
    for (const values of [z, skewed, rounded]) {
      const ranks = plotRanks(n, 400);
      assert.deepEqual(Array.from(selectRanks(values, ranks)), reference(values, ranks));
    }
  });

  it('selectRanks orders ties, -0 and +0 included, by row index, as argsortStable does', () => {
    const values = Float64Array.of(2, 0, -1, -0, 2, 0, -1, -0, 0);
    const all = Uint32Array.from(values.keys());
    assert.deepEqual(Array.from(selectRanks(values, all)), reference(values, all));
    assert.deepEqual(Array.from(selectRanks(values, all)), [2, 6, 1, 3, 5, 7, 8, 0, 4]);
  });

  it('selectRanks handles equal values, a huge range, one outlier among clumped values, and no ranks', () => {
    const equal = new Float64Array(1000).fill(1.5);
    const ranks = Uint32Array.of(0, 17, 999);
    assert.deepEqual(Array.from(selectRanks(equal, ranks)), [0, 17, 999]);
    // max - min overflows to Infinity: the whole order is used.
    const huge = seededNormals(4, 1000).map((v) => v * 1e307);
    huge[5] = 1.7e308;
    huge[9] = -1.7e308;
    assert.deepEqual(Array.from(selectRanks(huge, ranks)), reference(huge, ranks));
    // Nearly every value in one bucket: the gathered share is too large and the whole order is used.
    const clumped = seededNormals(5, 5000).map((v) => 1 + v * 1e-9);
    clumped[100] = 1e6;
    const many = plotRanks(5000, 300);
    assert.deepEqual(Array.from(selectRanks(clumped, many)), reference(clumped, many));
    assert.equal(selectRanks(clumped, new Uint32Array(0)).length, 0);
  });

  it('selectRanks refuses ranks that do not increase or lie outside the values', () => {
    const v = Float64Array.of(1, 2, 3);
    assert.throws(() => selectRanks(v, Uint32Array.of(1, 1)), /ranks must increase and lie below 3; rank 1 is 1/);
    assert.throws(() => selectRanks(v, Uint32Array.of(3)), /rank 0 is 3/);
  });
});
