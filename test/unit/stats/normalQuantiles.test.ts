import { strict as assert } from 'node:assert';
import { argsortStable } from '../../../core/stats/argsort';
import { qnorm } from '../../../core/stats/distributions';
import { normalQuantiles } from '../../../core/stats/normalQuantiles';
import { seededNormals } from './seededNormal';

describe('normalQuantiles', () => {
  it('normalQuantiles uses (i - 3/8) / (n + 1/4) for n <= 10 and (i - 1/2) / n above (Blom 1958; R ppoints)', () => {
    const small = normalQuantiles(Float64Array.of(0.3, -1, 2));
    assert.deepEqual(Array.from(small.sample), [-1, 0.3, 2]);
    [1, 2, 3].forEach((i, k) => assert.ok(Math.abs((small.theoretical[k] as number) - qnorm((i - 0.375) / 3.25)) <= 1e-15));
    const x = seededNormals(2, 11);
    const big = normalQuantiles(x);
    for (let i = 1; i <= 11; i++) assert.ok(Math.abs((big.theoretical[i - 1] as number) - qnorm((i - 0.5) / 11)) <= 1e-15);
    // Sorted sample, with the input index of each point.
    for (let k = 0; k < 11; k++) assert.equal(big.sample[k], x[big.index[k] as number]);
    for (let k = 1; k < 11; k++) assert.ok((big.sample[k] as number) >= (big.sample[k - 1] as number));
  });

  it('normalQuantiles thins large samples to maxPoints, keeping both tails whole and using the full n', () => {
    const n = 10000;
    const x = seededNormals(6, n);
    const q = normalQuantiles(x, 500);
    assert.equal(q.sample.length, 500);
    assert.equal(q.n, n);
    // The 50 lowest and 50 highest ranks are all kept.
    for (let k = 0; k < 50; k++) {
      assert.equal(q.rank[k], k);
      assert.equal(q.rank[499 - k], n - 1 - k);
    }
    for (let k = 1; k < 500; k++) assert.ok((q.rank[k] as number) > (q.rank[k - 1] as number), `ranks increase at ${k}`);
    const r = q.rank[250] as number;
    assert.ok(Math.abs((q.theoretical[250] as number) - qnorm((r + 0.5) / n)) <= 1e-15);
  });

  it('normalQuantiles thinned: each kept point is the value at its rank of the stable sort (ties and non-finite values included)', () => {
    // The kept ranks are selected without sorting every value; the reference is the whole stable order (argsortStable).
    const n = 20_000;
    const x = seededNormals(8, n).map((v) => Math.round(v * 50) / 50);
    x[3] = NaN;
    x[4] = -Infinity;
    x[10] = -0;
    const q = normalQuantiles(x, 300);
    const source = Array.from(x.keys()).filter((i) => Number.isFinite(x[i] as number));
    const order = argsortStable(Float64Array.from(source, (i) => x[i] as number));
    assert.equal(q.n, n - 2);
    for (let k = 0; k < 300; k++) {
      const i = source[order[q.rank[k] as number] as number] as number;
      assert.equal(q.index[k], i, `point ${k}`);
      assert.ok(Object.is(q.sample[k], x[i]), `point ${k}`);
    }
  });

  it('normalQuantiles skips non-finite values and counts them', () => {
    const q = normalQuantiles(Float64Array.of(1, NaN, -2, Infinity, 0));
    assert.equal(q.n, 3);
    assert.equal(q.omitted, 2);
    assert.deepEqual(Array.from(q.index), [2, 4, 0]);
  });

  it('normalQuantiles orders tied values, -0 and +0 included, by input index (stable sort)', () => {
    const q = normalQuantiles(Float64Array.of(2, 0, -1, -0, 2, NaN, 0, -1));
    assert.deepEqual(Array.from(q.index), [2, 7, 1, 3, 6, 0, 4]);
    assert.deepEqual(Array.from(q.rank), [0, 1, 2, 3, 4, 5, 6]);
    const many = Float64Array.from({ length: 5000 }, (_, i) => (i * 37) % 5);
    const big = normalQuantiles(many, 5000);
    for (let k = 1; k < 5000; k++) {
      const [a, b] = [big.index[k - 1] as number, big.index[k] as number];
      assert.ok((many[a] as number) < (many[b] as number) || ((many[a] as number) === (many[b] as number) && a < b), `position ${k}`);
    }
  });

  it('normalQuantiles rejects maxPoints below 3', () => {
    assert.throws(() => normalQuantiles(Float64Array.of(1, 2, 3), 2), /maxPoints must be a whole number >= 3, got 2/);
  });
});
