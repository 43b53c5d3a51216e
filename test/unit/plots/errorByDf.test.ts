/**
 * Tests of the error-against-df figure (core/plots/errorByDf.ts): every candidate, or the
 * window around the decision with the candidates beyond its error range marked at its edge.
 * Data: datasets::cars (Ezekiel 1930; test/reference/fixtures/fits.json) tuned with the
 * one-SE rule over polynomial df 1 to 8.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../../core/analysis/analysis';
import { errorByDfSvg, type ErrorPoint } from '../../../core/plots/errorByDf';
import { selectDf } from '../../../core/tune/rules';
import type { Selection } from '../../../core/tune/types';
import { decisionWindow } from '../../../core/view/errorFocus';
import { errorPoints } from '../../../core/view/figureCatalogue';

const CARS = (JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;

describe('errorByDfSvg', () => {
  let points: ErrorPoint[];
  let sel: Selection;

  before(async () => {
    const data = { x: Float64Array.from(CARS.x), y: Float64Array.from(CARS.y) };
    const a = await analyse(data, { kind: 'polynomial', candidates: [1, 2, 3, 4, 5, 6, 7, 8], resample: { kind: 'folds', folds: 5, repeats: 4 }, rule: { kind: 'one-se' }, seed: 7 });
    points = errorPoints(a.tune.candidates, a.tune.metric);
    sel = selectDf(a.tune.candidates, { kind: 'one-se' }, a.tune.metric);
  });

  const spec = () => ({ id: 'fig-error', points, chosenDf: sel.df, threshold: sel.threshold, metricName: 'RMSE', ruleName: 'the one-standard-error rule' });
  /** The df of every candidate drawn as a point, and of every one marked at an edge. */
  const drawn = (svg: string) => ({
    points: [...svg.matchAll(/<circle class="kw-err-point[^"]*"[^>]*data-df="([^"]+)"/g)].map((m) => Number(m[1])),
    edge: [...svg.matchAll(/<path class="kw-err-point kw-off-scale[^"]*"[^>]*data-df="([^"]+)"><title>([^<]*)<\/title>/g)].map((m) => ({ df: Number(m[1]), title: m[2] ?? '' })),
  });

  it('errorByDfSvg draws every candidate with its bar, the threshold and the chosen df', () => {
    const svg = errorByDfSvg(spec());
    assert.deepEqual(
      drawn(svg).points,
      points.map((p) => p.df),
    );
    assert.deepEqual(drawn(svg).edge, []);
    assert.match(svg, /class="kw-threshold"/);
    assert.match(svg, new RegExp(`<circle class="kw-err-point kw-chosen"[^>]*data-df="${sel.df}"`));
    assert.doesNotMatch(svg, /Shown: /);
  });

  it('errorByDfSvg with a window draws only its candidates, marks means beyond its error range at the edge, and says so', () => {
    const window = decisionWindow(points, sel.df, sel.threshold);
    assert.ok(window, 'cars has a window around the decision');
    const svg = errorByDfSvg({ ...spec(), window });
    const d = drawn(svg);
    const inside = points.filter((p) => p.df >= window.df[0] && p.df <= window.df[1]);
    const beyond = inside.filter((p) => p.mean > window.error[1] || p.mean < window.error[0]);
    assert.deepEqual(
      [...d.points, ...d.edge.map((e) => e.df)].sort((a, b) => a - b),
      inside.map((p) => p.df),
    );
    assert.deepEqual(
      d.edge.map((e) => e.df),
      beyond.map((p) => p.df),
    );
    for (const e of d.edge) assert.match(e.title, /(above|below) the range shown$/);
    const left = points.length - inside.length;
    assert.match(svg, new RegExp(`Shown: df ${window.df[0]} to ${window.df[1]}, .*around the decision; ${left} other candidates? (is|are) left out of this view`));
  });

  it('errorByDfSvg marks every mean above the window at its top edge (a window round the least mean only)', () => {
    const best = points.reduce((b, p) => (p.mean < b.mean ? p : b));
    const others = points.filter((p) => p.df !== best.df);
    // A window holding every df but an error range round the least mean only, narrower than its distance to any other mean.
    const half = Math.min(...others.map((p) => p.mean - best.mean)) / 2;
    const window = { df: [points[0]?.df as number, points[points.length - 1]?.df as number] as const, error: [best.mean - half, best.mean + half] as const };
    const d = drawn(errorByDfSvg({ ...spec(), chosenDf: best.df, window }));
    assert.deepEqual(d.points, [best.df]);
    assert.deepEqual(
      d.edge.map((e) => e.df),
      others.map((p) => p.df),
    );
    assert.ok(d.edge.every((e) => /above the range shown$/.test(e.title)));
  });
});
