/**
 * CellSums and the sums of blocks beside it.
 *
 * Source: the definitions written out densely (A = Z' B' W B Z and b = Z' B' W y from the full
 * model-matrix rows of RowBasisCurve.designRow, core/fit/linearFit.ts; sums of blocks by
 * plain loops). Data invented.
 */
import { strict as assert } from 'node:assert';
import { ExtrapolatingBSplineBasis } from '../../../core/basis/naturalSpline';
import { RowBasisCurve } from '../../../core/fit/linearFit';
import { CellSums, differenceSquares, sumBlocks, sumsExcept } from '../../../core/groups/cellSums';
import { nullSpace } from '../../../core/linalg/nullSpace';

function close(actual: number, expected: number, tol: number, what: string): void {
  assert.ok(Math.abs(actual - expected) <= tol, `${what}: ${actual} vs ${expected}`);
}

describe('CellSums', () => {
  it("CellSums gathers Z'B'WBZ and Z'B'Wy of each cell apart, as the dense model matrix gives them", () => {
    const basis = new ExtrapolatingBSplineBasis(0, 10, Float64Array.of(2.5, 5, 7.5));
    const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
    const q = z.length / basis.size;
    const design = new RowBasisCurve('natural-spline', q, 0, 10, basis, new Float64Array(basis.size), new Float64Array(basis.size * basis.size), z);
    const rows = Array.from({ length: 40 }, (_, i) => ({ cell: i % 3, x: (i * 10) / 39 + (i === 39 ? 1 : 0), y: Math.sin(i), w: 1 + (i % 4) }));
    const sums = new CellSums(basis, z, 3);
    for (const r of rows) sums.add(r.cell, r.x, r.y, r.w);
    const { gram, rhs } = sums.finish();
    const row = new Float64Array(q);
    for (let c = 0; c < 3; c++) {
      const a = new Float64Array(q * q);
      const b = new Float64Array(q);
      for (const r of rows) {
        if (r.cell !== c) continue;
        design.designRow(r.x, row);
        for (let i = 0; i < q; i++) {
          b[i] = (b[i] as number) + r.w * (row[i] as number) * r.y;
          for (let j = 0; j < q; j++) a[i * q + j] = (a[i * q + j] as number) + r.w * (row[i] as number) * (row[j] as number);
        }
      }
      for (let k = 0; k < q * q; k++) close(gram[c * q * q + k] as number, a[k] as number, 1e-12, `cell ${c} gram[${k}]`);
      for (let k = 0; k < q; k++) close(rhs[c * q + k] as number, b[k] as number, 1e-12, `cell ${c} rhs[${k}]`);
    }
  });

  it('sumBlocks and sumsExcept add blocks, and every block but one', () => {
    const blocks = Float64Array.of(1, 10, 2, 20, 4, 40, 8, 80);
    assert.deepEqual([...sumBlocks(blocks, 2, 1, 3)], [6, 60]);
    assert.deepEqual([...sumBlocks(blocks, 2, 0, 0)], [0, 0]);
    assert.deepEqual([...sumsExcept(blocks, 4, 2)], [14, 140, 13, 130, 11, 110, 7, 70]);
    assert.deepEqual([...sumsExcept(Float64Array.of(5), 1, 1)], [0]);
  });

  it("differenceSquares is (u - v)' A (u - v)", () => {
    // A = [[2, 1], [1, 3]] stored after two padding numbers; d = (1, 2): 2 + 4 + 12 = 18.
    const a = Float64Array.of(9, 9, 2, 1, 1, 3);
    assert.equal(differenceSquares(a, 2, 2, [3, 2], [2, 0]), 18);
    assert.equal(differenceSquares(a, 2, 2, [1, 1], [1, 1]), 0);
  });
});
