/**
 * The heat figure of a surface (core/plots/surfaceHeat.ts): one cell per table node, shaded
 * by level or marked uncovered, the readings thinned to at most MAX_MARKED dots, and names
 * from the CSV escaped (the figure must stay well-formed XML).
 */
import { strict as assert } from 'node:assert';
import { HEAT_LEVELS, MAX_MARKED, surfaceHeatSvg } from '../../../core/plots/surfaceHeat';

describe('surfaceHeatSvg', () => {
  const us = Float64Array.of(0, 1, 2);
  const vs = Float64Array.of(10, 20);
  // fit = u + v / 10 at the 6 nodes, u outermost; the node (2, 20) uncovered.
  const fit = [1, 2, 2, 3, 3, 4];
  const uncovered = [0, 0, 0, 0, 0, 1];

  it('draws a cell per node: levels from the least to the greatest covered value, uncovered nodes apart', () => {
    const svg = surfaceHeatSvg({ id: 'h', us, vs, fit, uncovered, readingsU: Float64Array.of(0.5), readingsV: Float64Array.of(15), labels: { u: 'u', v: 'v', y: 'y' } });
    assert.equal((svg.match(/<rect class="kw-heat kw-heat-\d"/g) ?? []).length, 5);
    assert.equal((svg.match(/<rect class="kw-uncovered"/g) ?? []).length, 1);
    // The least covered value (1) is level 1, the greatest (3) level HEAT_LEVELS.
    assert.match(svg, /kw-heat-1"/);
    assert.match(svg, new RegExp(`kw-heat-${HEAT_LEVELS}"`));
    assert.equal((svg.match(/<circle class="kw-point"/g) ?? []).length, 1);
  });

  it('thins the readings to at most MAX_MARKED dots and escapes names', () => {
    const n = 5 * MAX_MARKED + 3;
    const svg = surfaceHeatSvg({
      id: 'h',
      us,
      vs,
      fit,
      uncovered,
      readingsU: new Float64Array(n).fill(1),
      readingsV: new Float64Array(n).fill(15),
      labels: { u: 'temp <°C>', v: 'a & b', y: '"y"' },
    });
    const dots = (svg.match(/<circle class="kw-point"/g) ?? []).length;
    // Every k-th reading in row order, k = ceil(n / MAX_MARKED).
    assert.equal(dots, Math.ceil(n / Math.ceil(n / MAX_MARKED)));
    assert.ok(dots <= MAX_MARKED);
    assert.doesNotMatch(svg, /<°C>|a & b/);
    assert.match(svg, /temp &lt;°C&gt;/);
  });
});
