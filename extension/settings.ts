/**
 * Knotwise's settings (`knotwise.*`) read once into a typed, read-only snapshot with
 * defaults and limits. Values outside their limits fall back to the default and are
 * listed in `problems`, so the host can say what it ignored. The texts use the command
 * line's words from core/registry/, so a setting and a command-line option mean the same
 * thing and have the same limits.
 */
import { DEFAULT_MEMORY_BUDGET, MEMORY_BUDGET_LIMITS } from '../core/stream/budget';
import type { AnalysisOptions } from '../core/analysis/types';
import { InputError } from '../core/errors';
import { MAX_HUBER_K } from '../core/fit/model';
import { HUBER_K } from '../core/fit/robust';
import { checkShapes } from '../core/fit/shape';
import { parseDfList } from '../core/tune/candidates';
import { parseGrid, type GridSpec } from '../core/table/grid';
import { checkInverse, DEFAULT_INVERSE, EDITOR_INVERSE_NAMES, INVERSE_LIMITS, type InverseSpec } from '../core/calibrate/spec';
import type { ResampleSpec, RuleSpec } from '../core/tune/types';
import type { CurveKindId, ModelOptions, Outcome, Shape } from '../core/types';
import { DEFAULT_CURVE, parseCurve, resolveModel } from '../core/registry/curves/index';
import { DEFAULT_OUTCOME, OUTCOME_LIST } from '../core/registry/outcomes/index';
import { DEFAULT_RESAMPLING, parseResampling } from '../core/registry/resampling/index';
import { DEFAULT_RULE, MAX_TOLERANCE_PERCENT, parseRule, RULE_LIST } from '../core/registry/rules/index';

/** Reads one raw setting (vscode's WorkspaceConfiguration.get, or a plain object in tests). */
export type SettingReader = (key: string) => unknown;

/** The settings snapshot. */
export interface Settings {
  readonly kind: CurveKindId;
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
  /** knotwise.table.flagNegative: flag table rows where the curve is below zero. */
  readonly flagNegative: boolean;
  readonly digits: number;
  /** knotwise.inverse.*: the inverse table to save with the curve table, or undefined when knotwise.inverse.write is off. */
  readonly inverse: InverseSpec | undefined;
  /** The inverse table's options even when it is not written (the panel previews it). */
  readonly inverseOptions: InverseSpec;
  /** Output folder: '' means next to the data file; relative paths start at the data file's folder. */
  readonly outputFolder: string;
  /** File name patterns; ${name} is the data file's name without its extension. */
  readonly tableName: string;
  readonly recordName: string;
  /** knotwise.refit.onSave: run an open panel's analysis again when its data file is saved or changes on disk. */
  readonly refitOnSave: boolean;
  /** knotwise.refit.askAboveRows: above this many data rows, ask before refitting on save. */
  readonly refitAskAboveRows: number;
  /** knotwise.memoryBudget (MiB): a data file whose whole read needs more is not tuned in the editor (core/stream/budget.ts). */
  readonly memoryBudget: number;
  /** knotwise.groups.*: a grouped run's df shared by every group (the command line's --shared-df), and one long table (--long-table). */
  readonly groups: { readonly sharedDf: boolean; readonly longTable: boolean };
  /** Settings that were ignored, with why. */
  readonly problems: readonly string[];
}

/** The model options of the settings (the command line's --outcome, --shape, --robust / --robust-k). */
export interface ModelSettings {
  readonly outcome: Outcome;
  readonly shape: readonly Shape[];
  /** Huber tuning constant; undefined for least squares. */
  readonly robustK: number | undefined;
}

/** Defaults, the same as the command line's. */
export const DEFAULTS = {
  kind: DEFAULT_CURVE as CurveKindId,
  outcome: DEFAULT_OUTCOME,
  shape: [] as readonly Shape[],
  robust: false,
  huberK: HUBER_K,
  candidates: '',
  resampling: DEFAULT_RESAMPLING,
  rule: DEFAULT_RULE,
  tolerancePercent: 2,
  seed: 1,
  holdoutFraction: 0,
  grid: '',
  extrapolate: false,
  flagNegative: false,
  significantDigits: 8,
  outputFolder: '',
  tableName: '${name}.curve.csv',
  recordName: '${name}.fit.json',
  refitOnSave: true,
  refitAskAboveRows: 200_000,
  memoryBudget: DEFAULT_MEMORY_BUDGET,
  groupsSharedDf: false,
  groupsLongTable: false,
} as const;

/** Limits of the numeric settings (the resampling limits live in core/registry/resampling/). */
export const LIMITS = {
  tolerancePercent: [0, MAX_TOLERANCE_PERCENT],
  holdoutFraction: [0, 0.5],
  significantDigits: [3, 17],
  seed: [0, 2 ** 32 - 1],
  refitAskAboveRows: [0, 1e9],
  memoryBudget: [MEMORY_BUDGET_LIMITS.min, MEMORY_BUDGET_LIMITS.max],
} as const;

/** Rules a setting may name (the person's own pick is a per-file choice in the panel). */
export const SETTING_RULES: readonly string[] = RULE_LIST.filter((r) => r.setting).map((r) => r.id);

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
      problems.push(`knotwise.${key}: ${err instanceof InputError ? err.describe('editor') : err instanceof Error ? err.message : String(err)}; using the default`);
      return fallback;
    }
  };

  const curveText = str('curve', DEFAULTS.kind);
  const kind: CurveKindId = attempt('curve', DEFAULTS.kind, () => parseCurve(curveText));

  const { model, huberK } = readModel(get, kind, problems);

  const candText = str('candidates', DEFAULTS.candidates);
  const candidates = candText === '' ? undefined : attempt<number[] | undefined>('candidates', undefined, () => parseDfList(candText));

  const defaultResample: ResampleSpec = { kind: 'bootstrap', resamples: 50 };
  // The resampling registry's limits apply here as on the command line.
  const resample = attempt('resampling', defaultResample, () => parseResampling(str('resampling', DEFAULTS.resampling)));

  const tolerancePercent = numIn('tolerancePercent', DEFAULTS.tolerancePercent, LIMITS.tolerancePercent);
  const ruleText = str('rule', DEFAULTS.rule);
  // The settings name a rule without its number; the tolerance comes from its own setting.
  const ruleDef = RULE_LIST.find((r) => r.setting && r.id === ruleText);
  if (!ruleDef) problems.push(`knotwise.rule "${ruleText}" is not one of ${SETTING_RULES.join(', ')}; using ${DEFAULTS.rule}`);
  const ruleSyntax = ruleDef?.id === 'simplest-within' ? `simplest-within:${tolerancePercent}` : (ruleDef?.id ?? DEFAULTS.rule);
  const rule: RuleSpec = attempt('rule', { kind: 'one-se' }, () => parseRule(ruleSyntax));

  const gridText = str('table.grid', DEFAULTS.grid);
  const grid = gridText === '' ? undefined : attempt<GridSpec | undefined>('table.grid', undefined, () => parseGrid(gridText));
  const extrapolateRaw = get('table.extrapolate');
  const extrapolate = typeof extrapolateRaw === 'boolean' ? extrapolateRaw : DEFAULTS.extrapolate;
  const flagRaw = get('table.flagNegative');
  const flagNegative = typeof flagRaw === 'boolean' ? flagRaw : DEFAULTS.flagNegative;

  const inverseOptions = readInverse(get, problems);
  const writeRaw = get('inverse.write');
  const inverse = writeRaw === true ? inverseOptions : undefined;

  const refitRaw = get('refit.onSave');
  const refitOnSave = typeof refitRaw === 'boolean' ? refitRaw : DEFAULTS.refitOnSave;

  const flag = (key: string, fallback: boolean): boolean => {
    const v = get(key);
    if (v === undefined || v === null) return fallback;
    if (typeof v === 'boolean') return v;
    problems.push(`knotwise.${key} must be true or false; using ${fallback}`);
    return fallback;
  };
  const groups = { sharedDf: flag('groups.sharedDf', DEFAULTS.groupsSharedDf), longTable: flag('groups.longTable', DEFAULTS.groupsLongTable) };

  const tableName = checkName('output.tableName', str('output.tableName', DEFAULTS.tableName), DEFAULTS.tableName, problems);
  const recordName = checkName('output.recordName', str('output.recordName', DEFAULTS.recordName), DEFAULTS.recordName, problems);

  return {
    kind,
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
    flagNegative,
    inverse,
    inverseOptions,
    digits: numIn('table.significantDigits', DEFAULTS.significantDigits, LIMITS.significantDigits, true),
    outputFolder: str('output.folder', DEFAULTS.outputFolder),
    tableName,
    recordName,
    refitOnSave,
    refitAskAboveRows: numIn('refit.askAboveRows', DEFAULTS.refitAskAboveRows, LIMITS.refitAskAboveRows, true),
    memoryBudget: numIn('memoryBudget', DEFAULTS.memoryBudget, LIMITS.memoryBudget, true),
    groups,
    problems,
  };
}

/** knotwise.inverse.*: checked as the command line checks its options; a bad value is listed in `problems` and its default used. */
function readInverse(get: SettingReader, problems: string[]): InverseSpec {
  const value = <T>(key: string, fallback: T, ok: (v: unknown) => boolean): T => {
    const v = get(key);
    if (v === undefined || v === null) return fallback;
    if (ok(v)) return v as T;
    problems.push(`knotwise.${key} ${JSON.stringify(v)} is not usable; using the default`);
    return fallback;
  };
  const gridText = value<string>('inverse.grid', '', (v) => typeof v === 'string');
  let grid: GridSpec | undefined;
  if (gridText.trim() !== '') {
    try {
      grid = checkInverse({ ...DEFAULT_INVERSE, grid: parseGrid(gridText) }, EDITOR_INVERSE_NAMES).grid;
    } catch (err) {
      problems.push(`knotwise.inverse.grid: ${err instanceof InputError ? err.describe('editor') : String(err)}; using the default`);
    }
  }
  const m = value<number>('inverse.readingsAveraged', 1, (v) => Number.isInteger(v) && (v as number) >= INVERSE_LIMITS.readingsAveraged.min && (v as number) <= INVERSE_LIMITS.readingsAveraged.max);
  const u = value<number>('inverse.referenceUncertainty', 0, (v) => typeof v === 'number' && Number.isFinite(v) && v >= 0);
  const w = value<number>('inverse.maxIntervalWidth', 0, (v) => typeof v === 'number' && Number.isFinite(v) && v >= 0);
  return { grid, readingsAveraged: m, referenceUncertainty: u, maxWidth: w > 0 ? w : undefined };
}

/**
 * knotwise.outcome, .shape, .robust and .huberK, checked one after the other against the
 * curve family (core/fit/model.ts resolveModel): an option the family cannot combine with
 * the ones before it is dropped and listed in `problems`.
 */
function readModel(get: SettingReader, kind: CurveKindId, problems: string[]): { model: ModelSettings; huberK: number } {
  const fits = (m: ModelOptions): string | undefined => {
    try {
      resolveModel(kind, m);
      return undefined;
    } catch (err) {
      return err instanceof InputError ? err.describe('editor') : err instanceof Error ? err.message : String(err);
    }
  };
  const outcomeRaw = get('outcome');
  let outcome: Outcome = DEFAULTS.outcome;
  if (outcomeRaw !== undefined && outcomeRaw !== null) {
    const hit = OUTCOME_LIST.find((o) => o.id === outcomeRaw);
    if (hit) outcome = hit.id;
    else problems.push(`knotwise.outcome "${String(outcomeRaw)}" is not one of ${OUTCOME_LIST.map((o) => o.id).join(', ')}; using ${DEFAULTS.outcome}`);
  }
  const outcomeProblem = fits({ outcome });
  if (outcomeProblem) {
    problems.push(`knotwise.outcome: ${outcomeProblem}; using ${DEFAULTS.outcome}`);
    outcome = DEFAULTS.outcome;
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
  const kRaw = get('robustK');
  let k: number = DEFAULTS.huberK;
  if (kRaw !== undefined && kRaw !== null) {
    if (typeof kRaw === 'number' && Number.isFinite(kRaw) && kRaw > 0 && kRaw <= MAX_HUBER_K) k = kRaw;
    else problems.push(`knotwise.robustK must be a number above 0 and at most ${MAX_HUBER_K}; using ${DEFAULTS.huberK}`);
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
 * squares, and the default Huber constant as `true` (--robust) rather than { k } (--robust-k),
 * so the record and its regenerate command read as the command line writes them.
 * Example: modelOptions({ outcome: 'counts', shape: [], robustK: undefined }) -> { outcome: 'counts' }.
 */
export function modelOptions(m: ModelSettings): ModelOptions {
  return {
    ...(m.outcome !== 'continuous' ? { outcome: m.outcome } : {}),
    ...(m.shape.length > 0 ? { shape: m.shape } : {}),
    ...(m.robustK !== undefined ? { robust: m.robustK === HUBER_K ? true : { k: m.robustK } } : {}),
  };
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
  return { kind: s.kind, candidates: s.candidates, resample: s.resample, rule: s.rule, seed: s.seed, holdout: s.holdout > 0 ? s.holdout : undefined, ...modelOptions(model) };
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
