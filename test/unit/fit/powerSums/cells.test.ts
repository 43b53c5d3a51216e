import { strict as assert } from 'node:assert';
import { accumulateByLabel, accumulateRow, buildCells, SUMS_PER_CELL } from '../../../../core/fit/powerSums/cells';
import { foldLabels } from '../../../../core/registry/resampling/folds';
import { orderByX } from '../../../../core/stats/orderByX';
import { seededNormals } from '../../stats/seededNormal';

/** Exact equality of every entry, zeros' signs included. */
function sameBits(got: Float64Array, want: Float64Array, what: string): void {
  assert.equal(got.length, want.length);
  for (let k = 0; k < want.length; k++) assert.ok(Object.is(got[k], want[k]), `${what}[${k}]: ${got[k]} against ${want[k]}`);
}

describe('power-sum cells: the one-pass fold sums', () => {
  const n = 3000;
  const x = seededNormals(21, n).map((v) => Math.round(v * 100) / 100);
  const y = seededNormals(22, n);
  const knots = [Float64Array.of(-4, -1, 0, 1.5, 4), Float64Array.of(-4, -0.5, 0.25, 4)];
  const cells = buildCells(x, knots);
  const len = (cells.breaks.length - 1) * SUMS_PER_CELL;
  const weights = [undefined, seededNormals(23, n).map((v) => 0.5 + Math.abs(v))];

  it('accumulateByLabel gives every fold the same sums, bit for bit, as accumulateRow row by row into that fold', () => {
    const folds = 7;
    const labels = new Uint16Array(n);
    foldLabels(orderByX(x), folds, 3, 0, labels);
    for (const w of weights) {
      const out = new Float64Array(folds * len).fill(9);
      accumulateByLabel(cells, y, w, labels, out, len);
      for (let k = 0; k < folds; k++) {
        const want = new Float64Array(len);
        for (let i = 0; i < n; i++) if (labels[i] === k) accumulateRow(want, cells.cell[i] as number, cells.t[i] as number, y[i] as number, w ? (w[i] as number) : 1);
        sameBits(out.subarray(k * len, (k + 1) * len), want, `fold ${k}`);
      }
    }
  });
});
