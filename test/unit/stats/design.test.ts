import { strict as assert } from 'node:assert';
import { InputError } from '../../../core/errors';
import { denseDesign } from '../../../core/stats/design';

describe('denseDesign', () => {
  it('denseDesign reads row-major rows and reports n and p', () => {
    const d = denseDesign(Float64Array.of(1, 0, 1, 1, 1, 2), 2);
    assert.equal(d.n, 3);
    assert.equal(d.p, 2);
    const row = new Float64Array(2);
    d.row(2, row);
    assert.deepEqual(Array.from(row), [1, 2]);
  });

  it('denseDesign rejects a length that is not a whole number of rows and a bad column count', () => {
    assert.throws(
      () => denseDesign(new Float64Array(5), 2),
      (e: unknown) => e instanceof InputError && /5\) are not a whole number of rows of 2 columns/.test(e.message),
    );
    assert.throws(() => denseDesign(new Float64Array(4), 0), /whole number of columns >= 1, got 0/);
  });
});
