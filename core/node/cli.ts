/**
 * The `knotwise` command line. `knotwise fit <file.csv> --x <col> --y <col> ...` fits one
 * df or tunes the df by resampling and prints a summary, or one JSON object with --json.
 * Every command's options are declared once in a table (core/node/args.ts) that drives
 * parsing, defaults and `--help`; accepted values and limits come from the registries.
 * Errors go to stderr with exit code 2 and say what and where.
 */
import { existsSync, statSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import type { AnalysisOptions } from '../analysis/types';
import { EMIT_KINDS, emitName, parseEmit } from '../emit/index';
import { CancelledError, InputError, isAllocationFailure } from '../errors';
import type { FitPlan, OutputOptions } from '../outputs/plan';
import { CAUTION } from '../outputs/record';
import { MAX_CANDIDATES, parseDfList, parseSeed } from '../tune/candidates';
import { parseColumns } from '../table/columns';
import { OPTIONAL_COLUMNS, TABLE_COLUMNS } from '../table/curveTable';
import { DEFAULT_GRID_COUNT, MAX_GRID_POINTS, parseGrid } from '../table/grid';
import { metricLabel, sig } from '../tune/format';
import { DEFAULT_TOLERANCE_PERCENT, errorPlace } from '../tune/rules';
import { atPlace } from '../words/numbers';
import { checkViews } from '../view/words';
import { dispersionNumbers } from '../words/checks';
import { isPlainModel, MAX_HUBER_K } from '../fit/model';
import { modelReportJson, modelSpecJson } from '../fit/modelJson';
import { HUBER_K } from '../fit/robust';
import { parseShapeList, SHAPES } from '../fit/shape';
import { MAX_SHAPED_SMOOTHING_DISTINCT } from '../fit/shapedSmoothing';
import type { FitResult, ModelOptions } from '../types';
import { VERSION } from '../version';
import { DEFAULT_DIGITS } from '../table/formatCsv';
import { inverseWords } from '../calibrate/inverseOutput';
import type { GroupSpec } from '../groups/spec';
import { runGroupFit } from './groupFit';
import { SURFACE_OPTIONS, surfaceArgsOf } from './surfaceOptions';
import { runSurfaceFit } from './surfaceFit';
import { checkInverse, CLI_INVERSE_NAMES, INVERSE_DEFAULT_POINTS, INVERSE_LIMITS, type InverseSpec } from '../calibrate/spec';
import { curveKinds, DEFAULT_CURVE, parseCurve, resolveModel } from '../registry/curves/index';
import { DEFAULT_OUTCOME, OUTCOME_LIST, outcomeKind, parseOutcome } from '../registry/outcomes/index';
import { DEFAULT_RESAMPLING, formatResampling, parseResampling, RESAMPLING_LIST, resamplingScheme } from '../registry/resampling/index';
import { DEFAULT_RULE, MAX_TOLERANCE_PERCENT, parseRule, RULE_LIST } from '../registry/rules/index';
import { type CommandSpec, defineCommand, formatHelp, nearest, parseCommand } from './args';
import { CHECK_COMMAND, runCheck } from './check';
import { COMPARE_COMMAND, runCompare } from './compareRecords';
import { writeOutputs } from './outputs';
import { checkOutputFolder, checkOutputNames, terminalText } from './outputTargets';
import { readableWhole, runPipeline } from './pipeline';
import { startWorkersEarly } from './pool';
import { availableParallelism } from 'node:os';
import { type Clock, ProgressLine, type ProgressStream } from './progress';
import { DEFAULT_MEMORY_BUDGET, MEMORY_BUDGET_LIMITS, parseMemoryBudget } from '../stream/budget';

/** Data files from this size up start their resampling workers before reading (about 50,000 rows of two columns). */
const EARLY_WORKERS_BYTES = 1 << 20;

/** The size of a file in bytes, or 0 when it cannot be read (reading it reports why). */
function fileSize(file: string): number {
  try {
    return statSync(file).size;
  } catch {
    return 0;
  }
}

/** Fewest and most significant digits of the table. */
const DIGITS = { min: 3, max: 17 } as const;
/** Largest held-out fraction. */
const MAX_HOLDOUT = 0.5;
/** The data file argument that reads standard input, and how messages name it. */
export const STDIN_ARG = '-';
const STDIN_NAME = 'standard input';

/** Limits of the resampling schemes in words, from the registry: "resamples 2 to 5000; folds 2 to 100; ...". */
function resamplingLimits(): string {
  return RESAMPLING_LIST.flatMap((s) => Object.entries(s.limits).map(([name, l]) => `${name} ${l.min} to ${l.max}`)).join('; ');
}

/** The curve kinds that take an option, from the registry. */
function kindsWith(test: (k: ReturnType<typeof curveKinds>[number]) => boolean): string {
  return curveKinds()
    .filter(test)
    .map((k) => k.id)
    .join(', ');
}

/** The table of `knotwise fit` (built on use, so curve kinds registered later are listed). */
function fitCommand() {
  const allCurves = curveKinds().length;
  return defineCommand({
    name: 'fit',
    summary: 'fit a curve to CSV data, tune its df by resampling, and write its curve table and fit record',
    usage: ['fit <file.csv> --x <column> --y <column> [options]', 'fit - --x <column> --y <column> --print-only [options]'],
    operands: { min: 1, max: 1, name: 'data file', missing: 'no data file given: knotwise fit <file.csv> --x <column> --y <column> (or - for standard input)' },
    options: [
      { group: 'Data', name: 'x', value: 'column', help: 'the column of the input quantity, by header text or label', required: true },
      { group: 'Data', name: 'y', value: 'column', help: 'the column of the readings, by header text or label', required: true, requiredUnless: 'channels' },
      SURFACE_OPTIONS.x2,
      { group: 'Data', name: 'weights', value: 'column', help: 'prior weights of the rows, positive', defaultText: 'every row weighs 1' },
      { group: 'Data', name: 'trials', value: 'column', help: 'with --outcome proportions: the number of trials of each row; --y then holds the successes' },
      {
        group: 'Data',
        name: 'memory-budget',
        value: 'MiB',
        help: 'memory the data may take held whole; a larger file is streamed from disk in passes (natural spline, continuous readings; bootstrap resampling then runs as bundles)',
        default: String(DEFAULT_MEMORY_BUDGET),
        limits: `a whole number from ${MEMORY_BUDGET_LIMITS.min} to ${MEMORY_BUDGET_LIMITS.max}`,
      },
      {
        group: 'Groups',
        name: 'per',
        value: 'column',
        help: 'split the rows by this column (a device, lot or channel name in each row) and tune and fit each group; rows with an empty group cell are rejected',
      },
      {
        group: 'Groups',
        name: 'channels',
        value: 'list',
        help: 'several reading columns against the same x (comma list), each tuned and fitted as a group of its own; replaces --y',
      },
      { group: 'Groups', name: 'shared-df', help: 'one df for all groups, chosen by the rule from their pooled resampled RMSE (resampling within each group); otherwise each group chooses its own' },
      { group: 'Groups', name: 'long-table', help: 'write one table <name>.groups.curve.csv with a leading group column instead of a table per group' },
      {
        group: 'Curve',
        name: 'curve',
        value: 'kind',
        help: 'the kind of curve',
        default: DEFAULT_CURVE,
        choices: curveKinds().map((k) => ({ value: k.id, help: k.description })),
      },
      {
        group: 'Curve',
        name: 'outcome',
        value: 'readings',
        help: 'what the readings are',
        default: DEFAULT_OUTCOME,
        choices: OUTCOME_LIST.map((o) => {
          const kinds = curveKinds().filter((k) => k.supports.outcomes.includes(o.id));
          return { value: o.id, help: o.description + (kinds.length < allCurves ? ` (curves: ${kinds.map((k) => k.id).join(', ')})` : '') };
        }),
      },
      {
        group: 'Curve',
        name: 'shape',
        value: 'list',
        help: `comma list of shapes the curve keeps everywhere in the data range: ${SHAPES.join(', ')}`,
        defaultText: 'no constraint',
        limits: `curves ${kindsWith((k) => k.supports.shapes)}; the smoothing spline up to ${MAX_SHAPED_SMOOTHING_DISTINCT} distinct x`,
      },
      {
        group: 'Curve',
        name: 'robust',
        help: `robust fitting (Huber M-estimation, k = ${HUBER_K}): rows far from the curve are down-weighted and listed by line`,
        limits: `curves ${kindsWith((k) => k.supports.robust)}; continuous readings only`,
      },
      { group: 'Curve', name: 'robust-k', value: 'k', help: "the robust fit's tuning constant; implies --robust", defaultText: `${HUBER_K} with --robust`, limits: `above 0, at most ${MAX_HUBER_K}` },
      {
        group: 'Tuning',
        name: 'df',
        value: 'df',
        help: 'one df, fitted as is (k), or the candidates to tune over (a,b,c or a..b); with --x2 the same for both inputs, or <list>x<list> per input (5x4 fits that pair as is)',
        defaultText: "the curve kind's candidates for the data",
        limits: `each at least 1; at most ${MAX_CANDIDATES} candidates`,
      },
      {
        group: 'Tuning',
        name: 'resampling',
        value: 'scheme',
        help: 'how the error of each candidate df is estimated',
        default: DEFAULT_RESAMPLING,
        choices: RESAMPLING_LIST.map((s) => ({ value: s.syntax, help: s.description })),
        limits: resamplingLimits(),
      },
      {
        group: 'Tuning',
        name: 'rule',
        value: 'rule',
        help: 'how the df is chosen from the candidates',
        default: DEFAULT_RULE,
        choices: RULE_LIST.map((r) => ({ value: r.syntax, help: r.description })),
        limits: `percent 0 to ${MAX_TOLERANCE_PERCENT}`,
      },
      { group: 'Tuning', name: 'seed', value: 'n', help: 'seed of the resampling; part of the result', default: '1', limits: 'a whole number' },
      {
        group: 'Tuning',
        name: 'holdout',
        value: 'fraction',
        help: 'rows held out first (stratified by x) and used once at the end',
        defaultText: 'no rows held out',
        limits: `above 0, at most ${MAX_HOLDOUT}`,
      },
      {
        group: 'Table',
        name: 'grid',
        value: 'grid',
        help: 'where the curve table is evaluated',
        defaultText: `${DEFAULT_GRID_COUNT} points over the data range`,
        choices: [
          { value: '<start>:<stop>:count=<n>', help: 'n evenly spaced points from start to stop' },
          { value: '<start>:<stop>:step=<h>', help: 'from start in steps of h up to stop' },
          { value: 'auto:<tolerance>', help: 'the coarsest even step over the data range at which straight lines between rows stay within the tolerance (units of y) of the curve' },
          { value: '<start>:<stop>:auto=<tolerance>', help: 'the same over a range of your choice' },
          { value: 'data', help: 'the distinct x of the data' },
          { value: '<x1>,<x2>,...', help: 'a list of x values' },
        ],
        limits: `at most ${MAX_GRID_POINTS} points`,
      },
      SURFACE_OPTIONS.grid2,
      { group: 'Table', name: 'extrapolate', help: 'allow table points outside the data range (surfaces: nodes the readings do not reach); they are flagged' },
      SURFACE_OPTIONS.reach,
      {
        group: 'Table',
        name: 'columns',
        value: 'list',
        help: 'table columns, in the order given; x is required, and a flag column that flags a row is always kept',
        defaultText: TABLE_COLUMNS.join(','),
        limits: `any of ${[...TABLE_COLUMNS, ...OPTIONAL_COLUMNS].join(', ')}`,
      },
      { group: 'Table', name: 'flag-negative', help: 'the quantity cannot be negative: flag table rows where the curve is below zero; --shape nonnegative constrains the curve instead' },
      { group: 'Table', name: 'digits', value: 'n', help: 'significant digits of the table values', default: String(DEFAULT_DIGITS), limits: `${DIGITS.min} to ${DIGITS.max}` },
      {
        group: 'Inverse table',
        name: 'inverse',
        help: 'also write <name>.inverse.csv: from a reading back to the quantity x, with 95 % inverse-prediction intervals; the curve must rise or fall throughout the data range',
      },
      {
        group: 'Inverse table',
        name: 'inverse-grid',
        value: 'grid',
        help: 'readings at which the inverse table is evaluated, in the forms of --grid (in units of y); auto:<tolerance> takes the tolerance in units of x; implies --inverse',
        defaultText: `${INVERSE_DEFAULT_POINTS} points over the readings the curve reaches`,
      },
      {
        group: 'Inverse table',
        name: 'readings-averaged',
        value: 'm',
        help: 'each reading to invert is the mean of m readings; implies --inverse',
        default: '1',
        limits: `${INVERSE_LIMITS.readingsAveraged.min} to ${INVERSE_LIMITS.readingsAveraged.max}`,
      },
      {
        group: 'Inverse table',
        name: 'reference-uncertainty',
        value: 'u',
        help: 'standard uncertainty of the reference values of x, in units of x; widens the intervals (implies --inverse)',
        default: '0',
      },
      {
        group: 'Inverse table',
        name: 'max-interval-width',
        value: 'width',
        help: 'flag inverse-table rows whose interval is wider than this, in units of x (implies --inverse)',
        defaultText: 'none flagged',
      },
      {
        group: 'Files',
        name: 'out',
        value: 'folder',
        help: 'write the curve table <name>.curve.csv and the fit record <name>.fit.json (and what --emit and --report ask for) into this folder',
        defaultText: "the data file's folder",
      },
      { group: 'Files', name: 'save', help: 'write them next to the data file, as without --out; for scripts that say so' },
      { group: 'Files', name: 'print-only', help: 'write no files, only print' },
      {
        group: 'Files',
        name: 'emit',
        value: 'list',
        help: 'also write the table as code (comma list)',
        defaultText: 'no code',
        choices: EMIT_KINDS.map((k) => ({ value: k, help: emitName(k, '<name>') })),
      },
      { group: 'Files', name: 'report', help: 'also write a review report <name>.report.md with SVG figures' },
      { group: 'Files', name: 'force', help: 'replace output files that Knotwise did not write' },
      { group: 'Printing', name: 'json', help: 'print one JSON object instead of the summary' },
      { group: 'Printing', name: 'quiet', help: 'print no summary; errors still go to standard error, and --json still prints its object' },
      {
        group: 'Printing',
        name: 'progress',
        help: 'show progress and the time left on standard error even when it is not a terminal; on a terminal it shows by itself once a run takes over a second, unless --quiet',
      },
    ],
    notes: [
      'A single --df without --resampling, --rule or --holdout fits that df as is; anything else tunes.',
      `- as the data file reads the CSV from standard input. Such a run writes no files (a table whose data exist on no disk could never be checked against them), so it needs --print-only or --json.`,
      'Exit codes: 0 done; 2 bad input or options, with the message on standard error saying what and where.',
    ],
  });
}

/** The table of `knotwise demo`. */
const DEMO_COMMAND = defineCommand({
  name: 'demo',
  summary: 'fit a bundled example (invented humidity-sensor data) and write its outputs',
  usage: ['demo [--out <folder>]'],
  operands: { min: 0, max: 0, name: 'argument' },
  options: [{ name: 'out', value: 'folder', help: 'where the outputs go', default: 'knotwise-demo' }],
});

/** Every command, in the order the general help lists them. */
export function commands(): CommandSpec[] {
  return [fitCommand(), CHECK_COMMAND, COMPARE_COMMAND, DEMO_COMMAND];
}

/** The general help: commands and where to find their options. */
function usage(): string {
  const list = commands();
  const width = Math.max(...list.map((c) => c.name.length), 'help [<command>]'.length) + 3;
  return [
    `knotwise ${VERSION}: smooth curves and curve tables from measured CSV data`,
    '',
    'Usage:',
    '  knotwise <command> [options]',
    '',
    'Commands:',
    ...list.map((c) => `  ${c.name.padEnd(width)}${c.summary}`),
    `  ${'help [<command>]'.padEnd(width)}this text, or a command's help`,
    '',
    `  ${'-h, --help'.padEnd(width)}this text`,
    `  ${'-V, --version'.padEnd(width)}the version`,
    '',
    'Run knotwise <command> --help for its options, defaults and limits.',
  ].join('\n');
}

/** What a run needs from its surroundings; tests inject their own. */
export interface CliEnv {
  /** Reads all of standard input. */
  readonly readStdin: () => Promise<Uint8Array>;
  /** True when standard input is a terminal (nothing piped in). */
  readonly stdinIsTTY: boolean;
  /** Where progress goes (standard error). */
  readonly progressStream: ProgressStream;
  readonly clock: Clock;
}

async function readAll(stream: NodeJS.ReadableStream): Promise<Uint8Array> {
  const chunks: Buffer[] = [];
  for await (const c of stream) chunks.push(typeof c === 'string' ? Buffer.from(c) : (c as Buffer));
  return Buffer.concat(chunks);
}

/** `env` with the process's own standard input, standard error and clock for what it leaves out (standard input is touched only when read). */
function withProcess(env: Partial<CliEnv>): CliEnv {
  return {
    readStdin: env.readStdin ?? (() => readAll(process.stdin)),
    get stdinIsTTY() {
      return env.stdinIsTTY ?? process.stdin.isTTY === true;
    },
    progressStream: env.progressStream ?? process.stderr,
    clock: env.clock ?? Date.now,
  };
}

/** Options of `knotwise fit`, parsed. */
interface FitArgs {
  /** The data file as given ('-' for standard input). */
  readonly file: string;
  readonly stdin: boolean;
  readonly x: string;
  readonly y: string;
  readonly weights?: string | undefined;
  /** Binomial outcome: column with the number of trials of each row. */
  readonly trials?: string | undefined;
  readonly json: boolean;
  readonly quiet: boolean;
  /** --progress: show progress even when standard error is not a terminal. */
  readonly progress: boolean;
  readonly tune: boolean;
  readonly options: AnalysisOptions;
  /** Table grid and format, emitters, report (see core/outputs/plan.ts). */
  readonly output: OutputOptions;
  /** Folder to write into; undefined: write nothing. */
  readonly out?: string | undefined;
  readonly force: boolean;
  /** --per or --channels: the rows split into groups. */
  readonly groups?: GroupSpec | undefined;
  /** --memory-budget in MiB, when given. */
  readonly memoryBudget?: number | undefined;
}

/** Parses `knotwise fit`'s arguments; undefined when help was asked for (and printed). */
function parseFitArgs(argv: readonly string[]): FitArgs | undefined {
  const spec = fitCommand();
  const a = parseCommand(spec, argv);
  if (a.help) {
    process.stdout.write(formatHelp(spec) + '\n');
    return undefined;
  }
  const file = a.operands[0] as string;
  const stdin = file === STDIN_ARG;
  const printOnly = a.flag('print-only');
  const json = a.flag('json');
  if (printOnly && (a.given('out') || a.flag('save'))) throw new InputError(`--print-only writes no files; drop ${a.given('out') ? '--out' : '--save'}`);
  if (a.given('out') && a.flag('save')) throw new InputError('--save writes next to the data file and --out into another folder; give one of them');
  if (stdin) {
    const writes = (['out', 'save', 'emit', 'report', 'force'] as const).find((n) => a.given(n));
    if (writes !== undefined)
      throw new InputError(`--${writes} writes files, but data read from standard input (-) exist on no disk, so a table written from them could never be checked against them; drop --${writes}`);
    if (!printOnly && !json)
      throw new InputError(
        'data read from standard input (-) exist on no disk, so a table written from them could never be checked against them: add --print-only (or --json) to print the result without writing files',
      );
  }
  const groups = parseGroupFlags(a, stdin);
  checkDistinctColumns([
    ['--x', a.text('x')],
    ['--y', a.text('y')],
    ['--per', a.text('per')],
    ['--weights', a.text('weights')],
    ['--trials', a.text('trials')],
  ]);
  const dfText = a.text('df');
  const dfs = dfText !== undefined ? parseDfList(dfText) : undefined;
  const tune = !(dfs && dfs.length === 1 && !a.given('resampling') && !a.given('rule') && !a.given('holdout'));
  const holdoutText = a.text('holdout');
  const holdout = holdoutText !== undefined ? Number(holdoutText) : undefined;
  if (holdout !== undefined && !(holdout > 0 && holdout <= MAX_HOLDOUT)) throw new InputError(`--holdout must be a fraction above 0 and at most ${MAX_HOLDOUT}; got "${holdoutText}"`);
  const kind = parseCurve(a.text('curve') as string);
  const model = parseModelFlags(kind, a.text('outcome') as string, a.given('outcome'), a.text('trials'), a.text('shape'), a.flag('robust'), a.text('robust-k'));
  const grid = a.text('grid');
  const columns = a.text('columns');
  const emit = a.text('emit');
  const printing = printOnly || stdin;
  return {
    file,
    stdin,
    x: a.text('x') as string,
    y: (groups?.channels?.[0] ?? a.text('y')) as string,
    groups,
    weights: a.text('weights'),
    trials: a.text('trials'),
    json,
    quiet: a.flag('quiet'),
    progress: a.flag('progress'),
    tune,
    output: {
      grid: grid !== undefined ? parseGrid(grid) : undefined,
      extrapolate: a.flag('extrapolate'),
      digits: parseDigits(a.text('digits') as string),
      columns: columns !== undefined ? parseColumns(columns) : undefined,
      flagNegative: a.flag('flag-negative'),
      emit: emit !== undefined ? parseEmit(emit) : [],
      report: a.flag('report'),
      inverse: parseInverseFlags(a),
    },
    // Outputs go next to the data unless --out names a folder or --print-only asks for none.
    out: printing ? undefined : (a.text('out') ?? dirname(file)),
    force: a.flag('force'),
    memoryBudget: a.given('memory-budget') ? parseMemoryBudget(a.text('memory-budget') as string) : undefined,
    options: {
      kind,
      candidates: dfs,
      resample: parseResampling(a.text('resampling') as string),
      rule: parseRule(a.text('rule') as string),
      seed: parseSeed(a.text('seed') as string),
      holdout,
      ...model,
    },
  };
}

/** --per, --channels, --shared-df and --long-table as a group spec; undefined without --per or --channels. */
function parseGroupFlags(a: { flag(name: string): boolean; text(name: string): string | undefined; given(name: string): boolean }, stdin: boolean): GroupSpec | undefined {
  const by = a.text('per');
  const channelsText = a.text('channels');
  if (by === undefined && channelsText === undefined) {
    const stray = ['shared-df', 'long-table'].find((n) => a.given(n));
    if (stray !== undefined) throw new InputError(`--${stray} needs groups: --per <column> or --channels <list>`);
    return undefined;
  }
  if (by !== undefined && channelsText !== undefined) throw new InputError('--per splits by a column and --channels by reading columns; give one of them');
  if (channelsText !== undefined && a.given('y')) throw new InputError('--channels names the reading columns; drop --y');
  if (stdin) throw new InputError('groups read their file twice over; give the data file instead of standard input (-)');
  const channels = channelsText?.split(',').map((c) => c.trim());
  if (channels && (channels.length < 2 || channels.some((c) => c === ''))) throw new InputError(`--channels needs at least 2 column names separated by commas; got "${channelsText}"`);
  return { by, channels, sharedDf: a.flag('shared-df'), longTable: a.flag('long-table') };
}

/** --inverse and its options as an inverse spec; undefined when none of them was given. */
function parseInverseFlags(a: { flag(name: string): boolean; text(name: string): string | undefined; given(name: string): boolean }): InverseSpec | undefined {
  const named = ['inverse-grid', 'readings-averaged', 'reference-uncertainty', 'max-interval-width'];
  if (!a.flag('inverse') && !named.some((n) => a.given(n))) return undefined;
  const number = (name: string, fallback: number | undefined): number | undefined => {
    const t = a.text(name);
    if (t === undefined) return fallback;
    const v = Number(t);
    if (t.trim() === '' || !Number.isFinite(v)) throw new InputError(`--${name} must be a number; got "${t}"`);
    return v;
  };
  const grid = a.text('inverse-grid');
  return checkInverse(
    {
      grid: grid !== undefined ? parseGrid(grid) : undefined,
      readingsAveraged: number('readings-averaged', 1) as number,
      referenceUncertainty: number('reference-uncertainty', 0) as number,
      maxWidth: number('max-interval-width', undefined),
    },
    CLI_INVERSE_NAMES,
  );
}

/** Refuses one column named by two of --x, --y, --weights, --trials. */
function checkDistinctColumns(named: readonly (readonly [string, string | undefined])[]): void {
  const given = named.filter((n): n is readonly [string, string] => n[1] !== undefined);
  for (let i = 0; i < given.length; i++) {
    for (let j = i + 1; j < given.length; j++) {
      const [a, col] = given[i] as readonly [string, string];
      const [b, other] = given[j] as readonly [string, string];
      if (col === other) throw new InputError(`${a} and ${b} name the same column "${col}"; each must be a column of its own`);
    }
  }
}

/** --outcome, --trials, --shape, --robust, --robust-k as model options (checked against --curve). */
function parseModelFlags(
  kind: string,
  outcomeText: string,
  outcomeGiven: boolean,
  trials: string | undefined,
  shape: string | undefined,
  robustFlag: boolean,
  robustK: string | undefined,
): ModelOptions {
  const outcome = parseOutcome(outcomeText);
  if (trials !== undefined && outcome !== 'proportions') throw new InputError('--trials needs --outcome proportions');
  let robust: ModelOptions['robust'];
  if (robustK !== undefined) {
    const k = Number(robustK);
    if (!(k > 0) || !Number.isFinite(k)) throw new InputError(`--robust-k must be a positive number; got "${robustK}"`);
    robust = { k };
  } else if (robustFlag) robust = true;
  const options: ModelOptions = {
    ...(outcomeGiven ? { outcome } : {}),
    ...(shape !== undefined ? { shape: parseShapeList(shape) } : {}),
    ...(robust !== undefined ? { robust } : {}),
  };
  resolveModel(kind, options);
  return options;
}

function parseDigits(text: string): number {
  const v = Number(text);
  if (!Number.isInteger(v) || v < DIGITS.min || v > DIGITS.max) throw new InputError(`--digits must be a whole number from ${DIGITS.min} to ${DIGITS.max}; got "${text}"`);
  return v;
}

/** Numbers as JSON allows them: non-finite values become null. */
function finite(v: number): number | null {
  return Number.isFinite(v) ? v : null;
}

/** True for counts and proportions: fits by deviance, where R² does not apply. */
function byDeviance(fit: FitResult): boolean {
  return fit.model !== undefined && fit.model.glm !== undefined;
}

function fitJson(fit: FitResult, streamed: boolean): Record<string, unknown> {
  // A fit streamed from the file keeps no per-row arrays: they are null.
  const rows = (a: () => Float64Array): (number | null)[] | null => (streamed ? null : Array.from(a(), finite));
  const arr = (a: Float64Array): (number | null)[] => Array.from(a, finite);
  const deviance = byDeviance(fit);
  return {
    curve: fit.kind,
    df: fit.df,
    n: fit.n,
    residualDf: fit.residualDf,
    knots: Array.from(fit.knots),
    coefficients: arr(fit.coefficients),
    ...(fit.lambda !== undefined ? { lambda: fit.lambda } : {}),
    residualSd: finite(fit.sigma),
    // For counts and proportions the fit's r2 is the share of the null deviance explained.
    r2: deviance ? null : finite(fit.r2),
    devianceExplained: deviance ? finite(fit.r2) : null,
    logLik: finite(fit.logLik),
    aic: finite(fit.aic),
    aicc: finite(fit.aicc),
    bic: finite(fit.bic),
    looRmse: finite(fit.looRmse),
    gcv: finite(fit.gcv),
    notes: fit.notes,
    fitted: rows(() => fit.fitted),
    residuals: rows(() => fit.residuals),
    leverage: rows(() => fit.leverage),
    cooksDistance: rows(() => fit.cooksDistance),
  };
}

async function runFit(argv: readonly string[], env: CliEnv): Promise<number> {
  // Two inputs (--x2): a surface, with options of its own (core/node/surfaceArgs.ts).
  const surface = surfaceArgsOf(fitCommand(), argv);
  if (surface) return runSurfaceFit(surface, env);
  const args = parseFitArgs(argv);
  if (!args) return 0;
  if (args.out === undefined && (args.output.emit.length > 0 || args.output.report)) {
    throw new InputError('--emit and --report write files: drop --print-only');
  }
  let bytes: Uint8Array | undefined;
  if (args.stdin) {
    if (env.stdinIsTTY) throw new InputError('- reads the CSV from standard input, but standard input is a terminal: pipe the data in, e.g. knotwise fit - --x a --y b --print-only < data.csv');
    bytes = await env.readStdin();
  }
  const plan: FitPlan = {
    columns: { x: args.x, y: args.y, weights: args.weights },
    tune: args.tune,
    options: args.options,
    output: args.output,
    ...(args.trials !== undefined ? { trials: args.trials } : {}),
    ...(args.memoryBudget !== undefined ? { memoryBudget: args.memoryBudget } : {}),
  };
  if (args.groups) return runGroupFit({ ...plan, tune: true, groups: args.groups }, { file: args.file, out: args.out, force: args.force, json: args.json, quiet: args.quiet }, env);
  const dataName = args.stdin ? STDIN_NAME : args.file;
  // Progress on a terminal by itself (unless --quiet), elsewhere only when asked for.
  const showProgress = args.progress || (env.progressStream.isTTY === true && !args.quiet);
  const progress = showProgress ? new ProgressLine(env.progressStream, env.clock) : undefined;
  if (args.out !== undefined) checkOutputFolder(args.out);
  // A tuning of a large file resamples on worker threads: start them now, so that loading
  // them overlaps reading and fitting (small files resample inline and need none).
  if (
    plan.tune &&
    resamplingScheme(plan.options.resample).method === 'resamples' &&
    (bytes?.length ?? fileSize(args.file)) >= EARLY_WORKERS_BYTES &&
    // A file streamed in passes (above the memory budget) resamples on this thread; one refused at its header needs none.
    (bytes !== undefined || readableWhole(args.file, plan.memoryBudget ?? DEFAULT_MEMORY_BUDGET))
  )
    // This thread resamples too (runPipeline), so one worker fewer than cores.
    startWorkersEarly(Math.max(1, availableParallelism() - 1));
  let run;
  try {
    run = await runPipeline(dataName, plan, args.out ?? (args.stdin ? '.' : dirname(args.file)), undefined, { bytes, progress });
  } catch (err) {
    // A problem of the data names the data file.
    if (err instanceof InputError && err.place.file === undefined) throw new InputError(err.raw, { ...err.place, file: dataName });
    throw err;
  } finally {
    progress?.finish();
  }
  const { table, selection: sel, analysis, fit, diagnostics, deliverables } = run;
  const tableOut = deliverables.table;
  const outside = deliverables.summary.extrapolated.length;
  let written: { table: string; record: string; files: string[] } | undefined;
  if (args.out !== undefined) {
    const record = deliverables.files.find((f) => f.kind === 'record');
    if (!args.force && record)
      checkOutputNames(
        args.out,
        deliverables.files.map((f) => f.name),
        record.name,
        args.file,
      );
    const files = writeOutputs(args.out, deliverables.files, args.file, args.force);
    written = { table: files[0] as string, record: files[files.length - 1] as string, files };
  }
  if (args.json) {
    const out: Record<string, unknown> = {
      knotwise: VERSION,
      data: {
        file: args.stdin ? STDIN_ARG : basename(args.file),
        sha256: table.sha256,
        columns: sel.labels,
        units: sel.units,
        rowsRead: table.rowCount,
        rowsUsed: run.rowsUsed,
        rejected: sel.rejected,
      },
      model: modelSpecJson(args.options, args.trials),
      fit: { ...fitJson(fit, run.streamed !== undefined), model: modelReportJson(fit.model) },
      table: {
        columns: tableOut.columns,
        rows: tableOut.rows.map((r) => r.map(finite)),
        extrapolatedPoints: outside,
        grid: deliverables.summary.grid,
        interpolation: deliverables.summary.interpolation,
        negativePoints: deliverables.summary.negative === null ? null : deliverables.summary.negative.length,
      },
      diagnostics,
      // The inverse table and the drift, as the record keeps them (null when not made).
      inverse: deliverables.record.inverse ?? null,
      inverseRows: deliverables.inverse ? deliverables.inverse.table.rows.map((r) => r.map(finite)) : null,
      drift: deliverables.record.drift ?? null,
      warnings: deliverables.warnings,
      // Data from standard input cannot be read again: no command redoes the run.
      regenerate: args.stdin ? null : deliverables.regenerate,
      caution: CAUTION,
    };
    if (written) out.written = written;
    if (analysis) {
      const t = analysis.tune;
      out.tuning = { curve: t.kind, resampling: formatResampling(t.resample), seed: t.seed, metric: t.metric, rowsTuned: analysis.n, notes: t.notes };
      out.candidates = t.candidates.map((c) => ({
        ...c,
        errors: Object.fromEntries(Object.entries(c.errors).map(([k, e]) => [k, { mean: finite(e.mean), se: finite(e.se), values: e.values.map(finite) }])),
      }));
      out.selected = {
        df: t.selected.df,
        rule: t.selected.rule,
        metric: t.selected.metric,
        reason: t.selected.reason,
        threshold: t.selected.threshold ?? null,
        alternatives: t.selected.alternatives,
        edge: t.selected.edge ?? null,
      };
      if (t.holdout) out.holdout = t.holdout;
    }
    process.stdout.write(JSON.stringify(out) + '\n');
  } else if (!args.quiet) {
    const lines = [
      `${args.stdin ? STDIN_NAME : basename(args.file)}: ${run.rowsUsed} rows used, ${sel.rejected.length} rejected`,
      ...sel.rejected.slice(0, 10).map((r) => `  line ${r.line}${r.column ? ` (${r.column})` : ''}: ${r.reason}`),
      ...(sel.rejected.length > 10 ? [`  ... and ${sel.rejected.length - 10} more`] : []),
    ];
    if (run.streamed && run.streamed.asked.kind !== run.streamed.resample.kind)
      lines.push(`Streamed: the file is above the memory budget, so ${formatResampling(run.streamed.asked)} ran as ${formatResampling(run.streamed.resample)} (see the note below).`);
    if (analysis) {
      lines.push(`Tuning (${formatResampling(analysis.tune.resample)}, seed ${analysis.tune.seed}):`);
      // The decimal place of the explanation below (errorPlace), so each mean reads the same in both.
      const rule = analysis.tune.selected.rule;
      const place = errorPlace(analysis.tune.candidates, analysis.tune.metric, rule.kind === 'simplest-within' ? rule.percent : DEFAULT_TOLERANCE_PERCENT);
      for (const c of analysis.tune.candidates) {
        const e = c.errors[analysis.tune.metric];
        lines.push(c.skipped ? `  df ${c.df}: skipped - ${c.skipped}` : `  df ${c.df}: ${metricLabel(analysis.tune.metric)} ${atPlace(e?.mean ?? NaN, place)} (SE ${sig(e?.se ?? NaN, 2)})`);
      }
      lines.push(analysis.tune.selected.reason);
      if (analysis.tune.holdout)
        lines.push(`Held-out rows: ${analysis.tune.holdout.rows}, RMSE ${sig(analysis.tune.holdout.rmse)}${analysis.tune.holdout.warning ? ` - ${analysis.tune.holdout.warning}` : ''}`);
    }
    const explained = byDeviance(fit) ? `deviance explained ${sig(100 * fit.r2, 3)} %` : `R² ${sig(fit.r2, 4)}`;
    // 4 digits, as the report's and the panel's fit line print them.
    lines.push(`Fit: ${fit.kind} df ${sig(fit.df, 4)}, residual SD ${sig(fit.sigma, 4)}, ${explained}, LOO RMSE ${sig(fit.looRmse, 4)}, GCV ${sig(fit.gcv, 4)}`);
    if (!isPlainModel(args.options)) lines.push(modelLine(fit, args.trials));
    for (const note of fit.notes) lines.push(`Note: ${note}`);
    // The residual checks in the words of the panel and the report (core/view/words.ts).
    for (const c of checkViews(diagnostics)) lines.push(`Check: ${c.name}: ${c.text}`);
    const ip = deliverables.summary.interpolation;
    lines.push(
      `Table: ${deliverables.summary.points} rows` +
        (ip
          ? `; linear interpolation between rows stays within ${sig(ip.maxError)} of the curve${ip.tolerance !== null ? ` (automatic step ${sig(ip.step ?? NaN, 6)}, tolerance ${sig(ip.tolerance)})` : ''}`
          : ''),
    );
    if (deliverables.inverse) lines.push(`Inverse table: ${inverseWords(deliverables.inverse.summary)}`);
    if (deliverables.drift) lines.push(`Drift from the curve the record replaced: ${deliverables.drift.words}`);
    for (const w of deliverables.warnings) lines.push(`Warning: ${w}`);
    if (written) for (const f of written.files) lines.push(`Wrote ${f}`);
    lines.push(`Caution: ${CAUTION}`);
    process.stdout.write(terminalText(lines.join('\n')) + '\n');
  }
  return 0;
}

/** One summary line on the outcome, shape and robust fitting of a fit, with down-weighted rows by line. */
function modelLine(fit: FitResult, trials: string | undefined): string {
  const m = fit.model;
  if (!m) return 'Model: continuous readings, least squares';
  const o = outcomeKind(m.outcome);
  const parts = [`${o.id} readings (${o.distribution}, ${o.link} link)${trials !== undefined ? `, trials from column "${trials}"` : ''}`];
  if (m.glm)
    parts.push(
      `deviance ${sig(m.glm.deviance)} (flat curve ${sig(m.glm.nullDeviance)}), ${dispersionNumbers({ ratio: m.glm.dispersion, residualDf: fit.residualDf, pearsonChi2: m.glm.pearsonChi2 })}`,
    );
  if (m.constraints) parts.push(`shape ${m.shape.join(' + ')}: ${m.constraints.active} of ${m.constraints.total} constraints active`);
  if (m.robust) {
    const rows = m.robust.downweighted.rows;
    parts.push(
      `Huber k = ${m.robust.k}, scale ${sig(m.robust.scale)}, ${m.robust.downweighted.total} rows down-weighted` +
        (rows.length
          ? ` (lines ${rows
              .slice(0, 10)
              .map((r) => `${r.line}: ${sig(r.weight, 2)}`)
              .join(', ')}${m.robust.downweighted.total > 10 ? ', ...' : ''})`
          : ''),
    );
  }
  if (!m.converged) parts.push('NOT CONVERGED');
  return `Model: ${parts.join('; ')}`;
}

/** Fits the bundled humidity-sensor example (invented data) and writes its deliverables. */
async function runDemo(argv: readonly string[], env: CliEnv): Promise<number> {
  const a = parseCommand(DEMO_COMMAND, argv);
  if (a.help) {
    process.stdout.write(formatHelp(DEMO_COMMAND) + '\n');
    return 0;
  }
  const example = [join(__dirname, '..', 'examples'), join(__dirname, '..', '..', 'examples'), resolve('examples')].map((d) => join(d, 'humidity-sensor.csv')).find((f) => existsSync(f));
  if (!example) throw new InputError('the bundled example examples/humidity-sensor.csv was not found');
  const out = resolve(a.text('out') as string);
  process.stdout.write(`Demo: invented humidity-sensor calibration data (${example})\n`);
  const code = await runFit(
    [
      example,
      '--x',
      'reference_rh',
      '--y',
      'sensor_output',
      '--resampling',
      'folds:10x5',
      '--rule',
      'one-se',
      '--grid',
      '10:94:step=2',
      '--flag-negative',
      '--emit',
      'c,ts,json',
      '--report',
      '--out',
      out,
    ],
    env,
  );
  process.stdout.write(`Outputs are in ${out}: open ${join(out, 'humidity-sensor.report.md')} for the review report; check them with: knotwise check ${out}\n`);
  return code;
}

/** The command named `name`, or an InputError naming the nearest one. */
function unknownCommand(name: string): InputError {
  const guess = nearest(name, [...commands().map((c) => c.name), 'help']);
  return new InputError(`unknown command "${name}"; ${guess !== undefined ? `did you mean ${guess}? (knotwise --help lists the commands)` : 'knotwise --help lists the commands'}`);
}

/**
 * Runs the command line; returns the exit code (0 done, 1 `check` found changes, 2 bad
 * input or options, 3 internal error). `env` replaces standard input, the progress stream
 * and the clock (tests).
 */
export async function main(argv: readonly string[], env: Partial<CliEnv> = {}): Promise<number> {
  const e = withProcess(env);
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case 'fit':
        return await runFit(rest, e);
      case 'demo':
        return await runDemo(rest, e);
      case 'check':
        return await runCheck(rest);
      case 'compare':
        return runCompare(rest);
      case undefined:
        process.stderr.write(usage() + '\n');
        return 2;
      case '--help':
      case '-h':
      case 'help': {
        const topic = command === 'help' && rest[0] !== '-h' && rest[0] !== '--help' ? rest[0] : undefined;
        if (command === 'help' && rest.length > 1) throw new InputError(`help takes at most one command; got "${rest.join(' ')}"`);
        if (topic === undefined) {
          process.stdout.write(usage() + '\n');
          return 0;
        }
        const spec = commands().find((c) => c.name === topic);
        if (!spec) throw unknownCommand(topic);
        process.stdout.write(formatHelp(spec) + '\n');
        return 0;
      }
      case '--version':
      case '-V':
        process.stdout.write(VERSION + '\n');
        return 0;
      default:
        if (command.startsWith('-'))
          throw new InputError(`${command} is not an option of knotwise itself; put options after the command, e.g. knotwise fit data.csv ${command} ...; run knotwise --help for the commands`);
        throw unknownCommand(command);
    }
  } catch (err) {
    if (err instanceof InputError) {
      process.stderr.write(terminalText(`knotwise: ${err.describe()}`) + '\n');
      return 2;
    }
    if (isAllocationFailure(err)) {
      // Out of memory outside the reading and the fitting (which say how many rows): the same advice, without a count.
      process.stderr.write(
        'knotwise: out of memory: the data do not fit in the memory this process may use. Fit a part of the rows, or run where the process may use more memory (a larger machine, a higher ulimit, or NODE_OPTIONS=--max-old-space-size=<megabytes> when the JavaScript heap is the limit).\n',
      );
      return 2;
    }
    if (err instanceof CancelledError) {
      process.stderr.write('knotwise: cancelled\n');
      return 2;
    }
    process.stderr.write(`knotwise: internal error: ${(err as Error).stack ?? String(err)}\n`);
    return 3;
  }
}

if (require.main === module) {
  // A reader that stops early (`knotwise check | head`) closes the pipe: stop quietly, as
  // command-line tools do, instead of dying with a stack trace.
  process.stdout.on('error', (err: NodeJS.ErrnoException) => {
    if (err.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw err;
  });
  void main(process.argv.slice(2)).then((code) => {
    process.exitCode = code;
  });
}
