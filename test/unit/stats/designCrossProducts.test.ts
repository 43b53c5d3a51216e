import { strict as assert } from 'node:assert';
import { denseDesign } from '../../../core/stats/design';
import { designCrossProducts } from '../../../core/stats/designCrossProducts';
import { seededNormals } from './seededNormal';
import { fitCurve } from '../../../core/fit/index';
import { RowBasisCurve } from '../../../core/fit/linearFit';
import type { DesignRows } from '../../../core/stats/design';
import { ExtrapolatingBSplineBasis } from '../../../core/basis/naturalSpline';

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

  it("the sparse form of a spline design (basis rows and the null-space map) gives the same X'X, X'AX, X'A^2X and X'u as the dense products", () => {
    // Seeded x with ties, sorted as the residual checks order them; natural spline df 6 (basis
    // with the natural constraint's null-space map) and polynomial df 4 (dense, no map); weighted rows.
    for (const [kind, df] of [
      ['natural-spline', 6],
      ['polynomial', 4],
    ] as const) {
      const n = 300;
      const raw = seededNormals(77, n);
      const x = Float64Array.from(raw, (v) => Math.round(v * 20) / 4).sort();
      const y = Float64Array.from(x, (v, i) => Math.sin(v) + 0.1 * (seededNormals(5, n)[i] as number));
      const rootW = Float64Array.from(x, (_, i) => Math.sqrt(1 + (i % 3)));
      const fit = fitCurve({ x, y }, { kind, df });
      const curve = fit.curve;
      assert.ok(curve instanceof RowBasisCurve);
      const p = curve.designSize;
      const sparse = curve.sparseDesign();
      const dense: DesignRows = {
        p,
        row(i, out) {
          curve.designRow(x[i] as number, out);
          for (let k = 0; k < p; k++) out[k] = (out[k] as number) * (rootW[i] as number);
        },
      };
      const withSparse: DesignRows = {
        ...dense,
        sparse: {
          size: sparse.size,
          width: sparse.width,
          expand: sparse.expand,
          row(i, out) {
            const first = sparse.row(x[i] as number, out);
            for (let k = 0; k < sparse.width; k++) out[k] = (out[k] as number) * (rootW[i] as number);
            return first;
          },
        },
      };
      const e = seededNormals(9, n);
      const a = designCrossProducts(dense, n, { squaresOf: e, differences: true });
      const b = designCrossProducts(withSparse, n, { squaresOf: e, differences: true });
      // The reference: the dense matrix X and A of Durbin & Watson (1950) multiplied out.
      const xm = new Float64Array(n * p);
      const row = new Float64Array(p);
      for (let i = 0; i < n; i++) {
        dense.row(i, row);
        xm.set(row, i * p);
      }
      const ax = times(differenceMatrix(n), xm, n, p);
      for (const s2 of [a, b]) {
        assert.ok(s2.differences && s2.squares);
        assertUpperClose(s2.gram, crossProduct(xm, xm, n, p, p), p, `${kind} X'X`);
        assertUpperClose(s2.differences.xax, crossProduct(xm, ax, n, p, p), p, `${kind} X'AX`);
        assertUpperClose(s2.differences.xa2x, crossProduct(ax, ax, n, p, p), p, `${kind} X'A^2X`);
      }
      assert.ok(a.squares && b.squares);
      for (let k = 0; k < p; k++) assert.ok(Math.abs((a.squares.xu[k] as number) - (b.squares.xu[k] as number)) <= 1e-11 * n, `${kind} X'u ${k}`);
      assert.equal(a.squares.uu, b.squares.uu);
    }
  });
});

describe('designCrossProducts, sparse rows bit for bit', () => {
  /**
   * The sums in the sparse basis written out plainly: every product of every row's dense b_i,
   * d_i = b_i - b_(i-1) and a_(i-1) = d_(i-1) - d_i, added in row order. Exact property of
   * IEEE 754 arithmetic: adding an exact zero product never changes a sum that is not -0, and
   * these sums start at +0 and can never become -0, so skipping the zero entries (as the code
   * does) must give the same bits.
   */
  function plainSums(b: Float64Array[], e: Float64Array, size: number) {
    const n = b.length;
    const g = new Float64Array(size * size);
    const xax = new Float64Array(size * size);
    const xa2x = new Float64Array(size * size);
    const xu = new Float64Array(size);
    let meanSquare = 0;
    for (let i = 0; i < n; i++) meanSquare += (e[i] as number) * (e[i] as number);
    meanSquare /= n;
    let uu = 0;
    const add = (m: Float64Array, v: Float64Array): void => {
      for (let r = 0; r < size; r++) for (let c = r; c < size; c++) m[r * size + c] = (m[r * size + c] as number) + (v[r] as number) * (v[c] as number);
    };
    let dPrev = new Float64Array(size);
    for (let i = 0; i < n; i++) {
      const bi = b[i] as Float64Array;
      add(g, bi);
      const u = (e[i] as number) ** 2 - meanSquare;
      uu += u * u;
      for (let k = 0; k < size; k++) xu[k] = (xu[k] as number) + (bi[k] as number) * u;
      const d = i === 0 ? new Float64Array(size) : bi.map((v, k) => v - ((b[i - 1] as Float64Array)[k] as number));
      if (i > 0) add(xax, d);
      if (i > 0)
        add(
          xa2x,
          dPrev.map((v, k) => v - (d[k] as number)),
        );
      dPrev = d;
    }
    add(xa2x, dPrev);
    return { g, xax, xa2x, xu, uu };
  }

  function sameBits(got: Float64Array, want: Float64Array, what: string): void {
    assert.equal(got.length, want.length);
    for (let k = 0; k < want.length; k++) assert.ok(Object.is(got[k], want[k]), `${what}[${k}]: ${got[k]} against ${want[k]}`);
  }

  it('sparse B-spline rows: the sums equal the plain row-ordered sums to the last bit (long runs in one knot interval, single rows, rows on knots)', () => {
    const basis = new ExtrapolatingBSplineBasis(0, 10, Float64Array.of(1, 1.5, 4, 4.2, 7));
    // Clumps of many rows, intervals holding one or two rows, and rows exactly on knots (zero basis values).
    const x = Float64Array.from(
      [
        ...Array.from({ length: 400 }, (_, i) => (i * 1) / 400),
        1.2,
        1.5,
        1.5,
        ...Array.from({ length: 300 }, (_, i) => 1.6 + (i * 2.3) / 300),
        4,
        4.1,
        ...Array.from({ length: 500 }, (_, i) => 4.2 + (i * 5.8) / 499),
      ].sort((a, b) => a - b),
    );
    const n = x.length;
    const e = seededNormals(12, n);
    const size = basis.size;
    const dense = Array.from(x, (xi) => {
      const out = new Float64Array(4);
      const first = basis.row(xi, out);
      const row = new Float64Array(size);
      row.set(out, first);
      return row;
    });
    const design: DesignRows = {
      p: size,
      row: (i, out) => out.set(dense[i] as Float64Array),
      sparse: { size, width: 4, expand: undefined, row: (i, out) => basis.row(x[i] as number, out) },
    };
    const got = designCrossProducts(design, n, { squaresOf: e, differences: true });
    const want = plainSums(dense, e, size);
    sameBits(got.gram, want.g, 'gram');
    sameBits(got.differences?.xax as Float64Array, want.xax, "X'AX");
    sameBits(got.differences?.xa2x as Float64Array, want.xa2x, "X'A^2X");
    sameBits(got.squares?.xu as Float64Array, want.xu, "X'u");
    assert.ok(Object.is(got.squares?.uu, want.uu));
  });
});
