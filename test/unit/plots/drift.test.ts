/**
 * Tests of the drift figure (core/plots/drift.ts): well-formed SVG, both curves and both
 * bands drawn, the mark at the x the drift reports. Data: MASS::mcycle (Silverman 1985;
 * test/reference/fixtures/fits.json), its even rows as the recorded curve and its odd rows
 * as the new one.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { curveSample, driftFromRecord, type Drift } from '../../../core/calibrate/drift';
import { fitCurve } from '../../../core/fit/index';
import { driftSvg } from '../../../core/plots/drift';
import { standaloneSvg } from '../../../core/report/figureStyle';
import type { XYData } from '../../../core/types';

const MCYCLE = (JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { mcycle: { x: number[]; y: number[] } } }).datasets.mcycle;

function rows(keep: (i: number, x: number) => boolean): XYData {
  const i = MCYCLE.x.map((_, k) => k).filter((k) => keep(k, MCYCLE.x[k] as number));
  return { x: Float64Array.from(i, (k) => MCYCLE.x[k] as number), y: Float64Array.from(i, (k) => MCYCLE.y[k] as number) };
}

/**
 * Throws unless `text` is well-formed XML as far as figures need: every tag closed in order,
 * attribute values quoted, no raw '<' or bare '&' in text (XML 1.0, sections 2.1, 2.4 and 3.1).
 */
function assertWellFormed(text: string): void {
  const stack: string[] = [];
  const tag = /<(\/?)([A-Za-z][\w:-]*)((?:\s+[\w:-]+="[^"<]*")*)\s*(\/?)>/y;
  let i = 0;
  while (i < text.length) {
    const lt = text.indexOf('<', i);
    const chunk = lt < 0 ? text.slice(i) : text.slice(i, lt);
    assert.doesNotMatch(chunk, /&(?!(amp|lt|gt|quot|#39);)/, `bare & in text near ${i}`);
    if (lt < 0) break;
    tag.lastIndex = lt;
    const m = tag.exec(text);
    assert.ok(m, `malformed tag at ${lt}: ${text.slice(lt, lt + 60)}`);
    const [, close, name, , selfClose] = m;
    if (close) assert.equal(stack.pop(), name, `</${name}> closes the open element at ${lt}`);
    else if (!selfClose) stack.push(name as string);
    i = tag.lastIndex;
  }
  assert.deepEqual(stack, [], 'every element closed');
}

/** The x pixel of a data value, from two of the figure's x tick labels (a linear axis). */
function pixelOf(svg: string, x: number): number {
  const ticks = [...svg.matchAll(/<text class="kw-tick" x="([\d.]+)" y="[\d.]+" text-anchor="middle">([^<]+)<\/text>/g)].map((m) => [Number(m[2]), Number(m[1])] as const);
  assert.ok(ticks.length >= 2, 'two x ticks');
  const [[v0, p0], [v1, p1]] = [ticks[0] as readonly [number, number], ticks[ticks.length - 1] as readonly [number, number]];
  return p0 + ((x - v0) * (p1 - p0)) / (v1 - v0);
}

describe('driftSvg', () => {
  const spec = { kind: 'natural-spline', df: 8 } as const;
  const newFit = fitCurve(
    rows((i) => i % 2 === 1),
    spec,
  );
  const recorded = curveSample(
    fitCurve(
      rows((i) => i % 2 === 0),
      spec,
    ),
  );
  const current = curveSample(newFit);
  const drift = driftFromRecord(recorded, newFit) as Drift;

  it('driftSvg draws both bands and both curves, well-formed, with a title and a description', () => {
    const svg = driftSvg({ id: 'fig-drift', recorded, current, drift, xLabel: 'times [ms]', yLabel: 'accel <g>' });
    assertWellFormed(svg);
    assert.equal(svg.match(/<svg /g)?.length, 1);
    assert.match(svg, /role="img"/);
    for (const cls of ['kw-band-pi kw-drift-recorded', 'kw-band-ci kw-drift-current', 'kw-threshold kw-drift-recorded', 'kw-curve kw-drift-current']) {
      const m = new RegExp(`<path class="${cls}" d="(M[^"]+)"/>`).exec(svg);
      assert.ok(m, `${cls} drawn`);
      // A curve has one point per sampled x; a band goes out along the upper limit and back along the lower.
      const moves = (m[1]?.match(/[ML]/g) ?? []).length;
      assert.equal(moves, cls.includes('band') ? 2 * recorded.x.length : recorded.x.length, `${cls}: points`);
    }
    assert.match(svg, /<title id="fig-drift-title">Recorded and new accel &lt;g&gt; against times \[ms\], each with its 95 % band<\/title>/);
    assert.ok(svg.includes(drift.words.replace(/'/g, '&#39;')), 'the description carries the drift in words');
    assert.ok(standaloneSvg(svg).startsWith('<?xml'), 'usable in the report');
  });

  it('driftSvg marks the largest relative difference at the x the drift reports', () => {
    const svg = driftSvg({ id: 'fig-drift', recorded, current, drift, xLabel: 'times', yLabel: 'accel' });
    const R = drift.largestRelative as NonNullable<Drift['largestRelative']>;
    const m = /<circle class="kw-point kw-influential kw-drift-mark" cx="([\d.]+)" cy="[\d.]+" r="[\d.]+" data-x="([^"]+)">/.exec(svg);
    assert.ok(m, 'a mark');
    assert.equal(Number(m[2]), R.x);
    // Source: the axis's own tick labels; coordinates are printed to 0.01.
    assert.ok(Math.abs(Number(m[1]) - pixelOf(svg, R.x)) <= 0.02, `mark at ${m[1]}, axis puts x = ${R.x} at ${pixelOf(svg, R.x)}`);
  });

  it('driftSvg marks the largest difference when no point can be judged, and nothing without overlap', () => {
    const unjudged = { ...recorded, se: recorded.se.map(() => 0) };
    const d = driftFromRecord(unjudged, newFit) as Drift;
    const svg = driftSvg({ id: 'fig-drift', recorded: unjudged, current, drift: d, xLabel: 'times', yLabel: 'accel' });
    assert.match(svg, new RegExp(`data-x="${d.largest.x}"`));
    const apart = driftSvg({ id: 'fig-drift', recorded, current: { ...current }, drift: null, xLabel: 'times', yLabel: 'accel' });
    assertWellFormed(apart);
    assert.doesNotMatch(apart, /kw-drift-mark/);
    assert.match(apart, /Their x ranges do not overlap, so they cannot be compared\./);
  });
});
