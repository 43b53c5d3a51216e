/**
 * A fit of a file larger than the memory budget, streamed from disk in passes
 * (docs/design.md, "Streaming"): the plain natural spline with continuous readings, tuned
 * by bundles (core/stream/bundles.ts). The passes: (1) rows, rejected rows, x range and the
 * weighted mean of y; (2) the spread of y and a histogram of x; (3..) the x values near the
 * knots' ranks until the knots are exact; then the per-cell power sums of all rows and of
 * every bundle; and last every candidate's residual sum of squares with the chosen fit's
 * checks. Every pass hashes the file again and stops the run if it changed.
 */
import type { Analysis } from '../analysis/types';
import { ExtrapolatingBSplineBasis } from '../basis/naturalSpline';
import { CancelledError, InputError } from '../errors';
import { accumulateRow, interleaveCubics, SUMS_PER_CELL } from '../fit/powerSums/cells';
import { SplineFromSums } from '../fit/powerSums/splineSums';
import { checkRowValues, MIN_X_RANGE } from '../fit/prepared';
import { chosenColumns, noUsableRows, pickRows, requireNumeric, type ColumnChoice, type RejectedRow, type Selection } from '../ingest/select';
import { noDataRows } from '../ingest/tableBuilder';
import type { ColumnInfo, ParsedTable, TableProblem } from '../ingest/types';
import { nullSpace } from '../linalg/nullSpace';
import { buildDeliverables } from '../outputs/deliver';
import type { FitPlan } from '../outputs/plan';
import { curveKind } from '../registry/curves/index';
import { formatResampling, resamplingScheme } from '../registry/resampling/index';
import { bundleCount, bundleCounts, bundleOf, combineBundles } from '../stream/bundles';
import { ExactRanks } from '../stream/exactRanks';
import { knotRanks, locate, streamedKnots, unionBreaks } from '../stream/knots';
import { KEPT_EXTREMES, StreamedChecks, streamedFit, QQ_SAMPLE_ROWS, type StreamedCandidate } from '../stream/result';
import { selectDf } from '../tune/rules';
import { summarise } from '../tune/summaries';
import type { CandidateResult, Progress, ResampleSpec } from '../tune/types';
import type { FitResult } from '../types';
import { sha256 } from './outputs';
import { dataSource, placed, readPreviousRecord, type PipelineRun } from './pipeline';
import { filePass, type FileIdentity } from './streamFile';
import { join, basename, extname } from 'node:path';

/** A larger share of failed resamples than this skips the candidate (as core/tune/tune.ts). */
const MAX_FAILED_SHARE = 0.5;
/** Passes of a usual streamed run, for the progress line. */
const TYPICAL_PASSES = 5;

/**
 * The scheme a streamed tuning resamples with: bundles as asked, or bundles with the same
 * number of resamples in place of the bootstrap (which draws n rows from all rows and so
 * cannot stream). Throws InputError for a scheme that cannot stream.
 */
export function streamedResampling(spec: ResampleSpec): Extract<ResampleSpec, { kind: 'bundles' }> {
  if (spec.kind === 'bundles') return spec;
  if (spec.kind === 'bootstrap') return { kind: 'bundles', resamples: spec.resamples };
  throw new InputError(
    `${formatResampling(spec)} needs every row in memory, and this file is above the memory budget: use --resampling bundles:<resamples> (or bootstrap:<resamples>, which then resamples by bundles), raise --memory-budget, or fit a part of the file`,
  );
}

/**
 * Refuses, with what to do, a plan the streamed path does not carry out (it never guesses):
 * only a tuned plain natural spline with continuous readings, no held-out rows, trials,
 * groups, report, inverse table or table at the data's x.
 */
export function checkStreamable(plan: FitPlan, budget: number, estimate: number): void {
  const o = plan.options;
  const above = `this file needs about ${Math.round(estimate)} MiB held whole, above the memory budget of ${budget} MiB, so it is streamed from disk in passes`;
  const refuse = (what: string): never => {
    throw new InputError(`${above}, and ${what} is not available streamed yet: raise --memory-budget to about ${Math.ceil(estimate)} (if the machine has the memory), or fit a part of the file`);
  };
  if (o.kind !== 'natural-spline') refuse(`the curve ${o.kind}`);
  if ((o.outcome !== undefined && o.outcome !== 'continuous') || (o.shape !== undefined && o.shape.length > 0) || o.robust)
    refuse('an outcome other than continuous readings, a shape or a robust fit');
  if (!plan.tune) refuse('a single df fitted without tuning');
  if (o.holdout) refuse('--holdout');
  if (plan.trials !== undefined) refuse('--trials');
  if (plan.groups !== undefined) refuse('groups');
  if (plan.output.report) refuse('--report');
  if (plan.output.inverse !== undefined) refuse('--inverse');
  if (plan.output.grid?.kind === 'data') refuse('--grid data');
  try {
    streamedResampling(o.resample);
  } catch (e) {
    if (e instanceof InputError) refuse(`--resampling ${formatResampling(o.resample)}`);
    throw e;
  }
}

/** Running facts of pass 1 about one chosen column (for the numeric check over the whole file). */
interface ColumnTally {
  numeric: number;
  invalid: number;
  missing: number;
  line?: number;
  reason?: string;
}

/**
 * Reads, tunes and fits `file` as `plan` says, streaming it in passes, and builds the
 * outputs as runPipeline does. `budget` and `estimate` (MiB) are stated in the notes.
 * Throws InputError (file, line, column where known) for bad input and for a file that
 * changes between passes; CancelledError when `progress` says so between passes.
 */
export async function streamPipeline(
  file: string,
  plan: FitPlan,
  outFolder: string,
  names: { readonly table: string; readonly record: string } | undefined,
  source: { readonly progress?: Progress | undefined; readonly previous?: unknown },
  budget: number,
  estimate: number,
): Promise<PipelineRun> {
  checkStreamable(plan, budget, estimate);
  const progress = source.progress;
  const resample = streamedResampling(plan.options.resample);
  const seed = plan.options.seed;
  const choice: ColumnChoice = plan.columns;
  let pass = 0;
  let identity: FileIdentity | undefined;
  const step = async (what: string, onRows: (part: ParsedTable) => void): Promise<void> => {
    if (progress?.cancelled()) throw new CancelledError();
    pass++;
    // Typically five passes (docs/design.md, "Streaming"); more when the knots need another.
    progress?.report(pass - 1, Math.max(TYPICAL_PASSES, pass + 1), `pass ${pass} over the file: ${what}`);
    identity = await filePass(file, pass, identity, onRows);
  };
  // Pass 1: rows, rejected rows, column checks, x range, weighted mean of y.
  let chosenCols: ColumnInfo[] | undefined;
  let columns: readonly ColumnInfo[] = [];
  let header = true;
  let labels: Selection['labels'] = { x: choice.x, y: choice.y };
  const tallies: ColumnTally[] = [];
  const rejected: RejectedRow[] = [];
  let rowProblems = 0;
  let firstRowProblem: TableProblem | undefined;
  let rowsRead = 0;
  let n = 0;
  let min = Infinity;
  let max = -Infinity;
  let sw = 0;
  let swy = 0;
  let sumLogW = 0;
  let weighted = false;
  const negative = { count: 0, line: 0 };
  await step('rows and ranges', (part) => {
    if (!chosenCols) {
      chosenCols = chosenColumns(part, choice, file);
      columns = part.columns;
      header = part.format.header;
      const [cx, cy, cw] = chosenCols as [ColumnInfo, ColumnInfo, ColumnInfo | undefined];
      labels = cw !== undefined ? { x: cx.label, y: cy.label, weights: cw.label } : { x: cx.label, y: cy.label };
      for (let k = 0; k < chosenCols.length; k++) tallies.push({ numeric: 0, invalid: 0, missing: 0 });
      weighted = chosenCols.length === 3;
    }
    rowsRead += part.rowCount;
    chosenCols.forEach((c, k) => {
      const info = part.columns[c.index] as ColumnInfo;
      const t = tallies[k] as ColumnTally;
      t.numeric += info.numericCount;
      t.invalid += info.invalidCount;
      t.missing += info.missingCount;
      if (t.line === undefined && info.problems.rows.length > 0) {
        t.line = part.lines[info.problems.rows[0] as number] as number;
        t.reason = info.problems.reasons[0] as string;
      }
    });
    for (const p of part.problems) {
      if (p.column !== undefined) continue;
      rowProblems++;
      firstRowProblem ??= p;
    }
    const picked = pickRows(part, chosenCols);
    for (const r of picked.rejected) rejected.push(r);
    const { x, y, w, lines } = picked.data;
    try {
      checkRowValues(picked.data);
    } catch (e) {
      throw placed(e, file, labels);
    }
    for (let i = 0; i < x.length; i++) {
      const xi = x[i] as number;
      const wi = w ? (w[i] as number) : 1;
      if (xi < min) min = xi;
      if (xi > max) max = xi;
      sw += wi;
      swy += wi * (y[i] as number);
      if (w) sumLogW += Math.log(wi);
      if ((y[i] as number) < 0 && negative.count++ === 0) negative.line = lines ? (lines[i] as number) : n + i + 1;
    }
    n += x.length;
  });
  if (rowsRead === 0 && !chosenCols) throw noDataRows(header, rowProblems, firstRowProblem, file);
  const picked = chosenCols as ColumnInfo[];
  picked.forEach((c, k) => {
    const t = tallies[k] as ColumnTally;
    const whole: ColumnInfo = {
      ...c,
      numericCount: t.numeric,
      invalidCount: t.invalid,
      missingCount: t.missing,
      numeric: t.numeric > t.invalid,
      problems: { rows: Int32Array.of(0), reasons: [t.reason ?? ''] },
    };
    requireNumeric(
      {
        columns: columns.map((d) => (d.index === c.index ? whole : d)),
        values: [],
        lines: Int32Array.of(t.line ?? 0),
        rowCount: 0,
        format: { delimiter: ',', decimalComma: false, header, bom: false, lineEnding: 'lf' },
        problems: [],
        blankLines: 0,
      },
      whole,
      file,
    );
  });
  if (rowsRead === 0) throw noDataRows(header, rowProblems, firstRowProblem, file);
  if (n === 0) throw noUsableRows(picked, rejected[0], file);
  if (max > min && !(max - min >= MIN_X_RANGE)) {
    throw new InputError(
      `the x values spread over only ${max - min} (from ${min} to ${max}); Knotwise needs a spread of at least ${MIN_X_RANGE} to tell them apart in double precision: rescale the column, e.g. change its unit`,
      { file, column: labels.x },
    );
  }
  resamplingScheme(resample).check(resample, n);
  const ymean = swy / sw;
  const offset = Number.isFinite(ymean) ? ymean : 0;
  // Candidates: as given, else the kind's default for at least its largest df of distinct x (checked after pass 2).
  const kind = curveKind('natural-spline');
  const asked = plan.options.candidates;
  const widest = [...new Set(asked ?? kind.defaultCandidates(Number.MAX_SAFE_INTEGER))].sort((a, b) => a - b);
  const ranks = new ExactRanks(n, knotRanks(n, widest), min, max);
  // Pass 2: spread of y (the resampling's scale, the total sum of squares) and the first histogram of x.
  let ss = 0;
  await step('spread of y and the distribution of x', (part) => {
    const { x, y, w } = pickRows(part, picked).data;
    for (let i = 0; i < x.length; i++) {
      const d = (y[i] as number) - ymean;
      ss += (w ? (w[i] as number) : 1) * d * d;
      ranks.offer(x[i] as number);
    }
  });
  ranks.endPass();
  while (!ranks.done) {
    await step('x values near the knots', (part) => {
      const x = pickRows(part, picked).data.x;
      for (let i = 0; i < x.length; i++) ranks.offer(x[i] as number);
    });
    ranks.endPass();
  }
  const distinct = { count: ranks.distinctAtLeast, exact: ranks.distinctExact };
  let dfs = widest;
  if (asked === undefined) {
    if (!distinct.exact && distinct.count < widest[widest.length - 1]!)
      throw new InputError(`x has few distinct values (at least ${distinct.count}); give the candidates with --df, or raise --memory-budget so that the file is read whole`, {
        file,
        column: labels.x,
      });
    dfs = [...new Set(kind.defaultCandidates(distinct.count))].sort((a, b) => a - b);
  }
  const placedKnots = streamedKnots(n, dfs, min, max, distinct, (r) => ranks.value(r), file);
  const yscale = Math.sqrt(ss / sw) || 1;
  const totals = { sw, sumLogW: weighted ? sumLogW : 0, tss: ss };
  const skipped = new Map<number, string>();
  const specs: { df: number; basis: ExtrapolatingBSplineBasis; knots: Float64Array; z: Float64Array }[] = [];
  for (const k of placedKnots) {
    if ('skipped' in k) skipped.set(k.df, k.skipped);
    else {
      const basis = new ExtrapolatingBSplineBasis(k.lower, k.upper, k.interior);
      specs.push({ df: k.df, basis, knots: Float64Array.of(k.lower, ...k.interior, k.upper), z: nullSpace(basis.naturalConstraint(), 2, basis.size) });
    }
  }
  if (specs.length === 0) throw new InputError(`no candidate df can be fitted: ${[...skipped.values()][0] ?? 'none given'}`, { file });
  const breaks = unionBreaks(specs.map((s) => s.knots));
  const cellCount = breaks.length - 1;
  const cells = { breaks, cell: new Int32Array(0), t: new Float64Array(0) };
  const size = cellCount * SUMS_PER_CELL;
  const B = bundleCount(n);
  // Pass: the power sums of all rows (y minus its mean, for the fits) and of every bundle (y centred and scaled, for the resamples).
  const all = new Float64Array(size);
  const perBundle = new Float64Array(B * size);
  const bundleWeight = new Float64Array(B);
  const bundleOfRow = (row: number): number => bundleOf(row, seed, B);
  const ct = new Float64Array(2);
  let row = 0;
  await step('power sums of every cell and bundle', (part) => {
    const { x, y, w } = pickRows(part, picked).data;
    for (let i = 0; i < x.length; i++, row++) {
      locate(breaks, x[i] as number, ct);
      const c = ct[0] as number;
      const t = ct[1] as number;
      const yi = y[i] as number;
      const wi = w ? (w[i] as number) : 1;
      accumulateRow(all, c, t, yi - offset, wi);
      const b = bundleOfRow(row);
      accumulateRow(perBundle, b * cellCount + c, t, (yi - ymean) / yscale, wi);
      bundleWeight[b] = (bundleWeight[b] as number) + wi;
    }
  });
  // Every candidate fitted to all rows from the sums, then resampled from the bundles' sums.
  const fitted: (StreamedCandidate & { model: SplineFromSums; fitPoly: Float64Array })[] = [];
  for (const s of specs) {
    const model = new SplineFromSums(cells, s.basis, s.z, `natural spline with df ${s.df}`);
    if (!model.fit(all)) {
      skipped.set(s.df, model.lastError);
      continue;
    }
    fitted.push({ df: s.df, basis: s.basis, z: s.z, knots: s.knots, theta: Float64Array.from(model.theta), cov: model.covariance(), rss: NaN, model, fitPoly: Float64Array.from(model.fitPoly) });
  }
  const count = resample.resamples;
  const C = fitted.length;
  const rmse = fitted.map(() => new Float64Array(count));
  const counts = new Uint32Array(B);
  const train = new Float64Array(size);
  const test = new Float64Array(size);
  for (let r = 0; r < count; r++) {
    if (progress?.cancelled()) throw new CancelledError();
    bundleCounts(B, seed, r, counts);
    combineBundles(perBundle, size, counts, train, test);
    let wTest = 0;
    for (let b = 0; b < B; b++) if (counts[b] === 0) wTest += bundleWeight[b] as number;
    for (let k = 0; k < C; k++) {
      const m = (fitted[k] as (typeof fitted)[number]).model;
      (rmse[k] as Float64Array)[r] = wTest > 0 && m.fit(train) ? yscale * Math.sqrt(m.sse(test) / wTest) : NaN;
    }
  }
  const notes: string[] = [];
  const errors = new Map<number, CandidateResult['errors']>();
  fitted.forEach((f, k) => {
    const s = summarise(rmse[k] as Float64Array);
    const failed = count - s.count;
    if (failed > MAX_FAILED_SHARE * count) {
      skipped.set(f.df, `the resampled training rows could not determine the curve in ${failed} of ${count} resamples (too few distinct x between knots)`);
      return;
    }
    if (failed > 0) notes.push(`df ${f.df}: ${failed} of ${count} resamples could not be fitted and were left out of its mean error.`);
    errors.set(f.df, { rmse: { mean: s.mean, se: s.se, values: s.values } });
  });
  const rule = plan.options.rule;
  const preliminary: CandidateResult[] = dfs.map((df) => (skipped.has(df) || !errors.has(df) ? { df, skipped: skipped.get(df) ?? 'not fitted', errors: {} } : { df, errors: errors.get(df) ?? {} }));
  const chosenDf = selectDf(preliminary, rule, 'rmse').df;
  const kc = fitted.findIndex((f) => f.df === chosenDf);
  const chosenFit = fitted[kc] as (typeof fitted)[number];
  // Last pass: every candidate's residual sum of squares row by row, and the chosen fit's checks.
  const rss = new Float64Array(C);
  const checks = new StreamedChecks();
  const sampleBundles = Math.max(1, Math.floor((B * QQ_SAMPLE_ROWS) / n));
  const buf = new Float64Array(4);
  const p = chosenFit.basis.size;
  const cov = chosenFit.cov;
  const polys = interleaveCubics(
    fitted.map((f) => f.fitPoly),
    cellCount,
    new Float64Array(cellCount * C * 4),
  );
  row = 0;
  await step('residuals and checks of the chosen fit', (part) => {
    const { x, y, w, lines } = pickRows(part, picked).data;
    for (let i = 0; i < x.length; i++, row++) {
      locate(breaks, x[i] as number, ct);
      const c = ct[0] as number;
      const t = ct[1] as number;
      const yc = (y[i] as number) - offset;
      const wi = w ? (w[i] as number) : 1;
      // Every candidate's cubic of this cell side by side, in the arithmetic of the whole read's residual sums.
      let o = c * C * 4;
      let chosenRes = 0;
      for (let k = 0; k < C; k++, o += 4) {
        const f = (polys[o] as number) + t * ((polys[o + 1] as number) + t * ((polys[o + 2] as number) + t * (polys[o + 3] as number)));
        const res = yc - f;
        rss[k] = (rss[k] as number) + wi * res * res;
        if (k === kc) chosenRes = res;
      }
      // The chosen fit's leverage, as the whole read's per-row arrays take it.
      const first = chosenFit.model.basisAt(c, t, buf);
      let h = 0;
      for (let a = 0; a < 4; a++) {
        const off = (first + a) * p + first;
        const s =
          (cov[off] as number) * (buf[0] as number) + (cov[off + 1] as number) * (buf[1] as number) + (cov[off + 2] as number) * (buf[2] as number) + (cov[off + 3] as number) * (buf[3] as number);
        h += (buf[a] as number) * s;
      }
      checks.row(row, lines ? (lines[i] as number) : row + 1, wi, chosenRes, wi * h, bundleOfRow(row) < sampleBundles);
    }
  });
  const streamNote = `The data were streamed from the file in ${pass} passes (about ${Math.round(estimate).toLocaleString('en-US')} MiB held whole, above the memory budget of ${budget.toLocaleString('en-US')} MiB): the knots are the exact quantiles; the errors were resampled by ${formatResampling(resample)}, RMSE only (MAE and the maximum error need every resample's fit at every row); the residual checks are the streamed ones: influential rows among the ${KEPT_EXTREMES.toLocaleString('en-US')} rows of largest Cook's distance, studentized residual and leverage each, the normal plot from a sample of about ${QQ_SAMPLE_ROWS.toLocaleString('en-US')} rows; Shapiro-Wilk, Durbin-Watson, Breusch-Pagan, lack of fit and the row-order check were not run.`;
  const fits = new Map<number, FitResult>();
  fitted.forEach((f, k) => {
    const cand = { ...f, rss: rss[k] as number };
    fits.set(f.df, streamedFit(cand, n, totals, offset, k === kc ? checks.looRmse : NaN, k === kc ? [streamNote] : []));
  });
  const { diagnostics, notes: checkNotes } = checks.finish(fits.get(chosenDf) as FitResult, n);
  // The checks' own notes (a list of influential rows cut short) join the chosen fit's, which the record keeps.
  fits.set(chosenDf, streamedFit({ ...chosenFit, rss: rss[kc] as number }, n, totals, offset, checks.looRmse, [streamNote, ...checkNotes]));
  const chosen = fits.get(chosenDf) as FitResult;
  const candidates: CandidateResult[] = preliminary.map((c) => {
    const f = fits.get(c.df);
    return c.skipped !== undefined || !f ? c : { ...c, aic: f.aic, aicc: f.aicc, bic: f.bic };
  });
  const chosenBy = selectDf(candidates, rule, 'rmse');
  // The explanation says how the errors were resampled, as the record's notes do.
  const how = `The errors were resampled by ${formatResampling(resample)} (the rows dealt into ${B.toLocaleString('en-US')} bundles by a seeded hash of their row number, bundles drawn with replacement, error on the bundles left out), because the file was streamed from disk in passes above the memory budget.`;
  const selected = { ...chosenBy, reason: `${chosenBy.reason} ${how}` };
  const tune = { kind: 'natural-spline' as const, resample, seed, metric: 'rmse' as const, candidates, selected, notes };
  const options = { ...plan.options, resample };
  const streamedPlan: FitPlan = { ...plan, options };
  const empty = { x: new Float64Array(0), y: new Float64Array(0), w: undefined, lines: new Int32Array(0) };
  const analysis: Analysis = { options, n, data: empty, tune, fits, chosen, diagnostics };
  const table = {
    columns,
    values: [],
    lines: new Int32Array(0),
    rowCount: rowsRead,
    format: { delimiter: ',' as const, decimalComma: false, header, bom: false, lineEnding: 'lf' as const },
    problems: [],
    blankLines: 0,
    sha256: (identity as FileIdentity).sha256,
    bytes: (identity as FileIdentity).size,
  };
  const units = { x: picked[0]?.unit, y: picked[1]?.unit, ...(picked[2] ? { weights: picked[2].unit } : {}) };
  const selection: Selection = { data: empty, rejected, labels, units };
  const recordName = names?.record ?? `${basename(file, extname(file))}.fit.json`;
  const deliverables = buildDeliverables({
    previous: source.previous !== undefined ? source.previous : readPreviousRecord(join(outFolder, recordName)),
    plan: streamedPlan,
    ...dataSource(file, outFolder, table),
    selection,
    fitted: empty,
    analysis,
    fit: chosen,
    diagnostics,
    sha256,
    names,
    rows: { used: n, range: Float64Array.of(min, max), negative },
  });
  return { table, selection, fitted: empty, analysis, fit: chosen, diagnostics, deliverables, rowsUsed: n, streamed: { passes: pass, asked: plan.options.resample, resample } };
}
