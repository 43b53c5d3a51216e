/**
 * Panel payloads built by the real core (ingest, analyse, view) from the open data sets
 * in test/e2e/fixtures (R's `cars`, MASS::mcycle, MASS::menarche, datasets::CO2 and
 * datasets::trees; see make-fixtures.R there).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../core/analysis/analysis';
import type { Analysis, AnalysisOptions } from '../../core/analysis/types';
import { parseCsvText } from '../../core/ingest/reader';
import { selectColumns } from '../../core/ingest/select';
import { selectTrials } from '../../core/ingest/trials';
import type { PanelPayload } from '../../core/view/model';
import type { XYData } from '../../core/types';
import { buildPanelPayload } from '../../core/view/payload';
import { analyseGroups } from '../../core/groups/analyse';
import { commonCurveFor } from '../../core/groups/commonRun';
import { splitByColumn } from '../../core/groups/split';
import { buildGroupsView, type GroupsView } from '../../core/view/groups';
import { selectSurfaceColumns } from '../../core/surface/columns';
import { prepareSurface } from '../../core/surface/data';
import { fitSurface } from '../../core/surface/fit';
import { tuneSurface, type SurfaceTuneResult } from '../../core/surface/tune';
import { buildSurfaceView, type SurfaceInput, type SurfaceView } from '../../core/view/surface';

export const fixtureDir = join(__dirname, '..', 'e2e', 'fixtures');

/** One analysed fixture: the payload plus what the fake host needs to answer detail requests. */
export interface Fixture {
  readonly payload: PanelPayload;
  readonly analysis: Analysis;
  readonly data: XYData;
}

/**
 * Reads a fixture CSV (optionally with its header line replaced) and analyses columns x, y
 * (with `trials`, a binomial outcome's trials column, as the host does).
 */
export async function analysedFixture(file: string, x: string, y: string, options: AnalysisOptions, header?: string, trials?: string): Promise<Fixture> {
  let text = readFileSync(join(fixtureDir, file), 'utf8');
  if (header !== undefined) text = header + text.slice(text.indexOf('\n'));
  const table = parseCsvText(text, { file });
  const sel = trials !== undefined ? selectTrials(table, { x, y }, trials, file) : selectColumns(table, { x, y }, file);
  const analysis = await analyse(sel.data, options);
  const payload = buildPanelPayload({
    runId: 1,
    analysis,
    source: { fileName: file, xLabel: sel.labels.x, yLabel: sel.labels.y },
    rejected: sel.rejected.length,
    heldOut: 0,
    tolerancePercent: 2,
    trialsLabel: trials !== undefined ? sel.labels.weights : undefined,
  });
  return { payload, analysis, data: analysis.data };
}

/** MASS::mcycle, natural spline df 3..15, 10-fold cross-validation repeated 3 times (seed 1), one-SE rule. */
export function mcycleFixture(): Promise<Fixture> {
  return analysedFixture('mcycle.csv', 'times', 'accel', {
    kind: 'natural-spline',
    candidates: [3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15],
    resample: { kind: 'folds', folds: 10, repeats: 3 },
    rule: { kind: 'one-se' },
    seed: 1,
  });
}

/** A grouped run as the host shows it: the overview, and each group's panel under a run id. */
export interface GroupsFixture {
  readonly view: GroupsView;
  readonly analyses: readonly Analysis[];
  /** The panel of group `group` as the host sends it under run id `runId`. */
  payloadFor(group: number, runId: number): PanelPayload;
}

/**
 * datasets::CO2 split by plant (12 groups of 7 readings), each tuned with natural splines of
 * df 2 to 4 by 7-fold cross-validation (seed 1), one-SE rule; the overview under set id `setId`.
 */
export async function co2GroupsFixture(setId = 10): Promise<GroupsFixture> {
  const table = parseCsvText(readFileSync(join(fixtureDir, 'co2.csv'), 'utf8'), { file: 'co2.csv', keepText: 'plant' });
  const split = splitByColumn(table, { x: 'conc', y: 'uptake' }, 'plant', 'co2.csv');
  const analysis = await analyseGroups(split.groups, { kind: 'natural-spline', candidates: [2, 3, 4], resample: { kind: 'folds', folds: 7, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1 }, false);
  const view = buildGroupsView({ setId, fileName: 'co2.csv', split, analysis, common: commonCurveFor(split, analysis) });
  const analyses = analysis.groups.map((g) => g.analysis);
  return {
    view,
    analyses,
    payloadFor: (group, runId) =>
      buildPanelPayload({
        runId,
        analysis: analyses[group] as Analysis,
        source: { fileName: 'co2.csv', xLabel: split.labels.x, yLabel: split.labels.y },
        rejected: split.rejected.length,
        heldOut: 0,
        tolerancePercent: 2,
      }),
  };
}

/** A surface run as the host shows it: the view, and what the stub host needs to answer the panel's requests. */
export interface SurfaceFixture {
  readonly view: SurfaceView;
  readonly tune: SurfaceTuneResult;
  /** The view of the same run under `runId` at another pair (by hand) or with other slices, built by core as the host does. */
  viewWith(runId: number, options: { readonly pair?: { readonly x: number; readonly x2: number }; readonly slices?: { readonly input: SurfaceInput; readonly at?: readonly number[] } }): SurfaceView;
}

/**
 * datasets::trees (Ryan, Joiner & Ryan 1976; test/e2e/fixtures/make-fixtures.R): Volume over
 * Girth and Height, df pairs 1..9 x 1..9 (the command line's default) tuned by 5-fold
 * cross-validation (seed 1) with the one-SE rule, as the editor's run does (extension/surfaceRun.ts).
 */
export async function treesSurfaceFixture(runId = 3): Promise<SurfaceFixture> {
  const table = parseCsvText(readFileSync(join(fixtureDir, 'trees.csv'), 'utf8'), { file: 'trees.csv' });
  const selection = selectSurfaceColumns(table, { u: 'Girth', v: 'Height', y: 'Volume' }, 'trees.csv');
  const prepared = prepareSurface(selection.data);
  const { result: tune, fit } = await tuneSurface(prepared, { resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1 });
  const base = { fileName: 'trees.csv', labels: selection.labels, rejected: selection.rejected.length, prepared, tune };
  const viewWith: SurfaceFixture['viewWith'] = (id, options) => {
    const byHand = options.pair !== undefined && (options.pair.x !== fit.dfU || options.pair.x2 !== fit.dfV);
    const shown = byHand && options.pair ? fitSurface(prepared, { dfU: options.pair.x, dfV: options.pair.x2 }) : fit;
    return buildSurfaceView({ ...base, runId: id, fit: shown, byHand, slices: options.slices });
  };
  return { view: viewWith(runId, {}), tune, viewWith };
}
