/**
 * The panel's view of a surface (core/view/surface.ts): residuals as R computes them, the
 * default slices at R's quartiles, the bands' order, a size bounded by the grid whatever the
 * rows, and the protocol's guard on the view (core/protocol.ts) with hostile variants.
 *
 * Data: datasets::trees (Volume over Girth and Height, shipped with R) and datasets::airquality
 * from test/reference/fixtures/surface.json (written by test/reference/r/surface.R).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { isHostMessage, isPanelMessage } from '../../../core/protocol';
import { fitSurface } from '../../../core/surface/fit';
import { prepareSurface, type SurfaceData } from '../../../core/surface/data';
import { tuneSurface } from '../../../core/surface/tune';
import { buildSurfaceView, MAX_SLICES, RESIDUAL_BINS, VIEW_NODES, VIEW_READINGS } from '../../../core/view/surface';

interface Dataset {
  readonly u: number[];
  readonly v: number[];
  readonly y: number[];
  readonly uName: string;
  readonly vName: string;
  readonly yName: string;
}
interface Case {
  readonly dataset: string;
  readonly dfU: number;
  readonly dfV: number;
  readonly residuals: number[];
}
const fixture = JSON.parse(readFileSync(join(__dirname, '../../reference/fixtures/surface.json'), 'utf8')) as { datasets: Record<string, Dataset>; cases: Case[] };

function data(name: string): SurfaceData {
  const d = fixture.datasets[name] as Dataset;
  return { u: Float64Array.from(d.u), v: Float64Array.from(d.v), y: Float64Array.from(d.y) };
}
const labels = { u: 'Girth', v: 'Height', y: 'Volume' };

/** A JSON round trip, as a message crosses to the webview. */
const wire = <T>(v: T): T => JSON.parse(JSON.stringify(v)) as T;

describe('buildSurfaceView', () => {
  const prepared = prepareSurface(data('trees'));
  const fit = fitSurface(prepared, { dfU: 3, dfV: 2 });
  const view = buildSurfaceView({ runId: 4, fileName: 'trees.csv', labels, rejected: 0, prepared, fit, byHand: false });

  it('shows every residual of a small data set as R computes it (trees, df 3 x 2)', () => {
    // Source: R 4.2 residuals(lm(...)) on the row-wise product of ns bases, test/reference/r/surface.R.
    const ref = fixture.cases.find((c) => c.dataset === 'trees' && c.dfU === 3 && c.dfV === 2) as Case;
    assert.equal(view.residuals.x.kind, 'points');
    assert.equal(view.residuals.x.r.length, 31);
    const scale = Math.max(...ref.residuals.map(Math.abs));
    // The view rounds to 6 significant digits (display only).
    for (const [i, r] of ref.residuals.entries()) assert.ok(Math.abs((view.residuals.x.r[i] as number) - r) <= 1e-5 * scale, `row ${i}: ${view.residuals.x.r[i]} vs ${r}`);
    assert.deepEqual(view.residuals.x.x, fixture.datasets.trees?.u);
    assert.deepEqual(view.residuals.x2.x, fixture.datasets.trees?.v);
  });

  it('slices the first input at its quartiles by default', () => {
    // Source: R 4.2 quantile(trees$Girth) (type 7): 11.05, 12.9, 15.25.
    assert.equal(view.slices.input, 'x');
    assert.deepEqual(
      view.slices.curves.map((c) => c.at),
      [11.05, 12.9, 15.25],
    );
  });

  it('slices the second input at given values, each curve inside its bands (confidence inside prediction)', () => {
    // Exact property of pointwise bands: ciLower <= fit <= ciUpper and the prediction band contains the confidence band.
    const v = buildSurfaceView({ runId: 4, fileName: 'trees.csv', labels, rejected: 0, prepared, fit, byHand: false, slices: { input: 'x2', at: [70, 80] } });
    assert.equal(v.slices.input, 'x2');
    assert.deepEqual(
      v.slices.curves.map((c) => c.at),
      [70, 80],
    );
    for (const c of v.slices.curves) {
      for (let k = 0; k < c.fit.length; k++) {
        assert.ok(
          (c.piLower[k] as number) <= (c.ciLower[k] as number) &&
            (c.ciLower[k] as number) <= (c.fit[k] as number) &&
            (c.fit[k] as number) <= (c.ciUpper[k] as number) &&
            (c.ciUpper[k] as number) <= (c.piUpper[k] as number),
        );
      }
      // Along Girth at Height fixed: the slice is the surface's value there.
      const k = 7;
      assert.ok(Math.abs((c.fit[k] as number) - fit.predict(v.slices.along[k] as number, c.at)) <= 1e-5 * Math.abs(c.fit[k] as number));
    }
  });

  it('marks the grid nodes outside the readings and keeps the corners of an empty corner uncovered', () => {
    assert.equal(view.grid.xs.length, VIEW_NODES);
    assert.equal(view.grid.fit.length, VIEW_NODES * VIEW_NODES);
    // trees: the thinnest trees are not the tallest, so the corner (min Girth, max Height) lies outside the hull (R: trees[trees$Girth < 9, ] has Height 70, 65, 63).
    const corner = 0 * VIEW_NODES + (VIEW_NODES - 1);
    assert.equal(view.grid.uncovered[corner], 1);
    // A reading's own node region is covered: the node nearest the median tree.
    assert.ok(view.grid.uncovered.some((f) => f === 0));
  });

  it("says a pair picked by hand was picked, and names the rule's pair", async () => {
    const { result } = await tuneSurface(prepared, { resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1, candidatesU: [1, 2, 3], candidatesV: [1, 2] });
    const hand = fitSurface(prepared, { dfU: 3, dfV: 2 });
    const v = buildSurfaceView({ runId: 5, fileName: 'trees.csv', labels, rejected: 0, prepared, fit: hand, tune: result, byHand: true });
    assert.equal(v.byHand, true);
    assert.match(v.explanation, /picked/);
    assert.ok(v.explanation.includes(`df ${result.selected.dfU} × ${result.selected.dfV}`));
    assert.ok(v.landscape);
    assert.equal(v.landscape.mean.length, 3 * 2);
    assert.deepEqual(v.landscape.ruled, { x: result.selected.dfU, x2: result.selected.dfV });
  });

  it('stays bounded by the grid on many rows: readings thinned, residuals binned', () => {
    // Seeded invented data (a property test, not a reference): 5,000 rows of a plane plus noise.
    let s = 12345;
    const rand = (): number => (s = (s * 1103515245 + 12345) % 2147483648) / 2147483648;
    const n = 5000;
    const u = new Float64Array(n);
    const v = new Float64Array(n);
    const y = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      u[i] = rand() * 10;
      v[i] = rand() * 5;
      y[i] = 2 * (u[i] as number) - (v[i] as number) + rand();
    }
    const p = prepareSurface({ u, v, y });
    const f = fitSurface(p, { dfU: 2, dfV: 2 });
    const big = buildSurfaceView({ runId: 1, fileName: 'big.csv', labels, rejected: 0, prepared: p, fit: f, byHand: false });
    assert.ok(big.readings.x.length <= VIEW_READINGS);
    assert.equal(big.residuals.x.kind, 'bins');
    assert.ok(big.residuals.x.r.length <= RESIDUAL_BINS);
    // Every row lands in one bin.
    assert.equal(
      big.residuals.x.count?.reduce((a, b) => a + b, 0),
      n,
    );
    // Exact property: least-squares residuals with an intercept sum to zero, so the count-weighted bin means do too.
    const total = big.residuals.x.r.reduce((a, r, i) => a + r * (big.residuals.x.count?.[i] as number), 0);
    // Tolerance: the view rounds each bin's mean to 6 significant digits.
    assert.ok(Math.abs(total) < 1e-2, `sum ${total}`);
    assert.ok(JSON.stringify(big).length < 200_000);
  });
});

describe('protocol: the surface messages', () => {
  const prepared = prepareSurface(data('airquality'));
  const fit = fitSurface(prepared, { dfU: 4, dfV: 3 });
  const view = wire(buildSurfaceView({ runId: 2, fileName: 'airquality.csv', labels: { u: 'Temp', v: 'Wind', y: 'Ozone' }, rejected: 37, prepared, fit, byHand: false }));

  it('accepts the view as built, after a JSON round trip', () => {
    assert.equal(isHostMessage({ type: 'surface', view }), true);
  });

  it('refuses hostile or malformed views', () => {
    const bad: unknown[] = [
      { type: 'surface', view: { ...view, extra: 1 } },
      { type: 'surface', view: { ...view, runId: -1 } },
      { type: 'surface', view: { ...view, pair: { x: 0, x2: 3 } } },
      { type: 'surface', view: { ...view, grid: { ...view.grid, fit: view.grid.fit.slice(1) } } },
      { type: 'surface', view: { ...view, readings: { ...view.readings, x: new Array(VIEW_READINGS + 1).fill(1) } } },
      { type: 'surface', view: { ...view, slices: { ...view.slices, input: 'z' } } },
      { type: 'surface', view: { ...view, labels: { ...view.labels, x: 'a'.repeat(70_000) } } },
      { type: 'surface', view: JSON.parse(JSON.stringify(view).replace('"caution"', '"__proto__":{"polluted":1},"caution"')) as unknown },
      { type: 'surface', view, more: true },
      { type: 'surface' },
    ];
    for (const [i, m] of bad.entries()) assert.equal(isHostMessage(m), false, `case ${i}`);
  });

  it("checks the panel's surface requests", () => {
    assert.equal(isPanelMessage({ type: 'surfaceSlices', runId: 2, input: 'x2', at: [5, 10] }), true);
    assert.equal(isPanelMessage({ type: 'surfaceSlices', runId: 2, input: 'x', at: [] }), true);
    assert.equal(isPanelMessage({ type: 'surfacePair', runId: 2, x: 5, x2: 4 }), true);
    assert.equal(isPanelMessage({ type: 'surfaceRule', runId: 2 }), true);
    assert.equal(isPanelMessage({ type: 'surfaceSave', requestId: 1, runId: 2 }), true);
    const bad: unknown[] = [
      { type: 'surfaceSlices', runId: 2, input: 'y', at: [1] },
      { type: 'surfaceSlices', runId: 2, input: 'x', at: new Array(MAX_SLICES + 1).fill(1) },
      { type: 'surfaceSlices', runId: 2, input: 'x', at: [Number.NaN] },
      { type: 'surfaceSlices', runId: 2, input: 'x', at: ['1'] },
      { type: 'surfacePair', runId: 2, x: 2.5, x2: 4 },
      { type: 'surfacePair', runId: 2, x: 0, x2: 4 },
      { type: 'surfacePair', runId: 2, x: 1e9, x2: 4 },
      { type: 'surfaceSave', requestId: -1, runId: 2 },
      { type: 'surfaceSave', requestId: 1, runId: 2, path: '/etc/passwd' },
    ];
    for (const [i, m] of bad.entries()) assert.equal(isPanelMessage(m), false, `case ${i}`);
  });
});
