/**
 * Real roots of Chebyshev series in [-1, 1] (core/calibrate/roots.ts). Known roots come from
 * polynomials built from their roots, and from the zeros of T_n, cos((2k - 1) pi / (2n))
 * (Abramowitz & Stegun 1964, Handbook of Mathematical Functions, 22.16.4).
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { ChebyshevNodes } from '../../../core/calibrate/chebyshev';
import { RootFinder } from '../../../core/calibrate/roots';

/** Chebyshev coefficients of prod (s - r_i) (times `lead`), interpolated at deg + 1 points. */
function fromRoots(roots: readonly number[], lead = 1): Float64Array {
  const n = roots.length + 1;
  const nodes = new ChebyshevNodes(n);
  const values = Float64Array.from(nodes.s, (s) => roots.reduce((p, r) => p * (s - r), lead));
  const c = new Float64Array(n);
  nodes.interpolate(values, c);
  return c;
}

function rootsOf(c: Float64Array, noise = 0): number[] {
  const finder = new RootFinder(c.length - 1);
  const out = new Float64Array(2 * c.length);
  const count = finder.roots(c, c.length, noise, out);
  return Array.from(out.subarray(0, count));
}

function sameRoots(found: number[], expected: number[], tol: number): void {
  assert.equal(found.length, expected.length, `found ${found.join(', ')}; expected ${expected.join(', ')}`);
  expected.forEach((r, i) => assert.ok(Math.abs((found[i] as number) - r) <= tol, `root ${i}: ${found[i]} vs ${r}`));
}

describe('RootFinder', () => {
  it('roots of a quadratic (s - 0.3)(s + 0.5), with leading coefficient 1 and -1e-9', () => {
    sameRoots(rootsOf(fromRoots([-0.5, 0.3])), [-0.5, 0.3], 1e-15);
    sameRoots(rootsOf(fromRoots([-0.5, 0.3], -1e-9)), [-0.5, 0.3], 1e-15);
  });

  it('a quadratic with one root far outside [-1, 1] keeps the inner one to full precision (no cancellation)', () => {
    sameRoots(rootsOf(fromRoots([1e8, 0.123456789])), [0.123456789], 1e-15);
  });

  it('a straight line: the root inside, none for a root outside', () => {
    sameRoots(rootsOf(Float64Array.of(0.25, 1)), [-0.25], 0);
    sameRoots(rootsOf(Float64Array.of(3, 1)), [], 0);
  });

  it('no real roots: s^2 + 1', () => {
    sameRoots(rootsOf(Float64Array.of(1.5, 0, 0.5)), [], 0);
  });

  it('a double root (s - 0.2)^2 is reported once as a touching zero when noise allows for rounding', () => {
    const found = rootsOf(fromRoots([0.2, 0.2]), 1e-15);
    assert.ok(found.length >= 1 && found.length <= 2, `found ${found.join(', ')}`);
    for (const r of found) assert.ok(Math.abs(r - 0.2) <= 1e-7, `${r}`);
  });

  it('quartic with roots -0.9, -0.1, 0.35, 0.8 (recursive isolation)', () => {
    sameRoots(rootsOf(fromRoots([-0.9, -0.1, 0.35, 0.8])), [-0.9, -0.1, 0.35, 0.8], 1e-14);
  });

  it('T_10 has its zeros at cos((2k - 1) pi / 20) (A&S 22.16.4)', () => {
    const c = new Float64Array(11);
    c[10] = 1;
    const expected = Array.from({ length: 10 }, (_, k) => Math.cos(((2 * (k + 1) - 1) * Math.PI) / 20)).sort((a, b) => a - b);
    sameRoots(rootsOf(c), expected, 1e-14);
  });

  it('a root at an end of [-1, 1] counts (within the rounding allowance)', () => {
    sameRoots(rootsOf(fromRoots([-1, 0.5, 3]), 1e-14), [-1, 0.5], 1e-14);
  });

  it('finds every root of polynomials of degree 1 to 9 built from roots at least 0.1 apart (property)', () => {
    // Roots closer together are ill-conditioned: a rounding of the coefficients moves them by eps / |p'(root)|.
    fc.assert(
      fc.property(fc.uniqueArray(fc.integer({ min: -9, max: 9 }), { minLength: 1, maxLength: 9 }), fc.double({ min: 0.1, max: 100, noNaN: true }), (ints, lead) => {
        const roots = ints.map((k) => k / 10).sort((a, b) => a - b);
        const found = rootsOf(fromRoots(roots, lead));
        return found.length === roots.length && roots.every((r, i) => Math.abs((found[i] as number) - r) <= 1e-9);
      }),
    );
  });

  it('refuses a series above the degree it was set up for', () => {
    assert.throws(() => new RootFinder(2).roots(new Float64Array(4), 4, 0, new Float64Array(8)), /degree 2/);
  });
});
