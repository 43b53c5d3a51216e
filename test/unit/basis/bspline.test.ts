/**
 * Tests of the cubic B-spline evaluator's values-only path (core/basis/bspline.ts): the
 * unrolled loop must give the bits of the general loop (which also computes derivatives),
 * and the values form a partition of unity (de Boor 1978, A Practical Guide to Splines,
 * chapter IX, property (iv)). Knots: clamped vectors with repeated and close interior knots.
 */
import { strict as assert } from 'node:assert';
import { BSplineEvaluator, clampedKnots } from '../../../core/basis/bspline';
import { RandomStream } from '../../../core/tune/rng';

describe('BSplineEvaluator values only', () => {
  const rng = new RandomStream(17, 0);
  const knotSets = [
    clampedKnots(0, 1, Float64Array.of(0.25, 0.5, 0.75)),
    clampedKnots(-3, 1e6, Float64Array.of(-2.999, 0, 0, 1e-9, 17, 5e5)),
    clampedKnots(1e-300, 3e-300, Float64Array.of(2e-300)),
    clampedKnots(10, 20, new Float64Array(0)),
  ];

  it('eval(x, 0) gives the values of eval(x, 1), bit for bit, at knots, between them, at and beyond the ends', () => {
    for (const t of knotSets) {
      const fast = new BSplineEvaluator(t);
      const general = new BSplineEvaluator(t);
      const lo = t[3] as number;
      const hi = t[t.length - 4] as number;
      const xs = [...t, lo - 1, hi + 1, lo, hi, ...Array.from({ length: 2000 }, () => lo + ((hi - lo) * rng.int(1_000_001)) / 1_000_000)];
      for (const x of xs) {
        const first = fast.eval(x, 0);
        assert.equal(general.eval(x, 1), first, `first basis function at x = ${x}`);
        for (let j = 0; j < 4; j++) assert.ok(Object.is(fast.value[j], general.value[j]), `value ${j} at x = ${x}: ${fast.value[j]} against ${general.value[j]}`);
        const sum = (fast.value[0] as number) + (fast.value[1] as number) + (fast.value[2] as number) + (fast.value[3] as number);
        assert.ok(Math.abs(sum - 1) <= 1e-12, `partition of unity at x = ${x}: ${sum}`);
      }
    }
  });
});
