/**
 * The surface table's pieces (core/surface/coverage.ts, tableGrid.ts, table.ts): the convex
 * hull and the reach against a hand-made L-shaped data set whose uncovered corner is known
 * exactly, bilinear interpolation exact for u v (an exact property: the bilinear
 * interpolant reproduces every function a + b u + c v + d u v), the automatic step checked
 * on an independent dense set of points, and a plane reproduced in the table.
 */
import { strict as assert } from 'node:assert';
import { convexHull, coverageOf } from '../../../core/surface/coverage';
import { fitSurface } from '../../../core/surface/fit';
import { surfaceTable } from '../../../core/surface/table';
import { bilinearError, resolveSurfaceGrid } from '../../../core/surface/tableGrid';

/** Readings on the integer grid 0..10 x 0..10 without the corner u > 5 and v > 5 (an L shape). */
function lShape(): { u: Float64Array; v: Float64Array } {
  const u: number[] = [];
  const v: number[] = [];
  for (let a = 0; a <= 10; a++)
    for (let b = 0; b <= 10; b++) {
      if (a > 5 && b > 5) continue;
      u.push(a);
      v.push(b);
    }
  return { u: Float64Array.from(u), v: Float64Array.from(v) };
}

describe('surface coverage', () => {
  it('convexHull finds the corners of a square and drops inner and collinear points', () => {
    // Exact geometry: the hull of a square with points on its edges and inside is its 4 corners.
    const h = convexHull(Float64Array.of(0, 1, 0, 1, 0.5, 0.5, 0), Float64Array.of(0, 0, 1, 1, 0.5, 0, 0.5));
    assert.equal(h.u.length, 4);
    const pts = Array.from(h.u, (x, i) => `${x},${h.v[i]}`).sort();
    assert.deepEqual(pts, ['0,0', '0,1', '1,0', '1,1']);
  });

  it('flags the uncovered corner of an L-shaped data set: outside the hull beyond u + v = 15, far where no reading lies within the reach', () => {
    // Hand-made data: the hull of the L is the pentagon (0,0) (10,0) (10,5) (5,10) (0,10), so a
    // node is outside exactly when u + v > 15; "far" is checked by brute force over all readings.
    const { u, v } = lShape();
    const cov = coverageOf(u, v, 0.1);
    let outside = 0;
    let farInside = 0;
    for (let a = 0; a <= 20; a++) {
      for (let b = 0; b <= 20; b++) {
        const x = a / 2;
        const y = b / 2;
        const isOutside = x + y > 15;
        assert.equal(cov.outsideHull(x, y), isOutside, `outside at (${x}, ${y})`);
        let nearest = Infinity;
        for (let i = 0; i < u.length; i++) nearest = Math.min(nearest, Math.hypot(((u[i] as number) - x) / 10, ((v[i] as number) - y) / 10));
        assert.equal(cov.far(x, y), nearest > 0.1 + 1e-12, `far at (${x}, ${y}), nearest ${nearest}`);
        if (isOutside) outside++;
        else if (nearest > 0.1 + 1e-12) farInside++;
      }
    }
    assert.ok(outside > 0 && farInside > 0);
  });

  it('far agrees with a brute-force nearest reading for clumped readings, nodes beyond the data and several reaches', () => {
    // Brute force over every reading is the reference; the readings sit in two clumps, so many nodes are far.
    let s = 3;
    const rnd = (): number => (s = (s * 16807) % 2147483647) / 2147483647;
    const n = 3000;
    const u = Float64Array.from({ length: n }, (_, i) => (i % 2 ? 20 : 60) + rnd() * 15);
    const v = Float64Array.from({ length: n }, (_, i) => (i % 2 ? 1 : 3) + rnd() * 0.5);
    const [u0, u1] = [Math.min(...u), Math.max(...u)];
    const [v0, v1] = [Math.min(...v), Math.max(...v)];
    for (const reach of [0.03, 0.25, 1.2]) {
      const cov = coverageOf(u, v, reach);
      let far = 0;
      for (let k = 0; k < 600; k++) {
        const x = u0 - 10 + rnd() * (u1 - u0 + 20);
        const y = v0 - 1 + rnd() * (v1 - v0 + 2);
        let nearest = Infinity;
        for (let i = 0; i < n; i++) nearest = Math.min(nearest, Math.hypot(((u[i] as number) - x) / (u1 - u0), ((v[i] as number) - y) / (v1 - v0)));
        // Points within 1e-9 of the reach could fall either way by rounding: skip them.
        if (Math.abs(nearest - reach) < 1e-9) continue;
        assert.equal(cov.far(x, y), nearest > reach, `reach ${reach} at (${x}, ${y}): nearest ${nearest}`);
        if (nearest > reach) far++;
      }
      if (reach < 1) assert.ok(far > 0);
    }
  });

  it('counts a node on an edge or a vertex of the hull as inside', () => {
    const { u, v } = lShape();
    const cov = coverageOf(u, v);
    for (const [x, y] of [
      [0, 0],
      [10, 5],
      [7.5, 7.5],
      [5, 10],
      [10, 2.5],
    ] as const)
      assert.equal(cov.outsideHull(x, y), false, `(${x}, ${y})`);
  });
});

describe('surface table grid', () => {
  it('bilinearError is zero for u v + u - v (reproduced exactly by bilinear interpolation)', () => {
    // Exact property of bilinear interpolation on a rectangle.
    const e = bilinearError(
      (a, b) => a * b + a - b,
      Float64Array.of(0, 0.5, 2),
      Float64Array.of(-1, 3),
      (x) => x,
    );
    assert.ok(e.maxError < 1e-12, String(e.maxError));
  });

  it('the automatic step keeps bilinear interpolation between the printed nodes within the tolerance on an independent dense check', () => {
    // A smooth surface of known form; the check below uses 40,000 points of a seeded generator, not the grid's own check lattice.
    const n = 400;
    let s = 7;
    const rnd = (): number => (s = (s * 16807) % 2147483647) / 2147483647;
    const u = Float64Array.from({ length: n }, () => rnd() * 10);
    const v = Float64Array.from({ length: n }, () => rnd() * 4);
    const y = Float64Array.from({ length: n }, (_, i) => Math.sin((u[i] as number) / 2) * Math.exp((v[i] as number) / 4));
    const fit = fitSurface({ u, v, y }, { dfU: 6, dfV: 4 });
    const round = (x: number): number => Number(x.toPrecision(8));
    const tol = 0.002;
    const g = resolveSurfaceGrid({ kind: 'auto', tolerance: tol }, { kind: 'auto', tolerance: tol }, { u, v, rangeU: fit.rangeU, rangeV: fit.rangeV }, (a, b) => fit.predict(a, b), round);
    assert.ok(g.auto && g.auto.maxError <= tol);
    const nv = g.vs.length;
    const node = (i: number, j: number): number => round(fit.predict(g.us[i] as number, g.vs[j] as number));
    let worst = 0;
    for (let k = 0; k < 40_000; k++) {
      const a = (g.us[0] as number) + rnd() * ((g.us[g.us.length - 1] as number) - (g.us[0] as number));
      const b = (g.vs[0] as number) + rnd() * ((g.vs[nv - 1] as number) - (g.vs[0] as number));
      let i = 0;
      while (i < g.us.length - 2 && a > (g.us[i + 1] as number)) i++;
      let j = 0;
      while (j < nv - 2 && b > (g.vs[j + 1] as number)) j++;
      const p = (a - (g.us[i] as number)) / ((g.us[i + 1] as number) - (g.us[i] as number));
      const q = (b - (g.vs[j] as number)) / ((g.vs[j + 1] as number) - (g.vs[j] as number));
      const bil = (1 - p) * ((1 - q) * node(i, j) + q * node(i, j + 1)) + p * ((1 - q) * node(i + 1, j) + q * node(i + 1, j + 1));
      worst = Math.max(worst, Math.abs(fit.predict(a, b) - bil));
    }
    assert.ok(worst <= tol, `dense check: ${worst} > ${tol}`);
    // Not absurdly fine: the steps were chosen, not the limit.
    assert.ok(g.us.length * nv < 5000, `${g.us.length} x ${nv} nodes`);
  });
});

describe('surfaceTable', () => {
  it('reproduces a plane exactly at every node (df 2 x 2 spans a + b u + c v)', () => {
    // Exact property: least squares reproduces data lying in the model space.
    const u: number[] = [];
    const v: number[] = [];
    for (let a = 0; a < 8; a++)
      for (let b = 0; b < 6; b++) {
        u.push(10 + a * 1.5);
        v.push(-2 + b * 0.7);
      }
    const plane = (a: number, b: number): number => 3 + 2 * a - 0.5 * b;
    const U = Float64Array.from(u);
    const V = Float64Array.from(v);
    const fit = fitSurface({ u: U, v: V, y: Float64Array.from(u, (a, i) => plane(a, v[i] as number)) }, { dfU: 2, dfV: 2 });
    const grid = resolveSurfaceGrid(
      undefined,
      undefined,
      { u: U, v: V, rangeU: fit.rangeU, rangeV: fit.rangeV },
      (a, b) => fit.predict(a, b),
      (x) => x,
    );
    const t = surfaceTable(fit, grid, coverageOf(U, V), false, { u: 'u', v: 'v' });
    assert.equal(t.rows.length, 21 * 21);
    for (const r of t.rows) assert.ok(Math.abs((r[2] as number) - plane(r[0] as number, r[1] as number)) < 1e-11, `fit at (${r[0]}, ${r[1]})`);
  });

  it('refuses nodes the readings do not reach unless asked for, and flags them when asked', () => {
    const { u, v } = lShape();
    const y = Float64Array.from(u, (a, i) => a + (v[i] as number));
    const fit = fitSurface({ u, v, y }, { dfU: 2, dfV: 2 });
    const grid = resolveSurfaceGrid(
      { kind: 'count', start: 0, stop: 10, count: 11 },
      { kind: 'count', start: 0, stop: 10, count: 11 },
      { u, v, rangeU: fit.rangeU, rangeV: fit.rangeV },
      (a, b) => fit.predict(a, b),
      (x) => x,
    );
    // Outside the hull: u + v > 15 on the integer nodes, 1 + 2 + 3 + 4 + 5 = 15 nodes; far inside it: (7,7), (7,8), (8,7).
    assert.throws(
      () => surfaceTable(fit, grid, coverageOf(u, v, 0.1), false, { u: 'u', v: 'v' }),
      /18 of 121 table nodes lie where the readings do not reach \(15 outside the convex hull of the readings, 3 inside it/,
    );
    const t = surfaceTable(fit, grid, coverageOf(u, v, 0.1), true, { u: 'u', v: 'v' });
    assert.equal(t.outside, 15);
    assert.equal(t.far, 3);
  });
});
