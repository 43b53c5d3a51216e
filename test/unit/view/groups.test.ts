/**
 * Tests of a grouped run's overview for the panel (core/view/groups.ts). Reference: the
 * command line's own outputs for the same file and options (`knotwise fit co2.csv --per
 * plant`, whose grouped fits are checked against R in test/reference/groups.test.ts): each
 * group's df, rows and curve in the view are those of its record and table. Data:
 * datasets::CO2 (Potvin, Lechowicz & Tardif 1990) and MASS::mcycle (Silverman 1985), both
 * written by test/e2e/fixtures/make-fixtures.R.
 */
import { strict as assert } from 'node:assert';
import { copyFileSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { analyse } from '../../../core/analysis/analysis';
import type { Analysis } from '../../../core/analysis/types';
import { analyseGroups } from '../../../core/groups/analyse';
import { commonCurveFor } from '../../../core/groups/commonRun';
import { splitByColumn, type GroupSplit } from '../../../core/groups/split';
import { parseCsvText } from '../../../core/ingest/reader';
import { selectColumns } from '../../../core/ingest/select';
import { isHostMessage } from '../../../core/protocol';
import { parseResampling } from '../../../core/registry/resampling/index';
import { buildGroupsView, GROUP_CURVE_POINTS, GROUP_READINGS, readingsShown } from '../../../core/view/groups';
import { REPO, runMain } from '../node/runMain';

const fixture = (name: string): string => join(REPO, 'test', 'e2e', 'fixtures', name);

/** The numbers of one column of a curve table. */
function column(csv: string, name: string): number[] {
  const [head, ...rows] = csv.trimEnd().split('\n');
  const k = (head ?? '').split(',').indexOf(name);
  return rows.map((r) => Number(r.split(',')[k]));
}

describe('buildGroupsView', function () {
  this.timeout(60_000);

  it("buildGroupsView(CO2 by plant) has each group's df, rows and curve as the command line writes them", async () => {
    const dir = mkdtempSync(join(tmpdir(), 'kw-groups-view-'));
    try {
      copyFileSync(fixture('co2.csv'), join(dir, 'co2.csv'));
      const run = await runMain('fit', join(dir, 'co2.csv'), '--x', 'conc', '--y', 'uptake', '--per', 'plant', '--df', '2,3,4', '--resampling', 'folds:7', '--seed', '3', '--quiet');
      assert.equal(run.code, 0, run.stderr);
      const record = JSON.parse(readFileSync(join(dir, 'co2.groups.fit.json'), 'utf8')) as {
        groups: { name: string; df: number; rowsUsed: number; table: string; range: [number, number] }[];
        common: { words: string };
      };
      const table = parseCsvText(readFileSync(fixture('co2.csv'), 'utf8'), { file: 'co2.csv', keepText: 'plant' });
      const split = splitByColumn(table, { x: 'conc', y: 'uptake' }, 'plant', 'co2.csv');
      const analysis = await analyseGroups(split.groups, { kind: 'natural-spline', candidates: [2, 3, 4], resample: parseResampling('folds:7'), rule: { kind: 'one-se' }, seed: 3 }, false);
      const view = buildGroupsView({ setId: 7, fileName: 'co2.csv', split, analysis, common: commonCurveFor(split, analysis) });
      assert.equal(view.setId, 7);
      assert.equal(view.groupLabel, 'plant');
      assert.deepEqual([view.xLabel, view.yLabel], ['conc', 'uptake']);
      assert.equal(view.common, record.common.words);
      assert.equal(view.shared, undefined);
      assert.deepEqual(
        view.groups.map((g) => [g.name, g.df, g.rows]),
        record.groups.map((g) => [g.name, g.df, g.rowsUsed]),
      );
      for (const [i, g] of view.groups.entries()) {
        const rec = record.groups[i] as (typeof record.groups)[number];
        assert.deepEqual([g.lo, g.hi], rec.range);
        // The view's 21 points are every fifth row of the 101-row table; 6 significant digits against the table's 8.
        const csv = readFileSync(join(dir, rec.table), 'utf8');
        const xs = column(csv, 'x');
        const fit = column(csv, 'fit');
        assert.equal(g.curve.length, GROUP_CURVE_POINTS);
        for (let k = 0; k < GROUP_CURVE_POINTS; k++) {
          const x = g.lo + ((g.hi - g.lo) * k) / (GROUP_CURVE_POINTS - 1);
          assert.ok(Math.abs(x - (xs[5 * k] as number)) <= 1e-6 * Math.abs(x), `${g.name} x at row ${5 * k}`);
          assert.ok(Math.abs((g.curve[k] as number) - (fit[5 * k] as number)) <= 1e-5 * Math.abs(fit[5 * k] as number), `${g.name} curve at row ${5 * k}: ${g.curve[k]} against ${fit[5 * k]}`);
        }
        assert.deepEqual(g.x, Array.from(split.groups[i]?.data.x ?? []), `${g.name}: all 7 readings`);
      }
      assert.equal(isHostMessage({ type: 'groups', view }), true, 'the protocol accepts the view');
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('readingsShown keeps every row up to GROUP_READINGS, else the lowest and highest reading of each slice of x (MASS::mcycle)', () => {
    const table = parseCsvText(readFileSync(fixture('mcycle.csv'), 'utf8'), { file: 'mcycle.csv' });
    const { x, y } = selectColumns(table, { x: 'times', y: 'accel' }).data;
    const lo = Math.min(...x);
    const hi = Math.max(...x);
    assert.deepEqual(readingsShown(x.subarray(0, 30), y.subarray(0, 30), lo, hi), [...Array(30).keys()]);
    const kept = readingsShown(x, y, lo, hi);
    assert.ok(kept.length <= GROUP_READINGS && kept.length >= GROUP_READINGS / 2, `${kept.length} rows kept`);
    const slices = GROUP_READINGS / 2;
    for (let s = 0; s < slices; s++) {
      const inSlice = [...x.keys()].filter((i) => Math.min(slices - 1, Math.floor((((x[i] as number) - lo) / (hi - lo)) * slices)) === s);
      if (inSlice.length === 0) continue;
      const ys = inSlice.map((i) => y[i] as number);
      const keptYs = kept.filter((i) => inSlice.includes(i)).map((i) => y[i] as number);
      assert.ok(keptYs.includes(Math.min(...ys)) && keptYs.includes(Math.max(...ys)), `slice ${s}: its lowest and highest readings are kept`);
    }
  });

  it('buildGroupsView stays small for 1,000 groups: under 1 MB of JSON with 133 rows in each group', async () => {
    const table = parseCsvText(readFileSync(fixture('mcycle.csv'), 'utf8'), { file: 'mcycle.csv' });
    const data = selectColumns(table, { x: 'times', y: 'accel' }).data;
    const one: Analysis = await analyse(data, { kind: 'natural-spline', candidates: [8], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    const names = Array.from({ length: 1000 }, (_, i) => `rig-${i + 1}`);
    const split: GroupSplit = { groups: names.map((name) => ({ name, data })), rejected: [], labels: { x: 'times', y: 'accel' }, groupLabel: 'rig' };
    const view = buildGroupsView({ setId: 1, fileName: 'mcycle.csv', split, analysis: { groups: names.map((name) => ({ name, analysis: one })) }, common: null });
    const size = JSON.stringify({ type: 'groups', view }).length;
    assert.ok(size < 1_000_000, `${size} characters`);
    assert.ok(view.groups.every((g) => g.x.length <= GROUP_READINGS && g.curve.length === GROUP_CURVE_POINTS));
    assert.equal(isHostMessage({ type: 'groups', view }), true);
  });
});
