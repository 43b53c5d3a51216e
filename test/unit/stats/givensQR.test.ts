import { strict as assert } from 'node:assert';
import { FitError } from '../../../core/errors';
import { GivensQR } from '../../../core/stats/givensQR';
import { seededNormals } from './seededNormal';

function accumulate(rows: number[][], y: number[]): GivensQR {
  const p = (rows[0] as number[]).length;
  const qr = new GivensQR(p);
  rows.forEach((r, i) => qr.addRow(Float64Array.from(r), y[i] as number));
  return qr;
}

describe('GivensQR', () => {
  it("GivensQR gives R with R'R = X'X and |Q'y|^2 + RSS = |y|^2 (orthogonality of Q)", () => {
    const z = seededNormals(17, 200);
    const rows: number[][] = [];
    const y: number[] = [];
    for (let i = 0; i < 50; i++) {
      const x = i / 49;
      rows.push([1, x, x * x, z[i] as number]);
      y.push(2 - x + (z[100 + i] as number));
    }
    const qr = accumulate(rows, y);
    const p = 4;
    for (let a = 0; a < p; a++) {
      for (let b = 0; b < p; b++) {
        let rtr = 0;
        for (let k = 0; k < p; k++) rtr += (qr.r[k * p + a] as number) * (qr.r[k * p + b] as number);
        const xtx = rows.reduce((s, r) => s + (r[a] as number) * (r[b] as number), 0);
        assert.ok(Math.abs(rtr - xtx) <= 1e-12 * Math.max(1, Math.abs(xtx)), `(${a},${b}): ${rtr} vs ${xtx}`);
      }
    }
    const yy = y.reduce((s, v) => s + v * v, 0);
    const fitted = Array.from(qr.qty).reduce((s, v) => s + v * v, 0);
    assert.ok(Math.abs(fitted + qr.residualSS - yy) <= 1e-12 * yy);
    qr.checkRank();
  });

  it("GivensQR fits points on a line exactly: residual sum of squares 0, R b = Q'y gives the line", () => {
    // y = 1 + 2x on x = 0..4: the least-squares line is the line itself.
    const qr = accumulate(
      [
        [1, 0],
        [1, 1],
        [1, 2],
        [1, 3],
        [1, 4],
      ],
      [1, 3, 5, 7, 9],
    );
    assert.ok(qr.residualSS <= 1e-24);
    const r = qr.r;
    const b1 = (qr.qty[1] as number) / (r[3] as number);
    const b0 = ((qr.qty[0] as number) - (r[1] as number) * b1) / (r[0] as number);
    assert.ok(Math.abs(b0 - 1) <= 1e-14 && Math.abs(b1 - 2) <= 1e-14, `${b0}, ${b1}`);
  });

  it("GivensQR.solveTransposed solves R' u = v", () => {
    const qr = accumulate(
      [
        [2, 1, 0],
        [0, 3, 1],
        [1, 0, 4],
        [1, 1, 1],
      ],
      [0, 0, 0, 0],
    );
    const v = Float64Array.of(1, -2, 0.5);
    const u = new Float64Array(3);
    qr.solveTransposed(v, u);
    for (let j = 0; j < 3; j++) {
      let s = 0;
      for (let k = 0; k <= j; k++) s += (qr.r[k * 3 + j] as number) * (u[k] as number);
      assert.ok(Math.abs(s - (v[j] as number)) <= 1e-14, `row ${j}`);
    }
  });

  it('GivensQR.checkRank names the column that repeats the others', () => {
    const qr = accumulate(
      [
        [1, 2, 3],
        [1, 5, 6],
        [1, 7, 8],
        [1, 0, 1],
      ],
      [0, 0, 0, 0],
    );
    assert.throws(
      () => qr.checkRank(),
      (e: unknown) => e instanceof FitError && /column 3 of 3/.test(e.message),
    );
  });
});
