import { strict as assert } from 'node:assert';
import { addCrossProducts, GRAM_CONDITION_LIMIT, rowViews, ScaledCholesky } from '../../../core/stats/crossProducts';
import { seededNormals } from './seededNormal';

/** Upper triangle of X'X by the definition (sum over rows of x_a x_b). */
function directProducts(block: Float64Array, rows: number, p: number): Float64Array {
  const out = new Float64Array(p * p);
  for (let a = 0; a < p; a++) {
    for (let b = a; b < p; b++) {
      let s = 0;
      for (let t = 0; t < rows; t++) s += (block[t * p + a] as number) * (block[t * p + b] as number);
      out[a * p + b] = s;
    }
  }
  return out;
}

describe('addCrossProducts', () => {
  it("addCrossProducts adds the upper triangle of X'X (worked example in the doc comment)", () => {
    const out = new Float64Array(4);
    addCrossProducts(Float64Array.of(1, 0, 1, 2), 2, 2, out);
    assert.deepEqual(Array.from(out), [2, 2, 0, 4]);
  });

  it('addCrossProducts equals the direct sums for even and odd column counts and any row count', () => {
    for (let p = 1; p <= 7; p++) {
      for (const rows of [0, 1, 2, 5, 9]) {
        const block = seededNormals(100 * p + rows, rows * p);
        const out = new Float64Array(p * p).fill(1); // adds to what is there
        addCrossProducts(block, rows, p, out);
        const ref = directProducts(block, rows, p);
        for (let a = 0; a < p; a++) {
          for (let b = 0; b < p; b++) {
            const expected = b >= a ? 1 + (ref[a * p + b] as number) : 1;
            assert.ok(Math.abs((out[a * p + b] as number) - expected) <= 1e-13 * Math.max(1, Math.abs(expected)), `p ${p}, rows ${rows}, (${a}, ${b})`);
          }
        }
      }
    }
  });

  it('rowViews writes through to the rows of the block', () => {
    const block = new Float64Array(6);
    const views = rowViews(block, 2, 3, 2);
    (views[1] as Float64Array).set([7, 8]);
    assert.deepEqual(Array.from(block), [0, 0, 0, 7, 8, 0]);
  });
});

describe('ScaledCholesky', () => {
  it('ScaledCholesky of [4, 2; 2, 4] scales to unit diagonal and factors [1, .5; .5, 1] (worked by hand)', () => {
    // S = diag(1/2, 1/2); L = [1, 0; 0.5, sqrt(0.75)]; ||G_s||_1 = 1.5 and
    // G_s^-1 = [1, -0.5; -0.5, 1] / 0.75 has 1-norm 2, so the condition number is 3.
    const f = ScaledCholesky.of(Float64Array.of(4, 2, 2, 4), 2);
    assert.ok(f);
    assert.deepEqual(Array.from(f.scale), [0.5, 0.5]);
    assert.ok(Math.abs((f.lower[2] as number) - 0.5) <= 1e-15 && Math.abs((f.lower[3] as number) - Math.sqrt(0.75)) <= 1e-15);
    assert.equal(f.lower[1], 0);
    assert.ok(Math.abs(f.condition - 3) <= 1e-14);
  });

  it('ScaledCholesky gives the 1-norm condition (2 - delta) / delta of [1, 1 - delta; 1 - delta, 1] and refuses it above GRAM_CONDITION_LIMIT', () => {
    // Eigenvalues 2 - delta and delta; ||G||_1 = 2 - delta, ||G^-1||_1 = 1 / delta (by hand).
    const delta = 1e-3;
    const f = ScaledCholesky.of(Float64Array.of(1, 1 - delta, 0, 1), 2); // only the upper triangle is read
    assert.ok(f);
    assert.ok(Math.abs(f.condition - (2 - delta) / delta) <= 1e-9 * f.condition, `${f.condition}`);
    const tiny = 1e-8;
    assert.ok((2 - tiny) / tiny > GRAM_CONDITION_LIMIT);
    assert.equal(ScaledCholesky.of(Float64Array.of(1, 1 - tiny, 0, 1), 2), undefined);
  });

  it('ScaledCholesky refuses singular, zero-column and non-finite Gram matrices', () => {
    assert.equal(ScaledCholesky.of(Float64Array.of(1, 1, 1, 1), 2), undefined);
    assert.equal(ScaledCholesky.of(Float64Array.of(1, 0, 0, 0), 2), undefined);
    assert.equal(ScaledCholesky.of(Float64Array.of(Infinity, 0, 0, 1), 2), undefined);
    assert.equal(ScaledCholesky.of(Float64Array.of(NaN, 0, 0, 1), 2), undefined);
  });

  it('projectedSquare is the fitted sum of squares n ybar^2 + Sxy^2 / Sxx of a straight-line fit', () => {
    // Analysis of variance of a straight-line fit: Draper & Smith (1998), Applied
    // Regression Analysis, 3rd ed., chapter 1.
    const n = 40;
    const x = Float64Array.from({ length: n }, (_, i) => 100 + i / 3);
    const y = seededNormals(5, n).map((v, i) => 2 + 0.3 * (x[i] as number) + v);
    const rows = new Float64Array(2 * n);
    x.forEach((v, i) => {
      rows[2 * i] = 1;
      rows[2 * i + 1] = v;
    });
    const gram = directProducts(rows, n, 2);
    const xy = Float64Array.of(
      y.reduce((s, v) => s + v, 0),
      y.reduce((s, v, i) => s + v * (x[i] as number), 0),
    );
    const f = ScaledCholesky.of(gram, 2);
    assert.ok(f);
    const mx = x.reduce((s, v) => s + v, 0) / n;
    const my = y.reduce((s, v) => s + v, 0) / n;
    let sxx = 0;
    let sxy = 0;
    for (let i = 0; i < n; i++) {
      sxx += ((x[i] as number) - mx) ** 2;
      sxy += ((x[i] as number) - mx) * ((y[i] as number) - my);
    }
    const expected = n * my * my + (sxy * sxy) / sxx;
    assert.ok(Math.abs(f.projectedSquare(xy) - expected) <= 1e-10 * expected, `${f.projectedSquare(xy)} vs ${expected}`);
  });

  it('whiten(K) has trace tr(G^-1 K) and squared Frobenius norm tr(G^-1 K G^-1 K) (2 x 2 inverse by hand)', () => {
    const g = Float64Array.of(5, 2, 2, 3); // det 11
    const k = Float64Array.of(2, -1, -1, 4);
    const ginv = [3 / 11, -2 / 11, -2 / 11, 5 / 11];
    // M = G^-1 K.
    const m = [0, 0, 0, 0];
    for (let a = 0; a < 2; a++) {
      for (let b = 0; b < 2; b++) {
        m[a * 2 + b] = (ginv[a * 2] as number) * (k[b] as number) + (ginv[a * 2 + 1] as number) * (k[2 + b] as number);
      }
    }
    const tr = (m[0] as number) + (m[3] as number);
    const tr2 = (m[0] as number) ** 2 + 2 * (m[1] as number) * (m[2] as number) + (m[3] as number) ** 2;
    const f = ScaledCholesky.of(g, 2);
    assert.ok(f);
    const w = f.whiten(k);
    assert.ok(Math.abs((w[0] as number) + (w[3] as number) - tr) <= 1e-14, 'trace');
    const frob = Array.from(w).reduce((s, v) => s + v * v, 0);
    assert.ok(Math.abs(frob - tr2) <= 1e-14, 'Frobenius');
    assert.equal(w[1], w[2]);
  });
});
