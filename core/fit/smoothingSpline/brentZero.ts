/**
 * Brent's root finder on a bracketing interval (zeroin: Brent 1973, "Algorithms for
 * Minimization without Derivatives", chapter 4, procedure zero).
 */

/**
 * Brent's method on [a, b] with g(a) = fa and g(b) = fb of opposite signs (or fb = 0):
 * inverse quadratic interpolation or secant steps, falling back to bisection, so the
 * bracket always shrinks (Brent 1973, chapter 4). It stops when the bracket is below the
 * rounding tolerance, when a zero is hit, or as soon as `done()` says so; the caller keeps
 * what it needs from its calls of g (nothing is returned). Cost: at most about
 * log2(width / tolerance)^2 calls of g, typically a few.
 * @example
 *   let root = NaN;
 *   brentZero((x) => { root = x; return x * x - 2; }, 1, -1, 2, 2, () => false); // root ~ 1.41421356
 */
export function brentZero(g: (x: number) => number, a0: number, fa0: number, b0: number, fb0: number, done: () => boolean): void {
  let a = a0;
  let fa = fa0;
  let b = b0;
  let fb = fb0;
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  while (!done()) {
    if (fb > 0 === fc > 0) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + 1e-14;
    const mid = 0.5 * (c - b);
    if (Math.abs(mid) <= tol || fb === 0) break;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      let pp: number;
      let qq: number;
      const s = fb / fa;
      if (a === c) {
        pp = 2 * mid * s;
        qq = 1 - s;
      } else {
        const q0 = fa / fc;
        const r = fb / fc;
        pp = s * (2 * mid * q0 * (q0 - r) - (b - a) * (r - 1));
        qq = (q0 - 1) * (r - 1) * (s - 1);
      }
      if (pp > 0) qq = -qq;
      else pp = -pp;
      if (2 * pp < Math.min(3 * mid * qq - Math.abs(tol * qq), Math.abs(e * qq))) {
        e = d;
        d = pp / qq;
      } else {
        d = mid;
        e = d;
      }
    } else {
      d = mid;
      e = d;
    }
    a = b;
    fa = fb;
    b += Math.abs(d) > tol ? d : mid > 0 ? tol : -tol;
    fb = g(b);
  }
}
