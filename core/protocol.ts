/**
 * The one message protocol between the VS Code host and the Knotwise panel (webview): the
 * messages of each direction as a tagged union with readonly fields, and the runtime
 * guards each side runs on what it receives. Both sides switch on `type` with an
 * exhaustiveness check. Requests that need an answer carry an id; results carry the run id
 * they belong to, so the panel drops anything from an outdated run. What the messages
 * carry (the payload, the residual details) is the view model of core/view/model.ts.
 *
 * The guards accept a message only when it has exactly the fields of its type (no unknown
 * or inherited keys, so no `__proto__`), every number is finite where one is required,
 * ids and lines are integers, and texts stay under MAX_MESSAGE_TEXT characters.
 */
import { SHAPES } from './fit/shape';
import { OUTCOME_LIST } from './registry/outcomes/index';
import { MAX_TOLERANCE_PERCENT } from './registry/rules/index';
import { parseDfList } from './tune/candidates';
import type { RuleSpec } from './tune/types';
import type { GroupsView } from './view/groups';
import { MAX_SLICES, SLICE_POINTS, VIEW_NODES, VIEW_READINGS, RESIDUAL_POINTS, type SurfaceView } from './view/surface';
import type { DataStateView, FitDetail, ModelChoice, PanelPayload } from './view/model';

/** Messages from the host to the panel. */
export type HostMessage =
  /** The data file this panel belongs to (its URI as text and its name); the panel keeps it in its state so a reloaded window restores it. */
  | { readonly type: 'file'; readonly uri: string; readonly fileName: string }
  /** A run started or advanced; the panel shows the text (and how far it is, 0 to 1, when known) and keeps the previous result greyed. */
  | { readonly type: 'running'; readonly runId: number; readonly message: string; readonly fraction?: number }
  /** A run finished: replace everything shown. */
  | { readonly type: 'result'; readonly payload: PanelPayload }
  /** A run failed or was cancelled; the text says why. */
  | { readonly type: 'failed'; readonly runId: number; readonly message: string }
  /** Answer to `needDetail`. */
  | { readonly type: 'detail'; readonly runId: number; readonly detail: FitDetail }
  /** Answer to `save`: the files written, as workspace-relative paths, and a line about the table. */
  | { readonly type: 'saved'; readonly requestId: number; readonly files: readonly string[]; readonly note?: string }
  /** Answer to `save` when nothing was written; the text says why. */
  | { readonly type: 'saveFailed'; readonly requestId: number; readonly message: string }
  /** Whether the data changed since run `runId` (sent after every result and on every change). */
  | { readonly type: 'dataState'; readonly runId: number; readonly state: DataStateView }
  /** A grouped run finished: the overview of every group (its `groupResult` follows). */
  | { readonly type: 'groups'; readonly view: GroupsView }
  /** The panel of group `group` (an index into the overview's groups) of the grouped run `setId`: replace everything shown below the overview. */
  | { readonly type: 'groupResult'; readonly setId: number; readonly group: number; readonly payload: PanelPayload }
  /** A surface run finished (two inputs): replace everything shown with this surface (core/view/surface.ts). */
  | { readonly type: 'surface'; readonly view: SurfaceView };

/** Messages from the panel to the host. */
export type PanelMessage =
  /** The panel's script is listening; the host sends the latest result (again). */
  | { readonly type: 'ready' }
  /** The panel needs the residual details of one df of a run. */
  | { readonly type: 'needDetail'; readonly runId: number; readonly df: number }
  /** The person changed the rule or picked a df; the host saves this choice. */
  | { readonly type: 'choice'; readonly runId: number; readonly rule: RuleSpec; readonly df: number }
  /** Save the curve table and fit record for the current choice. */
  | { readonly type: 'save'; readonly requestId: number; readonly runId: number; readonly rule: RuleSpec }
  /** The data changed or has unsaved edits: save the data file when needed, run again keeping the rule, then save (one answer: `saved` or `saveFailed`). */
  | { readonly type: 'refitAndSave'; readonly requestId: number; readonly runId: number; readonly rule: RuleSpec }
  /** Stop the run in progress. */
  | { readonly type: 'stop' }
  /** Reveal a 1-based line of the CSV in its editor. */
  | { readonly type: 'revealLine'; readonly line: number }
  /** Run the analysis again with the current settings. */
  | { readonly type: 'rerun' }
  /** Run the analysis again with these model options (they override the settings for this file). */
  | { readonly type: 'model'; readonly runId: number; readonly model: ModelChoice }
  /** Run the analysis again with these candidate df, written as the command line's --df takes them (e.g. '2..20'); they override the settings for this file. */
  | { readonly type: 'candidates'; readonly runId: number; readonly candidates: string }
  /** Save the inverse table with the curve table from now on (true) or not (false): the host sets knotwise.inverse.write for the data's folder. */
  | { readonly type: 'inverseTable'; readonly save: boolean }
  /** Show group `group` (an index into the overview's groups) of the grouped run `setId`; the host answers with `groupResult`. */
  | { readonly type: 'selectGroup'; readonly setId: number; readonly group: number }
  /** Show the surface run `runId` sliced at these values (at most MAX_SLICES; none: its quartiles) of one input; the host answers with `surface`. */
  | { readonly type: 'surfaceSlices'; readonly runId: number; readonly input: 'x' | 'x2'; readonly at: readonly number[] }
  /** Show the surface run `runId` at a df pair picked by hand (df of the first input, of the second); saving then uses it. The host answers with `surface` or `failed`. */
  | { readonly type: 'surfacePair'; readonly runId: number; readonly x: number; readonly x2: number }
  /** Go back to the pair the rule chose for the surface run `runId`. */
  | { readonly type: 'surfaceRule'; readonly runId: number }
  /** Save the surface table and surface record of run `runId` as shown (answer: `saved` or `saveFailed`). */
  | { readonly type: 'surfaceSave'; readonly requestId: number; readonly runId: number };

/** The panel's folding sections of details, by id, in the order the panel shows them. */
export const FOLD_IDS = ['residual-checks', 'influential-rows', 'calibration', 'candidates', 'model-report', 'notes'] as const;
/** One folding section of the panel. */
export type FoldId = (typeof FOLD_IDS)[number];

/**
 * What the panel keeps across reloads (the webview's saved state): its data file, the run
 * it showed, the rule the person chose, the model options set in the panel, and how the
 * person left the view (open sections, the error figure's range). After a window reload
 * the host reads it back to restore the panel, so it is checked like a message.
 */
export interface PanelState {
  /** The data file's URI as text. */
  readonly file: string;
  readonly runId?: number;
  readonly rule?: RuleSpec;
  /** Present when the panel's controls set the model options (they override the settings for this file). */
  readonly model?: ModelChoice;
  /** The folding sections left open (each at most once). */
  readonly open?: readonly FoldId[];
  /** What the error figure shows: the window around the decision or every candidate. */
  readonly errorRange?: 'decision' | 'all';
  /** Present when the panel set the candidate df (as the command line's --df takes them); they override the settings for this file. */
  readonly candidates?: string;
  /** True when the person asked to see every listed influential row, not only the first ten. */
  readonly allInfluential?: boolean;
  /** A grouped run: the name of the group shown (text from the CSV). */
  readonly group?: string;
}

/** Compile-time exhaustiveness check for switches over message tags. */
export function unreachable(x: never): never {
  throw new Error(`unexpected message ${JSON.stringify(x)}`);
}

/** Longest text a message field may hold (status and error lines, file names, notes). */
export const MAX_MESSAGE_TEXT = 65_536;
/** Most files one `saved` answer lists (table, record, code files, report and its figures). */
export const MAX_SAVED_FILES = 64;
/** Most groups one grouped run may show. */
export const MAX_GROUPS = 100_000;
/** Deepest nesting of objects and arrays a payload or detail may have. */
const MAX_DEPTH = 16;

type Fields = Readonly<Record<string, unknown>>;

/** `v` as a record of its own fields when it is a plain object (not an array, not a class instance), else undefined. */
function plainObject(v: unknown): Fields | undefined {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) return undefined;
  const proto: unknown = Object.getPrototypeOf(v);
  return proto === Object.prototype || proto === null ? (v as Fields) : undefined;
}

/** True when the own keys of `o` are exactly the required ones plus any of the optional ones. */
function hasExactKeys(o: Fields, required: readonly string[], optional: readonly string[] = []): boolean {
  const keys = Object.keys(o);
  if (Object.getOwnPropertySymbols(o).length > 0) return false;
  for (const k of required) if (!Object.prototype.hasOwnProperty.call(o, k)) return false;
  return keys.every((k) => required.includes(k) || optional.includes(k));
}

const isFiniteNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const isId = (v: unknown): v is number => Number.isSafeInteger(v) && (v as number) >= 0;
const isPositive = (v: unknown): v is number => isFiniteNumber(v) && v > 0;
const isText = (v: unknown): v is string => typeof v === 'string' && v.length <= MAX_MESSAGE_TEXT;
const isGroupIndex = (v: unknown): v is number => isId(v) && v < MAX_GROUPS;

/** Keys that could reach an object's prototype when copied carelessly. */
const FORBIDDEN_KEYS: ReadonlySet<string> = new Set(['__proto__', 'constructor', 'prototype']);

/**
 * True when `v` is plain data: plain objects, arrays, strings under MAX_MESSAGE_TEXT,
 * numbers (NaN included: a GCV standard error is NaN), booleans, null and undefined, at
 * most MAX_DEPTH deep, with no `__proto__`, `constructor` or `prototype` key anywhere.
 * O(size of v).
 */
function isPlainData(v: unknown, depth = 0): boolean {
  if (v === null || v === undefined || typeof v === 'number' || typeof v === 'boolean') return true;
  if (typeof v === 'string') return v.length <= MAX_MESSAGE_TEXT;
  if (depth >= MAX_DEPTH) return false;
  if (Array.isArray(v)) {
    for (const item of v) if (!isPlainData(item, depth + 1)) return false;
    return true;
  }
  const o = plainObject(v);
  if (!o || Object.getOwnPropertySymbols(o).length > 0) return false;
  for (const k of Object.keys(o)) if (FORBIDDEN_KEYS.has(k) || !isPlainData(o[k], depth + 1)) return false;
  return true;
}

const OUTCOME_IDS: readonly string[] = OUTCOME_LIST.map((o) => o.id);
const SHAPE_NAMES: readonly string[] = SHAPES;

/** True when `r` is a well-formed RuleSpec: a known kind with exactly its fields (tolerance 0-100 %, a positive df). */
export function isRuleSpec(r: unknown): r is RuleSpec {
  const o = plainObject(r);
  if (!o) return false;
  switch (o.kind) {
    case 'least-error':
    case 'one-se':
      return hasExactKeys(o, ['kind']);
    case 'simplest-within':
      return hasExactKeys(o, ['kind', 'percent']) && isFiniteNumber(o.percent) && o.percent >= 0 && o.percent <= MAX_TOLERANCE_PERCENT;
    case 'pick':
      return hasExactKeys(o, ['kind', 'df']) && isPositive(o.df);
    default:
      return false;
  }
}

/** True when `m` is a well-formed ModelChoice: a known outcome, distinct known shapes, a boolean (combinations are checked by the host). */
export function isModelChoice(m: unknown): m is ModelChoice {
  const o = plainObject(m);
  if (!o || !hasExactKeys(o, ['outcome', 'shape', 'robust'])) return false;
  const shape = o.shape;
  return (
    typeof o.outcome === 'string' &&
    OUTCOME_IDS.includes(o.outcome) &&
    Array.isArray(shape) &&
    shape.length <= SHAPE_NAMES.length &&
    shape.every((s, i) => typeof s === 'string' && SHAPE_NAMES.includes(s) && shape.indexOf(s) === i) &&
    typeof o.robust === 'boolean'
  );
}

/** Longest candidate text a message may carry (a range or a list of up to MAX_CANDIDATES df). */
const MAX_CANDIDATE_TEXT = 2048;

/** True when `t` is candidate df text the command line's --df accepts (a df, a list or a range; core/tune/candidates.ts parseDfList). */
export function isCandidateText(t: unknown): t is string {
  if (typeof t !== 'string' || t.length === 0 || t.length > MAX_CANDIDATE_TEXT) return false;
  try {
    return parseDfList(t).length > 0;
  } catch {
    return false;
  }
}

/** True when `m` is a PanelMessage (the host checks everything it receives). */
export function isPanelMessage(m: unknown): m is PanelMessage {
  const o = plainObject(m);
  if (!o) return false;
  switch (o.type) {
    case 'ready':
    case 'rerun':
    case 'stop':
      return hasExactKeys(o, ['type']);
    case 'needDetail':
      return hasExactKeys(o, ['type', 'runId', 'df']) && isId(o.runId) && isPositive(o.df);
    case 'choice':
      return hasExactKeys(o, ['type', 'runId', 'rule', 'df']) && isId(o.runId) && isPositive(o.df) && isRuleSpec(o.rule);
    case 'save':
    case 'refitAndSave':
      return hasExactKeys(o, ['type', 'requestId', 'runId', 'rule']) && isId(o.requestId) && isId(o.runId) && isRuleSpec(o.rule);
    case 'revealLine':
      return hasExactKeys(o, ['type', 'line']) && isId(o.line) && o.line >= 1;
    case 'model':
      return hasExactKeys(o, ['type', 'runId', 'model']) && isId(o.runId) && isModelChoice(o.model);
    case 'candidates':
      return hasExactKeys(o, ['type', 'runId', 'candidates']) && isId(o.runId) && isCandidateText(o.candidates);
    case 'inverseTable':
      return hasExactKeys(o, ['type', 'save']) && typeof o.save === 'boolean';
    case 'selectGroup':
      return hasExactKeys(o, ['type', 'setId', 'group']) && isId(o.setId) && isGroupIndex(o.group);
    case 'surfaceSlices':
      return (
        hasExactKeys(o, ['type', 'runId', 'input', 'at']) && isId(o.runId) && (o.input === 'x' || o.input === 'x2') && Array.isArray(o.at) && o.at.length <= MAX_SLICES && o.at.every(isFiniteNumber)
      );
    case 'surfacePair':
      return hasExactKeys(o, ['type', 'runId', 'x', 'x2']) && isId(o.runId) && isSurfaceDf(o.x) && isSurfaceDf(o.x2);
    case 'surfaceRule':
      return hasExactKeys(o, ['type', 'runId']) && isId(o.runId);
    case 'surfaceSave':
      return hasExactKeys(o, ['type', 'requestId', 'runId']) && isId(o.requestId) && isId(o.runId);
    default:
      return false;
  }
}

/** Largest df of one input a picked pair may name (the natural spline's df of a curve is bounded alike by its rows; the host checks the data). */
export const MAX_SURFACE_INPUT_DF = 100;

/** True when `d` is a whole df of one input of a surface, 1 to MAX_SURFACE_INPUT_DF. */
const isSurfaceDf = (d: unknown): d is number => Number.isSafeInteger(d) && (d as number) >= 1 && (d as number) <= MAX_SURFACE_INPUT_DF;

/** Numbers only, at most `max` of them (null stands for NaN after a JSON round trip). */
const isBoundedNumbers = (v: unknown, max: number): boolean => isNumberList(v) && v.length <= max;

/** True when `v` is a SurfaceView: its fields with the right types, sizes within the view model's bounds, plain data throughout. */
function isSurfaceView(v: unknown): v is SurfaceView {
  const o = plainObject(v);
  if (
    !o ||
    !hasExactKeys(o, ['runId', 'fileName', 'labels', 'rows', 'pair', 'byHand', 'explanation', 'fitLine', 'notes', 'grid', 'readings', 'slices', 'residuals', 'caution'], ['landscape']) ||
    !isId(o.runId) ||
    !isText(o.fileName) ||
    typeof o.byHand !== 'boolean' ||
    !isText(o.explanation) ||
    !isText(o.fitLine) ||
    !isText(o.caution) ||
    !Array.isArray(o.notes) ||
    !o.notes.every(isText)
  )
    return false;
  const labels = plainObject(o.labels);
  if (!labels || !hasExactKeys(labels, ['x', 'x2', 'y']) || !isText(labels.x) || !isText(labels.x2) || !isText(labels.y)) return false;
  const rows = plainObject(o.rows);
  if (!rows || !hasExactKeys(rows, ['used', 'rejected']) || !isId(rows.used) || !isId(rows.rejected)) return false;
  const pair = plainObject(o.pair);
  if (!pair || !hasExactKeys(pair, ['x', 'x2']) || !isSurfaceDf(pair.x) || !isSurfaceDf(pair.x2)) return false;
  const nodes = VIEW_NODES * VIEW_NODES;
  const grid = plainObject(o.grid);
  if (
    !grid ||
    !hasExactKeys(grid, ['xs', 'x2s', 'fit', 'uncovered']) ||
    !isBoundedNumbers(grid.xs, VIEW_NODES) ||
    !isBoundedNumbers(grid.x2s, VIEW_NODES) ||
    !isBoundedNumbers(grid.fit, nodes) ||
    !isBoundedNumbers(grid.uncovered, nodes) ||
    (grid.fit as unknown[]).length !== (grid.xs as unknown[]).length * (grid.x2s as unknown[]).length ||
    (grid.uncovered as unknown[]).length !== (grid.fit as unknown[]).length
  )
    return false;
  const readings = plainObject(o.readings);
  if (!readings || !hasExactKeys(readings, ['x', 'x2', 'every']) || !isBoundedNumbers(readings.x, VIEW_READINGS) || !isBoundedNumbers(readings.x2, VIEW_READINGS) || !isPositive(readings.every))
    return false;
  const slices = plainObject(o.slices);
  if (!slices || !hasExactKeys(slices, ['input', 'along', 'curves']) || (slices.input !== 'x' && slices.input !== 'x2') || !isBoundedNumbers(slices.along, SLICE_POINTS)) return false;
  if (!Array.isArray(slices.curves) || slices.curves.length > MAX_SLICES) return false;
  for (const c of slices.curves) {
    const s = plainObject(c);
    if (!s || !hasExactKeys(s, ['at', 'fit', 'ciLower', 'ciUpper', 'piLower', 'piUpper']) || !isFiniteNumber(s.at)) return false;
    if (!['fit', 'ciLower', 'ciUpper', 'piLower', 'piUpper'].every((k) => isBoundedNumbers(s[k], SLICE_POINTS))) return false;
  }
  const residuals = plainObject(o.residuals);
  if (!residuals || !hasExactKeys(residuals, ['x', 'x2'])) return false;
  for (const r of [residuals.x, residuals.x2]) {
    const res = plainObject(r);
    if (!res || !hasExactKeys(res, ['kind', 'x', 'r'], ['count']) || (res.kind !== 'points' && res.kind !== 'bins')) return false;
    if (!isBoundedNumbers(res.x, RESIDUAL_POINTS) || !isBoundedNumbers(res.r, RESIDUAL_POINTS) || (res.x as unknown[]).length !== (res.r as unknown[]).length) return false;
    if (res.count !== undefined && !isBoundedNumbers(res.count, RESIDUAL_POINTS)) return false;
  }
  if (o.landscape !== undefined) {
    const l = plainObject(o.landscape);
    if (!l || !hasExactKeys(l, ['metric', 'dfX', 'dfX2', 'mean', 'se', 'ruled', 'lines']) || !isText(l.metric)) return false;
    if (!isBoundedNumbers(l.dfX, MAX_SURFACE_INPUT_DF) || !isBoundedNumbers(l.dfX2, MAX_SURFACE_INPUT_DF)) return false;
    const cells = (l.dfX as unknown[]).length * (l.dfX2 as unknown[]).length;
    if (!isNumberList(l.mean) || !isNumberList(l.se) || l.mean.length !== cells || l.se.length !== cells) return false;
    const ruled = plainObject(l.ruled);
    if (!ruled || !hasExactKeys(ruled, ['x', 'x2']) || !isSurfaceDf(ruled.x) || !isSurfaceDf(ruled.x2)) return false;
    if (!Array.isArray(l.lines) || l.lines.length > MAX_SURFACE_INPUT_DF + 2 || !l.lines.every(isText)) return false;
  }
  return isPlainData(o);
}

/** Longest data file URI a panel state may name. */
const MAX_URI_TEXT = 8192;

/** True when `s` is a panel's saved state (see PanelState); anything else is ignored when a window restores its panels. */
export function isPanelState(s: unknown): s is PanelState {
  const o = plainObject(s);
  return (
    o !== undefined &&
    hasExactKeys(o, ['file'], ['runId', 'rule', 'model', 'open', 'errorRange', 'candidates', 'allInfluential', 'group']) &&
    typeof o.file === 'string' &&
    o.file.length > 0 &&
    o.file.length <= MAX_URI_TEXT &&
    (o.runId === undefined || isId(o.runId)) &&
    (o.rule === undefined || isRuleSpec(o.rule)) &&
    (o.model === undefined || isModelChoice(o.model)) &&
    (o.open === undefined || isFoldList(o.open)) &&
    (o.errorRange === undefined || o.errorRange === 'decision' || o.errorRange === 'all') &&
    (o.candidates === undefined || isCandidateText(o.candidates)) &&
    (o.allInfluential === undefined || typeof o.allInfluential === 'boolean') &&
    (o.group === undefined || (isText(o.group) && o.group.length > 0))
  );
}

const FOLD_NAMES: readonly string[] = FOLD_IDS;

/** True when `v` lists known folding sections, each at most once. */
function isFoldList(v: unknown): v is readonly FoldId[] {
  return Array.isArray(v) && v.length <= FOLD_NAMES.length && v.every((f) => typeof f === 'string' && FOLD_NAMES.includes(f)) && new Set(v).size === v.length;
}

/** True when every named field of `o` is an array. */
const arrays = (o: Fields, keys: readonly string[]): boolean => keys.every((k) => Array.isArray(o[k]));

/** The fields of a payload the panel reads before anything else; the rest is checked as plain data. */
function isPanelPayload(p: unknown): p is PanelPayload {
  const o = plainObject(p);
  if (!o || !isId(o.runId) || !isPlainData(o)) return false;
  const source = plainObject(o.source);
  const rows = plainObject(o.rows);
  const model = plainObject(o.model);
  const data = plainObject(o.data);
  return (
    source !== undefined &&
    typeof source.fileName === 'string' &&
    typeof source.xLabel === 'string' &&
    typeof source.yLabel === 'string' &&
    rows !== undefined &&
    [rows.used, rows.rejected, rows.heldOut].every(isId) &&
    model !== undefined &&
    typeof model.outcome === 'string' &&
    typeof model.words === 'string' &&
    data !== undefined &&
    (data.kind === 'points' || data.kind === 'bins') &&
    typeof o.metric === 'string' &&
    isRuleSpec(o.rule) &&
    isFiniteNumber(o.tolerancePercent) &&
    typeof o.caution === 'string' &&
    arrays(o, ['candidates', 'notes', 'warnings', 'grid', 'curves', 'details']) &&
    (o.refit === undefined || isRefitView(o.refit))
  );
}

/** True when `r` is a RefitView: its reason and nothing but finite numbers (counts and df positive or zero) and a boolean. */
function isRefitView(r: unknown): boolean {
  const o = plainObject(r);
  return (
    o !== undefined &&
    hasExactKeys(o, ['reason', 'rowsBefore', 'rowsNow', 'dfBefore', 'dfNow', 'ruleDropped', 'largestChange', 'atX', 'ySpread']) &&
    (o.reason === 'saved' || o.reason === 'asked') &&
    isId(o.rowsBefore) &&
    isId(o.rowsNow) &&
    isPositive(o.dfBefore) &&
    isPositive(o.dfNow) &&
    typeof o.ruleDropped === 'boolean' &&
    isFiniteNumber(o.largestChange) &&
    o.largestChange >= 0 &&
    isFiniteNumber(o.atX) &&
    isFiniteNumber(o.ySpread) &&
    o.ySpread >= 0
  );
}

/** True when `s` is a DataStateView with exactly its fields. */
function isDataState(s: unknown): s is DataStateView {
  const o = plainObject(s);
  if (!o || !hasExactKeys(o, ['analysed', 'refit', 'followedOnDisk'], ['change'])) return false;
  if (o.analysed !== 'disk' && o.analysed !== 'unsaved') return false;
  if (o.refit !== 'automatic' && o.refit !== 'asked' && o.refit !== 'manual') return false;
  if (typeof o.followedOnDisk !== 'boolean') return false;
  if (o.change === undefined) return true;
  const c = plainObject(o.change);
  return (
    c !== undefined &&
    hasExactKeys(c, ['where', 'added', 'removed', 'changed', 'header']) &&
    (c.where === 'editor' || c.where === 'disk' || c.where === 'missing') &&
    isId(c.added) &&
    isId(c.removed) &&
    isId(c.changed) &&
    typeof c.header === 'boolean'
  );
}

/** The fields of a detail the panel reads first; the rest is checked as plain data. */
function isFitDetail(d: unknown): d is FitDetail {
  const o = plainObject(d);
  return (
    o !== undefined && isPositive(o.df) && (o.residualKind === 'response' || o.residualKind === 'deviance') && arrays(o, ['notes', 'knots', 'influential', 'checks', 'warnings']) && isPlainData(o)
  );
}

/** Numbers, null standing for a value without one (NaN after a JSON round trip). */
const isNumberList = (v: unknown): v is readonly number[] => Array.isArray(v) && v.every((x) => typeof x === 'number' || x === null);

/** True when `g` is one group of an overview: its fields with the right types (numbers may be NaN where a fit gives none). */
function isGroupSummary(g: unknown): boolean {
  const o = plainObject(g);
  return (
    o !== undefined &&
    hasExactKeys(o, ['name', 'rows', 'df', 'sigma', 'lo', 'hi', 'curve', 'x', 'y', 'warnings']) &&
    isText(o.name) &&
    o.name.length > 0 &&
    isId(o.rows) &&
    isPositive(o.df) &&
    (typeof o.sigma === 'number' || o.sigma === null) &&
    isFiniteNumber(o.lo) &&
    isFiniteNumber(o.hi) &&
    o.lo <= o.hi &&
    isNumberList(o.curve) &&
    isNumberList(o.x) &&
    isNumberList(o.y) &&
    o.x.length === o.y.length &&
    isId(o.warnings)
  );
}

/** True when `v` is a GroupsView: exactly its fields, at least one and at most MAX_GROUPS groups, plain data throughout. */
function isGroupsView(v: unknown): v is GroupsView {
  const o = plainObject(v);
  if (!o || !hasExactKeys(o, ['setId', 'fileName', 'groupLabel', 'xLabel', 'yLabel', 'rejected', 'groups'], ['shared', 'common'])) return false;
  if (!isId(o.setId) || !isText(o.fileName) || !isText(o.groupLabel) || !isText(o.xLabel) || !isText(o.yLabel) || !isId(o.rejected)) return false;
  if (!Array.isArray(o.groups) || o.groups.length === 0 || o.groups.length > MAX_GROUPS || !o.groups.every(isGroupSummary)) return false;
  if (o.common !== undefined && !isText(o.common)) return false;
  if (o.shared !== undefined) {
    const sh = plainObject(o.shared);
    if (!sh || !hasExactKeys(sh, ['df', 'reason']) || !isPositive(sh.df) || !isText(sh.reason)) return false;
  }
  return isPlainData(o);
}

/** True when `m` is a HostMessage (the panel checks everything it receives before showing it). */
export function isHostMessage(m: unknown): m is HostMessage {
  const o = plainObject(m);
  if (!o) return false;
  switch (o.type) {
    case 'file':
      return hasExactKeys(o, ['type', 'uri', 'fileName']) && typeof o.uri === 'string' && o.uri.length <= MAX_URI_TEXT && isText(o.fileName);
    case 'running':
      return (
        hasExactKeys(o, ['type', 'runId', 'message'], ['fraction']) &&
        isId(o.runId) &&
        isText(o.message) &&
        (o.fraction === undefined || (isFiniteNumber(o.fraction) && o.fraction >= 0 && o.fraction <= 1))
      );
    case 'failed':
      return hasExactKeys(o, ['type', 'runId', 'message']) && isId(o.runId) && isText(o.message);
    case 'dataState':
      return hasExactKeys(o, ['type', 'runId', 'state']) && isId(o.runId) && isDataState(o.state);
    case 'result':
      return hasExactKeys(o, ['type', 'payload']) && isPanelPayload(o.payload);
    case 'detail':
      return hasExactKeys(o, ['type', 'runId', 'detail']) && isId(o.runId) && isFitDetail(o.detail);
    case 'saved':
      return (
        hasExactKeys(o, ['type', 'requestId', 'files'], ['note']) &&
        isId(o.requestId) &&
        Array.isArray(o.files) &&
        o.files.length <= MAX_SAVED_FILES &&
        o.files.every(isText) &&
        (o.note === undefined || isText(o.note))
      );
    case 'saveFailed':
      return hasExactKeys(o, ['type', 'requestId', 'message']) && isId(o.requestId) && isText(o.message);
    case 'groups':
      return hasExactKeys(o, ['type', 'view']) && isGroupsView(o.view);
    case 'groupResult':
      return hasExactKeys(o, ['type', 'setId', 'group', 'payload']) && isId(o.setId) && isGroupIndex(o.group) && isPanelPayload(o.payload);
    case 'surface':
      return hasExactKeys(o, ['type', 'view']) && isSurfaceView(o.view);
    default:
      return false;
  }
}
