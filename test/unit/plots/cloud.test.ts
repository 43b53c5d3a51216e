/**
 * Tests of how readings are drawn (core/plots/cloud.ts): the logarithmic shade classes of a
 * density grid, the counts each class covers (the legend), and the marks. The density grids
 * are R's faithful and quakes binned on the shipped grid (test/reference/fixtures/density.json,
 * whose counts test/reference/density.test.ts checks against R).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { BIN_LEVELS, binLevel, binLevelRanges, cloudMarks, cloudWords, densityLegend, maxCount } from '../../../core/plots/cloud';
import { plotFrame } from '../../../core/plots/frame';
import { cloudOf, DEFAULT_CLOUD_LIMITS } from '../../../core/view/cloud';
import type { CloudBins } from '../../../core/view/model';

interface DensityFixture {
  readonly cases: readonly { readonly name: string; readonly x: readonly (number | null)[]; readonly y: readonly (number | null)[] }[];
}
const FIXTURE = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'density.json'), 'utf8')) as DensityFixture;

/** The density grid cloudOf ships for a case of the fixture. */
function grid(name: string): CloudBins {
  const c = FIXTURE.cases.find((k) => k.name.startsWith(name));
  assert.ok(c, name);
  const col = (v: readonly (number | null)[]): Float64Array => Float64Array.from(v, (a) => (a === null ? NaN : a));
  const cloud = cloudOf(col(c.x), col(c.y), undefined, { ...DEFAULT_CLOUD_LIMITS, maxPoints: 0 });
  assert.equal(cloud.kind, 'bins');
  return cloud as CloudBins;
}

describe('binLevel', () => {
  it('binLevel cuts log(count) / log(max) into equal parts: count max^(k/6) starts class k + 1 (the logarithmic scale)', () => {
    const max = 1e6;
    for (let k = 0; k < BIN_LEVELS; k++) {
      assert.equal(binLevel(Math.round(Math.pow(max, k / BIN_LEVELS)), max), k + 1, `count 10^${k}`);
      if (k > 0) assert.equal(binLevel(Math.round(Math.pow(max, k / BIN_LEVELS)) - 1, max), k, `just under 10^${k}`);
    }
    assert.equal(binLevel(max, max), BIN_LEVELS);
  });

  it('binLevel: 0 for an empty cell, the darkest class when the fullest cell holds one reading, rising with the count within 1..BIN_LEVELS', () => {
    assert.equal(binLevel(0, 10), 0);
    assert.equal(binLevel(5, 0), 0);
    assert.equal(binLevel(1, 1), BIN_LEVELS);
    for (let max = 2; max <= 300; max++) {
      let last = 1;
      for (let c = 1; c <= max; c++) {
        const l = binLevel(c, max);
        assert.ok(l >= last && l <= BIN_LEVELS, `max ${max}, count ${c}: class ${l} after ${last}`);
        last = l;
      }
      assert.equal(binLevel(1, max), 1);
      assert.equal(binLevel(max, max), BIN_LEVELS);
    }
  });
});

describe('binLevelRanges', () => {
  it('binLevelRanges partitions 1..max, each count in the range of its own class (every max up to 400)', () => {
    for (let max = 1; max <= 400; max++) {
      const ranges = binLevelRanges(max);
      assert.equal(ranges[0]?.from, 1, `max ${max}`);
      assert.equal(ranges[ranges.length - 1]?.to, max, `max ${max}`);
      for (let i = 1; i < ranges.length; i++) {
        assert.equal(ranges[i]?.from, (ranges[i - 1]?.to as number) + 1, `max ${max}: contiguous`);
        assert.ok((ranges[i]?.level as number) > (ranges[i - 1]?.level as number), `max ${max}: classes rise`);
      }
      for (const r of ranges) for (let c = r.from; c <= r.to; c++) assert.equal(binLevel(c, max), r.level, `max ${max}, count ${c}`);
    }
  });

  it('binLevelRanges matches the worked example of its doc comment and is empty below one reading', () => {
    assert.deepEqual(
      binLevelRanges(100).map((r) => [r.level, r.from, r.to]),
      [
        [1, 1, 2],
        [2, 3, 4],
        [3, 5, 9],
        [4, 10, 21],
        [5, 22, 46],
        [6, 47, 100],
      ],
    );
    assert.deepEqual(binLevelRanges(0), []);
    assert.deepEqual(binLevelRanges(NaN), []);
  });
});

describe('density marks and legend', () => {
  it('cloudMarks gives each cell of faithful and quakes the class of its count', () => {
    for (const name of ['faithful', 'quakes']) {
      const cloud = grid(name);
      const frame = plotFrame({ id: 't', xDomain: [cloud.xMin, cloud.xMax], yDomain: [cloud.yMin, cloud.yMax], xLabel: 'x', yLabel: 'y' });
      const svg = cloudMarks(cloud, frame, { x: 'x', y: 'y' });
      const cells = [...svg.matchAll(/<rect class="kw-bin kw-bin-(\d)"[^>]*><title>(\d+) readings?:/g)];
      assert.equal(cells.length, cloud.counts.filter((c) => c > 0).length, `${name}: one mark per occupied cell`);
      const max = maxCount(cloud);
      for (const m of cells) assert.equal(Number(m[1]), binLevel(Number(m[2]), max), `${name}: ${m[0]}`);
    }
  });

  it('densityLegend shows a swatch of each class in use with the counts it covers; cloudWords says the same', () => {
    const cloud = grid('quakes');
    const ranges = binLevelRanges(maxCount(cloud));
    const legend = densityLegend(cloud);
    assert.match(legend, /^<g class="kw-legend" aria-hidden="true"><text class="kw-tick"[^>]*>readings per cell:<\/text>/);
    assert.deepEqual(
      [...legend.matchAll(/class="kw-bin kw-bin-(\d)"/g)].map((m) => Number(m[1])),
      ranges.map((r) => r.level),
    );
    const labels = [...legend.matchAll(/<text class="kw-tick"[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]).slice(1);
    assert.deepEqual(
      labels,
      ranges.map((r) => (r.from === r.to ? `${r.from}` : `${r.from}–${r.to}`)),
    );
    const words = cloudWords(cloud);
    assert.match(words, /^1000 readings drawn as a density grid of 64 by 40 cells .*logarithmic scale/);
    for (const r of ranges) assert.ok(words.includes(r.from === r.to ? `${r.from}` : `${r.from} to ${r.to}`), words);
  });
});
