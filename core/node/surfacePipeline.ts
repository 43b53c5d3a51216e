/**
 * One surface fit from a file: read the CSV, choose the columns, tune the df pair (or fit
 * the one given), and build every output's text. Shared by `knotwise fit --x2` and
 * `knotwise check` of a surface record, so both take exactly the same steps.
 */
import { InputError, isAllocationFailure, outOfMemory } from '../errors';
import { selectSurfaceColumns, type SurfaceSelection } from '../surface/columns';
import { prepareSurface } from '../surface/data';
import { buildSurfaceDeliverables, type SurfaceDeliverables } from '../surface/deliver';
import { fitSurface, type SurfaceFit } from '../surface/fit';
import type { SurfacePlan } from '../surface/spec';
import { tuneSurface, type SurfaceTuneResult } from '../surface/tune';
import type { Progress } from '../tune/types';
import { sha256 } from './outputs';
import { dataSource } from './pipeline';
import { readCsvFile, type FileTable } from './readCsv';

/** Everything one surface run produced. */
export interface SurfaceRun {
  readonly table: FileTable;
  readonly selection: SurfaceSelection;
  readonly tune?: SurfaceTuneResult | undefined;
  readonly fit: SurfaceFit;
  readonly deliverables: SurfaceDeliverables;
}

/**
 * Reads `file`, fits as `plan` says, and builds the outputs as they would be written into
 * `outFolder` (the data path in the record and the regenerate command is relative to it).
 * Throws InputError (with file, line and column where known) for bad input.
 * Example: (await runSurfacePipeline('rig.csv', plan, 'out')).deliverables.files.
 */
export async function runSurfacePipeline(file: string, plan: SurfacePlan, outFolder: string, progress?: Progress): Promise<SurfaceRun> {
  const table = await readCsvFile(file);
  const selection = selectSurfaceColumns(table, plan.columns, file);
  let tune: SurfaceTuneResult | undefined;
  let fit: SurfaceFit;
  let prepared;
  try {
    prepared = prepareSurface(selection.data);
    if (plan.tune) {
      const r = await tuneSurface(prepared, { candidatesU: plan.candidatesU, candidatesV: plan.candidatesV, resample: plan.resample, rule: plan.rule, seed: plan.seed }, progress);
      tune = r.result;
      fit = r.fit;
    } else fit = fitSurface(prepared, { dfU: plan.candidatesU?.[0] as number, dfV: plan.candidatesV?.[0] as number });
  } catch (e) {
    if (isAllocationFailure(e)) throw outOfMemory(selection.data.u.length, 'fitting', { file });
    if (e instanceof InputError && e.place.file === undefined) throw new InputError(e.raw, { ...e.place, file });
    throw e;
  }
  const deliverables = buildSurfaceDeliverables({
    plan,
    ...dataSource(file, outFolder, table),
    labels: selection.labels,
    units: selection.units,
    rejected: selection.rejected,
    prepared,
    tune,
    fit,
    sha256,
  });
  return { table, selection, tune, fit, deliverables };
}
