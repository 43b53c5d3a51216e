/**
 * Tests of the data-and-curve figure (core/plots/dataCurve.ts): draw order and the density
 * legend. Data: datasets::cars (Ezekiel 1930; test/reference/fixtures/fits.json), drawn as
 * dots and, binned on the shipped grid, as a density grid.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../../core/analysis/analysis';
import { LEGEND_HEIGHT } from '../../../core/plots/cloud';
import { dataCurveSvg } from '../../../core/plots/dataCurve';
import { FIGURE_HEIGHT, FIGURE_WIDTH } from '../../../core/plots/svg';
import { cloudOf, DEFAULT_CLOUD_LIMITS } from '../../../core/view/cloud';
import type { CurveView } from '../../../core/view/model';
import { curveView, evenGrid } from '../../../core/view/payload';

const CARS = (JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;

describe('dataCurveSvg', () => {
  let curve: CurveView;
  let grid: number[];
  const x = Float64Array.from(CARS.x);
  const y = Float64Array.from(CARS.y);

  before(async () => {
    const a = await analyse({ x, y }, { kind: 'natural-spline', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    const g = evenGrid(4, 25, 40);
    curve = curveView(a.chosen, g);
    grid = Array.from(g);
  });

  /** The position in `svg` of the first element with class `cls` (-1 when absent). */
  const at = (svg: string, cls: string): number => svg.search(new RegExp(`class="${cls}[" ]`));

  it('dataCurveSvg draws a density grid beneath the bands and the curve, with its legend in a strip below the axes', () => {
    const svg = dataCurveSvg({ id: 'fig', data: cloudOf(x, y, undefined, { ...DEFAULT_CLOUD_LIMITS, maxPoints: 0 }), grid, curve, xLabel: 'speed', yLabel: 'dist' });
    const order = ['kw-bins', 'kw-band-pi', 'kw-band-ci', 'kw-curve'].map((c) => at(svg, c));
    assert.ok(order.every((p) => p >= 0));
    assert.deepEqual(
      [...order].sort((a, b) => a - b),
      order,
      `paint order ${order.join(' < ')}`,
    );
    assert.ok(at(svg, 'kw-legend') > at(svg, 'kw-curve'));
    assert.match(svg, new RegExp(`viewBox="0 0 ${FIGURE_WIDTH} ${FIGURE_HEIGHT + LEGEND_HEIGHT}"`));
  });

  it('dataCurveSvg draws dots on top of the curve, where each can be pointed at, and needs no legend', () => {
    const svg = dataCurveSvg({ id: 'fig', data: cloudOf(x, y), grid, curve, xLabel: 'speed', yLabel: 'dist' });
    assert.ok(at(svg, 'kw-points') > at(svg, 'kw-curve'));
    assert.equal((svg.match(/<circle class="kw-point"/g) ?? []).length, CARS.x.length);
    assert.equal(at(svg, 'kw-legend'), -1);
    assert.match(svg, new RegExp(`viewBox="0 0 ${FIGURE_WIDTH} ${FIGURE_HEIGHT}"`));
  });
});
