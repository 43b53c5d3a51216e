/**
 * A surface in the editor (two inputs and a reading, core/surface/): the column picks (the
 * first input, the second input, the reading, optional weights), the tuning of the df pair
 * with the settings' resampling, rule and seed and a cancellable progress notification, the
 * view the panel shows (core/view/surface.ts), a pair picked by hand, and saving exactly
 * what `knotwise fit <file> --x .. --x2 .. --y ..` writes (core/surface/deliver.ts) through
 * the same crash-safe commit as a curve table (extension/save.ts).
 */
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import type { ParsedTable } from '../core/ingest/types';
import { selectSurfaceColumns, type SurfaceSelection } from '../core/surface/columns';
import { DEFAULT_REACH } from '../core/surface/coverage';
import { prepareSurface, type PreparedSurface } from '../core/surface/data';
import { buildSurfaceDeliverables, type SurfaceDeliverables } from '../core/surface/deliver';
import { fitSurface, type SurfaceFit } from '../core/surface/fit';
import type { SurfaceRule } from '../core/surface/select';
import { parseSurfaceRule, type SurfacePlan } from '../core/surface/spec';
import { DEFAULT_RESAMPLING, parseResampling } from '../core/registry/resampling/index';
import { DEFAULT_RULE } from '../core/registry/rules/index';
import { tuneSurface, type SurfaceTuneResult } from '../core/surface/tune';
import { buildSurfaceView, type SurfaceInput, type SurfaceView } from '../core/view/surface';
import { pickOne, type ColumnChoice, type ColumnItem } from './columns';
import type { CsvSource } from './csvSource';
import { withRunProgress, type ProgressListener } from './run';
import { outputFolder, relativeDataPath, writeOutputSet, type OverwriteAnswer } from './save';
import type { Settings } from './settings';

/** Everything a surface run produced, and what the panel shows of it. */
export interface SurfaceRunState {
  readonly runId: number;
  readonly source: CsvSource;
  readonly choice: ColumnChoice & { readonly x2: string };
  readonly selection: SurfaceSelection;
  readonly prepared: PreparedSurface;
  readonly tune: SurfaceTuneResult;
  /** The fit of the pair the rule chose. */
  readonly ruled: SurfaceFit;
  /** The fit shown and saved: the rule's, or a pair picked by hand. */
  readonly shown: SurfaceFit;
  readonly byHand: boolean;
  readonly slices: { readonly input: SurfaceInput; readonly at?: readonly number[] | undefined };
  readonly view: SurfaceView;
}

/** The settings' rule as a surface rule (a setting never names a picked df; the one-SE rule stands in should it). */
function surfaceRule(settings: Settings): SurfaceRule {
  return settings.rule.kind === 'pick' ? { kind: 'one-se' } : settings.rule;
}

/** Items of one surface pick: the numeric columns not in `exclude`, with a first entry meaning none when `none` is given. */
function numericItems(table: ParsedTable, exclude: readonly string[], none?: { readonly label: string; readonly description: string }): ColumnItem[] {
  const out: ColumnItem[] = none ? [{ label: none.label, description: none.description }] : [];
  for (const c of table.columns) {
    if (!c.numeric || exclude.includes(c.label)) continue;
    out.push({ label: c.label, description: c.unit ? `[${c.unit}]` : '', column: c });
  }
  return out;
}

const NO_WEIGHTS = { label: 'No weights', description: 'every row counts the same' } as const;

/**
 * Asks for the first input, the second input, the reading and the optional weights of a
 * surface (numeric columns only), offering the remembered choice first; undefined when the
 * person dismissed a pick.
 */
export async function pickSurfaceColumns(
  table: ParsedTable,
  fileName: string,
  remembered: ColumnChoice | undefined,
  token: vscode.CancellationToken,
): Promise<(ColumnChoice & { x2: string }) | undefined> {
  const numeric = table.columns.filter((c) => c.numeric);
  if (numeric.length < 3) throw new Error(`${fileName} has ${numeric.length} numeric column${numeric.length === 1 ? '' : 's'}; a surface needs three (two inputs and the reading)`);
  const steps = 4;
  const x = await pickOne(`Knotwise surface: the first input of ${fileName}`, 1, numericItems(table, []), remembered?.x ?? numeric[0]?.label, token, steps);
  if (!x?.column) return undefined;
  const x2 = await pickOne(
    `Knotwise surface: the second input of ${fileName} (the reading depends on both)`,
    2,
    numericItems(table, [x.label]),
    typeof remembered?.x2 === 'string' ? remembered.x2 : numeric.find((c) => c.label !== x.label)?.label,
    token,
    steps,
  );
  if (!x2?.column) return undefined;
  const y = await pickOne(
    `Knotwise surface: the reading of ${fileName} (what the surface describes)`,
    3,
    numericItems(table, [x.label, x2.label]),
    remembered?.y ?? numeric.find((c) => c.label !== x.label && c.label !== x2.label)?.label,
    token,
    steps,
  );
  if (!y?.column) return undefined;
  const w = await pickOne(
    `Knotwise surface: weights for ${fileName} (optional)`,
    4,
    numericItems(table, [x.label, x2.label, y.label], NO_WEIGHTS),
    remembered?.weights ?? NO_WEIGHTS.label,
    token,
    steps,
  );
  if (!w) return undefined;
  return { x: x.label, x2: x2.label, y: y.label, weights: w.column ? w.label : undefined, per: null };
}

/**
 * Tunes the surface of `choice` on `source` with the settings' resampling, rule and seed
 * over the default candidate pairs (1 to 9 per input, at most the distinct values, as the
 * command line without --df), with a cancellable notification; rejects with CancelledError
 * when stopped and InputError for bad columns.
 */
export async function runSurface(
  runId: number,
  source: CsvSource,
  choice: ColumnChoice & { readonly x2: string },
  settings: Settings,
  token: vscode.CancellationToken,
  onProgress: ProgressListener,
): Promise<SurfaceRunState> {
  const selection = selectSurfaceColumns(source.table, { u: choice.x, v: choice.x2, y: choice.y, weights: choice.weights }, source.fileName);
  const prepared = prepareSurface(selection.data);
  const { result, fit } = await withRunProgress(`Knotwise: tuning the surface for ${source.fileName}`, token, onProgress, (progress) =>
    tuneSurface(prepared, { resample: settings.resample, rule: surfaceRule(settings), seed: settings.seed }, progress),
  );
  return surfaceState({ runId, source, choice, selection, prepared, tune: result, ruled: fit, shown: fit, byHand: false, slices: { input: 'x' } });
}

/** The state with its view (re)built. */
export function surfaceState(s: Omit<SurfaceRunState, 'view'>): SurfaceRunState {
  const view = buildSurfaceView({
    runId: s.runId,
    fileName: s.source.fileName,
    labels: s.selection.labels,
    rejected: s.selection.rejected.length,
    prepared: s.prepared,
    fit: s.shown,
    tune: s.tune,
    byHand: s.byHand,
    slices: s.slices,
  });
  return { ...s, view };
}

/** The state showing the pair (x, x2) picked by hand (the rule's own pair: back to the rule). Throws FitError when the data cannot support it. */
export function withPair(s: SurfaceRunState, x: number, x2: number): SurfaceRunState {
  if (x === s.ruled.dfU && x2 === s.ruled.dfV) return surfaceState({ ...s, shown: s.ruled, byHand: false });
  return surfaceState({ ...s, shown: fitSurface(s.prepared, { dfU: x, dfV: x2 }), byHand: true });
}

/**
 * The plan the command line carries out for this save: by the rule, `fit --x --x2 --y` with
 * the settings' resampling, rule and seed; a pair picked by hand, `--df <x>x<x2>` fitted as
 * given. Default grids (21 nodes per input), the default reach, the table settings'
 * extrapolation and digits; no code and no report.
 */
export function surfacePlan(s: SurfaceRunState, settings: Settings): SurfacePlan {
  const c = s.selection.labels;
  const base = {
    columns: { u: c.u, v: c.v, y: c.y, weights: c.weights },
    resample: s.tune.resample,
    rule: s.tune.selected.rule,
    seed: s.tune.seed,
    extrapolate: settings.extrapolate,
    reach: DEFAULT_REACH,
    digits: settings.digits,
    emit: [],
    report: false,
  };
  // A pair by hand is `--df <x>x<x2>` alone: the command line then records its default resampling, rule and seed, which played no part.
  const asGiven = { resample: parseResampling(DEFAULT_RESAMPLING), rule: parseSurfaceRule(DEFAULT_RULE), seed: 1 };
  return s.byHand ? { ...base, ...asGiven, tune: false, candidatesU: [s.shown.dfU], candidatesV: [s.shown.dfV] } : { ...base, tune: true };
}

/** Every output's text as the command line would write it into `folder`. Throws InputError when nodes lie beyond the readings without knotwise.table.extrapolate. */
export function surfaceDeliverables(s: SurfaceRunState, settings: Settings, dataUri: vscode.Uri, folder: vscode.Uri): SurfaceDeliverables {
  const name = s.source.fileName;
  const dot = name.lastIndexOf('.');
  return buildSurfaceDeliverables({
    plan: surfacePlan(s, settings),
    stem: dot > 0 ? name.slice(0, dot) : name,
    dataFile: name,
    dataPath: relativeDataPath(folder, dataUri),
    dataSha256: s.source.sha256,
    rowsRead: s.source.table.rowCount,
    labels: s.selection.labels,
    units: s.selection.units,
    rejected: s.selection.rejected,
    prepared: s.prepared,
    tune: s.byHand ? undefined : s.tune,
    fit: s.shown,
    sha256: (text) => createHash('sha256').update(text).digest('hex'),
  });
}

/** Writes the surface's outputs as one set; the written files (the record last), or undefined when the person declined to replace a file Knotwise did not write. */
export async function saveSurface(s: SurfaceRunState, settings: Settings, dataUri: vscode.Uri, answer: OverwriteAnswer): Promise<vscode.Uri[] | undefined> {
  const folder = outputFolder(dataUri, settings.outputFolder);
  const out = surfaceDeliverables(s, settings, dataUri, folder);
  const record = out.files.find((f) => f.kind === 'record');
  if (!record) throw new Error('buildSurfaceDeliverables returned no surface record');
  return writeOutputSet(folder, dataUri, out.files, record.name, answer, 'the new surface table and surface record');
}
