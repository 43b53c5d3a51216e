import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { InputError } from '../../../core/errors';
import { quantileType7 } from '../../../core/stats/quantile';

describe('quantileType7', () => {
  it('quantileType7 of 1..n is 1 + (n - 1) p (Hyndman & Fan 1996, definition 7: linear in the order statistics)', () => {
    const x = Float64Array.from({ length: 11 }, (_, i) => i + 1);
    const probs = [0, 0.05, 0.25, 1 / 3, 0.5, 0.9, 1];
    const q = quantileType7(x, probs);
    probs.forEach((p, k) => assert.ok(Math.abs((q[k] as number) - (1 + 10 * p)) <= 1e-14, `p = ${p}: ${q[k]}`));
  });

  it('quantileType7 hits the order statistics at p = k / (n - 1) and interpolates linearly between them', () => {
    // Hyndman & Fan (1996), definition 7: p_k = (k - 1) / (n - 1) maps to x_(k).
    const x = Float64Array.of(-3, 0.5, 0.5, 2, 10);
    const q = quantileType7(x, [0, 0.25, 0.5, 0.75, 1, 0.875]);
    assert.deepEqual(Array.from(q.subarray(0, 5)), [-3, 0.5, 0.5, 2, 10]);
    assert.ok(Math.abs((q[5] as number) - 6) <= 1e-14); // halfway between 2 and 10
  });

  it('quantileType7 is monotone in p and stays within [min, max] (property, seeded)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 40 }),
        fc.array(fc.double({ min: 0, max: 1, noNaN: true }), { minLength: 1, maxLength: 10 }),
        (values, probs) => {
          const sorted = Float64Array.from(values).sort();
          const ps = probs.slice().sort((a, b) => a - b);
          const q = quantileType7(sorted, ps);
          for (let k = 0; k < q.length; k++) {
            const v = q[k] as number;
            if (v < (sorted[0] as number) || v > (sorted[sorted.length - 1] as number)) return false;
            if (k > 0 && v < (q[k - 1] as number) - 1e-9 * Math.abs(v)) return false;
          }
          return true;
        },
      ),
      { seed: 7, numRuns: 200 },
    );
  });

  it('quantileType7 of one value is that value for every p', () => {
    assert.deepEqual(Array.from(quantileType7(Float64Array.of(4.5), [0, 0.3, 1])), [4.5, 4.5, 4.5]);
  });

  it('quantileType7 rejects empty, unsorted and NaN samples and probabilities outside [0, 1]', () => {
    assert.throws(() => quantileType7(new Float64Array(0), [0.5]), InputError);
    assert.throws(() => quantileType7(Float64Array.of(1, 3, 2), [0.5]), /index 2 \(2\) is below the one before \(3\)/);
    assert.throws(() => quantileType7(Float64Array.of(1, NaN), [0.5]), /index 1 is NaN/);
    assert.throws(() => quantileType7(Float64Array.of(1, 2), [1.2]), /probability 0 must be in \[0, 1\], got 1.2/);
  });
});
