/**
 * Tests of the resampling hot path's rows grouped by cell (core/fit/powerSums/layout.ts) and
 * of the cells' bucket lookup (core/fit/powerSums/cells.ts buildCells). The layout holds the
 * rows in x order and must give the same sums, bit for bit, as accumulateRow row by row in
 * that order (resampling version 3), with the bootstrap's multiplicities by x rank, and the
 * same held-out rows as a plain filter over the rows. Data: seeded normal draws, rounded to two decimals so that x has ties, with and
 * without prior weights.
 */
import { strict as assert } from 'node:assert';
import { accumulateRow, buildCells, SUMS_PER_CELL } from '../../../../core/fit/powerSums/cells';
import { absoluteErrors, heldOutByLabel, heldOutRows, heldOutWhere, layoutByCell, sumsByLabel, sumsFromCounts } from '../../../../core/fit/powerSums/layout';
import { bootstrapCounts } from '../../../../core/registry/resampling/bootstrap';
import { foldLabels } from '../../../../core/registry/resampling/folds';
import { orderByX, xInOrder } from '../../../../core/stats/orderByX';
import { RandomStream } from '../../../../core/tune/rng';
import { seededNormals } from '../../stats/seededNormal';

/** Exact equality of every entry, zeros' signs included. */
function sameBits(got: ArrayLike<number>, want: ArrayLike<number>, what: string): void {
  assert.equal(got.length, want.length, `${what}: length`);
  for (let k = 0; k < want.length; k++) assert.ok(Object.is(got[k], want[k]), `${what}[${k}]: ${got[k]} against ${want[k]}`);
}

/** The cell of x as a binary search over the breaks finds it (the lookup buildCells replaced). */
function cellBySearch(breaks: Float64Array, xi: number): number {
  let lo = 0;
  let hi = breaks.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xi < (breaks[mid] as number)) hi = mid;
    else lo = mid;
  }
  return lo;
}

describe('power-sum rows grouped by cell', () => {
  const n = 4000;
  const x = seededNormals(31, n).map((v) => Math.round(v * 100) / 100);
  const y = seededNormals(32, n).map((v) => 5 + 3 * v);
  const knots = [Float64Array.of(-4.5, -1, 0, 1.5, 4.5), Float64Array.of(-4.5, -0.5, 0.25, 0.3, 4.5)];
  const cells = buildCells(x, knots);
  const cellCount = cells.breaks.length - 1;
  const len = cellCount * SUMS_PER_CELL;
  const mean = 5;
  const scale = 3;
  const yc = y.map((v) => (v - mean) / scale);
  const weights = [undefined, seededNormals(33, n).map((v) => 0.5 + Math.abs(v))];
  const order = orderByX(x);
  const sortedX = xInOrder(x);

  it('buildCells puts every row in the cell a binary search finds, with the same position in it, also for x outside the knots and on a break', () => {
    const rng = new RandomStream(9, 0);
    const cases: { what: string; x: Float64Array; knots: Float64Array[] }[] = [
      { what: 'the rows above', x, knots },
      { what: 'x outside the knots', x: Float64Array.of(-10, -4.5, 4.5, 10, 0, 0.25, 0.3, -1), knots },
      { what: 'widely spread x', x: Float64Array.from({ length: 2000 }, () => Math.exp(rng.int(1000) / 25)), knots: [Float64Array.of(1, 2, 50, 1e6, 2.2e17)] },
      { what: 'tiny x', x: Float64Array.from({ length: 500 }, () => rng.int(1000) * 1e-300), knots: [Float64Array.of(0, 1e-298, 3e-298, 9.99e-298)] },
    ];
    for (const c of cases) {
      const got = buildCells(c.x, c.knots);
      for (let i = 0; i < c.x.length; i++) {
        const want = cellBySearch(got.breaks, c.x[i] as number);
        assert.equal(got.cell[i], want, `${c.what}: row ${i} (x = ${c.x[i]})`);
        const start = got.breaks[want] as number;
        assert.ok(Object.is(got.t[i], ((c.x[i] as number) - start) / ((got.breaks[want + 1] as number) - start)), `${c.what}: t of row ${i}`);
      }
    }
  });

  it('layoutByCell holds every row once, in x order (ties by row), grouped by cell, with y centred and scaled; it refuses another order', () => {
    for (const w of weights) {
      const layout = layoutByCell(cells.breaks, sortedX, order, { y, mean, scale }, w);
      assert.equal(layout.start[cellCount], n);
      sameBits(layout.perm, order, 'the x order');
      const seen = new Uint8Array(n);
      for (let c = 0; c < cellCount; c++) {
        for (let p = layout.start[c] as number; p < (layout.start[c + 1] as number); p++) {
          const i = layout.perm[p] as number;
          assert.equal(cells.cell[i], c);
          if (p > (layout.start[c] as number)) {
            const before = layout.perm[p - 1] as number;
            assert.ok((x[before] as number) < (x[i] as number) || (x[before] === x[i] && before < i), 'x order, ties by row, within a cell');
          }
          assert.ok(Object.is(layout.t[p], cells.t[i]) && Object.is(layout.y[p], yc[i]) && (!w || Object.is(layout.w?.[p], w[i])));
          seen[i] = (seen[i] as number) + 1;
        }
      }
      assert.ok(seen.every((s) => s === 1));
    }
    assert.throws(() => layoutByCell(cells.breaks, x, order, { y, mean, scale }, undefined), /not in order/);
    assert.throws(() => layoutByCell(cells.breaks, sortedX, order.subarray(1), { y, mean, scale }, undefined), /sorted x for an order/);
  });

  it('sumsFromCounts gives the bootstrap sums of accumulateRow row by row in x order, bit for bit, with the multiplicities by x rank, and the rows of count 0 as the held-out rows', () => {
    const counts = new Uint32Array(n);
    for (const w of weights) {
      const layout = layoutByCell(cells.breaks, sortedX, order, { y, mean, scale }, w);
      const held = heldOutRows(cellCount, w !== undefined);
      for (let r = 0; r < 3; r++) {
        bootstrapCounts(n, 5, r, counts);
        const train = new Float64Array(len).fill(7);
        const test = new Float64Array(len).fill(7);
        const count = sumsFromCounts(layout, counts, train, test, held);
        const wantTrain = new Float64Array(len);
        const wantTest = new Float64Array(len);
        let zero = 0;
        for (let k = 0; k < n; k++) {
          const i = order[k] as number;
          const c = counts[k] as number;
          const wi = w ? (w[i] as number) : 1;
          accumulateRow(c > 0 ? wantTrain : wantTest, cells.cell[i] as number, cells.t[i] as number, yc[i] as number, c > 0 ? c * wi : wi);
          if (c === 0) zero++;
        }
        sameBits(train, wantTrain, `resample ${r} training sums`);
        sameBits(test, wantTest, `resample ${r} held-out sums`);
        assert.equal(count, zero);
        assert.equal(held.count, zero);
        // The held-out rows cell by cell, in x order: a plain filter over the layout (its mask by row).
        const mask = new Uint8Array(n);
        for (let k = 0; k < n; k++) mask[order[k] as number] = counts[k] === 0 ? 1 : 0;
        const again = heldOutRows(cellCount, w !== undefined);
        heldOutWhere(layout, mask, again);
        sameBits(held.start, again.start, 'cell starts');
        sameBits(held.t.subarray(0, zero), again.t.subarray(0, zero), 't');
        sameBits(held.y.subarray(0, zero), again.y.subarray(0, zero), 'y');
        if (w) sameBits((held.w as Float64Array).subarray(0, zero), (again.w as Float64Array).subarray(0, zero), 'w');
      }
    }
  });

  it('sumsFromCounts grows its held-out rows when more rows than expected are out (every row out of bag)', () => {
    const layout = layoutByCell(cells.breaks, sortedX, order, { y, mean, scale }, undefined);
    const held = heldOutRows(cellCount, false);
    const count = sumsFromCounts(layout, new Uint32Array(n), new Float64Array(len), new Float64Array(len), held);
    assert.equal(count, n);
    sameBits(held.y.subarray(0, n), layout.y, 'every row, in layout order');
  });

  it('sumsByLabel gives every fold the sums of accumulateRow row by row in x order, bit for bit', () => {
    const folds = 6;
    const labels = new Uint16Array(n);
    // Labels by x rank, as the layout reads them.
    foldLabels(order, folds, 4, 0, labels, 'rank');
    for (const w of weights) {
      const layout = layoutByCell(cells.breaks, sortedX, order, { y, mean, scale }, w);
      const got = new Float64Array(folds * len).fill(3);
      sumsByLabel(layout, labels, got, len);
      const want = new Float64Array(folds * len);
      order.forEach((i, k) => accumulateRow(want, (labels[k] as number) * cellCount + (cells.cell[i] as number), cells.t[i] as number, yc[i] as number, w ? (w[i] as number) : 1));
      sameBits(got, want, 'fold sums');
    }
  });

  it('heldOutByLabel gives each fold its rows cell by cell (labels by x rank), and their weight added in x order', () => {
    const folds = 5;
    const labels = new Uint16Array(n);
    const byRow = new Uint16Array(n);
    foldLabels(order, folds, 8, 0, labels, 'rank');
    foldLabels(order, folds, 8, 0, byRow);
    order.forEach((i, k) => assert.equal(byRow[i], labels[k], 'the same labelling, placed by rank'));
    for (const w of weights) {
      const layout = layoutByCell(cells.breaks, sortedX, order, { y, mean, scale }, w);
      const byLabel = heldOutByLabel(layout, labels, folds);
      for (let f = 0; f < folds; f++) {
        const want = heldOutRows(cellCount, w !== undefined);
        heldOutWhere(
          layout,
          Uint8Array.from(byRow, (l) => (l === f ? 1 : 0)),
          want,
        );
        const got = byLabel[f] as (typeof byLabel)[number];
        assert.equal(got.count, want.count);
        sameBits(got.start, want.start, `fold ${f} cell starts`);
        sameBits(got.t, want.t.subarray(0, want.count), `fold ${f} t`);
        sameBits(got.y, want.y.subarray(0, want.count), `fold ${f} y`);
        let weight = 0;
        order.forEach((i, k) => {
          if (labels[k] === f) weight += w ? (w[i] as number) : 1;
        });
        assert.ok(Object.is(got.weight, weight), `fold ${f} weight`);
      }
    }
  });

  it('absoluteErrors gives the weighted sum of absolute errors (to rounding) and the largest error (exactly) of a per-row evaluation', () => {
    const rng = new RandomStream(12, 0);
    const poly = Float64Array.from({ length: 4 * cellCount }, () => rng.int(2001) / 1000 - 1);
    for (const w of weights) {
      const layout = layoutByCell(cells.breaks, sortedX, order, { y, mean, scale }, w);
      const held = heldOutRows(cellCount, w !== undefined);
      const counts = new Uint32Array(n);
      bootstrapCounts(n, 2, 0, counts);
      sumsFromCounts(layout, counts, new Float64Array(len), new Float64Array(len), held);
      const result = new Float64Array(2);
      absoluteErrors(held, poly, result);
      let sae = 0;
      let max = 0;
      for (let k = 0; k < n; k++) {
        if (counts[k] !== 0) continue;
        const i = order[k] as number;
        const o = (cells.cell[i] as number) * 4;
        const t = cells.t[i] as number;
        const a = Math.abs((yc[i] as number) - ((poly[o] as number) + t * ((poly[o + 1] as number) + t * ((poly[o + 2] as number) + t * (poly[o + 3] as number)))));
        sae += (w ? (w[i] as number) : 1) * a;
        max = Math.max(max, a);
      }
      assert.ok(Math.abs((result[0] as number) - sae) <= 1e-12 * sae, `sum ${result[0]} against ${sae}`);
      assert.ok(Object.is(result[1], max));
    }
  });
});
