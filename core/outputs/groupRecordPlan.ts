/**
 * Reading a group record (core/groups/deliver.ts) back into the plan that made it, so
 * `knotwise check` can rebuild every group's outputs from the data.
 */
import { InputError } from '../errors';
import { GROUP_RECORD_FORMAT, GROUP_RECORD_VERSION, type GroupSpec } from '../groups/spec';
import { parseColumns } from '../table/columns';
import { DEFAULT_OUTPUT, type FitPlan } from './plan';
import { emitOf, Fields, gridOf, inverseOf, modelOf } from './recordPlan';
import { parseCurve } from '../registry/curves/index';
import { parseResampling } from '../registry/resampling/index';
import { parseRule } from '../registry/rules/index';

type Json = Record<string, unknown>;

/** A group record's plan and provenance. */
export interface GroupRecordRun {
  readonly plan: FitPlan & { readonly groups: GroupSpec };
  readonly dataPath: string;
  readonly dataSha256: string;
  readonly toolVersion: string;
  /** Every output the record lists, with its SHA-256. */
  readonly files: readonly { readonly file: string; readonly sha256: string }[];
}

/** True when a parsed JSON value claims to be a group record. */
export function isGroupRecord(json: unknown): boolean {
  return json !== null && typeof json === 'object' && (json as Json).format === GROUP_RECORD_FORMAT;
}

/**
 * Reads a parsed group record into its plan. Throws InputError naming the key at fault, a
 * newer or older version, or a value the command line would refuse. O(size).
 * Example: readGroupRecord(JSON.parse(text), 'rig.groups.fit.json').plan.groups.by.
 */
export function readGroupRecord(json: unknown, where: string): GroupRecordRun {
  const f = new Fields(where, 'group record');
  if (!isGroupRecord(json)) throw new InputError(`not a group record: "format" is not "${GROUP_RECORD_FORMAT}"`, { file: where });
  const rec = json as Json;
  const version = f.num(rec, 'version');
  if (version !== GROUP_RECORD_VERSION) throw new InputError(`group record version ${version}; this Knotwise reads version ${GROUP_RECORD_VERSION}`, { file: where });
  const data = f.obj(rec, 'data');
  const columns = f.obj(data, 'columns', 'data.columns');
  const spec = f.obj(rec, 'spec');
  const tool = f.obj(rec, 'tool');
  const channels =
    data.channels === null || data.channels === undefined
      ? undefined
      : f.arr(data, 'channels', 'data.channels').map((c, i) => (typeof c === 'string' ? c : f.fail(`data.channels[${i}]`, 'must be a string')));
  const by = data.groupBy === null || data.groupBy === undefined ? undefined : f.str(data, 'groupBy', 'data.groupBy');
  if ((by === undefined) === (channels === undefined)) f.fail('data.groupBy', 'or data.channels must be given, not both');
  const candidates =
    spec.candidates === null || spec.candidates === undefined
      ? undefined
      : f.arr(spec, 'candidates', 'spec.candidates').map((v, i) => (typeof v === 'number' && v >= 1 ? v : f.fail(`spec.candidates[${i}]`, 'must be a number of at least 1')));
  const model = modelOf(spec.model, f);
  // With a trials column the weights column names the trials (as in a fit record: core/outputs/recordPlan.ts).
  const weightsLabel = columns.weights === undefined || columns.weights === null ? undefined : f.str(columns, 'weights', 'data.columns.weights');
  const weights = model.trials !== undefined && weightsLabel === model.trials ? undefined : weightsLabel;
  const plan: FitPlan & { groups: GroupSpec } = {
    columns: { x: f.str(columns, 'x', 'data.columns.x'), y: f.str(columns, 'y', 'data.columns.y'), ...(weights !== undefined ? { weights } : {}) },
    tune: true,
    options: {
      kind: f.parse('spec.curve', () => parseCurve(f.str(spec, 'curve', 'spec.curve'))),
      candidates,
      resample: f.parse('spec.resampling', () => parseResampling(f.str(spec, 'resampling', 'spec.resampling'))),
      rule: f.parse('spec.rule', () => parseRule(f.str(spec, 'rule', 'spec.rule'))),
      seed: f.num(spec, 'seed', 'spec.seed'),
      holdout: spec.holdout === null || spec.holdout === undefined ? undefined : f.num(spec, 'holdout', 'spec.holdout'),
      ...model.options,
    },
    output: {
      ...DEFAULT_OUTPUT,
      grid: spec.grid === null || spec.grid === undefined ? undefined : gridOf(spec.grid, f),
      digits: f.num(spec, 'digits', 'spec.digits'),
      extrapolate: f.bool(spec, 'extrapolate', 'spec.extrapolate'),
      columns: spec.columns === null || spec.columns === undefined ? undefined : f.parse('spec.columns', () => parseColumns(f.arr(spec, 'columns', 'spec.columns').map(String).join(','))),
      flagNegative: f.bool(spec, 'flagNegative', 'spec.flagNegative'),
      emit: emitOf(spec, f),
      report: f.bool(spec, 'report', 'spec.report'),
      inverse: inverseOf(spec.inverse, f),
    },
    groups: { by, channels, sharedDf: f.bool(spec, 'sharedDf', 'spec.sharedDf'), longTable: f.bool(spec, 'longTable', 'spec.longTable') },
    ...(model.trials !== undefined ? { trials: model.trials } : {}),
  };
  const files = f.arr(rec, 'outputs').map((o, i) => {
    if (o === null || typeof o !== 'object') return f.fail(`outputs[${i}]`, 'must be an object');
    return { file: f.str(o as Json, 'file', `outputs[${i}].file`), sha256: f.str(o as Json, 'sha256', `outputs[${i}].sha256`) };
  });
  return { plan, dataPath: f.str(data, 'path', 'data.path'), dataSha256: f.str(data, 'sha256', 'data.sha256'), toolVersion: f.str(tool, 'version', 'tool.version'), files };
}
