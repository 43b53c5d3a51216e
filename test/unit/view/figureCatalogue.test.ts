/**
 * Tests of the figure catalogue (core/view/figureCatalogue.ts), the one list of figures the
 * panel and the report draw: ids and keys, what each figure needs, the builders' inputs,
 * and the titles and descriptions. Data: datasets::cars (Ezekiel 1930;
 * test/reference/fixtures/fits.json) and datasets::discoveries (physics.json).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../../core/analysis/analysis';
import type { Analysis } from '../../../core/analysis/types';
import { errorFormat, selectDf } from '../../../core/tune/rules';
import type { RuleSpec } from '../../../core/tune/types';
import type { XYData } from '../../../core/types';
import { decisionWindow } from '../../../core/view/errorFocus';
import { errorPoints, errorWindowOf, FIGURE_CATALOGUE, type FigureView } from '../../../core/view/figureCatalogue';
import type { FitDetail } from '../../../core/view/model';
import { buildPanelPayload, detailFor } from '../../../core/view/payload';

const REFS = join(__dirname, '..', '..', 'reference', 'fixtures');
const CARS = (JSON.parse(readFileSync(join(REFS, 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;
const DISCOVERIES = (JSON.parse(readFileSync(join(REFS, 'physics.json'), 'utf8')) as { datasets: Record<string, { x: number[]; y: number[] }> }).datasets.discoveries as { x: number[]; y: number[] };

const xy = (d: { x: number[]; y: number[] }): XYData => ({ x: Float64Array.from(d.x), y: Float64Array.from(d.y), lines: Int32Array.from(d.x, (_, i) => i + 2) });

/** The view of `rule`'s df of an analysis, as the panel builds it from its payload. */
function viewOf(a: Analysis, rule: RuleSpec, labels: readonly [string, string] = ['speed', 'dist']): FigureView {
  const [xLabel, yLabel] = labels;
  const p = buildPanelPayload({ runId: 1, analysis: a, source: { fileName: 'd.csv', xLabel, yLabel }, rejected: 0, heldOut: 0, tolerancePercent: 2 });
  const sel = selectDf(p.candidates, rule, p.metric);
  return {
    xLabel,
    yLabel,
    df: sel.df,
    data: p.data,
    grid: p.grid,
    curve: p.curves.find((c) => c.df === sel.df),
    tuning: { metric: p.metric, candidates: p.candidates, rule: sel.rule, threshold: sel.threshold },
    detail: detailFor(a, sel.df) as FitDetail,
  };
}

/**
 * `v` with residuals in the order of the rows, as the residual checks give them when the rows
 * are not in x order: here the chosen fit's residuals taken in reverse, a drawing input only.
 */
function withRowOrder(v: FigureView, a: Analysis, blockSize = 1): FigureView {
  const r = Array.from(a.chosen.residuals).reverse();
  const rowOrder = { row: r.map((_, i) => i + 1), line: r.map((_, i) => r.length + 1 - i), residual: r, blockSize, lag1: 0, runsZ: 0, runsPValue: 1, sameAsX: false, flagged: false };
  return { ...v, detail: { ...(v.detail as FitDetail), rowOrder } };
}

describe('FIGURE_CATALOGUE', () => {
  let cars: Analysis;

  before(async () => {
    cars = await analyse(xy(CARS), { kind: 'natural-spline', candidates: [2, 3, 4, 5, 6], resample: { kind: 'bootstrap', resamples: 20 }, rule: { kind: 'one-se' }, seed: 3 });
  });

  it('lists each figure once, with the panel ids and report keys the panel and report rely on', () => {
    assert.deepEqual(
      FIGURE_CATALOGUE.map((f) => [f.key, f.id, f.needs, f.inReport, f.section]),
      [
        ['curve', 'fig-data', 'curve', true, 'decision'],
        ['error', 'fig-error', 'tuning', true, 'decision'],
        ['residuals-x', 'fig-resid-x', 'detail', true, 'residual-checks'],
        ['residuals-fitted', 'fig-resid-fit', 'detail', true, 'residual-checks'],
        ['row-order', 'fig-row-order', 'detail', false, 'residual-checks'],
        ['normal-quantiles', 'fig-qq', 'detail', true, 'residual-checks'],
        ['cooks', 'fig-cooks', 'detail', false, 'influential-rows'],
        ['leverage', 'fig-leverage', 'detail', false, 'influential-rows'],
      ],
    );
    for (const f of FIGURE_CATALOGUE) assert.ok(f.description.length > 20 && f.description.endsWith('.'), `${f.key} says how to read it`);
  });

  it('draws every figure from a full view: its id on the SVG, its description closing the <desc>', () => {
    const v = withRowOrder(viewOf(cars, { kind: 'one-se' }), cars);
    for (const f of FIGURE_CATALOGUE) {
      const svg = f.svg(v);
      assert.ok(svg !== undefined, f.key);
      assert.match(svg, new RegExp(`^<svg [^>]*data-figure="${f.id}"`), f.key);
      const desc = /<desc id="[^"]+">([^<]*)<\/desc>/.exec(svg)?.[1] ?? '';
      assert.ok(desc.endsWith(f.description.replace(/'/g, '&#39;')), `${f.key}: ${desc}`);
      assert.ok(f.title(v).length > 5, f.key);
    }
  });

  it('leaves out what the view lacks, and titles it all the same (the panel shows a placeholder)', () => {
    const full = withRowOrder(viewOf(cars, { kind: 'one-se' }), cars);
    const bare: FigureView = { ...full, curve: undefined, tuning: undefined, detail: undefined };
    for (const f of FIGURE_CATALOGUE) {
      assert.equal(f.svg(bare), undefined, f.key);
      assert.equal(f.input(bare), undefined, f.key);
      assert.ok(f.title(bare).length > 5, f.key);
      const has = { curve: { ...bare, curve: full.curve }, tuning: { ...bare, tuning: full.tuning }, detail: { ...bare, detail: full.detail } }[f.needs];
      assert.ok(f.svg(has) !== undefined, `${f.key} needs only its ${f.needs}`);
    }
  });

  it("the error figure's input: evaluated candidates only, the chosen df, the rule's threshold; the title names the threshold only when there is one", () => {
    const error = FIGURE_CATALOGUE.find((f) => f.key === 'error');
    assert.ok(error);
    const oneSe = viewOf(cars, { kind: 'one-se' });
    const input = error.input(oneSe) as { chosenDf: number; threshold: number | undefined; points: readonly { df: number }[] };
    assert.equal(input.chosenDf, oneSe.df);
    assert.equal(input.threshold, oneSe.tuning?.threshold);
    assert.deepEqual(
      input.points.map((p) => p.df),
      cars.tune.candidates.filter((c) => c.skipped === undefined && c.errors.rmse).map((c) => c.df),
    );
    assert.match(error.title(oneSe), /one-SE bars; the dashed line is the rule's threshold; the larger dot is the chosen df \d+ \(one-standard-error rule\)$/);
    const least = viewOf(cars, { kind: 'least-error' });
    assert.equal(least.tuning?.threshold, undefined);
    assert.doesNotMatch(error.title(least), /dashed/);
  });

  it("the error figure prints mean errors and the threshold as the explanation and the candidates table do (errorFormat at the explanation's tolerance)", () => {
    const error = FIGURE_CATALOGUE.find((f) => f.key === 'error');
    assert.ok(error);
    for (const [rule, tolerance] of [
      [{ kind: 'one-se' }, 2],
      [{ kind: 'simplest-within', percent: 7 }, 7],
      [{ kind: 'least-error' }, 0.5],
    ] as const) {
      const base = viewOf(cars, rule);
      const t = base.tuning;
      assert.ok(t);
      const sel = selectDf(t.candidates, rule, t.metric, 'editor', tolerance);
      assert.equal(sel.otherRulesTolerance, tolerance);
      const v: FigureView = { ...base, tuning: { ...t, tolerancePercent: sel.otherRulesTolerance }, errorRange: 'all' };
      const svg: string = error.svg(v) ?? '';
      const fmt = errorFormat(t.candidates, t.metric, tolerance);
      const hovers: [number, string][] = [...svg.matchAll(/data-df="([^"]+)"><title>df [^:]+: mean RMSE ([^,<]+)/g)].map((m) => [Number(m[1]), m[2] ?? '']);
      assert.ok(hovers.length > 0, 'every point has its hover text');
      for (const [df, printed] of hovers) {
        const mean = t.candidates.find((c) => c.df === df)?.errors.rmse?.mean as number;
        assert.equal(printed, fmt(mean), `df ${df}`);
      }
      // The best mean as the explanation prints it, in the explanation and in the figure.
      const best = Math.min(...t.candidates.map((c) => c.errors.rmse?.mean ?? Infinity));
      assert.ok(sel.ruleReason.includes(`Least mean RMSE ${fmt(best)} at df`), sel.ruleReason);
      assert.match(svg, new RegExp(`lowest ${fmt(best).replace('.', '\\.')} at df`));
      if (sel.threshold !== undefined) assert.ok(svg.includes(`threshold ${fmt(sel.threshold)}`) && sel.ruleReason.includes(fmt(sel.threshold)), sel.ruleReason);
    }
  });

  it('the error figure around the decision: the window of core/view/errorFocus.ts when asked for and useful, said in the title', () => {
    const error = FIGURE_CATALOGUE.find((f) => f.key === 'error');
    assert.ok(error);
    const v = viewOf(cars, { kind: 'one-se' });
    const t = v.tuning;
    assert.ok(t);
    const window = decisionWindow(errorPoints(t.candidates, t.metric), v.df, t.threshold);
    assert.ok(window, 'cars with df 2 to 6 has a window around the decision');
    const focused: FigureView = { ...v, errorRange: 'decision' };
    assert.deepEqual(errorWindowOf(focused), window);
    assert.deepEqual((error.input(focused) as { window: unknown }).window, window);
    assert.match(error.title(focused), new RegExp(`; df ${window.df[0]} to ${window.df[1]}, around the decision$`));
    // Every candidate: asked for, or by default (the report draws it so).
    for (const all of [{ ...v, errorRange: 'all' as const }, v]) {
      assert.equal(errorWindowOf(all), undefined);
      assert.equal((error.input(all) as { window: unknown }).window, undefined);
      assert.doesNotMatch(error.title(all), /around the decision/);
    }
  });

  it('the figure of residuals in row order is left out without them or when the rows are in x order; block means say so', () => {
    const rowOrder = FIGURE_CATALOGUE.find((f) => f.key === 'row-order');
    assert.ok(rowOrder);
    const v = viewOf(cars, { kind: 'one-se' });
    const given = withRowOrder(v, cars);
    assert.equal(rowOrder.svg({ ...v, detail: { ...(v.detail as FitDetail), rowOrder: undefined } }), undefined);
    const inXOrder = { ...given, detail: { ...(given.detail as FitDetail), rowOrder: { ...(given.detail?.rowOrder as NonNullable<FitDetail['rowOrder']>), sameAsX: true } } };
    assert.equal(rowOrder.svg(inXOrder), undefined);
    const svg = rowOrder.svg(given) ?? '';
    assert.equal((svg.match(/<circle class="kw-point"/g) ?? []).length, CARS.x.length, 'one point per row');
    assert.match(svg, /data-line="\d+"/);
    assert.equal(rowOrder.title(given), 'Residuals in the order of the rows in the file');
    assert.equal(rowOrder.title(withRowOrder(v, cars, 50)), 'Residuals in the order of the rows in the file (each point the mean of 50 rows)');
  });

  it('errorPoints leaves out skipped candidates and those without the metric', () => {
    const pts = errorPoints(
      [
        { df: 2, errors: { rmse: { mean: 1, se: 0.1, values: [] } } },
        { df: 3, errors: { rmse: { mean: 0.8, se: 0.1, values: [] } }, skipped: 'rank deficient' },
        { df: 4, errors: {} },
      ],
      'rmse',
    );
    assert.deepEqual(pts, [{ df: 2, mean: 1, se: 0.1 }]);
  });

  it('counts (datasets::discoveries): the residual figures say deviance residuals in their titles', async () => {
    const a = await analyse(xy(DISCOVERIES), {
      kind: 'natural-spline',
      candidates: [3, 4],
      resample: { kind: 'folds', folds: 5, repeats: 1 },
      rule: { kind: 'least-error' },
      seed: 1,
      outcome: 'counts',
    });
    const v = viewOf(a, { kind: 'least-error' }, ['year', 'discoveries']);
    assert.equal(v.detail?.residualKind, 'deviance');
    const titles = FIGURE_CATALOGUE.filter((f) => f.key.startsWith('residuals-')).map((f) => f.title(v));
    assert.deepEqual(titles, ['Deviance residuals against year', 'Deviance residuals against fitted values']);
    // Without the details yet, the title cannot know the kind and says residuals.
    assert.equal(FIGURE_CATALOGUE.find((f) => f.key === 'residuals-x')?.title({ ...v, detail: undefined }), 'Residuals against year');
  });
});
