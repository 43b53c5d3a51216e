import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { argsortStable, sortedOrder } from '../../../core/stats/argsort';
import { orderByX } from '../../../core/tune/plan';
import { isOrderOf, sortedCopy, xInOrder } from '../../../core/stats/orderByX';

/**
 * Reference order: Array.prototype.sort, which ECMAScript 2019 (ECMA-262 10th ed.,
 * section 22.1.3.27) requires to be stable, with NaN placed after every number.
 */
function referenceOrder(values: Float64Array): number[] {
  const idx = Array.from({ length: values.length }, (_, i) => i);
  return idx.sort((a, b) => {
    const va = values[a] as number;
    const vb = values[b] as number;
    const na = Number.isNaN(va);
    const nb = Number.isNaN(vb);
    if (na || nb) return Number(na) - Number(nb);
    return va < vb ? -1 : va > vb ? 1 : 0;
  });
}

/** Doubles of every kind: ordinary, huge, tiny, subnormal, signed zeros, infinities, NaN. */
const anyDouble = fc.oneof(fc.double(), fc.constantFrom(0, -0, NaN, Infinity, -Infinity, 5e-324, -5e-324, Number.MAX_VALUE, -Number.MAX_VALUE, 1, -1), fc.integer({ min: -3, max: 3 }));

describe('argsortStable', () => {
  it('argsortStable orders by value with ties by index (worked example in the doc comment)', () => {
    assert.deepEqual(Array.from(argsortStable(Float64Array.of(3, -1, 3, 0))), [1, 3, 0, 2]);
  });

  it('argsortStable equals the stable Array.prototype.sort order for any doubles (ECMA-262 stable sort)', () => {
    // Short arrays take the insertion path, longer ones the radix passes.
    for (const [minLength, maxLength] of [
      [0, 31],
      [32, 400],
    ] as const) {
      fc.assert(
        fc.property(fc.array(anyDouble, { minLength, maxLength, size: 'max' }), (list) => {
          const values = Float64Array.from(list);
          assert.deepEqual(Array.from(argsortStable(values)), referenceOrder(values));
        }),
        { numRuns: 200 },
      );
    }
  });

  it('argsortStable equals the stable sort for finite doubles with NaN, the bucket path (ECMA-262 stable sort)', () => {
    // Without infinities the values take the bucket path: spread, clustered, tied, tiny ranges and wide ones.
    const finite = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true }),
      fc.double({ min: 1, max: 1.000001, noNaN: true }),
      fc.constantFrom(0, -0, NaN, 5e-324, -5e-324, Number.MAX_VALUE, -Number.MAX_VALUE / 4, 1, -1, 2),
      fc.integer({ min: -3, max: 3 }),
    );
    fc.assert(
      fc.property(fc.array(finite, { minLength: 32, maxLength: 3000, size: 'max' }), (list) => {
        const values = Float64Array.from(list);
        const { order, sorted } = sortedOrder(values);
        assert.deepEqual(Array.from(order), referenceOrder(values));
        // The sorted values are the input's own, -0 kept (Object.is), NaN last.
        assert.ok(Array.from(order).every((i, k) => Object.is(sorted[k], values[i])));
      }),
      { numRuns: 300 },
    );
  });

  it('argsortStable of skewed values takes nested buckets and the merge sort, in the stable order', () => {
    const n = 20_000;
    // Powers of two (every bucket but the last nearly empty, depth after depth) and a log-normal-like spread with ties.
    const powers = Float64Array.from({ length: n }, (_, i) => 2 ** ((i * 7919) % 900) * ((i % 3) - 1));
    assert.deepEqual(Array.from(argsortStable(powers)), referenceOrder(powers));
    const skewed = Float64Array.from({ length: n }, (_, i) => Math.round(Math.exp(((i * 104729) % 1000) / 60) * 100) / 100);
    assert.deepEqual(Array.from(argsortStable(skewed)), referenceOrder(skewed));
  });

  it('argsortStable treats -0 and +0 as equal and puts NaN last, both by index (radix and insertion paths)', () => {
    for (const n of [8, 200]) {
      const pattern = [0, -0, NaN, -1];
      const values = Float64Array.from({ length: n }, (_, i) => pattern[i % 4] as number);
      const rows = (keep: (i: number) => boolean): number[] => Array.from({ length: n }, (_, i) => i).filter(keep);
      const expected = [...rows((i) => i % 4 === 3), ...rows((i) => i % 4 < 2), ...rows((i) => i % 4 === 2)];
      assert.deepEqual(Array.from(argsortStable(values)), expected);
    }
  });

  it('argsortStable handles many rows with heavy ties and values sharing their high bits', () => {
    const n = 50_000;
    const tied = Float64Array.from({ length: n }, (_, i) => ((i * 7919) % 13) - 6);
    assert.deepEqual(Array.from(argsortStable(tied)), referenceOrder(tied));
    // Nanosecond timestamps: equal in all but the lowest bits of the mantissa.
    const close = Float64Array.from({ length: n }, (_, i) => 1.7e18 + ((i * 104729) % 5000) * 256);
    assert.deepEqual(Array.from(argsortStable(close)), referenceOrder(close));
  });

  it('argsortStable of an empty or one-value array', () => {
    assert.equal(argsortStable(new Float64Array(0)).length, 0);
    assert.deepEqual(Array.from(argsortStable(Float64Array.of(NaN))), [0]);
  });

  it("the bucket path's edge cases give the stable order and the values in it: all NaN, mostly NaN, a range too narrow to divide, all equal (ECMA-262 stable sort)", () => {
    const cases: [string, Float64Array][] = [
      ['all NaN', new Float64Array(100).fill(NaN)],
      ['30 NaN among 40', Float64Array.from({ length: 40 }, (_, i) => (i % 4 === 0 ? i / 3 : NaN))],
      ['0 and the least subnormal', Float64Array.from({ length: 500 }, (_, i) => (i % 3 === 0 ? 5e-324 : i % 7 === 0 ? NaN : 0))],
      ['all equal', new Float64Array(300).fill(-2.5)],
    ];
    for (const [name, v] of cases) {
      const { order, sorted } = sortedOrder(v);
      assert.deepEqual(Array.from(order), referenceOrder(v), name);
      assert.deepEqual(
        Array.from(sorted),
        Array.from(order, (i) => v[i] as number),
        `${name}: values in order`,
      );
    }
  });

  it('orderByX is the stable argsort of x', () => {
    const x = Float64Array.from({ length: 1000 }, (_, i) => Math.round(Math.sin(i) * 20) / 4);
    assert.deepEqual(Array.from(orderByX(x)), referenceOrder(x));
  });

  it('xInOrder is x read in the order of orderByX, and isOrderOf knows only that order', () => {
    const x = Float64Array.from({ length: 1000 }, (_, i) => Math.round(Math.sin(i) * 20) / 4);
    const order = orderByX(x);
    assert.deepEqual(
      Array.from(xInOrder(x)),
      Array.from(order, (i) => x[i]),
    );
    assert.equal(xInOrder(x), xInOrder(x));
    assert.ok(isOrderOf(x, order));
    assert.ok(!isOrderOf(x, Int32Array.from(order)));
  });

  it('sortedCopy equals the typed-array sort (ECMA-262 %TypedArray%.prototype.sort: -0 before +0, NaN last), bit for bit', () => {
    const cases = [
      Float64Array.of(0, -0, -1, 0, -0, 2, NaN, -0, 1),
      Float64Array.from({ length: 3000 }, (_, i) => (i % 7 === 0 ? (i % 2 ? -0 : 0) : Math.round(Math.cos(i) * 9) / 3)),
      new Float64Array(0),
    ];
    for (const x of cases) {
      const got = sortedCopy(x);
      const want = Float64Array.from(x).sort();
      assert.equal(got.length, want.length);
      for (let k = 0; k < want.length; k++) assert.ok(Object.is(got[k], want[k]), `position ${k}: ${got[k]} against ${want[k]}`);
    }
    fc.assert(
      fc.property(fc.array(fc.constantFrom(-0, 0, 1, -1, 2.5), { maxLength: 40 }), (values) => {
        const x = Float64Array.from(values);
        const want = Float64Array.from(x).sort();
        return sortedCopy(x).every((v, k) => Object.is(v, want[k]));
      }),
    );
  });
});
