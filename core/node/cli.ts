/**
 * The `knotwise` command line. `knotwise fit <file.csv> --x <col> --y <col> ...` fits one
 * df or tunes the df by resampling and prints a summary, or one JSON object with --json.
 * Errors go to stderr with exit code 2 and say what and where.
 */
import { parseArgs } from 'node:util';
import { existsSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { analyse } from '../analysis';
import type { Analysis, AnalysisOptions } from '../analysisTypes';
import { diagnose } from '../diagnose';
import { CancelledError, InputError } from '../errors';
import { fitCurve } from '../fit/index';
import { prepareData } from '../fit/prepared';
import { selectColumns } from '../ingest/select';
import { parseDfList, parseFamily, parseResample, parseRule, parseSeed } from '../spec';
import { checkInRange, defaultGrid, gridPoints, parseGrid } from '../table/grid';
import { curveTable } from '../table/curveTable';
import { formatResample } from '../spec';
import { sig } from '../tune/format';
import type { FitResult } from '../types';
import { workerRunner } from './pool';
import { readCsvFile } from './readCsv';
import { VERSION } from '../version';
import { fitRecord } from '../record';
import { curveTableCsv, DEFAULT_DIGITS } from '../table/formatCsv';
import { outputNames, writeDeliverables } from './outputs';

const USAGE = `knotwise ${VERSION}: smooth curves and curve tables from measured CSV data

Usage:
  knotwise fit <file.csv> --x <column> --y <column> [options]

Options:
  --weights <column>        prior weights (positive)
  --model natural|poly|smooth   curve family (default natural)
  --df <k | a,b,c | a..b>   one df (fit as is) or candidates to tune over
  --resample boot:<B> | cv:<K>[x<R>] | loo | gcv   how errors are estimated (default boot:50)
  --rule lowest | 1se | tol:<percent>   how the df is chosen (default 1se)
  --seed <int>              random seed (default 1)
  --holdout <fraction>      rows held out (stratified by x) and checked once at the end
  --grid <start>:<stop>:<count> | <start>:<stop>:step=<h> | data | <x1,x2,...>
  --extrapolate             allow table points outside the data range (flagged)
  --out <folder>            write the curve table (<name>.curve.csv) and fit record (<name>.fit.json) there
  --save                    write them next to the data file
  --digits <n>              significant digits in the table (default 8)
  --force                   replace output files that Knotwise did not write
  --json                    print one JSON object instead of the summary

  knotwise demo [--out <folder>]   fit a bundled example and write its outputs (default ./knotwise-demo)
  --help                    this text`;

/** Options of `knotwise fit`, parsed. */
interface FitArgs {
  readonly file: string;
  readonly x: string;
  readonly y: string;
  readonly weights?: string | undefined;
  readonly json: boolean;
  readonly tune: boolean;
  readonly options: AnalysisOptions;
  readonly grid?: string | undefined;
  readonly extrapolate: boolean;
  readonly out?: string | undefined;
  readonly digits: number;
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
      digits: { type: 'string' },
      force: { type: 'boolean' },
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
  return {
    file,
    x: values.x,
    y: values.y,
    weights: values.weights,
    json: values.json === true,
    tune,
    grid: values.grid,
    extrapolate: values.extrapolate === true,
    out: values.out ?? (values.save ? dirname(file) : undefined),
    digits: parseDigits(values.digits ?? String(DEFAULT_DIGITS)),
    force: values.force === true,
    options: {
      family: parseFamily(values.model ?? 'natural'),
      candidates: dfs,
      resample: parseResample(values.resample ?? 'boot:50'),
      rule: parseRule(values.rule ?? '1se'),
      seed: parseSeed(values.seed ?? '1'),
      holdout,
    },
  };
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

/**
 * Errors raised while fitting know the row but not the file, and name the columns by role
 * (x, y, weights): give them the file and the CSV's own column names.
 */
function placed(e: unknown, file: string, labels: { readonly x: string; readonly y: string; readonly weights?: string }): unknown {
  if (!(e instanceof InputError) || e.place.file !== undefined) return e;
  const role = e.place.column;
  const column = role === 'x' ? labels.x : role === 'y' ? labels.y : role === 'weights' ? labels.weights : role;
  return new InputError(e.message, { file, line: e.place.line, column });
}

async function runFit(argv: string[]): Promise<number> {
  const args = parseFitArgs(argv);
  const table = await readCsvFile(args.file);
  const sel = selectColumns(table, { x: args.x, y: args.y, weights: args.weights }, args.file);
  let fit: FitResult;
  let analysis: Analysis | undefined;
  try {
    if (args.tune) {
      analysis = await analyse(sel.data, args.options, workerRunner());
      fit = analysis.chosen;
    } else {
      fit = fitCurve(sel.data, { family: args.options.family, df: (args.options.candidates as number[])[0] as number });
    }
  } catch (e) {
    throw placed(e, args.file, sel.labels);
  }
  const diagnostics = analysis ? analysis.diagnostics : diagnose(sel.data, fit);
  const sorted = prepareData(sel.data).sortedX;
  const grid = args.grid ? parseGrid(args.grid) : defaultGrid(sorted);
  const points = gridPoints(grid, sorted);
  const outside = checkInRange(points, fit.curve.lower, fit.curve.upper, args.extrapolate);
  const tableOut = curveTable(fit, points);
  let written: { table: string; record: string } | undefined;
  if (args.out !== undefined) {
    const tableText = curveTableCsv(tableOut, args.digits);
    written = writeDeliverables(args.out, args.file, {
      table: tableText,
      record: (tableSha) =>
        JSON.stringify(
          fitRecord({
            dataFile: basename(args.file),
            dataSha256: table.sha256,
            columns: sel.labels,
            rowsRead: table.rowCount,
            rowsUsed: sel.data.x.length,
            rejected: sel.rejected,
            family: args.options.family,
            analysis,
            fit,
            diagnostics,
            grid,
            digits: args.digits,
            extrapolate: args.extrapolate,
            tableFile: outputNames(args.file).table,
            tableSha256: tableSha,
          }),
          null,
          2,
        ) + '\n',
    }, args.force);
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
      fit: fitJson(fit),
      table: { columns: tableOut.columns, rows: tableOut.rows.map((r) => r.map(finite)), extrapolatedPoints: outside },
      diagnostics,
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
    for (const note of fit.notes) lines.push(`Note: ${note}`);
    for (const w of diagnostics.warnings) lines.push(`Warning: ${w}`);
    if (outside) lines.push(`Warning: ${outside} table point(s) are extrapolated beyond the data range.`);
    if (written) lines.push(`Wrote ${written.table}`, `Wrote ${written.record}`);
    lines.push('Caution: an empirical fit is not a certified calibration; safety-related use must follow the applicable standards and qualified review.');
    process.stdout.write(lines.join('\n') + '\n');
  }
  return 0;
}

/** Fits the bundled humidity-sensor example (invented data) and writes its deliverables. */
async function runDemo(argv: string[]): Promise<number> {
  const { values } = parseArgs({ args: argv, options: { out: { type: 'string' } } });
  const example = [join(__dirname, '..', 'examples'), join(__dirname, '..', '..', 'examples'), resolve('examples')].map((d) => join(d, 'humidity-sensor.csv')).find((f) => existsSync(f));
  if (!example) throw new InputError('the bundled example examples/humidity-sensor.csv was not found');
  const out = resolve(values.out ?? 'knotwise-demo');
  process.stdout.write(`Demo: invented humidity-sensor calibration data (${example})\n`);
  return runFit([example, '--x', 'reference_rh', '--y', 'sensor_output', '--resample', 'cv:10x5', '--rule', '1se', '--grid', '10:92.5:step=2.5', '--out', out]);
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
