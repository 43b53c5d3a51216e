/**
 * solveLsi and activeSetCovariance (core/linalg/lsi.ts). solveLsi is checked against the
 * Kuhn-Tucker conditions of min 1/2 b'Gb - g'b subject to A b >= h (Lawson & Hanson 1974,
 * chapter 23; Nocedal & Wright, Numerical Optimization, 2nd ed., 2006, Theorem 16.4):
 * feasibility, non-negative multipliers, stationarity G b - g = A' lambda, complementary
 * slackness. activeSetCovariance is checked against the null-space form Z (Z'GZ)^-1 Z' of
 * the equality-constrained covariance (Z from core/linalg/nullSpace.ts, an independent
 * Householder route). Problems are seeded fast-check draws; tolerances stated per check.
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { FitError } from '../../../core/errors';
import { activeSetCovariance, solveLsi } from '../../../core/linalg/lsi';
import { nullSpace } from '../../../core/linalg/nullSpace';
import { factorSpd } from '../../../core/linalg/spd';

const entry = fc.integer({ min: -500, max: 500 }).map((v) => v / 100);

/** G = M'M + I (q x q, SPD), g, A (r x q) and h with a known feasible point b* (h = A b* - slack). */
const problem = fc.record({ q: fc.integer({ min: 1, max: 6 }), r: fc.integer({ min: 1, max: 9 }) }).chain(({ q, r }) =>
  fc.record({
    q: fc.constant(q),
    r: fc.constant(r),
    m: fc.array(entry, { minLength: q * q, maxLength: q * q }),
    g: fc.array(entry, { minLength: q, maxLength: q }),
    a: fc.array(entry, { minLength: r * q, maxLength: r * q }),
    b: fc.array(entry, { minLength: q, maxLength: q }),
    slack: fc.array(
      fc.integer({ min: 0, max: 300 }).map((v) => v / 100),
      { minLength: r, maxLength: r },
    ),
  }),
);

function spd(m: number[], q: number): Float64Array {
  const g = new Float64Array(q * q);
  for (let i = 0; i < q; i++)
    for (let j = 0; j < q; j++) {
      let s = i === j ? 1 : 0;
      for (let k = 0; k < q; k++) s += (m[k * q + i] as number) * (m[k * q + j] as number);
      g[i * q + j] = s;
    }
  return g;
}

describe('solveLsi (least squares with inequality constraints via LDP and NNLS)', () => {
  it('solveLsi reproduces the example of its doc comment: min b^2/2 + 2 b subject to b >= 0 gives b = 0', () => {
    // Source: hand computation; the unconstrained minimiser is -2, so the bound is active.
    const r = solveLsi(Float64Array.of(1), Float64Array.of(-2), 1, Float64Array.of(1), Float64Array.of(0), 1, 'x');
    assert.ok(Math.abs(r.beta[0] as number) <= 1e-15);
    assert.equal(r.activeCount, 1);
    assert.ok(Math.abs((r.multipliers[0] as number) - 2) <= 1e-14, 'multiplier 2 = -(G b - g)');
  });

  it('solveLsi returns G^-1 g unchanged, with nothing active, when it satisfies every constraint', () => {
    // Source: hand computation; G = diag(2, 4), g = (2, 4) gives b = (1, 1), which satisfies b1 >= 0 and b2 >= 0.
    // Tolerance 1e-15 (the scaled Cholesky rounds once or twice).
    const r = solveLsi(Float64Array.of(2, 0, 0, 4), Float64Array.of(2, 4), 2, Float64Array.of(1, 0, 0, 1), Float64Array.of(0, 0), 2, 'x');
    assert.ok(Math.abs((r.beta[0] as number) - 1) <= 1e-15 && Math.abs((r.beta[1] as number) - 1) <= 1e-15, `b = ${Array.from(r.beta)}`);
    assert.equal(r.activeCount, 0);
    assert.equal(r.iterations, 0);
  });

  it('solveLsi throws FitError naming the fit when the constraints are inconsistent', () => {
    // b >= 1 and -b >= 0 cannot both hold.
    assert.throws(
      () => solveLsi(Float64Array.of(1), Float64Array.of(0), 1, Float64Array.of(1, -1), Float64Array.of(1, 0), 2, 'test fit'),
      (e: unknown) => e instanceof FitError && /test fit: the shape constraints cannot all hold/.test(e.message),
    );
  });

  it('solveLsi satisfies the Kuhn-Tucker conditions on seeded random problems with a feasible point', () => {
    // Tolerance: 1e-8 relative to the size of the terms (a few Cholesky and QR solves of size <= 10).
    fc.assert(
      fc.property(problem, ({ q, r, m, g, a, b, slack }) => {
        const G = spd(m, q);
        const A = Float64Array.from(a);
        const h = new Float64Array(r);
        for (let i = 0; i < r; i++) {
          let s = 0;
          for (let j = 0; j < q; j++) s += (A[i * q + j] as number) * (b[j] as number);
          h[i] = s - (slack[i] as number);
        }
        const sol = solveLsi(G, Float64Array.from(g), q, A, h, r, 'random');
        let scale = 1;
        for (const v of [...G, ...g, ...A, ...h, ...sol.beta]) scale = Math.max(scale, Math.abs(v));
        const tol = 1e-8 * scale * scale * (q + r);
        for (let i = 0; i < r; i++) {
          let s = -(h[i] as number);
          for (let j = 0; j < q; j++) s += (A[i * q + j] as number) * (sol.beta[j] as number);
          const lam = sol.multipliers[i] as number;
          assert.ok(s >= -tol, `constraint ${i} violated by ${s}`);
          assert.ok(lam >= 0, `multiplier ${i} = ${lam}`);
          assert.ok(Math.abs(lam * s) <= tol * Math.max(1, lam), `complementary slackness ${lam} x ${s}`);
        }
        for (let j = 0; j < q; j++) {
          let grad = -(g[j] as number);
          for (let k = 0; k < q; k++) grad += (G[j * q + k] as number) * (sol.beta[k] as number);
          let at = 0;
          for (let i = 0; i < r; i++) at += (A[i * q + j] as number) * (sol.multipliers[i] as number);
          assert.ok(Math.abs(grad - at) <= tol * (1 + Math.max(...Array.from(sol.multipliers))), `stationarity ${grad} vs ${at} in coordinate ${j}`);
        }
      }),
      { seed: 42, numRuns: 300 },
    );
  });
});

describe('activeSetCovariance (covariance with the active constraints as equalities)', () => {
  it('activeSetCovariance reproduces the example of its doc comment: G = I, active row (1, 0) gives diag(0, 1)', () => {
    const { cov, rank } = activeSetCovariance(Float64Array.of(1, 0, 0, 1), 2, Float64Array.of(1, 0), 1, Uint8Array.of(1));
    assert.equal(rank, 1);
    const want = [0, 0, 0, 1];
    for (let i = 0; i < 4; i++) assert.ok(Math.abs((cov[i] as number) - (want[i] as number)) <= 1e-15, `cov[${i}] = ${cov[i]}`);
  });

  it("activeSetCovariance equals Z (Z'GZ)^-1 Z' with Z the null space of the active rows, and drops dependent rows", () => {
    // Tolerance 1e-9 relative to the largest entry of G^-1.
    fc.assert(
      fc.property(problem, ({ q, r, m, a }) => {
        const G = spd(m, q);
        const ginv = factorSpd(G, q, 'G').inverse;
        const A = Float64Array.from(a);
        // Make the last row a copy of the first (dependent), and mark it and the first min(q - 1, r - 1) rows active.
        if (r >= 2) for (let j = 0; j < q; j++) A[(r - 1) * q + j] = A[j] as number;
        const active = new Uint8Array(r);
        const k = Math.min(q - 1, r >= 2 ? r - 1 : r);
        for (let i = 0; i < k; i++) active[i] = 1;
        if (r >= 2 && k >= 1) active[r - 1] = 1;
        const rows: number[] = [];
        for (let i = 0; i < r; i++) if (active[i] === 1) rows.push(i);
        const c = new Float64Array(k * q);
        for (let i = 0; i < k; i++) for (let j = 0; j < q; j++) c[i * q + j] = A[i * q + j] as number;
        let independent = true;
        try {
          if (k > 0) nullSpace(c, k, q);
        } catch {
          independent = false;
        }
        fc.pre(independent && k > 0 && rows.every((i) => A.subarray(i * q, (i + 1) * q).some((v) => v !== 0)));
        const z = nullSpace(c, k, q);
        const p = q - k;
        const { cov, rank } = activeSetCovariance(ginv, q, A, r, active);
        assert.equal(rank, k, 'the copied row is recognised as dependent');
        // Z (Z'GZ)^-1 Z'.
        const zgz = new Float64Array(p * p);
        for (let i = 0; i < p; i++)
          for (let j = 0; j < p; j++) {
            let s = 0;
            for (let u = 0; u < q; u++) for (let v = 0; v < q; v++) s += (z[u * p + i] as number) * (G[u * q + v] as number) * (z[v * p + j] as number);
            zgz[i * p + j] = s;
          }
        const inv = factorSpd(zgz, p, 'ZGZ').inverse;
        let scale = 0;
        for (const v of ginv) scale = Math.max(scale, Math.abs(v));
        for (let i = 0; i < q; i++)
          for (let j = 0; j < q; j++) {
            let s = 0;
            for (let u = 0; u < p; u++) for (let v = 0; v < p; v++) s += (z[i * p + u] as number) * (inv[u * p + v] as number) * (z[j * p + v] as number);
            assert.ok(Math.abs((cov[i * q + j] as number) - s) <= 1e-9 * scale, `cov[${i}][${j}] = ${cov[i * q + j]}, null-space form ${s}`);
          }
      }),
      { seed: 3, numRuns: 200 },
    );
  });
});
