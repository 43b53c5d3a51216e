/**
 * Tests of the grouped run's figures: every group's curve in one frame
 * (core/plots/groupOverlay.ts) and one group's small figure (core/plots/groupSmall.ts).
 * Curves: the view of datasets::CO2 by plant (Potvin, Lechowicz & Tardif 1990;
 * test/e2e/fixtures/co2.csv), built by core/view/groups.ts.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyseGroups } from '../../../core/groups/analyse';
import { splitByColumn } from '../../../core/groups/split';
import { parseCsvText } from '../../../core/ingest/reader';
import { groupOverlaySvg, MANY_GROUPS, type OverlayCurve } from '../../../core/plots/groupOverlay';
import { groupSmallSvg, SMALL_HEIGHT, SMALL_WIDTH } from '../../../core/plots/groupSmall';
import { buildGroupsView, type GroupsView } from '../../../core/view/groups';

describe('groupOverlaySvg and groupSmallSvg', () => {
  let view: GroupsView;
  let curves: OverlayCurve[];

  before(async () => {
    const table = parseCsvText(readFileSync(join(__dirname, '..', '..', 'e2e', 'fixtures', 'co2.csv'), 'utf8'), { file: 'co2.csv', keepText: 'plant' });
    const split = splitByColumn(table, { x: 'conc', y: 'uptake' }, 'plant', 'co2.csv');
    const analysis = await analyseGroups(split.groups, { kind: 'natural-spline', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 }, false);
    view = buildGroupsView({ setId: 1, fileName: 'co2.csv', split, analysis, common: null });
    curves = view.groups.map((g) => ({ name: g.name, lo: g.lo, hi: g.hi, y: g.curve }));
  });

  /** The group indices of the curve paths in drawing order, and their classes. */
  const paths = (svg: string): { group: number; cls: string }[] => [...svg.matchAll(/<path class="([^"]+)" data-group="(\d+)"/g)].map((m) => ({ cls: m[1] as string, group: Number(m[2]) }));

  it('groupOverlaySvg draws one curve per group, the selected one last and bold, with a title and a description naming it', () => {
    const svg = groupOverlaySvg({ id: 'fig-groups', curves, selected: 4, xLabel: 'conc', yLabel: 'uptake', groupLabel: 'plant' });
    const drawn = paths(svg);
    assert.equal(drawn.length, 12);
    assert.deepEqual(drawn.at(-1), { group: 4, cls: 'kw-group-curve kw-group-selected' });
    assert.deepEqual(
      drawn
        .slice(0, -1)
        .map((p) => p.group)
        .sort((a, b) => a - b),
      [0, 1, 2, 3, 5, 6, 7, 8, 9, 10, 11],
    );
    assert.ok(
      drawn.slice(0, -1).every((p) => p.cls === 'kw-group-curve'),
      `${curves.length} groups are at most ${MANY_GROUPS}: ordinary lines`,
    );
    assert.match(svg, /role="img" aria-labelledby="fig-groups-title fig-groups-desc"/);
    assert.match(svg, /<title id="fig-groups-title">The fitted curves of 12 groups by plant, uptake against conc<\/title>/);
    assert.match(svg, new RegExp(`The curve of plant ${view.groups[4]?.name} is drawn bold`));
    // Every path point lies inside the plotting box (the frame's clip is not needed to keep them there).
    for (const d of svg.matchAll(/data-group="\d+" d="([^"]+)"/g)) {
      for (const [, x, y] of (d[1] as string).matchAll(/[ML](-?[\d.]+) (-?[\d.]+)/g)) assert.ok(Number(x) >= 62 && Number(x) <= 546 && Number(y) >= 12 && Number(y) <= 274, `${x} ${y}`);
    }
  });

  it('groupOverlaySvg thins the lines of many groups and escapes names from the CSV', () => {
    const many = Array.from({ length: 30 }, (_, i) => ({ ...(curves[i % curves.length] as OverlayCurve), name: i === 7 ? '<img src=x onerror=alert(1)>' : `g${i}` }));
    const svg = groupOverlaySvg({ id: 'fig-many', curves: many, selected: 7, xLabel: 'conc', yLabel: 'uptake', groupLabel: 'rig & "bench"' });
    const drawn = paths(svg);
    assert.equal(drawn.length, 30);
    assert.ok(drawn.slice(0, -1).every((p) => p.cls === 'kw-group-curve kw-group-many'));
    assert.doesNotMatch(svg, /<img/);
    assert.match(svg, /The curve of rig &amp; &quot;bench&quot; &lt;img src=x onerror=alert\(1\)&gt; is drawn bold/);
    assert.doesNotMatch(groupOverlaySvg({ id: 'fig-none', curves: many, xLabel: 'conc', yLabel: 'uptake', groupLabel: 'rig' }), /kw-group-selected|drawn bold/, 'no group selected: none drawn bold');
  });

  it('groupSmallSvg draws every reading as a dot and the curve on the shared ranges, with a title and a description', () => {
    const g = view.groups[2];
    assert.ok(g);
    const svg = groupSmallSvg({
      id: 'kw-small-2',
      name: g.name,
      x: g.x,
      y: g.y,
      lo: g.lo,
      hi: g.hi,
      curve: g.curve,
      df: g.df,
      rows: g.rows,
      xRange: [95, 1000],
      yRange: [7.7, 45.5],
      xLabel: 'conc',
      yLabel: 'uptake',
      groupLabel: 'plant',
    });
    assert.match(svg, new RegExp(`viewBox="0 0 ${SMALL_WIDTH} ${SMALL_HEIGHT}"`));
    const dots = /class="kw-small-dots" d="([^"]+)"/.exec(svg)?.[1] ?? '';
    assert.equal((dots.match(/h0/g) ?? []).length, 7, 'one dot per reading');
    assert.match(svg, /<path class="kw-curve kw-small-curve" d="M/);
    assert.match(svg, new RegExp(`<title id="kw-small-2-title">plant ${g.name}: uptake against conc, df 3</title>`));
    assert.match(svg, new RegExp(`<desc id="kw-small-2-desc">The 7 readings of plant ${g.name} and its fitted curve with df 3`));
    const fewer = groupSmallSvg({
      id: 's',
      name: '<b>',
      x: g.x.slice(0, 3),
      y: g.y.slice(0, 3),
      lo: g.lo,
      hi: g.hi,
      curve: g.curve,
      df: 3,
      rows: 7,
      xRange: [95, 1000],
      yRange: [7.7, 45.5],
      xLabel: 'conc',
      yLabel: 'uptake',
      groupLabel: 'plant',
    });
    assert.match(fewer, /3 of the 7 readings of plant &lt;b&gt;/);
  });
});
