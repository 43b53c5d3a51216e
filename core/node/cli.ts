/**
 * The `knotwise` command line. `knotwise fit <file.csv> --x <col> --y <col> ...` fits one
 * df or tunes the df by resampling and prints a summary, or one JSON object with --json.
 * Errors go to stderr with exit code 2 and say what and where.
 */
import { parseArgs } from 'node:util';
import { existsSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import type { AnalysisOptions } from '../analysisTypes';
import { parseEmit } from '../emit/index';
import { CancelledError, InputError } from '../errors';
import type { FitPlan, OutputOptions } from '../plan';
import { CAUTION } from '../record';
import { parseDfList, parseFamily, parseResample, parseRule, parseSeed } from '../spec';
import { parseColumns } from '../table/columns';
import { parseGrid } from '../table/grid';
import { formatResample } from '../spec';
import { sig } from '../tune/format';
import { isPlainModel, parseOutcome, resolveModel } from '../fit/model';
import { modelReportJson, modelSpecJson } from '../fit/modelJson';
import { parseShapeList } from '../fit/shape';
import { MAX_SHAPED_SMOOTHING_DISTINCT } from '../fit/shapedSmoothing';
import type { FitResult, ModelOptions } from '../types';
import { VERSION } from '../version';
import { DEFAULT_DIGITS } from '../table/formatCsv';
import { runCheck } from './check';
import { writeOutputs } from './outputs';
import { runPipeline } from './pipeline';

const USAGE = `knotwise ${VERSION}: smooth curves and curve tables from measured CSV data

Usage:
  knotwise fit <file.csv> --x <column> --y <column> [options]

Options:
  --weights <column>        prior weights (positive)
  --family gaussian|poisson|binomial   outcome: least squares (default), counts (log link),
                            proportions or 0/1 outcomes (logit link); fitted by IRLS
  --trials <column>         binomial: number of trials per row (y is then the successes)
  --shape <list>            comma list of increasing, decreasing, nonnegative, convex, concave:
                            guaranteed everywhere in the data range (natural spline; smoothing
                            spline up to ${MAX_SHAPED_SMOOTHING_DISTINCT} distinct x)
  --robust                  Huber M-estimation (k = 1.345), down-weighted rows listed by line
  --huber-k <k>             Huber tuning constant (implies --robust)
  --model natural|poly|smooth   curve family (default natural)
  --df <k | a,b,c | a..b>   one df (fit as is) or candidates to tune over
  --resample boot:<B> | cv:<K>[x<R>] | loo | gcv   how errors are estimated (default boot:50)
  --rule lowest | 1se | tol:<percent> | df:<k>   how the df is chosen (default 1se; df:<k> picks a candidate by hand)
  --seed <int>              random seed (default 1)
  --holdout <fraction>      rows held out (stratified by x) and checked once at the end
  --grid <start>:<stop>:<count> | <start>:<stop>:step=<h> | data | <x1,x2,...>
         | auto:<tolerance> | <start>:<stop>:auto=<tolerance>
                            table grid; auto: the coarsest even step at which linear
                            interpolation stays within the tolerance (units of y) of the curve
  --extrapolate             allow table points outside the data range (flagged)
  --columns <x,fit,se,...>  table columns (default all: x,fit,se,ciLower,ciUpper,piLower,piUpper,extrapolated)
  --nonnegative             the quantity cannot be negative: flag rows where the curve is below zero
  --out <folder>            write the curve table (<name>.curve.csv) and fit record (<name>.fit.json) there
                            (default: next to the data file)
  --save                    write them next to the data file (the default, for scripts that say so)
  --print-only              write no files, only print
  --emit c,ts,json          also write code: C header (<name>.curve.h), TypeScript (<name>.curve.ts), JSON (<name>.curve.json)
  --report                  also write a review report (<name>.report.md with SVG figures)
  --digits <n>              significant digits in the table (default 8)
  --force                   replace output files that Knotwise did not write
  --json                    print one JSON object instead of the summary

  knotwise check [<record.fit.json> | <folder> ...]
                            rebuild each recorded table from its data and compare: exit 0 when
                            current, 1 when data or outputs changed, 2 on error; no argument:
                            every *.fit.json under the current folder
  knotwise demo [--out <folder>]   fit a bundled example and write its outputs (default ./knotwise-demo)
  --help                    this text`;

/** Options of `knotwise fit`, parsed. */
interface FitArgs {
  readonly file: string;
  readonly x: string;
  readonly y: string;
  readonly weights?: string | undefined;
  /** Binomial outcome: column with the number of trials of each row. */
  readonly trials?: string | undefined;
  readonly json: boolean;
  readonly tune: boolean;
  readonly options: AnalysisOptions;
  /** Table grid and format, emitters, report (see core/plan.ts). */
  readonly output: OutputOptions;
  readonly out?: string | undefined;
  readonly force: boolean;
}

function parseFitArgs(argv: string[]): FitArgs {
  const { values, positionals } = parseArgs({
    args: argv,
    allowPositionals: true,
    options: {
      x: { type: 'string' },
      y: { type: 'string' },
      weights: { type: 'string' },
      family: { type: 'string' },
      trials: { type: 'string' },
      shape: { type: 'string' },
      robust: { type: 'boolean' },
      'huber-k': { type: 'string' },
      model: { type: 'string' },
      df: { type: 'string' },
      resample: { type: 'string' },
      rule: { type: 'string' },
      seed: { type: 'string' },
      holdout: { type: 'string' },
      grid: { type: 'string' },
      extrapolate: { type: 'boolean' },
      json: { type: 'boolean' },
      out: { type: 'string' },
      save: { type: 'boolean' },
      'print-only': { type: 'boolean' },
      digits: { type: 'string' },
      force: { type: 'boolean' },
      columns: { type: 'string' },
      nonnegative: { type: 'boolean' },
      emit: { type: 'string' },
      report: { type: 'boolean' },
    },
  });
  const file = positionals[0];
  if (!file) throw new InputError('no data file given: knotwise fit <file.csv> --x <column> --y <column>');
  if (positionals.length > 1) throw new InputError(`unexpected argument "${positionals[1]}"`);
  if (!values.x || !values.y) throw new InputError('both --x and --y columns are required');
  const dfs = values.df !== undefined ? parseDfList(values.df) : undefined;
  const tune = !(dfs && dfs.length === 1 && values.resample === undefined && values.rule === undefined && values.holdout === undefined);
  const holdout = values.holdout !== undefined ? Number(values.holdout) : undefined;
  if (holdout !== undefined && !(holdout > 0 && holdout <= 0.5)) throw new InputError(`--holdout must be a fraction above 0 and at most 0.5; got "${values.holdout}"`);
  const model = parseModelFlags(values);
  return {
    file,
    x: values.x,
    y: values.y,
    weights: values.weights,
    trials: values.trials,
    json: values.json === true,
    tune,
    output: {
      grid: values.grid !== undefined ? parseGrid(values.grid) : undefined,
      extrapolate: values.extrapolate === true,
      digits: parseDigits(values.digits ?? String(DEFAULT_DIGITS)),
      columns: values.columns !== undefined ? parseColumns(values.columns) : undefined,
      nonnegative: values.nonnegative === true,
      emit: values.emit !== undefined ? parseEmit(values.emit) : [],
      report: values.report === true,
    },
    // Outputs go next to the data unless --out names a folder or --print-only asks for none.
    out: values['print-only'] === true ? undefined : (values.out ?? dirname(file)),
    force: values.force === true,
    options: {
      family: parseFamily(values.model ?? 'natural'),
      candidates: dfs,
      resample: parseResample(values.resample ?? 'boot:50'),
      rule: parseRule(values.rule ?? '1se'),
      seed: parseSeed(values.seed ?? '1'),
      holdout,
      ...model,
    },
  };
}

/** --family, --trials, --shape, --robust, --huber-k as model options (checked against --model). */
function parseModelFlags(values: { family?: string | undefined; trials?: string | undefined; shape?: string | undefined; robust?: boolean | undefined; 'huber-k'?: string | undefined; model?: string | undefined }): ModelOptions {
  const outcome = values.family !== undefined ? parseOutcome(values.family) : undefined;
  if (values.trials !== undefined && outcome !== 'binomial') throw new InputError('--trials needs --family binomial');
  let robust: ModelOptions['robust'];
  if (values['huber-k'] !== undefined) {
    const k = Number(values['huber-k']);
    if (!(k > 0) || !Number.isFinite(k)) throw new InputError(`--huber-k must be a positive number; got "${values['huber-k']}"`);
    robust = { k };
  } else if (values.robust === true) robust = true;
  const options: ModelOptions = {
    ...(outcome !== undefined ? { outcome } : {}),
    ...(values.shape !== undefined ? { shape: parseShapeList(values.shape) } : {}),
    ...(robust !== undefined ? { robust } : {}),
  };
  resolveModel(parseFamily(values.model ?? 'natural'), options);
  return options;
}

function parseDigits(text: string): number {
  const v = Number(text);
  if (!Number.isInteger(v) || v < 3 || v > 17) throw new InputError(`--digits must be a whole number from 3 to 17; got "${text}"`);
  return v;
}

/** Numbers as JSON allows them: non-finite values become null. */
function finite(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

function fitJson(fit: FitResult): Record<string, unknown> {
  const arr = (a: Float64Array): (number | null)[] => Array.from(a, finite);
  return {
    family: fit.family,
    df: fit.df,
    n: fit.n,
    residualDf: fit.residualDf,
    knots: Array.from(fit.knots),
    coefficients: arr(fit.coefficients),
    ...(fit.lambda !== undefined ? { lambda: fit.lambda } : {}),
    sigma: finite(fit.sigma),
    r2: finite(fit.r2),
    logLik: finite(fit.logLik),
    aic: finite(fit.aic),
    aicc: finite(fit.aicc),
    bic: finite(fit.bic),
    looRmse: finite(fit.looRmse),
    gcv: finite(fit.gcv),
    notes: fit.notes,
    fitted: arr(fit.fitted),
    residuals: arr(fit.residuals),
    leverage: arr(fit.leverage),
    cooksDistance: arr(fit.cooksDistance),
  };
}

async function runFit(argv: string[]): Promise<number> {
  const args = parseFitArgs(argv);
  if (args.out === undefined && (args.output.emit.length > 0 || args.output.report)) {
    throw new InputError('--emit and --report write files: drop --print-only');
  }
  const plan: FitPlan = { columns: { x: args.x, y: args.y, weights: args.weights }, tune: args.tune, options: args.options, output: args.output, ...(args.trials !== undefined ? { trials: args.trials } : {}) };
  const run = await runPipeline(args.file, plan, args.out ?? dirname(args.file));
  const { table, selection: sel, analysis, fit, diagnostics, deliverables } = run;
  const tableOut = deliverables.table;
  const outside = deliverables.summary.extrapolated.length;
  let written: { table: string; record: string; files: string[] } | undefined;
  if (args.out !== undefined) {
    const files = writeOutputs(args.out, deliverables.files, args.file, args.force);
    written = { table: files[0] as string, record: files[files.length - 1] as string, files };
  }
  if (args.json) {
    const out: Record<string, unknown> = {
      knotwise: VERSION,
      data: {
        file: basename(args.file),
        sha256: table.sha256,
        columns: sel.labels,
        units: sel.units,
        rowsRead: table.rowCount,
        rowsUsed: sel.data.x.length,
        rejected: sel.rejected,
      },
      model: modelSpecJson(args.options, args.trials),
      fit: { ...fitJson(fit), model: modelReportJson(fit.model) },
      table: {
        columns: tableOut.columns,
        rows: tableOut.rows.map((r) => r.map(finite)),
        extrapolatedPoints: outside,
        grid: deliverables.summary.grid,
        interpolation: deliverables.summary.interpolation,
        negativePoints: deliverables.summary.negative === null ? null : deliverables.summary.negative.length,
      },
      diagnostics,
      warnings: deliverables.warnings,
      regenerate: deliverables.regenerate,
      caution: CAUTION,
    };
    if (written) out.written = written;
    if (analysis) {
      const t = analysis.tune;
      out.tuning = { family: t.family, resample: formatResample(t.resample), seed: t.seed, metric: t.metric, rowsTuned: analysis.n, notes: t.notes };
      out.candidates = t.candidates.map((c) => ({ ...c, errors: Object.fromEntries(Object.entries(c.errors).map(([k, e]) => [k, { mean: finite(e.mean), se: finite(e.se), values: e.values.map(finite) }])) }));
      out.selected = { df: t.selected.df, rule: t.selected.rule, metric: t.selected.metric, reason: t.selected.reason, threshold: t.selected.threshold ?? null, alternatives: t.selected.alternatives };
      if (t.holdout) out.holdout = t.holdout;
    }
    process.stdout.write(JSON.stringify(out) + '\n');
  } else {
    const lines = [
      `${basename(args.file)}: ${sel.data.x.length} rows used, ${sel.rejected.length} rejected`,
      ...sel.rejected.slice(0, 10).map((r) => `  line ${r.line}${r.column ? ` (${r.column})` : ''}: ${r.reason}`),
      ...(sel.rejected.length > 10 ? [`  ... and ${sel.rejected.length - 10} more`] : []),
    ];
    if (analysis) {
      lines.push(`Tuning (${formatResample(analysis.tune.resample)}, seed ${analysis.tune.seed}):`);
      for (const c of analysis.tune.candidates) {
        const e = c.errors[analysis.tune.metric];
        lines.push(c.skipped ? `  df ${c.df}: skipped - ${c.skipped}` : `  df ${c.df}: ${analysis.tune.metric} ${sig(e?.mean ?? NaN)} (SE ${sig(e?.se ?? NaN, 2)})`);
      }
      lines.push(analysis.tune.selected.reason);
      if (analysis.tune.holdout) lines.push(`Held-out rows: ${analysis.tune.holdout.rows}, RMSE ${sig(analysis.tune.holdout.rmse)}${analysis.tune.holdout.warning ? ` - ${analysis.tune.holdout.warning}` : ''}`);
    }
    lines.push(`Fit: ${fit.family} df ${sig(fit.df, 4)}, sigma ${sig(fit.sigma)}, R² ${sig(fit.r2, 4)}, LOO RMSE ${sig(fit.looRmse)}, GCV ${sig(fit.gcv)}`);
    if (!isPlainModel(args.options)) lines.push(modelLine(fit, args.trials));
    for (const note of fit.notes) lines.push(`Note: ${note}`);
    const ip = deliverables.summary.interpolation;
    lines.push(
      `Table: ${deliverables.summary.points} rows` +
        (ip ? `; linear interpolation between rows stays within ${sig(ip.maxError)} of the curve${ip.tolerance !== null ? ` (automatic step ${sig(ip.step ?? NaN, 6)}, tolerance ${sig(ip.tolerance)})` : ''}` : ''),
    );
    for (const w of deliverables.warnings) lines.push(`Warning: ${w}`);
    if (written) for (const f of written.files) lines.push(`Wrote ${f}`);
    lines.push(`Caution: ${CAUTION}`);
    process.stdout.write(lines.join('\n') + '\n');
  }
  return 0;
}

/** One summary line on the outcome family, shape and robust fitting of a fit, with down-weighted rows by line. */
function modelLine(fit: FitResult, trials: string | undefined): string {
  const m = fit.model;
  if (!m) return 'Model: Gaussian outcome, least squares';
  const parts = [`${m.outcome} outcome (${m.link} link)${trials !== undefined ? `, trials from column "${trials}"` : ''}`];
  if (m.glm) parts.push(`deviance ${sig(m.glm.deviance)} (null ${sig(m.glm.nullDeviance)}), Pearson dispersion ${sig(m.glm.dispersion)}`);
  if (m.constraints) parts.push(`shape ${m.shape.join(' + ')}: ${m.constraints.active} of ${m.constraints.total} constraints active`);
  if (m.robust) {
    const rows = m.robust.downweighted.rows;
    parts.push(`Huber k = ${m.robust.k}, scale ${sig(m.robust.scale)}, ${m.robust.downweighted.total} rows down-weighted` + (rows.length ? ` (lines ${rows.slice(0, 10).map((r) => `${r.line}: ${sig(r.weight, 2)}`).join(', ')}${m.robust.downweighted.total > 10 ? ', ...' : ''})` : ''));
  }
  if (!m.converged) parts.push('NOT CONVERGED');
  return `Model: ${parts.join('; ')}`;
}

/** Fits the bundled humidity-sensor example (invented data) and writes its deliverables. */
async function runDemo(argv: string[]): Promise<number> {
  const { values } = parseArgs({ args: argv, options: { out: { type: 'string' } } });
  const example = [join(__dirname, '..', 'examples'), join(__dirname, '..', '..', 'examples'), resolve('examples')].map((d) => join(d, 'humidity-sensor.csv')).find((f) => existsSync(f));
  if (!example) throw new InputError('the bundled example examples/humidity-sensor.csv was not found');
  const out = resolve(values.out ?? 'knotwise-demo');
  process.stdout.write(`Demo: invented humidity-sensor calibration data (${example})\n`);
  const code = await runFit([example, '--x', 'reference_rh', '--y', 'sensor_output', '--resample', 'cv:10x5', '--rule', '1se', '--grid', '10:94:step=2', '--nonnegative', '--emit', 'c,ts,json', '--report', '--out', out]);
  process.stdout.write(`Outputs are in ${out}: open ${join(out, 'humidity-sensor.report.md')} for the review report; check them with: knotwise check ${out}\n`);
  return code;
}

/** Runs the command line; returns the exit code. */
export async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case 'fit':
        return await runFit(rest);
      case 'demo':
        return await runDemo(rest);
      case 'check':
        return await runCheck(rest);
      case undefined:
      case '--help':
      case '-h':
      case 'help':
        process.stdout.write(USAGE + '\n');
        return command === undefined ? 2 : 0;
      case '--version':
        process.stdout.write(VERSION + '\n');
        return 0;
      default:
        throw new InputError(`unknown command "${command}"; run knotwise --help`);
    }
  } catch (e) {
    if (e instanceof InputError) {
      process.stderr.write(`knotwise: ${e.describe()}\n`);
      return 2;
    }
    if (e instanceof CancelledError) {
      process.stderr.write('knotwise: cancelled\n');
      return 2;
    }
    if (e instanceof TypeError && (e as { code?: string }).code?.startsWith('ERR_PARSE_ARGS')) {
      process.stderr.write(`knotwise: ${e.message}\n`);
      return 2;
    }
    process.stderr.write(`knotwise: internal error: ${(e as Error).stack ?? String(e)}\n`);
    return 3;
  }
}

if (require.main === module) {
  void main(process.argv.slice(2)).then((code) => {
    process.exitCode = code;
  });
}
