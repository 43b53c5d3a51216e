/**
 * Tests of the review report's Markdown (core/report/markdown.ts), built through
 * buildDeliverables from R's datasets::airquality (ozone against temperature; 37 rows with
 * a missing ozone value are rejected) from test/fixtures/csv/airquality.csv
 * (make-fixtures.R), tuned with a held-out check.
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../../core/analysis/analysis';
import { buildDeliverables } from '../../../core/outputs/deliver';
import { parseCsvText } from '../../../core/ingest/reader';
import { selectColumns } from '../../../core/ingest/select';
import { DEFAULT_OUTPUT, type FitPlan } from '../../../core/outputs/plan';
import { md, REPORT_LIST_LIMIT } from '../../../core/report/markdown';
import { holdoutMask, orderByX } from '../../../core/tune/plan';

const REPO = join(__dirname, '..', '..', '..');

describe('reportMarkdown', () => {
  let report = '';
  let figureNames: string[] = [];

  before(async function () {
    this.timeout(60_000);
    const text = readFileSync(join(REPO, 'test', 'fixtures', 'csv', 'airquality.csv'), 'utf8');
    const sel = selectColumns(parseCsvText(text), { x: 'Temp', y: 'Ozone' }, 'airquality.csv');
    const plan: FitPlan = {
      columns: { x: 'Temp', y: 'Ozone' },
      tune: true,
      options: { kind: 'natural-spline', candidates: [2, 3, 4, 5, 6], resample: { kind: 'folds', folds: 5, repeats: 2 }, rule: { kind: 'one-se' }, seed: 9, holdout: 0.2 },
      output: { ...DEFAULT_OUTPUT, grid: { kind: 'list', values: [50, 60, 70, 80, 90, 100] }, extrapolate: true, flagNegative: true, emit: ['c'], report: true },
    };
    const analysis = await analyse(sel.data, plan.options);
    assert.ok(analysis.n < sel.data.x.length, 'rows were held out');
    // The rows the analysis fitted: analyse's own split (its per-row arrays have analysis.n rows).
    const keep = holdoutMask(orderByX(sel.data.x), 0.2, 9);
    const idx = [...keep.keys()].filter((i) => keep[i] === 0);
    const fitted = {
      x: Float64Array.from(idx, (i) => sel.data.x[i] as number),
      y: Float64Array.from(idx, (i) => sel.data.y[i] as number),
      lines: Int32Array.from(idx, (i) => (sel.data.lines as Int32Array)[i] as number),
    };
    const d = buildDeliverables({
      plan,
      stem: 'airquality',
      dataFile: 'airquality.csv',
      dataPath: 'airquality.csv',
      dataSha256: createHash('sha256').update(text).digest('hex'),
      rowsRead: 153,
      selection: sel,
      fitted,
      analysis,
      fit: analysis.chosen,
      diagnostics: analysis.diagnostics,
      sha256: (t) => createHash('sha256').update(t).digest('hex'),
    });
    report = (d.files.find((f) => f.kind === 'report') as { text: string }).text;
    figureNames = d.files.filter((f) => f.kind === 'figure').map((f) => f.name);
  });

  it('starts with the title and the caution, then the warnings', () => {
    assert.match(report, /^# Curve review: airquality\.csv\n\n> \*\*Caution\.\*\* This curve is an empirical fit to the readings shown, not a certified calibration\./);
    // The fitted rows (held-out rows excluded) span 57 to 97 degrees F; brackets are escaped for Markdown.
    assert.match(report, /\n## Warnings\n\n- ⚠ 2 table row\(s\) lie outside the data range \\\[57, 97\\\] and are extrapolated \(x = 50, 100\)/);
  });

  it('references every figure file by its relative name, with alt text', () => {
    assert.equal(figureNames.length, 5);
    for (const f of figureNames) assert.match(report, new RegExp(`!\\[[^\\]]+\\]\\(${f.replace(/\./g, '\\.')}\\)`));
  });

  it('explains the choice with the rule, the resampling and the held-out check, and lists the candidates', () => {
    assert.match(report, /One-SE threshold/);
    assert.match(report, /5-fold cross-validation, repeated 2 times, folds stratified by x, seed 9; the rule is the one-standard-error rule \(`--rule one-se`\)/);
    assert.match(report, /Held-out check \(\d+ rows, 20 % set aside before tuning and used once\)/);
    assert.match(report, /\| df \| mean RMSE \| SE \| AIC \| BIC \| \|\n\| ---: /);
    assert.match(report, /\*\*chosen\*\*/);
  });

  it('lists the residual checks, the table with extrapolated and negative rows, and the rejected rows by line (at most REPORT_LIST_LIMIT)', () => {
    assert.match(report, /- (⚠ )?\*\*Shapiro-Wilk \(are the residuals normal\?\)\*\*: W = /);
    assert.match(report, /\*\*Extrapolated rows: 2\*\*/);
    assert.match(report, /The quantity was declared non-negative|\*\*The curve is below zero at \d+ rows\*\*/);
    assert.match(report, /- Rows: 153 read, 116 used, 37 rejected/);
    // airquality line 6 (row 5) has Ozone NA.
    assert.match(report, /\n {2}- line 6 \(Ozone\): missing value\n/);
    assert.match(report, new RegExp(`… and ${37 - REPORT_LIST_LIMIT} more \\(all are listed in the fit record\\)`));
  });

  it('prints each candidate mean in the table as the explanation prints it (one rule for the same quantity)', () => {
    // Issue 14, item 3: the explanation's least mean, chosen mean and next simpler mean appear
    // in the candidate table with the same digits.
    const why = /Least mean RMSE (\S+) at df (\d+)[^\n]*The smallest df at or under it is (\d+) \((\S+)\), chosen\./.exec(report);
    assert.ok(why, 'explanation found');
    const row = (df: string): string | undefined => new RegExp(`\\n\\| ${df} \\| (\\S+) \\|`).exec(report)?.[1];
    assert.equal(row(why[2] as string), why[1]);
    assert.equal(row(why[3] as string), why[4]);
  });

  it('names the rules by which rows stand out, with their sources', () => {
    assert.match(report, /(No row stands out|Rows that stand out: \d+ \([^)]*\))\. Thresholds: \|studentized residual\| above [\d.]+ \(Bonferroni outlier test at 5 % \(Weisberg 2014/);
    assert.match(report, /Cook's distance above 0\.\d+ \(median of F\(df, n - df\)/);
  });

  it('ends with how to reproduce and check, in a shell block', () => {
    assert.match(
      report,
      /```sh\nknotwise fit airquality\.csv --x Temp --y Ozone --curve natural-spline --df 2,3,4,5,6 --resampling folds:5x2 --rule one-se --seed 9 --holdout 0\.2 --grid 50,60,70,80,90,100 --extrapolate --flag-negative --emit c --report --out \.\nknotwise check airquality\.fit\.json\n```\n$/,
    );
    assert.match(report, /generated code: \[airquality\.curve\.h\]\(airquality\.curve\.h\)/);
  });
});

describe('md', () => {
  it('md escapes Markdown and HTML punctuation from the CSV so it shows as text', () => {
    assert.equal(md('<script>alert(1)</script>'), '\\<script\\>alert(1)\\</script\\>');
    assert.equal(md('a_b*c|d [e](f) #g `h` ~i! &j'), 'a\\_b\\*c\\|d \\[e\\](f) \\#g \\`h\\` \\~i\\! \\&j');
    assert.equal(md('two\nlines'), 'two lines');
  });
});

describe('reportMarkdown model section', () => {
  const REPO_ROOT = join(__dirname, '..', '..', '..');
  async function reportFor(file: string, x: string, y: string, options: FitPlan['options'], trials?: string): Promise<string> {
    const text = readFileSync(join(REPO_ROOT, 'test', 'e2e', 'fixtures', file), 'utf8');
    const sel = selectColumns(parseCsvText(text), { x, y }, file);
    const plan: FitPlan = { columns: { x, y }, tune: false, options, output: { ...DEFAULT_OUTPUT, report: true }, ...(trials ? { trials } : {}) };
    const analysis = await analyse(sel.data, options);
    const d = buildDeliverables({
      plan,
      stem: 'r',
      dataFile: file,
      dataPath: file,
      dataSha256: createHash('sha256').update(text).digest('hex'),
      rowsRead: sel.data.x.length,
      selection: sel,
      fitted: sel.data,
      analysis,
      fit: analysis.chosen,
      diagnostics: analysis.diagnostics,
      sha256: (t) => createHash('sha256').update(t).digest('hex'),
    });
    return (d.files.find((f) => f.kind === 'report') as { text: string }).text;
  }

  it('a robust fit of MASS::mcycle names Huber, k and the down-weighted rows by CSV line', async () => {
    const r = await reportFor('mcycle.csv', 'times', 'accel', { kind: 'natural-spline', candidates: [8], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1, robust: true });
    assert.match(r, /## Model\n\n- Readings: continuous \(Gaussian errors, least squares\)/);
    assert.match(r, /- Robust fit: Huber M-estimation, k = 1\.345, robust scale [0-9.]+; \d+ rows down-weighted: line \d+ \(weight 0\.\d+\)/);
  });

  it('a shape-constrained fit says which shape and how many constraints are active; a plain fit has no model section', async () => {
    const shaped = await reportFor('cars.csv', 'speed', 'dist', { kind: 'natural-spline', candidates: [6], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1, shape: ['increasing'] });
    assert.match(shaped, /- Shape: increasing, imposed on the B-spline coefficients so that it holds everywhere in the data range; \d+ of \d+ constraints are active/);
    const plain = await reportFor('cars.csv', 'speed', 'dist', { kind: 'natural-spline', candidates: [6], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    assert.doesNotMatch(plain, /## Model/);
  });
});
