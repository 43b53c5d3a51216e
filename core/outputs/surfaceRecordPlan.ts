/**
 * Reading a surface record (core/surface/deliver.ts) back into the plan that made it, so
 * `knotwise check` can rebuild every output of the surface from the data.
 */
import { InputError } from '../errors';
import { parseResampling } from '../registry/resampling/index';
import { checkReach } from '../surface/coverage';
import { SURFACE_RECORD_FORMAT, SURFACE_RECORD_VERSION } from '../surface/format';
import { parseSurfaceDf, parseSurfaceRule, type SurfacePlan } from '../surface/spec';
import { parseGrid } from '../table/grid';
import { emitOf, Fields } from './recordPlan';

type Json = Record<string, unknown>;

/** A surface record's plan and provenance. */
export interface SurfaceRecordRun {
  readonly plan: SurfacePlan;
  readonly dataPath: string;
  readonly dataSha256: string;
  readonly toolVersion: string;
  /** Every output the record lists, with its SHA-256. */
  readonly files: readonly { readonly file: string; readonly sha256: string }[];
}

/** True when a parsed JSON value claims to be a surface record. */
export function isSurfaceRecord(json: unknown): boolean {
  return json !== null && typeof json === 'object' && (json as Json).format === SURFACE_RECORD_FORMAT;
}

/**
 * Reads a parsed surface record into its plan. Throws InputError naming the key at fault, an
 * older or newer version, or a value the command line would refuse. O(size).
 * Example: readSurfaceRecord(JSON.parse(text), 'rig.surface.fit.json').plan.columns.v.
 */
export function readSurfaceRecord(json: unknown, where: string): SurfaceRecordRun {
  const f = new Fields(where, 'surface record');
  if (!isSurfaceRecord(json)) throw new InputError(`not a surface record: "format" is not "${SURFACE_RECORD_FORMAT}"`, { file: where });
  const rec = json as Json;
  const version = f.num(rec, 'version');
  if (version !== SURFACE_RECORD_VERSION) throw new InputError(`surface record version ${version}; this Knotwise reads version ${SURFACE_RECORD_VERSION}`, { file: where });
  const data = f.obj(rec, 'data');
  const columns = f.obj(data, 'columns', 'data.columns');
  const spec = f.obj(rec, 'spec');
  const tool = f.obj(rec, 'tool');
  const optionalText = (o: Json, key: string, path: string): string | undefined => (o[key] === null || o[key] === undefined ? undefined : f.str(o, key, path));
  const cand = f.obj(spec, 'candidates', 'spec.candidates');
  const cu = optionalText(cand, 'x', 'spec.candidates.x');
  const cv = optionalText(cand, 'x2', 'spec.candidates.x2');
  if ((cu === undefined) !== (cv === undefined)) f.fail('spec.candidates', 'must give both inputs or neither');
  const df = cu !== undefined && cv !== undefined ? f.parse('spec.candidates', () => parseSurfaceDf(`${cu}x${cv}`)) : undefined;
  const grids = f.obj(spec, 'grid', 'spec.grid');
  const gu = optionalText(grids, 'x', 'spec.grid.x');
  const gv = optionalText(grids, 'x2', 'spec.grid.x2');
  const weights = optionalText(columns, 'weights', 'data.columns.weights');
  const plan: SurfacePlan = {
    columns: { u: f.str(columns, 'x', 'data.columns.x'), v: f.str(columns, 'x2', 'data.columns.x2'), y: f.str(columns, 'y', 'data.columns.y'), ...(weights !== undefined ? { weights } : {}) },
    candidatesU: df?.[0],
    candidatesV: df?.[1],
    tune: f.bool(spec, 'tune', 'spec.tune'),
    resample: f.parse('spec.resampling', () => parseResampling(f.str(spec, 'resampling', 'spec.resampling'))),
    rule: f.parse('spec.rule', () => parseSurfaceRule(f.str(spec, 'rule', 'spec.rule'))),
    seed: f.num(spec, 'seed', 'spec.seed'),
    gridU: gu !== undefined ? f.parse('spec.grid.x', () => parseGrid(gu)) : undefined,
    gridV: gv !== undefined ? f.parse('spec.grid.x2', () => parseGrid(gv)) : undefined,
    reach: f.parse('spec.reach', () => checkReach(f.num(spec, 'reach', 'spec.reach'))),
    extrapolate: f.bool(spec, 'extrapolate', 'spec.extrapolate'),
    digits: f.num(spec, 'digits', 'spec.digits'),
    emit: emitOf(spec, f),
    report: f.bool(spec, 'report', 'spec.report'),
  };
  if (!plan.tune && df === undefined) f.fail('spec.candidates', 'must give the fitted pair when spec.tune is false');
  const files = f.arr(rec, 'outputs').map((o, i) => {
    if (o === null || typeof o !== 'object') return f.fail(`outputs[${i}]`, 'must be an object');
    return { file: f.str(o as Json, 'file', `outputs[${i}].file`), sha256: f.str(o as Json, 'sha256', `outputs[${i}].sha256`) };
  });
  return { plan, dataPath: f.str(data, 'path', 'data.path'), dataSha256: f.str(data, 'sha256', 'data.sha256'), toolVersion: f.str(tool, 'version', 'tool.version'), files };
}
