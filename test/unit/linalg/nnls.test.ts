/**
 * nnls (core/linalg/nnls.ts, Lawson & Hanson 1974, chapter 23) on hand-checked cases and,
 * with seeded fast-check problems, against its defining optimality conditions (Lawson &
 * Hanson 1974, Theorem 23.4, the Kuhn-Tucker conditions): x >= 0, the dual
 * w = E'(f - E x) is <= 0 where x = 0 and 0 where x > 0; and against brute force over
 * every set of free variables (the optimum is the least-squares solution on its own
 * support, so the best feasible such solution is the optimum). Reference values from R
 * are in test/reference/physics.test.ts. Tolerances are stated per check.
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { Matrix, solve } from 'ml-matrix';
import { nnls } from '../../../core/linalg/nnls';

/** Brute-force NNLS: least squares (ml-matrix QR solve) on every column subset, best feasible one. */
function bruteForce(e: Float64Array, m: number, n: number, f: Float64Array): { x: Float64Array; rss: number } {
  let best = { x: new Float64Array(n), rss: f.reduce((s, v) => s + v * v, 0) };
  for (let mask = 1; mask < 1 << n; mask++) {
    const cols: number[] = [];
    for (let j = 0; j < n; j++) if (mask & (1 << j)) cols.push(j);
    if (cols.length > m) continue;
    const a = new Matrix(m, cols.length);
    for (let i = 0; i < m; i++) cols.forEach((j, k) => a.set(i, k, e[i * n + j] as number));
    let z: Matrix;
    try {
      z = solve(a, Matrix.columnVector(Array.from(f)), true);
    } catch {
      continue;
    }
    if (cols.some((_, k) => !(z.get(k, 0) > 0))) continue;
    const x = new Float64Array(n);
    cols.forEach((j, k) => (x[j] = z.get(k, 0)));
    let rss = 0;
    for (let i = 0; i < m; i++) {
      let r = f[i] as number;
      for (let j = 0; j < n; j++) r -= (e[i * n + j] as number) * (x[j] as number);
      rss += r * r;
    }
    if (rss < best.rss) best = { x, rss };
  }
  return best;
}

/** Entries in [-10, 10] on a 0.01 grid: well scaled, with exact zeros and repeated values (rank deficiency) common. */
const entry = fc.integer({ min: -1000, max: 1000 }).map((v) => v / 100);

const problem = fc.record({ m: fc.integer({ min: 1, max: 7 }), n: fc.integer({ min: 1, max: 6 }) }).chain(({ m, n }) =>
  fc.record({
    m: fc.constant(m),
    n: fc.constant(n),
    e: fc.array(entry, { minLength: m * n, maxLength: m * n }),
    f: fc.array(entry, { minLength: m, maxLength: m }),
  }),
);

describe('nnls (Lawson & Hanson non-negative least squares)', () => {
  it('nnls reproduces the example of its doc comment: E = I, f = (1, -1) gives x = (1, 0)', () => {
    // Source: hand computation; the objective separates, (x1 - 1)^2 + (x2 + 1)^2 with x >= 0.
    const r = nnls(Float64Array.of(1, 0, 0, 1), 2, 2, Float64Array.of(1, -1));
    assert.deepEqual(Array.from(r.x), [1, 0]);
    assert.ok(Math.abs(r.residualNorm - 1) <= 1e-15, 'residual norm 1');
    assert.ok(r.converged);
  });

  it('nnls returns the unconstrained least-squares solution when it is positive', () => {
    // Source: hand computation; E = [[1, 1], [1, 2], [1, 3]], f = (2, 3, 4) lies on the line 1 + t exactly.
    const r = nnls(Float64Array.of(1, 1, 1, 2, 1, 3), 3, 2, Float64Array.of(2, 3, 4));
    assert.ok(Math.abs((r.x[0] as number) - 1) <= 1e-14 && Math.abs((r.x[1] as number) - 1) <= 1e-14, `x = ${Array.from(r.x)}`);
    assert.ok(r.residualNorm <= 1e-14);
  });

  it('nnls handles awkward cases: f = 0, a zero column, a column pointing away, more unknowns than equations', () => {
    assert.deepEqual(Array.from(nnls(Float64Array.of(1, 2, 3, 4), 2, 2, Float64Array.of(0, 0)).x), [0, 0], 'f = 0 gives x = 0');
    // A zero column never enters the passive set; the other one fits f = (1, 1) exactly (hand computation).
    const z = nnls(Float64Array.of(0, 1, 0, 1), 2, 2, Float64Array.of(1, 1));
    assert.equal(z.x[0], 0);
    assert.ok(Math.abs((z.x[1] as number) - 1) <= 1e-15);
    // A single column e = (-1, -1) with f = (1, 1): its least-squares coefficient is -1, so x = 0.
    assert.deepEqual(Array.from(nnls(Float64Array.of(-1, -1), 2, 1, Float64Array.of(1, 1)).x), [0]);
    // 1 equation, 3 unknowns, x1 + 2 x2 + 3 x3 = 6: one variable suffices and the residual is 0.
    const u = nnls(Float64Array.of(1, 2, 3), 1, 3, Float64Array.of(6));
    assert.ok(u.residualNorm <= 1e-14, `residual ${u.residualNorm}`);
    assert.ok(u.x.every((v) => v >= 0));
  });

  it('nnls rejects E and f of the wrong size', () => {
    assert.throws(() => nnls(new Float64Array(5), 2, 3, new Float64Array(2)), /nnls: E must be 2 x 3/);
  });

  it('nnls satisfies the Kuhn-Tucker conditions on seeded random problems', () => {
    // Tolerance: 1e-9 relative to ||E||_max (||f|| + ||E|| ||x||) for the dual (rounding of
    // a few QR solves of size <= 7), x >= 0 exactly.
    fc.assert(
      fc.property(problem, ({ m, n, e, f }) => {
        const E = Float64Array.from(e);
        const F = Float64Array.from(f);
        const r = nnls(E, m, n, F);
        let eMax = 0;
        for (const v of E) eMax = Math.max(eMax, Math.abs(v));
        const xNorm = Math.sqrt(r.x.reduce((s, v) => s + v * v, 0));
        const fNorm = Math.sqrt(F.reduce((s, v) => s + v * v, 0));
        const tol = 1e-9 * (eMax * (fNorm + eMax * xNorm * Math.sqrt(m * n)) + 1e-300);
        for (let j = 0; j < n; j++) {
          const x = r.x[j] as number;
          const w = r.dual[j] as number;
          assert.ok(x >= 0, `x[${j}] = ${x} is negative`);
          if (x > 0) assert.ok(Math.abs(w) <= tol, `dual ${w} at a positive variable (tolerance ${tol})`);
          else assert.ok(w <= tol, `dual ${w} > 0 at a zero variable (tolerance ${tol})`);
        }
      }),
      { seed: 20240611, numRuns: 300 },
    );
  });

  it('nnls attains the brute-force optimum over all column subsets on seeded random problems', () => {
    // Tolerance: residual sum of squares within 1e-9 relative (plus 1e-12 absolute) of the best subset solution.
    fc.assert(
      fc.property(problem, ({ m, n, e, f }) => {
        const E = Float64Array.from(e);
        const F = Float64Array.from(f);
        const r = nnls(E, m, n, F);
        const b = bruteForce(E, m, n, F);
        const rss = r.residualNorm * r.residualNorm;
        assert.ok(rss <= b.rss * (1 + 1e-9) + 1e-12, `nnls RSS ${rss} exceeds the brute-force optimum ${b.rss}`);
      }),
      { seed: 7, numRuns: 200 },
    );
  });
});
