/**
 * `knotwise fit` with two inputs (--x2): its options read into a surface plan, and the
 * options of curves that do not apply to surfaces refused, each with its reason.
 */
import { dirname } from 'node:path';
import { InputError } from '../errors';
import { parseEmit } from '../emit/index';
import { parseResampling } from '../registry/resampling/index';
import { checkReach, DEFAULT_REACH } from '../surface/coverage';
import { parseSurfaceDf, parseSurfaceRule, type SurfacePlan } from '../surface/spec';
import { parseSeed } from '../tune/candidates';
import { parseGrid } from '../table/grid';
import { DEFAULT_CURVE } from '../registry/curves/index';

/** The parsed options the surface command needs (a view of core/node/args.ts ParsedArgs). */
export interface SurfaceArgSource {
  readonly operands: readonly string[];
  given(name: string): boolean;
  text(name: string): string | undefined;
  flag(name: string): boolean;
}

/** A surface run of `knotwise fit`: the plan and where it reads, writes and prints. */
export interface SurfaceFitArgs {
  readonly file: string;
  readonly plan: SurfacePlan;
  /** Folder to write into; undefined: write nothing (--print-only). */
  readonly out?: string | undefined;
  readonly force: boolean;
  readonly json: boolean;
  readonly quiet: boolean;
  readonly progress: boolean;
}

/** Options of curves that surfaces refuse, with the reason in words. */
const NOT_FOR_SURFACES: readonly (readonly [string, string])[] = [
  ['per', 'groups are fitted as curves of one input'],
  ['channels', 'groups are fitted as curves of one input'],
  ['shared-df', 'groups are fitted as curves of one input'],
  ['long-table', 'groups are fitted as curves of one input'],
  ['outcome', 'surfaces fit continuous readings by least squares'],
  ['trials', 'surfaces fit continuous readings by least squares'],
  ['shape', 'surfaces are not shape-constrained'],
  ['robust', 'surfaces are fitted by least squares without down-weighting'],
  ['robust-k', 'surfaces are fitted by least squares without down-weighting'],
  ['holdout', 'surfaces use every row for tuning and fitting'],
  ['columns', 'the surface table has one fixed column set (x, x2, fit, se, bands, outside, far)'],
  ['flag-negative', 'the surface table flags nodes by coverage only'],
  ['inverse', 'an inverse table needs one input'],
  ['inverse-grid', 'an inverse table needs one input'],
  ['readings-averaged', 'an inverse table needs one input'],
  ['reference-uncertainty', 'an inverse table needs one input'],
  ['max-interval-width', 'an inverse table needs one input'],
  ['memory-budget', 'surfaces read the whole file (streaming in passes is for curves)'],
];

/**
 * Reads the options of `knotwise fit --x2` into a surface run. Throws InputError for an
 * option of curves that does not apply (naming it and why), standard input as the data,
 * and bad values. Example: surfaceFitArgs(parsed).plan.columns.v.
 */
export function surfaceFitArgs(a: SurfaceArgSource): SurfaceFitArgs {
  const file = a.operands[0] as string;
  if (file === '-') throw new InputError('a surface (--x2) reads its data file again for check; give the data file instead of standard input (-)');
  for (const [name, why] of NOT_FOR_SURFACES) if (a.given(name)) throw new InputError(`--${name} does not apply to a surface of two inputs (--x2): ${why}; drop --${name}`);
  if (a.given('curve') && a.text('curve') !== DEFAULT_CURVE)
    throw new InputError(`--curve ${a.text('curve')}: a surface of two inputs (--x2) is a tensor-product natural cubic regression spline; drop --curve`);
  const printOnly = a.flag('print-only');
  if (printOnly && (a.given('out') || a.flag('save'))) throw new InputError(`--print-only writes no files; drop ${a.given('out') ? '--out' : '--save'}`);
  if (a.given('out') && a.flag('save')) throw new InputError('--save writes next to the data file and --out into another folder; give one of them');
  const emitText = a.text('emit');
  const emit = emitText !== undefined ? parseEmit(emitText) : [];
  if (printOnly && (emit.length > 0 || a.flag('report'))) throw new InputError('--emit and --report write files: drop --print-only');
  const columns = { u: a.text('x') as string, v: a.text('x2') as string, y: a.text('y') as string, weights: a.text('weights') };
  const named: [string, string | undefined][] = [
    ['--x', columns.u],
    ['--x2', columns.v],
    ['--y', columns.y],
    ['--weights', columns.weights],
  ];
  for (let i = 0; i < named.length; i++)
    for (let j = i + 1; j < named.length; j++) {
      const [fa, ca] = named[i] as [string, string | undefined];
      const [fb, cb] = named[j] as [string, string | undefined];
      if (ca !== undefined && ca === cb) throw new InputError(`${fa} and ${fb} name the same column "${ca}"; each must be a column of its own`);
    }
  const dfText = a.text('df');
  const df = dfText !== undefined ? parseSurfaceDf(dfText) : undefined;
  const tune = !(df && df[0].length === 1 && df[1].length === 1 && !a.given('resampling') && !a.given('rule'));
  const digits = Number(a.text('digits'));
  if (!Number.isInteger(digits) || digits < 3 || digits > 17) throw new InputError(`--digits must be a whole number from 3 to 17; got "${a.text('digits')}"`);
  const reachText = a.text('reach');
  const reach = reachText !== undefined ? checkReach(Number(reachText), '--reach') : DEFAULT_REACH;
  const grid = a.text('grid');
  const grid2 = a.text('grid2');
  const plan: SurfacePlan = {
    columns,
    candidatesU: df?.[0],
    candidatesV: df?.[1],
    tune,
    resample: parseResampling(a.text('resampling') as string),
    rule: parseSurfaceRule(a.text('rule') as string),
    seed: parseSeed(a.text('seed') as string),
    gridU: grid !== undefined ? parseGrid(grid) : undefined,
    gridV: grid2 !== undefined ? parseGrid(grid2) : undefined,
    extrapolate: a.flag('extrapolate'),
    reach,
    digits,
    emit,
    report: a.flag('report'),
  };
  return {
    file,
    plan,
    out: printOnly ? undefined : (a.text('out') ?? dirname(file)),
    force: a.flag('force'),
    json: a.flag('json'),
    quiet: a.flag('quiet'),
    progress: a.flag('progress'),
  };
}
