/**
 * Chebyshev series on a piece (core/calibrate/chebyshev.ts): interpolation, the derivative
 * series, Clenshaw evaluation and the coefficient bound. Known values come from the
 * definition T_k(cos t) = cos(k t) and the power identities of Abramowitz & Stegun (1964),
 * Handbook of Mathematical Functions, table 22.3 (s^2 = (T_0 + T_2) / 2,
 * s^3 = (3 T_1 + T_3) / 4).
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { chebDerivative, chebSpread, chebValue, ChebyshevNodes } from '../../../core/calibrate/chebyshev';

const TOL = 1e-14;

function close(actual: number, expected: number, tol: number, what: string): void {
  assert.ok(Math.abs(actual - expected) <= tol, `${what}: ${actual} vs ${expected}`);
}

/** Interpolation coefficients of p on [-1, 1] from n Chebyshev points. */
function coefficientsOf(p: (s: number) => number, n: number): Float64Array {
  const nodes = new ChebyshevNodes(n);
  const values = Float64Array.from(nodes.s, p);
  const c = new Float64Array(n);
  nodes.interpolate(values, c);
  return c;
}

describe('ChebyshevNodes', () => {
  it('interpolate gives 2.5 T0 + 2 T1 + 1.5 T2 for 1 + 2s + 3s^2 (s^2 = (T0 + T2)/2, A&S table 22.3)', () => {
    const c = coefficientsOf((s) => 1 + 2 * s + 3 * s * s, 3);
    [2.5, 2, 1.5].forEach((v, k) => close(c[k] as number, v, TOL, `c${k}`));
  });

  it('interpolate gives (3 T1 + T3)/4 for s^3 with one spare point, whose coefficient is 0 (A&S table 22.3)', () => {
    const c = coefficientsOf((s) => s * s * s, 5);
    [0, 0.75, 0, 0.25, 0].forEach((v, k) => close(c[k] as number, v, TOL, `c${k}`));
  });

  it('nodes are cos(pi (2j + 1) / (2n)) and `at` maps them onto the piece', () => {
    const nodes = new ChebyshevNodes(4);
    for (let j = 0; j < 4; j++) close(nodes.s[j] as number, Math.cos((Math.PI * (2 * j + 1)) / 8), TOL, `node ${j}`);
    close(nodes.at(0, 2, 6), 4 + 2 * Math.cos(Math.PI / 8), 1e-14, 'x of node 0 on [2, 6]');
  });

  it('refuses zero points', () => {
    assert.throws(() => new ChebyshevNodes(0));
  });
});

describe('chebValue', () => {
  it('T_k(cos t) = cos(k t) (the definition), k = 0..12', () => {
    for (let k = 0; k <= 12; k++) {
      const c = new Float64Array(k + 1);
      c[k] = 1;
      for (const t of [0, 0.3, 1.1, 2.5, Math.PI]) close(chebValue(c, k + 1, Math.cos(t)), Math.cos(k * t), 1e-13, `T_${k}(cos ${t})`);
    }
  });

  it('an empty series is 0', () => {
    assert.equal(chebValue(new Float64Array(0), 0, 0.5), 0);
  });
});

describe('chebDerivative', () => {
  it('d/ds T_3 = 12 s^2 - 3 = 3 T0 + 6 T2 (A&S table 22.3)', () => {
    const d = new Float64Array(3);
    chebDerivative(Float64Array.of(0, 0, 0, 1), 4, d);
    [3, 0, 6].forEach((v, k) => close(d[k] as number, v, TOL, `d${k}`));
  });

  it('matches a central difference of the series for random coefficients (property)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1, max: 1, noNaN: true }), { minLength: 2, maxLength: 12 }), fc.double({ min: -0.9, max: 0.9, noNaN: true }), (cs, s) => {
        const c = Float64Array.from(cs);
        const d = new Float64Array(c.length);
        chebDerivative(c, c.length, d);
        const h = 1e-6;
        const fd = (chebValue(c, c.length, s + h) - chebValue(c, c.length, s - h)) / (2 * h);
        return Math.abs(chebValue(d, c.length - 1, s) - fd) <= 1e-6 * (1 + c.length * c.length);
      }),
    );
  });
});

describe('chebSpread', () => {
  it('bounds the series on [-1, 1]: |p(s) - c0| <= sum |c_k| (|T_k| <= 1)', () => {
    const c = Float64Array.of(0.5, -0.25, 0.125, 1);
    assert.equal(chebSpread(c, 4), 1.375);
    for (let s = -1; s <= 1; s += 0.01) assert.ok(Math.abs(chebValue(c, 4, s) - 0.5) <= 1.375 + 1e-15);
  });
});
