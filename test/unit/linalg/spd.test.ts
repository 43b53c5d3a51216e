/**
 * The condition check of factorSpd (core/linalg/spd.ts) with the Frobenius bound of the
 * resampling hot path: cond_2(A) <= ||A||_F ||A^-1||_F (Golub & Van Loan, Matrix
 * Computations, 4th ed., section 2.3, norm equivalence), so trying the bound first never
 * changes the decision. Matrices: Hilbert matrices H_ij = 1 / (i + j - 1), whose 2-norm
 * condition numbers grow by about e^3.5 per order (Todd 1954; e.g. about 1.5e10 at order
 * 8 and 1.6e13 at order 10: known values, from memory); unit-diagonal scaling changes them
 * little.
 */
import { strict as assert } from 'node:assert';
import { FitError } from '../../../core/errors';
import { factorSpd, MAX_CONDITION } from '../../../core/linalg/spd';

function hilbert(p: number): Float64Array {
  const a = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) a[i * p + j] = 1 / (i + j + 1);
  return a;
}

/** 'pass' or 'fail' of the check. */
function decision(a: Float64Array, p: number, boundOnly: boolean): 'pass' | 'fail' {
  try {
    factorSpd(a, p, 'test', undefined, boundOnly);
    return 'pass';
  } catch (e) {
    if (e instanceof FitError) return 'fail';
    throw e;
  }
}

describe('factorSpd condition check with the Frobenius bound', () => {
  it('decides as the power-iteration estimate does, from well to badly conditioned', () => {
    const seen = new Set<string>();
    for (let p = 2; p <= 12; p++) {
      const a = hilbert(p);
      const plain = decision(a, p, false);
      assert.equal(decision(a, p, true), plain, `Hilbert matrix of order ${p}`);
      seen.add(plain);
    }
    assert.deepEqual([...seen].sort(), ['fail', 'pass'], 'the orders cover both decisions');
  });

  it('the bound lies at or above the estimate and within a factor of the order of it', () => {
    for (let p = 2; p <= 7; p++) {
      const a = hilbert(p);
      const estimate = factorSpd(a, p, 'test').condition;
      const bound = factorSpd(a, p, 'test', undefined, true).condition;
      assert.ok(bound >= estimate * (1 - 1e-9), `order ${p}: ${bound} >= ${estimate}`);
      assert.ok(bound <= p * estimate * (1 + 1e-6), `order ${p}: ${bound} <= ${p} x ${estimate}`);
      assert.ok(bound < MAX_CONDITION);
    }
  });
});
