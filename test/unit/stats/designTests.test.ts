import { strict as assert } from 'node:assert';
import { FitError, InputError } from '../../../core/errors';
import { breuschPagan } from '../../../core/stats/breuschPagan';
import { denseDesign } from '../../../core/stats/design';
import { durbinWatsonAndBreuschPagan } from '../../../core/stats/designTests';
import { durbinWatson } from '../../../core/stats/durbinWatson';
import { polynomialDesigns } from './polynomialDesigns';
import { seededNormals } from './seededNormal';

describe('durbinWatsonAndBreuschPagan', () => {
  it('durbinWatsonAndBreuschPagan gives exactly the results of durbinWatson and breuschPagan, exact and normal paths, both routes', () => {
    for (const n of [40, 99, 100, 150, 1000]) {
      for (const p of [2, 5, 8]) {
        const { monomials, chebyshev } = polynomialDesigns(n, p);
        const e = seededNormals(n + p, n).map((v, i) => v * (1 + i / n));
        for (const design of [monomials, chebyshev]) {
          // Tolerance 0: the same arithmetic, one pass instead of two.
          const both = durbinWatsonAndBreuschPagan(e, design);
          assert.deepEqual(both.durbinWatson, durbinWatson(e, design), `Durbin-Watson, n ${n}, p ${p}`);
          assert.deepEqual(both.breuschPagan, breuschPagan(e, design), `Breusch-Pagan, n ${n}, p ${p}`);
        }
      }
    }
  });

  it('durbinWatsonAndBreuschPagan calls design.row once per row from 100 rows on', () => {
    const n = 500;
    let calls = 0;
    const { chebyshev } = polynomialDesigns(n, 4);
    const counted = {
      p: 4,
      row(i: number, out: Float64Array): void {
        calls++;
        chebyshev.row(i, out);
      },
    };
    durbinWatsonAndBreuschPagan(seededNormals(9, n), counted);
    assert.equal(calls, n);
  });

  it("durbinWatsonAndBreuschPagan raises durbinWatson's errors first, then breuschPagan's", () => {
    const n = 120;
    const { chebyshev } = polynomialDesigns(n, 3);
    const e = seededNormals(2, n);
    e[7] = NaN;
    assert.throws(
      () => durbinWatsonAndBreuschPagan(e, chebyshev),
      (err: unknown) => err instanceof InputError && /Durbin-Watson: residual 8 is not a finite number/.test(err.message),
    );
    const alternating = Float64Array.from({ length: n }, (_, i) => (i % 2 ? 1 : -1));
    assert.throws(() => durbinWatsonAndBreuschPagan(alternating, chebyshev), /Breusch-Pagan: the squared residuals are all equal/);
    const ones = denseDesign(new Float64Array(n).fill(1), 1);
    assert.throws(() => durbinWatsonAndBreuschPagan(seededNormals(3, n), ones), /Breusch-Pagan needs an intercept and at least one regressor/);
    const collinear = denseDesign(
      Float64Array.from({ length: 2 * n }, (_, k) => (k % 2 ? 2 : 1)),
      2,
    );
    assert.throws(() => durbinWatsonAndBreuschPagan(seededNormals(4, n), collinear), FitError);
  });
});
