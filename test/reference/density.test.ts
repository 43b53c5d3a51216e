/**
 * External reference check of the density grid the panel and the report draw when readings
 * would overplot (core/view/cloud.ts cloudOf) against R: fixture
 * test/reference/fixtures/density.json, written by test/reference/r/density.R (regenerate
 * with `Rscript test/reference/r/density.R` from the repository root). R counts the
 * readings with table(cut(y, ...), cut(x, ...)) on breaks seq(min, max, length.out = n + 1)
 * with right = FALSE and include.lowest = TRUE, on the grid size cloudOf ships with.
 *
 * Data: R's open datasets faithful, quakes, airquality (with missing readings) and
 * MASS::geyser. Counts are whole numbers and must agree exactly.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { cloudOf, DEFAULT_CLOUD_LIMITS } from '../../core/view/cloud';

interface DensityFixture {
  readonly generator: string;
  readonly r: string;
  readonly nx: number;
  readonly ny: number;
  readonly cases: readonly { readonly name: string; readonly x: readonly (number | null)[]; readonly y: readonly (number | null)[]; readonly counts: readonly number[] }[];
}

const fixture = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'density.json'), 'utf8')) as DensityFixture;
/** A missing reading (R's NA, written as null) as the NaN a typed column holds. */
const column = (v: readonly (number | null)[]): Float64Array => Float64Array.from(v, (a) => (a === null ? NaN : a));

describe(`density grid against R (${fixture.r})`, () => {
  it('the fixture was made on the grid size cloudOf ships with', () => {
    assert.equal(fixture.nx, DEFAULT_CLOUD_LIMITS.nx, 'regenerate test/reference/fixtures/density.json after changing DEFAULT_CLOUD_LIMITS');
    assert.equal(fixture.ny, DEFAULT_CLOUD_LIMITS.ny, 'regenerate test/reference/fixtures/density.json after changing DEFAULT_CLOUD_LIMITS');
  });

  for (const c of fixture.cases) {
    it(`cloudOf counts match table(cut(..., right = FALSE, include.lowest = TRUE)): ${c.name}`, () => {
      const x = column(c.x);
      const y = column(c.y);
      // maxPoints 0: bin whatever n is, on the shipped grid size.
      const cloud = cloudOf(x, y, undefined, { ...DEFAULT_CLOUD_LIMITS, maxPoints: 0 });
      assert.equal(cloud.kind, 'bins');
      if (cloud.kind !== 'bins') return;
      assert.equal(cloud.nx, fixture.nx);
      assert.equal(cloud.ny, fixture.ny);
      assert.deepEqual(cloud.counts, c.counts);
      // Every complete reading is counted once (R's table leaves out rows with NA, as cloudOf leaves out non-finite ones).
      const complete = c.x.filter((v, i) => v !== null && c.y[i] !== null).length;
      assert.equal(cloud.total, complete);
      assert.equal(
        c.counts.reduce((s, v) => s + v, 0),
        complete,
      );
    });
  }
});
