import { strict as assert } from 'node:assert';
import { pchisq, pf } from '../../../core/stats/distributions';
import { quadraticFormLowerTail } from '../../../core/stats/imhof';

/** Weights: k copies of 1 and l copies of -c. */
function weights(k: number, l: number, c: number): Float64Array {
  const w = new Float64Array(k + l);
  w.fill(1, 0, k);
  w.fill(-c, k);
  return w;
}

describe('quadraticFormLowerTail', () => {
  it('quadraticFormLowerTail(chi2_k - c chi2_l) equals the F distribution P(F(k, l) < c l / k) to 1e-9', () => {
    // chi2_k / chi2_l < c  <=>  (chi2_k / k) / (chi2_l / l) < c l / k (definition of F).
    for (const [k, l, c] of [
      [1, 1, 1],
      [3, 5, 0.7],
      [10, 2, 3],
      [40, 45, 0.9],
      [2, 60, 0.01],
      [1, 1, 1e-4],
      [1, 30, 25],
    ] as const) {
      const got = quadraticFormLowerTail(weights(k, l, c));
      const want = pf((c * l) / k, k, l);
      assert.ok(Math.abs(got - want) <= 1e-9, `k=${k} l=${l} c=${c}: ${got} vs ${want}`);
    }
  });

  it('quadraticFormLowerTail of unequal weights is symmetric: P(Q < 0) + P(-Q < 0) = 1', () => {
    // Symmetry: P(Q < 0) + P(-Q < 0) = 1 for a continuous Q.
    const lambda = Float64Array.of(3.1, 0.4, -0.2, -1.7, 0.05, 2.2, -0.9);
    const neg = lambda.map((v) => -v);
    const sum = quadraticFormLowerTail(lambda) + quadraticFormLowerTail(neg);
    assert.ok(Math.abs(sum - 1) <= 1e-9, `sum ${sum}`);
  });

  it('quadraticFormLowerTail with many weights of one sign and a large negative one tends to the chi-square', () => {
    // chi2_k - c z^2 with c = q * m and the z^2 replaced by the mean of m chi2_1 terms:
    // P(chi2_k < q * chi2_m / m) -> P(chi2_k < q) as m grows; with m = 4000 the F form is exact.
    const k = 6;
    const q = 4.2;
    const m = 4000;
    const got = quadraticFormLowerTail(weights(k, m, q / m));
    assert.ok(Math.abs(got - pf(q / k, k, m)) <= 1e-9, `${got}`);
    assert.ok(Math.abs(got - pchisq(q, k)) <= 2e-3, `${got} vs ${pchisq(q, k)}`);
  });

  it('quadraticFormLowerTail is 0 for positive and 1 for negative weights; rejects empty or non-finite input', () => {
    assert.equal(quadraticFormLowerTail(Float64Array.of(1, 2)), 0);
    assert.equal(quadraticFormLowerTail(Float64Array.of(-1, -2)), 1);
    assert.throws(() => quadraticFormLowerTail(new Float64Array(0)), /at least one weight/);
    assert.throws(() => quadraticFormLowerTail(Float64Array.of(1, NaN)), /weight 1 is not finite/);
  });
});
