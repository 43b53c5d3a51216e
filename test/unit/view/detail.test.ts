/**
 * Tests of the panel's residual details (core/view/detail.ts): standardised residuals as R
 * standardises them, deviance residuals for counts, and the model report of Poisson and
 * robust fits with down-weighted rows by line. References: test/reference/fixtures/fits.json
 * (test/reference/r/fits.R: lm with splines::ns; R's rstandard.lm is
 * sqrt(w) r / (sigma sqrt(1 - h))) and physics.json (test/reference/r/physics.R: glm with
 * family poisson, whose rstandard.glm is the deviance residual / sqrt(1 - h) with dispersion
 * 1; MASS::rlm with psi.huber).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fitCurve } from '../../../core/fit/index';
import type { Cloud } from '../../../core/view/model';
import type { FitSpec, XYData } from '../../../core/types';
import { fitDetail, MAX_DOWNWEIGHTED_LISTED, MAX_INFLUENTIAL_LISTED, modelReportView } from '../../../core/view/detail';
import { influentialRows } from '../../../core/stats/influence';
import { qnorm } from '../../../core/stats/distributions';
import { RandomStream } from '../../../core/tune/rng';
import { diagnose } from '../../../core/analysis/diagnose';

const FIXTURES = join(__dirname, '..', '..', 'reference', 'fixtures');

interface Dataset {
  readonly x: number[];
  readonly y: number[];
  readonly w?: number[];
}
interface FitsCase {
  readonly name: string;
  readonly dataset: string;
  readonly family: 'natural' | 'poly';
  readonly df: number;
  readonly residuals: number[];
  readonly hat: number[];
  readonly sigma: number;
}
interface GlmCase {
  readonly name: string;
  readonly dataset: string;
  readonly df: number;
  readonly deviance: number;
  readonly devianceResiduals: number[];
  readonly hat: number[];
}
interface RlmCase {
  readonly name: string;
  readonly dataset: string;
  readonly df: number;
  readonly weights: number[];
  readonly scale: number;
}

const fits = JSON.parse(readFileSync(join(FIXTURES, 'fits.json'), 'utf8')) as { datasets: Record<string, Dataset>; cases: FitsCase[] };
const physics = JSON.parse(readFileSync(join(FIXTURES, 'physics.json'), 'utf8')) as { datasets: Record<string, Dataset>; glm: GlmCase[]; rlm: RlmCase[] };

function data(d: Dataset): XYData {
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y), w: d.w ? Float64Array.from(d.w) : undefined, lines: Int32Array.from(d.x, (_, i) => i + 2) };
}

/** The panel rounds to 7 significant digits (core/view/round.ts); fits agree with R to about 1e-8 relative. */
function closeAll(what: string, actual: readonly number[], expected: readonly number[], rel = 2e-6): void {
  assert.equal(actual.length, expected.length, `${what}: length`);
  for (let i = 0; i < expected.length; i++) {
    const e = expected[i] as number;
    const a = actual[i] as number;
    assert.ok(Math.abs(a - e) <= rel * Math.max(1, Math.abs(e)), `${what}[${i}]: ${a} vs R ${e}`);
  }
}

const sorted = (v: readonly number[]): number[] => [...v].sort((a, b) => a - b);
const pointsY = (c: Cloud): number[] => (c.kind === 'points' ? [...c.y] : []);

describe('fitDetail', () => {
  for (const name of ['mcycle natural df=5', 'cars_w natural df=4']) {
    it(`fitDetail(${name}): the normal quantile plot shows R's rstandard and the residual figures reading minus fit`, () => {
      const c = fits.cases.find((k) => k.name === name) as FitsCase;
      const d = data(fits.datasets[c.dataset] as Dataset);
      const detail = fitDetail(fitCurve(d, { kind: c.family === 'natural' ? 'natural-spline' : 'polynomial', df: c.df }), d);
      const w = d.w;
      const rstandard = c.residuals.map((r, i) => (r * Math.sqrt(w ? (w[i] as number) : 1)) / (c.sigma * Math.sqrt(1 - (c.hat[i] as number))));
      closeAll(`${name} standardised residuals`, detail.qq.sample, sorted(rstandard));
      assert.equal(detail.residualKind, 'response');
      assert.equal(detail.residualsVsX.kind, 'points');
      closeAll(`${name} residuals`, pointsY(detail.residualsVsX), c.residuals, 1e-6);
      assert.equal(detail.model, undefined, 'plain least squares has no model report');
    });
  }

  it("fitDetail(discoveries Poisson df=5): deviance residuals, standardised as R's rstandard.glm, and the deviance in the model report", () => {
    const c = physics.glm.find((k) => k.name === 'discoveries poisson df=5') as GlmCase;
    const d = data(physics.datasets.discoveries as Dataset);
    const spec: FitSpec = { kind: 'natural-spline', df: c.df, outcome: 'counts' };
    const detail = fitDetail(fitCurve(d, spec), d);
    assert.equal(detail.residualKind, 'deviance');
    closeAll('deviance residuals', pointsY(detail.residualsVsX), c.devianceResiduals, 1e-6);
    closeAll('rstandard.glm', detail.qq.sample, sorted(c.devianceResiduals.map((r, i) => r / Math.sqrt(1 - (c.hat[i] as number)))));
    const m = detail.model;
    assert.ok(m?.glm, 'Poisson fits report the deviance');
    closeAll('deviance', [m.glm.deviance], [c.deviance]);
    assert.equal(m.converged, true);
    assert.ok(m.lines.some((l) => l.startsWith('Deviance ')));
  });

  it('modelReportView(mcycle robust df=8): down-weighted rows by CSV line, lowest weight first, as MASS::rlm weights them', () => {
    const c = physics.rlm.find((k) => k.name === 'mcycle huber df=8') as RlmCase;
    const d = data(physics.datasets.mcycle as Dataset);
    const view = modelReportView(fitCurve(d, { kind: 'natural-spline', df: c.df, robust: true }), d);
    const r = view?.robust;
    assert.ok(r, 'robust fits list their down-weighted rows');
    // Rows with R weight below 1 (weights within 1e-6 of 1 count as 1), CSV line = index + 2.
    const down = c.weights.flatMap((w, i) => (w < 1 - 1e-6 ? [{ line: i + 2, w }] : [])).sort((a, b) => a.w - b.w);
    assert.equal(r.total, down.length);
    assert.equal(r.rows.length, Math.min(down.length, MAX_DOWNWEIGHTED_LISTED));
    assert.deepEqual(
      r.rows.map((row) => row.line),
      down.slice(0, r.rows.length).map((x) => x.line),
    );
    closeAll(
      'weights',
      r.rows.map((row) => row.weight),
      down.slice(0, r.rows.length).map((x) => x.w),
      1e-3,
    );
    closeAll('scale', [r.scale], [c.scale]);
    for (const row of r.rows) {
      assert.equal(row.x, (physics.datasets.mcycle as Dataset).x[row.line - 2]);
      assert.equal(row.y, (physics.datasets.mcycle as Dataset).y[row.line - 2]);
    }
  });

  it('modelReportView: a shape-constrained fit reports its active constraints; plain least squares has no report', () => {
    const d = data(fits.datasets.cars as Dataset);
    const view = modelReportView(fitCurve(d, { kind: 'natural-spline', df: 5, shape: ['increasing'] }), d);
    assert.ok(view?.constraints, 'constraints reported');
    assert.ok(view.constraints.total > 0 && view.constraints.active <= view.constraints.total);
    assert.ok(view.lines.some((l) => l.startsWith('Shape increasing: ')));
    assert.equal(modelReportView(fitCurve(d, { kind: 'natural-spline', df: 5 }), d), undefined);
  });

  it('fitDetail(MASS::hills df=3): the influential rows R flags, at most ten shown, with the thresholds and the residuals in row order', () => {
    // test/reference/fixtures/influence.json, case "hills lm df=3" (test/reference/r/influence.R):
    // R flags rows 2 and 31 as outliers and row 34 by Cook's distance and leverage (0-based, x sorted).
    const infl = JSON.parse(readFileSync(join(FIXTURES, 'influence.json'), 'utf8')) as {
      datasets: Record<string, Dataset>;
      lm: { name: string; outliers: number[]; cooksRows: number[]; leverageRows: number[]; outlierLimit: number; cooksLimit: number }[];
    };
    const c = infl.lm.find((k) => k.name === 'hills lm df=3');
    assert.ok(c);
    const d = data(infl.datasets.hills as Dataset);
    const fit = fitCurve(d, { kind: 'natural-spline', df: 3 });
    const detail = fitDetail(fit, d, { diagnostics: diagnose(d, fit) });
    const flaggedByR = [...new Set([...c.outliers, ...c.cooksRows, ...c.leverageRows])];
    assert.equal(detail.influentialTotal, flaggedByR.length);
    assert.deepEqual(
      detail.influential.map((r) => r.line - 2).sort((a, b) => a - b),
      flaggedByR.sort((a, b) => a - b),
    );
    // The panel rounds thresholds to 5 significant digits (core/view/detail.ts).
    closeAll('thresholds', [detail.outlierThreshold as number, detail.cooksThreshold], [c.outlierLimit, c.cooksLimit], 1e-4);
    for (const r of detail.influential) assert.ok(r.exceeds.length > 0 && r.studentized !== undefined, JSON.stringify(r));
    assert.ok(detail.influential.some((r) => r.exceeds.some((e) => /Bonferroni/.test(e))));
    // Row order: the rows here are in x order, so the drift check is the Durbin-Watson check again.
    assert.equal(detail.rowOrder?.sameAsX, true);
    assert.equal(detail.rowOrder?.residual.length, d.x.length);
    assert.ok(
      detail.checks.every((k) => k.effect !== undefined),
      'every check carries its effect size',
    );
  });

  it('fitDetail lists every influential row (up to the limit), marks at most ten to show first, and counts them all', () => {
    // MASS::mcycle with df 2 (a straight line through a wave).
    const d = data(physics.datasets.mcycle as Dataset);
    const fit = fitCurve(d, { kind: 'natural-spline', df: 2 });
    const diagnostics = diagnose(d, fit);
    const detail = fitDetail(fit, d, { diagnostics });
    assert.equal(detail.influentialTotal, diagnostics.influential.total);
    assert.equal(detail.influentialShown, Math.min(10, diagnostics.influential.total));
    assert.deepEqual(
      detail.influential.map((r) => r.line),
      diagnostics.influential.rows.map((r) => r.line),
    );
  });

  it('fitDetail lists at most MAX_INFLUENTIAL_LISTED influential rows, the furthest past a threshold first, and counts every one', () => {
    // Invented rows for a behaviour test (how many are listed, not a statistical value): 1,000
    // readings on a gentle curve, with an influence report in which 300 rows are outliers.
    const n = 1000;
    const x = Float64Array.from({ length: n }, (_, i) => i / 10);
    const y = Float64Array.from(x, (v, i) => Math.sin(v / 20) + 0.01 * ((i * 7919) % 13));
    const lines = Int32Array.from({ length: n }, (_, i) => i + 2);
    const d: XYData = { x, y, lines };
    const fit = fitCurve(d, { kind: 'natural-spline', df: 4 });
    const studentized = Float64Array.from({ length: n }, (_, i) => (i % 3 === 0 && i < 900 ? 20 + i / 100 : 0));
    const influential = influentialRows({ leverage: fit.leverage, cooksDistance: new Float64Array(n), studentized, df: fit.df, reference: 'student', lines: d.lines });
    assert.equal(influential.total, 300);
    const detail = fitDetail(fit, d, { diagnostics: { ...diagnose(d, fit), influential } });
    assert.equal(detail.influentialTotal, 300);
    assert.equal(detail.influential.length, MAX_INFLUENTIAL_LISTED);
    assert.equal(detail.influentialShown, 10);
    // The largest studentized residual (row 897, line 899) comes first.
    assert.equal(detail.influential[0]?.line, 899);
  });
});

describe('the normal-quantile figure of a large fit', () => {
  it('keeps both tails of the standardised residuals whole and thins the middle, each point an order statistic of a full sort (20,000 seeded readings)', () => {
    const rng = new RandomStream(41, 0);
    const n = 20_000;
    const x = Float64Array.from({ length: n }, () => rng.int(1_000_000) / 10_000);
    const y = Float64Array.from(x, (v) => Math.sin(v / 12) + (rng.int(2001) - 1000) / 2000);
    const d: XYData = { x, y };
    const fit = fitCurve(d, { kind: 'natural-spline', df: 6 });
    const detail = fitDetail(fit, d);
    // The standardised residuals as R's rstandard defines them, sorted in full.
    const all = sorted(Array.from(fit.residuals, (r, i) => r / (fit.sigma * Math.sqrt(1 - (fit.leverage[i] as number)))));
    const { sample, theoretical } = detail.qq;
    assert.equal(sample.length, 300);
    // Plotting positions (i - 1/2) / n (Blom; R's ppoints), printed to 5 digits. A tenth of the points at each end are the lowest and highest order statistics themselves (core/stats/normalQuantiles.ts).
    closeAll('lowest tail', sample.slice(0, 30), all.slice(0, 30));
    closeAll('highest tail', sample.slice(-30), all.slice(-30));
    closeAll('plotting positions of the ends', [theoretical[0] as number, theoretical[299] as number], [qnorm(0.5 / n), qnorm((n - 0.5) / n)], 1e-4);
    for (let k = 1; k < sample.length; k++) assert.ok((sample[k] as number) >= (sample[k - 1] as number) && (theoretical[k] as number) > (theoretical[k - 1] as number), `point ${k} in order`);
    // 240 middle points for 19,940 middle ranks: one lies within about 83 ranks of the median.
    const mid = Math.round((n - 1) / 2);
    const [below, above] = [all[mid - 83] as number, all[mid + 83] as number];
    assert.ok(
      sample.some((v) => v >= below && v <= above),
      'the middle is thinned, not dropped',
    );
  });
});
