/**
 * Knotwise's settings (`knotwise.*`) read once into a typed, read-only snapshot with
 * defaults and limits. Values outside their limits fall back to the default and are
 * listed in `problems`, so the host can say what it ignored. The texts use the command
 * line's syntax (core/spec.ts), so a setting and a CLI flag mean the same thing.
 */
import type { AnalysisOptions } from '../core/analysisTypes';
import { MAX_HUBER_K, resolveModel } from '../core/fit/model';
import { HUBER_K } from '../core/fit/robust';
import { checkShapes } from '../core/fit/shape';
import { parseDfList, parseResample } from '../core/spec';
import { parseGrid, type GridSpec } from '../core/table/grid';
import type { ResampleSpec, RuleSpec } from '../core/tune/types';
import type { Family, ModelOptions, Outcome, Shape } from '../core/types';

/** Reads one raw setting (vscode's WorkspaceConfiguration.get, or a plain object in tests). */
export type SettingReader = (key: string) => unknown;

/** The settings snapshot. */
export interface Settings {
  readonly family: Family;
  /** Outcome family, shapes and Huber constant (undefined: least squares), checked against the family. */
  readonly model: ModelSettings;
  /** knotwise.huberK, also when robust fitting is off (the panel's robust switch uses it). */
  readonly huberK: number;
  /** Candidate df; undefined means the family's default range. */
  readonly candidates: readonly number[] | undefined;
  readonly resample: ResampleSpec;
  readonly rule: RuleSpec;
  readonly tolerancePercent: number;
  readonly seed: number;
  /** Held-out fraction, 0 for none. */
  readonly holdout: number;
  /** Table grid; undefined means the default (101 points over the data range). */
  readonly grid: GridSpec | undefined;
  readonly extrapolate: boolean;
  readonly digits: number;
  /** Output folder: '' means next to the data file; relative paths start at the data file's folder. */
  readonly outputFolder: string;
  /** File name patterns; ${name} is the data file's name without its extension. */
  readonly tableName: string;
  readonly recordName: string;
  /** Settings that were ignored, with why. */
  readonly problems: readonly string[];
}

/** The model options of the settings (the command line's --family, --shape, --robust / --huber-k). */
export interface ModelSettings {
  readonly outcome: Outcome;
  readonly shape: readonly Shape[];
  /** Huber tuning constant; undefined for least squares. */
  readonly robustK: number | undefined;
}

/** Defaults, the same as the command line's. */
export const DEFAULTS = {
  family: 'natural' as Family,
  outcome: 'gaussian' as Outcome,
  shape: [] as readonly Shape[],
  robust: false,
  huberK: HUBER_K,
  candidates: '',
  resampling: 'boot:50',
  rule: '1se',
  tolerancePercent: 2,
  seed: 1,
  holdoutFraction: 0,
  grid: '',
  extrapolate: false,
  significantDigits: 8,
  outputFolder: '',
  tableName: '${name}.curve.csv',
  recordName: '${name}.fit.json',
} as const;

/** Limits of the numeric settings. */
export const LIMITS = {
  resamples: [10, 5000],
  folds: [2, 100],
  repeats: [1, 100],
  tolerancePercent: [0, 100],
  holdoutFraction: [0, 0.5],
  significantDigits: [3, 17],
  seed: [0, 2 ** 32 - 1],
} as const;

/** Reads and checks every Knotwise setting. */
export function readSettings(get: SettingReader): Settings {
  const problems: string[] = [];
  const str = (key: string, fallback: string): string => {
    const v = get(key);
    if (v === undefined || v === null) return fallback;
    if (typeof v !== 'string') {
      problems.push(`knotwise.${key} must be text; using "${fallback}"`);
      return fallback;
    }
    return v.trim();
  };
  const numIn = (key: string, fallback: number, [lo, hi]: readonly [number, number], integer = false): number => {
    const v = get(key);
    if (v === undefined || v === null) return fallback;
    if (typeof v !== 'number' || !Number.isFinite(v) || v < lo || v > hi || (integer && !Number.isInteger(v))) {
      problems.push(`knotwise.${key} must be a${integer ? ' whole' : ''} number from ${lo} to ${hi}; using ${fallback}`);
      return fallback;
    }
    return v;
  };
  const attempt = <T>(key: string, fallback: T, parse: () => T): T => {
    try {
      return parse();
    } catch (err) {
      problems.push(`knotwise.${key}: ${err instanceof Error ? err.message : String(err)}; using the default`);
      return fallback;
    }
  };

  const familyText = str('curveFamily', DEFAULTS.family);
  const family: Family = familyText === 'natural' || familyText === 'poly' || familyText === 'smooth' ? familyText : DEFAULTS.family;
  if (family !== familyText) problems.push(`knotwise.curveFamily "${familyText}" is not natural, poly or smooth; using ${DEFAULTS.family}`);

  const { model, huberK } = readModel(get, family, problems);

  const candText = str('candidates', DEFAULTS.candidates);
  const candidates = candText === '' ? undefined : attempt<number[] | undefined>('candidates', undefined, () => parseDfList(candText));

  const defaultResample: ResampleSpec = { kind: 'boot', resamples: 50 };
  const resample = attempt('resampling', defaultResample, () => checkResample(parseResample(str('resampling', DEFAULTS.resampling))));

  const tolerancePercent = numIn('tolerancePercent', DEFAULTS.tolerancePercent, LIMITS.tolerancePercent);
  const ruleText = str('rule', DEFAULTS.rule);
  let rule: RuleSpec;
  switch (ruleText) {
    case 'lowest':
      rule = { kind: 'lowest' };
      break;
    case '1se':
      rule = { kind: '1se' };
      break;
    case 'tolerance':
      rule = { kind: 'tol', percent: tolerancePercent };
      break;
    default:
      problems.push(`knotwise.rule "${ruleText}" is not lowest, 1se or tolerance; using 1se`);
      rule = { kind: '1se' };
  }

  const gridText = str('table.grid', DEFAULTS.grid);
  const grid = gridText === '' ? undefined : attempt<GridSpec | undefined>('table.grid', undefined, () => parseGrid(gridText));
  const extrapolateRaw = get('table.extrapolate');
  const extrapolate = typeof extrapolateRaw === 'boolean' ? extrapolateRaw : DEFAULTS.extrapolate;

  const tableName = checkName('output.tableName', str('output.tableName', DEFAULTS.tableName), DEFAULTS.tableName, problems);
  const recordName = checkName('output.recordName', str('output.recordName', DEFAULTS.recordName), DEFAULTS.recordName, problems);

  return {
    family,
    model,
    huberK,
    candidates,
    resample,
    rule,
    tolerancePercent,
    seed: numIn('seed', DEFAULTS.seed, LIMITS.seed, true),
    holdout: numIn('holdoutFraction', DEFAULTS.holdoutFraction, LIMITS.holdoutFraction),
    grid,
    extrapolate,
    digits: numIn('table.significantDigits', DEFAULTS.significantDigits, LIMITS.significantDigits, true),
    outputFolder: str('output.folder', DEFAULTS.outputFolder),
    tableName,
    recordName,
    problems,
  };
}

/**
 * knotwise.outcome, .shape, .robust and .huberK, checked one after the other against the
 * curve family (core/fit/model.ts resolveModel): an option the family cannot combine with
 * the ones before it is dropped and listed in `problems`.
 */
function readModel(get: SettingReader, family: Family, problems: string[]): { model: ModelSettings; huberK: number } {
  const fits = (m: ModelOptions): string | undefined => {
    try {
      resolveModel(family, m);
      return undefined;
    } catch (err) {
      return err instanceof Error ? err.message : String(err);
    }
  };
  const outcomeRaw = get('outcome');
  let outcome: Outcome = DEFAULTS.outcome;
  if (outcomeRaw !== undefined && outcomeRaw !== null) {
    if (outcomeRaw === 'gaussian' || outcomeRaw === 'poisson' || outcomeRaw === 'binomial') outcome = outcomeRaw;
    else problems.push(`knotwise.outcome "${String(outcomeRaw)}" is not gaussian, poisson or binomial; using gaussian`);
  }
  const outcomeProblem = fits({ outcome });
  if (outcomeProblem) {
    problems.push(`knotwise.outcome: ${outcomeProblem}; using gaussian`);
    outcome = 'gaussian';
  }
  const shapeRaw = get('shape');
  let shape: readonly Shape[] = DEFAULTS.shape;
  if (shapeRaw !== undefined && shapeRaw !== null) {
    try {
      if (!Array.isArray(shapeRaw) || shapeRaw.some((v) => typeof v !== 'string')) throw new Error('must be a list of shape names');
      shape = checkShapes(shapeRaw as string[]);
    } catch (err) {
      problems.push(`knotwise.shape: ${err instanceof Error ? err.message : String(err)}; using no shape constraint`);
    }
  }
  const shapeProblem = shape.length ? fits({ outcome, shape }) : undefined;
  if (shapeProblem) {
    problems.push(`knotwise.shape: ${shapeProblem}; using no shape constraint`);
    shape = [];
  }
  const robustRaw = get('robust');
  let robust = typeof robustRaw === 'boolean' ? robustRaw : DEFAULTS.robust;
  if (robustRaw !== undefined && robustRaw !== null && typeof robustRaw !== 'boolean') problems.push('knotwise.robust must be true or false; using false');
  const kRaw = get('huberK');
  let k: number = DEFAULTS.huberK;
  if (kRaw !== undefined && kRaw !== null) {
    if (typeof kRaw === 'number' && Number.isFinite(kRaw) && kRaw > 0 && kRaw <= MAX_HUBER_K) k = kRaw;
    else problems.push(`knotwise.huberK must be a number above 0 and at most ${MAX_HUBER_K}; using ${DEFAULTS.huberK}`);
  }
  const robustProblem = robust ? fits({ outcome, shape, robust: { k } }) : undefined;
  if (robustProblem) {
    problems.push(`knotwise.robust: ${robustProblem}; fitting by least squares`);
    robust = false;
  }
  return { model: { outcome, shape, robustK: robust ? k : undefined }, huberK: k };
}

/**
 * Model settings as the command line's model options: only what differs from plain least
 * squares, and the default Huber constant as `true` (--robust) rather than { k } (--huber-k),
 * so the record and its regenerate command read as the command line writes them.
 * Example: modelOptions({ outcome: 'poisson', shape: [], robustK: undefined }) -> { outcome: 'poisson' }.
 */
export function modelOptions(m: ModelSettings): ModelOptions {
  return {
    ...(m.outcome !== 'gaussian' ? { outcome: m.outcome } : {}),
    ...(m.shape.length > 0 ? { shape: m.shape } : {}),
    ...(m.robustK !== undefined ? { robust: m.robustK === HUBER_K ? true : { k: m.robustK } } : {}),
  };
}

function checkResample(spec: ResampleSpec): ResampleSpec {
  const within = (v: number, [lo, hi]: readonly [number, number], what: string): void => {
    if (!Number.isInteger(v) || v < lo || v > hi) throw new Error(`${what} must be a whole number from ${lo} to ${hi}; got ${v}`);
  };
  if (spec.kind === 'boot') within(spec.resamples, LIMITS.resamples, 'the number of bootstrap resamples');
  if (spec.kind === 'cv') {
    within(spec.folds, LIMITS.folds, 'the number of folds');
    within(spec.repeats, LIMITS.repeats, 'the number of repeats');
  }
  return spec;
}

function checkName(key: string, value: string, fallback: string, problems: string[]): string {
  if (value === '' || /[\\/]/.test(value) || value === '.' || value === '..') {
    problems.push(`knotwise.${key} "${value}" must be a plain file name (no folders); using "${fallback}"`);
    return fallback;
  }
  return value;
}

/**
 * The analysis options the settings ask for (rule as set; the panel may change it later),
 * with `model` in place of the settings' model options when given (the panel's controls).
 * Keys in the command line's order, so equal options compare equal as JSON.
 */
export function analysisOptions(s: Settings, model: ModelSettings = s.model): AnalysisOptions {
  return { family: s.family, candidates: s.candidates, resample: s.resample, rule: s.rule, seed: s.seed, holdout: s.holdout > 0 ? s.holdout : undefined, ...modelOptions(model) };
}

/** A file name from a pattern: ${name} is the data file's name without extension. */
export function outputName(pattern: string, dataFileName: string): string {
  const dot = dataFileName.lastIndexOf('.');
  const stem = dot > 0 ? dataFileName.slice(0, dot) : dataFileName;
  return pattern.split('${name}').join(stem);
}

/** True when two option sets would tune the same way (the rule only picks among the results). */
export function sameAnalysis(a: AnalysisOptions, b: AnalysisOptions): boolean {
  return JSON.stringify({ ...a, rule: null }) === JSON.stringify({ ...b, rule: null });
}
