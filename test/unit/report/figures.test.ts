/**
 * Tests of the report's figures (core/report/figures.ts) for a tuned fit and a plain fit to
 * datasets::cars (Ezekiel 1930; test/reference/fixtures/fits.json from fits.R).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../../core/analysis/analysis';
import { diagnose } from '../../../core/analysis/diagnose';
import { fitCurve } from '../../../core/fit/index';
import { reportFigures } from '../../../core/report/figures';
import { FIGURE_CATALOGUE } from '../../../core/view/figureCatalogue';

const REPO = join(__dirname, '..', '..', '..');
const CARS = (JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;
const data = { x: Float64Array.from(CARS.x), y: Float64Array.from(CARS.y), lines: Int32Array.from(CARS.x, (_, i) => i + 2) };

describe('reportFigures', () => {
  it('reportFigures of a tuned fit: curve, error against df with the threshold, two residual figures and the normal quantile plot', async () => {
    const a = await analyse(data, { kind: 'natural-spline', candidates: [2, 3, 4, 5, 6], resample: { kind: 'bootstrap', resamples: 20 }, rule: { kind: 'one-se' }, seed: 3 });
    const figs = reportFigures({ stem: 'cars', fitted: data, fit: a.chosen, analysis: a, diagnostics: a.diagnostics, xLabel: 'speed', yLabel: 'dist', tableRange: [4, 25] });
    assert.deepEqual(
      figs.map((f) => f.name),
      ['cars.report.curve.svg', 'cars.report.error.svg', 'cars.report.residuals-x.svg', 'cars.report.residuals-fitted.svg', 'cars.report.normal-quantiles.svg'],
    );
    for (const f of figs) {
      assert.ok(f.svg.startsWith('<?xml') && f.svg.endsWith('</svg>\n'), f.name);
      assert.equal(f.svg.match(/<svg /g)?.length, 1, `${f.name}: one svg element`);
      assert.match(f.svg, /role="img"/);
    }
    const err = figs[1]?.svg ?? '';
    assert.match(err, /class="kw-threshold"/, 'the one-SE threshold is drawn');
    assert.match(err, new RegExp(`kw-chosen" cx="[0-9.]+" cy="[0-9.]+" r="5.5" data-df="${a.tune.selected.df}"`));
    // Captions and descriptions are the catalogue's, which the panel shows too.
    const inReport = FIGURE_CATALOGUE.filter((f) => f.inReport);
    assert.deepEqual(
      figs.map((f) => f.description),
      inReport.map((f) => f.description),
    );
    assert.match(figs[0]?.caption ?? '', new RegExp(`^Readings, fitted curve \\(df ${a.chosen.df}\\), 95 % confidence band \\(darker\\) and 95 % prediction band \\(lighter\\)$`));
    assert.match(figs[1]?.caption ?? '', /the dashed line is the rule's threshold; the larger dot is the chosen df \d+ \(one-standard-error rule\)$/);
    assert.deepEqual(
      figs.slice(2).map((f) => f.caption),
      ['Residuals against speed', 'Residuals against fitted values', 'Normal quantile plot of standardised residuals'],
    );
    // 50 readings drawn one by one in the curve figure.
    assert.equal(figs[0]?.svg.match(/<circle class="kw-point"/g)?.length, 50);
    assert.match(figs[0]?.svg ?? '', /class="kw-band-pi"/);
  });

  it('reportFigures of a plain fit has no error figure, and draws the curve over an extrapolated table range', () => {
    const fit = fitCurve(data, { kind: 'polynomial', df: 3 });
    const figs = reportFigures({ stem: 'cars', fitted: data, fit, diagnostics: diagnose(data, fit), xLabel: 'speed', yLabel: 'dist', tableRange: [0, 30] });
    assert.deepEqual(
      figs.map((f) => f.name.split('.')[2]),
      ['curve', 'residuals-x', 'residuals-fitted', 'normal-quantiles'],
    );
    // The x axis reaches the table's 0 and 30 (tick labels).
    assert.match(figs[0]?.svg ?? '', />0<\/text>/);
    assert.match(figs[0]?.svg ?? '', />30<\/text>/);
  });
});
