import { strict as assert } from 'node:assert';
import { denseDesign } from '../../../core/stats/design';
import { designCrossProducts } from '../../../core/stats/designCrossProducts';
import { seededNormals } from './seededNormal';

/**
 * The Durbin-Watson first-difference matrix A (n x n): diagonal 1, 2, ..., 2, 1 and -1 next
 * to the diagonal (Durbin & Watson 1950, Biometrika 37, 409-428, section 3).
 */
function differenceMatrix(n: number): Float64Array {
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    a[i * n + i] = i === 0 || i === n - 1 ? 1 : 2;
    if (i > 0) a[i * n + i - 1] = -1;
    if (i < n - 1) a[i * n + i + 1] = -1;
  }
  return a;
}

/** U'V for n x p and n x q row-major matrices. */
function crossProduct(u: Float64Array, v: Float64Array, n: number, p: number, q: number): Float64Array {
  const out = new Float64Array(p * q);
  for (let a = 0; a < p; a++) for (let b = 0; b < q; b++) for (let i = 0; i < n; i++) out[a * q + b] = (out[a * q + b] as number) + (u[i * p + a] as number) * (v[i * q + b] as number);
  return out;
}

/** (n x n) M times (n x p) X, row-major. */
function times(m: Float64Array, x: Float64Array, n: number, p: number): Float64Array {
  const out = new Float64Array(n * p);
  for (let i = 0; i < n; i++)
    for (let k = 0; k < n; k++) {
      const mik = m[i * n + k] as number;
      if (mik !== 0) for (let b = 0; b < p; b++) out[i * p + b] = (out[i * p + b] as number) + mik * (x[k * p + b] as number);
    }
  return out;
}

function assertUpperClose(actual: Float64Array, expected: Float64Array, p: number, what: string): void {
  let scale = 0;
  for (const v of expected) scale = Math.max(scale, Math.abs(v));
  for (let a = 0; a < p; a++) {
    for (let b = a; b < p; b++) {
      const diff = Math.abs((actual[a * p + b] as number) - (expected[a * p + b] as number));
      assert.ok(diff <= 1e-12 * scale, `${what} (${a}, ${b}): ${actual[a * p + b]} vs ${expected[a * p + b]}`);
    }
  }
}

describe('designCrossProducts', () => {
  it('designCrossProducts of the line design on x = 0, 1, 2 (worked example in the doc comment)', () => {
    const s = designCrossProducts(denseDesign(Float64Array.of(1, 0, 1, 1, 1, 2), 2), 3, { differences: true });
    assert.deepEqual(Array.from(s.gram), [3, 3, 0, 5]);
    assert.ok(s.differences);
    assert.deepEqual(Array.from(s.differences.xax), [0, 0, 0, 2]);
    assert.equal(s.squares, undefined);
  });

  it("designCrossProducts gives X'X, X'AX, X'A^2X, X'u and u'u as the dense products with A of Durbin & Watson (1950), across row blocks", () => {
    for (const [n, p] of [
      [7, 3],
      [300, 4],
      [257, 5],
    ] as const) {
      const x = seededNormals(n + p, n * p);
      const e = seededNormals(2 * n + p, n);
      const s = designCrossProducts(denseDesign(x, p), n, { squaresOf: e, differences: true });
      const a = differenceMatrix(n);
      const ax = times(a, x, n, p);
      assertUpperClose(s.gram, crossProduct(x, x, n, p, p), p, "X'X");
      assert.ok(s.differences && s.squares);
      assertUpperClose(s.differences.xax, crossProduct(x, ax, n, p, p), p, "X'AX");
      assertUpperClose(s.differences.xa2x, crossProduct(ax, ax, n, p, p), p, "X'A^2X");
      // u_i = e_i^2 - mean(e^2) (Koenker 1981).
      const mean = e.reduce((t, v) => t + v * v, 0) / n;
      const u = e.map((v) => v * v - mean);
      const xu = crossProduct(x, u, n, p, 1);
      for (let k = 0; k < p; k++) assert.ok(Math.abs((s.squares.xu[k] as number) - (xu[k] as number)) <= 1e-12 * n, `X'u ${k}`);
      const uu = u.reduce((t, v) => t + v * v, 0);
      assert.ok(Math.abs(s.squares.uu - uu) <= 1e-12 * uu);
      assert.equal(s.squares.meanSquare, mean);
    }
  });

  it('designCrossProducts calls design.row once per row, in order', () => {
    const calls: number[] = [];
    const design = {
      p: 2,
      row(i: number, out: Float64Array): void {
        calls.push(i);
        out[0] = 1;
        out[1] = i;
      },
    };
    designCrossProducts(design, 300, { squaresOf: new Float64Array(300).fill(1), differences: true });
    assert.deepEqual(
      calls,
      Array.from({ length: 300 }, (_, i) => i),
    );
  });
});
