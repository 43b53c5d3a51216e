/**
 * bandLdl, bandSolve and bandInverse (core/linalg/banded.ts) against closed forms and
 * against dense ml-matrix solves and inverses on seeded random SPD band matrices.
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { Matrix, inverse, solve } from 'ml-matrix';
import { FitError } from '../../../core/errors';
import { bandInverse, bandLdl, bandSolve } from '../../../core/linalg/banded';

/** Compact lower band storage of a dense symmetric matrix. */
function toBand(a: Matrix, p: number): Float64Array {
  const n = a.rows;
  const band = new Float64Array(n * (p + 1));
  for (let j = 0; j < n; j++) for (let d = 0; d <= p && j + d < n; d++) band[j * (p + 1) + d] = a.get(j + d, j);
  return band;
}

/** Second-difference matrix tridiag(-1, 2, -1) of order n. */
function secondDifference(n: number): Matrix {
  const a = Matrix.zeros(n, n);
  for (let i = 0; i < n; i++) {
    a.set(i, i, 2);
    if (i + 1 < n) {
      a.set(i, i + 1, -1);
      a.set(i + 1, i, -1);
    }
  }
  return a;
}

describe('banded LDL factorisation, solve and inverse band', () => {
  it('bandLdl, bandSolve and bandInverse reproduce the 2 x 2 example of their doc comments', () => {
    // Source: hand computation; the inverse of [[4, 2], [2, 3]] is the adjugate over the
    // determinant 8, i.e. [[3, -2], [-2, 4]] / 8. Tolerance 1e-15 (a handful of roundings).
    const f = bandLdl(Float64Array.of(4, 2, 3, 0), 2, 1);
    const expectF = [4, 0.5, 2, 0];
    for (let i = 0; i < 4; i++) assert.ok(Math.abs((f[i] as number) - (expectF[i] as number)) <= 1e-15, `factor[${i}]`);
    const x = bandSolve(f, 2, 1, Float64Array.of(6, 5));
    assert.ok(Math.abs((x[0] as number) - 1) <= 1e-15 && Math.abs((x[1] as number) - 1) <= 1e-15);
    const s = bandInverse(f, 2, 1);
    const expectS = [0.375, -0.25, 0.5, 0];
    for (let i = 0; i < 4; i++) assert.ok(Math.abs((s[i] as number) - (expectS[i] as number)) <= 1e-15, `inverse[${i}]`);
  });

  it('bandLdl pivots and bandInverse of the second-difference matrix match their closed forms', () => {
    // Source (closed forms, from memory; both are standard and easy to verify by hand): for
    // tridiag(-1, 2, -1) of order n the LDL' pivots are D_k = (k + 1) / k (k = 1..n) and the
    // inverse is (A^-1)_{ij} = min(i, j) (n + 1 - max(i, j)) / (n + 1) (1-based).
    // Tolerance 1e-12 relative (condition number ~ 0.4 n^2 = 1e3).
    for (const n of [1, 2, 7, 40]) {
      const p = 1;
      const f = bandLdl(toBand(secondDifference(n), p), n, p);
      for (let k = 1; k <= n; k++) {
        const d = f[(k - 1) * 2] as number;
        assert.ok(Math.abs(d - (k + 1) / k) <= 1e-12 * ((k + 1) / k), `n ${n}: pivot ${k} is ${d}`);
      }
      const s = bandInverse(f, n, p);
      for (let i = 1; i <= n; i++) {
        for (let j = i; j <= Math.min(n, i + p); j++) {
          const want = (Math.min(i, j) * (n + 1 - Math.max(i, j))) / (n + 1);
          const got = s[(i - 1) * 2 + (j - i)] as number;
          assert.ok(Math.abs(got - want) <= 1e-12 * want, `n ${n}: inverse(${i}, ${j}) is ${got}, closed form ${want}`);
        }
      }
    }
  });

  it('bandSolve and bandInverse agree with dense ml-matrix solve and inverse on random SPD band matrices', () => {
    // Source: ml-matrix's dense LU solve and inverse (an independent implementation).
    // A = B B' + 0.1 I with B lower triangular of bandwidth p, diagonal in [1, 2] and
    // off-diagonal entries in [-1, 1]: symmetric positive definite with half-bandwidth p.
    // Tolerance: 1e-10 times the largest entry of the dense result (moderate conditioning).
    fc.assert(
      fc.property(
        fc
          .integer({ min: 1, max: 30 })
          .chain((n) =>
            fc.tuple(
              fc.constant(n),
              fc.integer({ min: 0, max: Math.min(5, n - 1) }),
              fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: n * 6, maxLength: n * 6 }),
              fc.array(fc.double({ min: -10, max: 10, noNaN: true }), { minLength: n, maxLength: n }),
            ),
          ),
        ([n, p, entries, rhs]) => {
          const b = Matrix.zeros(n, n);
          for (let i = 0; i < n; i++) {
            for (let d = 0; d <= p && i - d >= 0; d++) {
              const e = entries[i * 6 + d] as number;
              b.set(i, i - d, d === 0 ? 1.5 + 0.5 * e : e);
            }
          }
          const a = b.mmul(b.transpose()).add(Matrix.eye(n, n).mul(0.1));
          const f = bandLdl(toBand(a, p), n, p);
          const x = bandSolve(f, n, p, Float64Array.from(rhs));
          const xd = solve(a, Matrix.columnVector(rhs));
          let scale = 0;
          for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(xd.get(i, 0)));
          for (let i = 0; i < n; i++) {
            assert.ok(Math.abs((x[i] as number) - xd.get(i, 0)) <= 1e-10 * scale + 1e-300, `n ${n} p ${p}: x[${i}]`);
          }
          const s = bandInverse(f, n, p);
          const sd = inverse(a);
          let sScale = 0;
          for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) sScale = Math.max(sScale, Math.abs(sd.get(i, j)));
          for (let i = 0; i < n; i++) {
            for (let d = 0; d <= p; d++) {
              const got = s[i * (p + 1) + d] as number;
              const want = i + d < n ? sd.get(i, i + d) : 0;
              assert.ok(Math.abs(got - want) <= 1e-10 * sScale, `n ${n} p ${p}: inverse(${i}, ${i + d}) is ${got}, dense ${want}`);
            }
          }
        },
      ),
      { seed: 20250601, numRuns: 200 },
    );
  });

  it('bandSolve solves in place when the result array is the right-hand side', () => {
    // Source: the same dense ml-matrix solve as above, on the second-difference matrix.
    const n = 9;
    const a = secondDifference(n);
    const f = bandLdl(toBand(a, 1), n, 1);
    const b = Float64Array.from({ length: n }, (_, i) => i - 3);
    const want = solve(a, Matrix.columnVector(Array.from(b)));
    bandSolve(f, n, 1, b, b);
    for (let i = 0; i < n; i++) assert.ok(Math.abs((b[i] as number) - want.get(i, 0)) <= 1e-12 * 30, `x[${i}]`);
  });

  it('bandLdl refuses indefinite and singular matrices, naming the pivot', () => {
    // Source: [[1, 2], [2, 1]] has eigenvalues 3 and -1 (indefinite); [[1, 1], [1, 1]] is
    // singular; a zero diagonal entry cannot be a positive definite matrix.
    assert.throws(
      () => bandLdl(Float64Array.of(1, 2, 1, 0), 2, 1),
      (e: unknown) => e instanceof FitError && /pivot 2 of 2/.test(e.message),
    );
    assert.throws(
      () => bandLdl(Float64Array.of(1, 1, 1, 0), 2, 1),
      (e: unknown) => e instanceof FitError && /pivot 2 of 2/.test(e.message),
    );
    assert.throws(
      () => bandLdl(Float64Array.of(0, 0, 1, 0), 2, 1),
      (e: unknown) => e instanceof FitError && /pivot 1 of 2/.test(e.message),
    );
  });

  it('band functions reject storage of the wrong shape', () => {
    // Source: the storage convention of core/linalg/banded.ts (length n (p + 1), n >= 1, p >= 0).
    assert.throws(() => bandLdl(new Float64Array(5), 2, 1), RangeError);
    assert.throws(() => bandLdl(new Float64Array(2), 2, -1), RangeError);
    assert.throws(() => bandLdl(new Float64Array(0), 0, 0), RangeError);
    assert.throws(() => bandSolve(new Float64Array(4), 2, 1, new Float64Array(3)), RangeError);
  });
});
