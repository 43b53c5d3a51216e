import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { binnedDensity } from '../../../core/stats/density';

describe('binnedDensity', () => {
  it('binnedDensity counts points in half-open bins, the last bin closed, row-major with y rows from the bottom', () => {
    const x = Float64Array.of(0, 0.49, 0.5, 1, 1, 0.2);
    const y = Float64Array.of(0, 0, 0, 1, 0.5, 0.99);
    const g = binnedDensity(x, y, 2, 2, [0, 1], [0, 1]);
    // (0,0),(0.49,0) -> cell 0; (0.5,0) -> cell 1; (1,1),(1,0.5) -> cell 3; (0.2,0.99) -> cell 2.
    assert.deepEqual(Array.from(g.counts), [2, 1, 1, 2]);
    assert.equal(g.maxCount, 2);
    assert.equal(g.outside, 0);
  });

  it('binnedDensity defaults to the data ranges, widens a constant range and counts points outside or non-finite', () => {
    const g = binnedDensity(Float64Array.of(2, 2, 2, NaN), Float64Array.of(1, 5, 3, 0), 3, 4);
    assert.deepEqual(g.xRange, [1.5, 2.5]);
    assert.deepEqual(g.yRange, [0, 5]);
    assert.equal(g.outside, 1);
    const clipped = binnedDensity(Float64Array.of(-1, 0.5, 3), Float64Array.of(0.5, 0.5, 0.5), 2, 1, [0, 1], [0, 1]);
    assert.equal(clipped.outside, 2);
    assert.deepEqual(Array.from(clipped.counts), [0, 1]);
  });

  it('binnedDensity keeps every finite point inside its own ranges (property, seeded)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: -1e9, max: 1e9, noNaN: true }), fc.double({ min: -5, max: 5, noNaN: true })), { minLength: 1, maxLength: 200 }),
        fc.integer({ min: 1, max: 30 }),
        fc.integer({ min: 1, max: 30 }),
        (pts, nx, ny) => {
          const g = binnedDensity(
            Float64Array.from(pts, (p) => p[0]),
            Float64Array.from(pts, (p) => p[1]),
            nx,
            ny,
          );
          const total = g.counts.reduce((s, c) => s + c, 0);
          return total === pts.length && g.outside === 0 && g.counts.length === nx * ny;
        },
      ),
      { seed: 3, numRuns: 150 },
    );
  });

  it('binnedDensity rejects mismatched lengths, bad grid sizes and empty ranges', () => {
    assert.throws(() => binnedDensity(new Float64Array(2), new Float64Array(3), 2, 2), /x has 2 values but y has 3/);
    assert.throws(() => binnedDensity(new Float64Array(2), new Float64Array(2), 0, 2), /nx must be a whole number >= 1, got 0/);
    assert.throws(() => binnedDensity(new Float64Array(2), new Float64Array(2), 2, 2, [1, 1]), /x range must be finite with upper > lower, got \[1, 1\]/);
  });
});
