/**
 * What a surface fit was asked for (the surface plan), its command-line words, and the
 * surface record's format name. The plan is stored in the surface record, so `knotwise
 * check` rebuilds the outputs from the data through the same steps.
 */
import type { EmitKind } from '../emit/common';
import { shellWord } from '../outputs/shellWord';
import { formatResampling } from '../registry/resampling/index';
import { InputError } from '../errors';
import { formatRule, parseRule } from '../registry/rules/index';
import { parseDfList } from '../tune/candidates';
import { DEFAULT_DIGITS } from '../table/formatCsv';
import { formatGrid, type GridSpec } from '../table/grid';
import type { ResampleSpec } from '../tune/types';
import { DEFAULT_REACH } from './coverage';
import type { SurfaceColumns } from './columns';
import type { SurfaceRule } from './select';

export { SURFACE_RECORD_FORMAT, SURFACE_RECORD_VERSION, SURFACE_SUFFIX } from './format';

/** One surface fit of `knotwise fit --x <u> --x2 <v> --y <y>`. */
export interface SurfacePlan {
  readonly columns: SurfaceColumns;
  /** Candidate df of each input (undefined: the default, 1 to min(9, distinct values)). */
  readonly candidatesU?: readonly number[] | undefined;
  readonly candidatesV?: readonly number[] | undefined;
  /** False: fit the one pair (candidatesU[0], candidatesV[0]) as is. */
  readonly tune: boolean;
  readonly resample: ResampleSpec;
  readonly rule: SurfaceRule;
  readonly seed: number;
  /** Grid of each input; undefined: DEFAULT_SURFACE_GRID_COUNT nodes over its data range. */
  readonly gridU?: GridSpec | undefined;
  readonly gridV?: GridSpec | undefined;
  /** Write nodes the readings do not reach (flagged) instead of refusing them. */
  readonly extrapolate: boolean;
  /** A node farther than this from every reading (scaled by each input's range) is flagged. */
  readonly reach: number;
  readonly digits: number;
  readonly emit: readonly EmitKind[];
  readonly report: boolean;
}

/** A df list as --df writes it: '2..9' for a run of whole numbers, else a comma list. */
export function dfListText(list: readonly number[]): string {
  const run = list.length > 2 && list.every((d, i) => Number.isInteger(d) && (i === 0 || d === (list[i - 1] as number) + 1));
  return run ? `${list[0]}..${list[list.length - 1]}` : list.join(',');
}

/** The --rule text of a surface rule: pick:<a>x<b> for a picked pair, else the curve rule's text. */
export function formatSurfaceRule(rule: SurfaceRule): string {
  return rule.kind === 'pick' ? `pick:${rule.dfU}x${rule.dfV}` : formatRule(rule);
}

/**
 * The `knotwise fit` command that carries out `plan` on the data at `dataPath` and writes
 * into the current folder (run it in the folder holding the outputs). Options at their
 * defaults are left out, except the resampling, rule and seed of a tuning.
 * Example: surfaceCommand(plan, 'rig.csv') -> "knotwise fit rig.csv --x temp --x2 load --y eff --df 1..9x1..9 --resampling bootstrap:50 --rule one-se --seed 1 --out .".
 */
export function surfaceCommand(plan: SurfacePlan, dataPath: string): string {
  const file = dataPath.startsWith('-') ? `./${dataPath}` : dataPath;
  const c = plan.columns;
  const w: string[] = ['knotwise', 'fit', shellWord(file), '--x', shellWord(c.u), '--x2', shellWord(c.v), '--y', shellWord(c.y)];
  if (c.weights !== undefined) w.push('--weights', shellWord(c.weights));
  const cu = plan.candidatesU;
  const cv = plan.candidatesV;
  if (plan.tune) {
    if (cu !== undefined && cv !== undefined) w.push('--df', `${dfListText(cu)}x${dfListText(cv)}`);
    w.push('--resampling', formatResampling(plan.resample), '--rule', formatSurfaceRule(plan.rule), '--seed', String(plan.seed));
  } else w.push('--df', `${cu?.[0]}x${cv?.[0]}`);
  if (plan.gridU !== undefined) w.push('--grid', shellWord(formatGrid(plan.gridU)));
  if (plan.gridV !== undefined) w.push('--grid2', shellWord(formatGrid(plan.gridV)));
  if (plan.reach !== DEFAULT_REACH) w.push('--reach', String(plan.reach));
  if (plan.extrapolate) w.push('--extrapolate');
  if (plan.digits !== DEFAULT_DIGITS) w.push('--digits', String(plan.digits));
  if (plan.emit.length) w.push('--emit', plan.emit.join(','));
  if (plan.report) w.push('--report');
  w.push('--out', '.');
  return w.join(' ');
}

/**
 * Parses --df for surfaces: `<list>` gives both inputs the same candidates, `<list>x<list>`
 * (or ×) one list per input, each list in the curve forms (a,b,c or a..b); whole numbers of
 * at least 1. Throws InputError naming the form. Example: parseSurfaceDf('2..6x1..4') -> [[2..6], [1..4]].
 */
export function parseSurfaceDf(text: string): [number[], number[]] {
  const parts = text.split(/[x×]/);
  if (parts.length > 2) throw new InputError(`--df "${text}" for two inputs takes <list> (both inputs) or <list>x<list> (the first input, then the second), e.g. 2..9 or 2..6x1..4`);
  const lists = parts.map((p) => parseDfList(p));
  for (const l of lists) for (const d of l) if (!Number.isInteger(d)) throw new InputError(`--df "${text}": the df of a surface's input must be a whole number; got ${d}`);
  return [lists[0] as number[], (lists[1] ?? lists[0]) as number[]];
}

/** Parses --rule for surfaces: the curve rules, and pick:<a>x<b> for a picked pair. */
export function parseSurfaceRule(text: string): SurfaceRule {
  const m = /^pick:(\d+)\s*[x×]\s*(\d+)$/.exec(text.trim());
  if (m) return { kind: 'pick', dfU: Number(m[1]), dfV: Number(m[2]) };
  const r = parseRule(text);
  if (r.kind === 'pick') throw new InputError(`--rule "${text}": with two inputs a picked candidate is a pair of df, pick:<df of --x>x<df of --x2>, e.g. pick:4x3`);
  return r;
}
