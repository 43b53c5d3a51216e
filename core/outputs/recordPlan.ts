/**
 * Reads a fit record back into the plan that made it, so its outputs can be rebuilt from
 * the data (`knotwise check`). Every field is checked; a bad record is refused with the
 * key at fault.
 */
import type { AnalysisOptions } from '../analysis/types';
import { EMIT_KINDS, type EmitKind } from '../emit/common';
import { InputError } from '../errors';
import { DEFAULT_OUTPUT, type FitPlan } from './plan';
import { RECORD_FORMAT, RECORD_VERSION } from './record';
import { checkInverse, type InverseSpec } from '../calibrate/spec';
import { RECORD_SCHEMA } from './recordSchema';
import { parseShapeList } from '../fit/shape';
import type { ModelOptions } from '../types';
import { parseColumns } from '../table/columns';
import { formatGrid, parseGrid, type GridSpec } from '../table/grid';
import { parseOutcome } from '../registry/outcomes/index';
import { parseCurve } from '../registry/curves/index';
import { parseResampling } from '../registry/resampling/index';
import { parseRule } from '../registry/rules/index';

/** What a record says about its run. */
export interface RecordedRun {
  readonly plan: FitPlan;
  /** The data file relative to the record's folder, `/`-separated. */
  readonly dataPath: string;
  readonly dataFile: string;
  readonly dataSha256: string;
  readonly rowsUsed: number;
  /** Version of Knotwise that wrote the record. */
  readonly toolVersion: string;
  /** Chosen df and family of the recorded fit. */
  readonly df: number;
  /** Every recorded output (table first) by file name, with its SHA-256. */
  readonly files: readonly { readonly file: string; readonly sha256: string }[];
}

type Json = Record<string, unknown>;

/** Reads typed fields of one record, naming the key at fault. */
export class Fields {
  constructor(
    private readonly where: string,
    /** What the messages call the record. */
    private readonly noun = 'fit record',
  ) {}
  fail(key: string, what: string): never {
    throw new InputError(`${this.noun}: "${key}" ${what}`, { file: this.where });
  }
  obj(o: Json, key: string, path = key): Json {
    const v = o[key];
    if (v === null || typeof v !== 'object' || Array.isArray(v)) this.fail(path, 'must be an object');
    return v as Json;
  }
  str(o: Json, key: string, path = key): string {
    const v = o[key];
    if (typeof v !== 'string') this.fail(path, 'must be a string');
    return v;
  }
  num(o: Json, key: string, path = key): number {
    const v = o[key];
    if (typeof v !== 'number' || !Number.isFinite(v)) this.fail(path, 'must be a number');
    return v;
  }
  bool(o: Json, key: string, path = key, fallback?: boolean): boolean {
    const v = o[key];
    if (v === undefined && fallback !== undefined) return fallback;
    if (typeof v !== 'boolean') this.fail(path, 'must be true or false');
    return v;
  }
  /** Runs a parser on a field, giving its errors the record and the key. */
  parse<T>(path: string, read: () => T): T {
    try {
      return read();
    } catch (e) {
      if (e instanceof InputError && e.place.file === undefined) this.fail(path, `is not valid: ${e.message}`);
      throw e;
    }
  }
  arr(o: Json, key: string, path = key): unknown[] {
    const v = o[key];
    if (!Array.isArray(v)) this.fail(path, 'must be an array');
    return v;
  }
}

/** A grid object as the record stores it, checked through its text form. */
export function gridOf(v: unknown, f: Fields, path = 'spec.grid'): GridSpec {
  if (v === null || typeof v !== 'object') f.fail(path, 'must be an object');
  const g = v as Json;
  const numbers = (keys: string[]): void => {
    for (const k of keys) if (g[k] !== undefined && (typeof g[k] !== 'number' || !Number.isFinite(g[k]))) f.fail(`${path}.${k}`, 'must be a number');
  };
  switch (g.kind) {
    case 'count':
      numbers(['start', 'stop', 'count']);
      break;
    case 'step':
      numbers(['start', 'stop', 'step']);
      break;
    case 'auto':
      numbers(['tolerance', 'start', 'stop']);
      break;
    case 'list':
      if (!Array.isArray(g.values) || g.values.some((x) => typeof x !== 'number' || !Number.isFinite(x))) f.fail(`${path}.values`, 'must be an array of numbers');
      break;
    case 'data':
      break;
    default:
      f.fail(`${path}.kind`, 'must be count, step, data, list or auto');
  }
  return f.parse(path, () => parseGrid(formatGrid(g as GridSpec)));
}

/** spec.emit: the code emitters asked for (absent: none). */
export function emitOf(spec: Record<string, unknown>, f: Fields): EmitKind[] {
  if (spec.emit === undefined) return [];
  return f.arr(spec, 'emit', 'spec.emit').map((k, i) => {
    const kind = EMIT_KINDS.find((e) => e === k);
    if (kind === undefined) f.fail(`spec.emit[${i}]`, `must be one of ${EMIT_KINDS.join(', ')}`);
    return kind as EmitKind;
  });
}

/** spec.inverse: the inverse table as asked for, or undefined (null: not asked for). */
export function inverseOf(v: unknown, f: Fields): InverseSpec | undefined {
  if (v === null || v === undefined) return undefined;
  if (typeof v !== 'object') return f.fail('spec.inverse', 'must be an object or null');
  const o = v as Json;
  const spec: InverseSpec = {
    grid: o.grid === null || o.grid === undefined ? undefined : gridOf(o.grid, f, 'spec.inverse.grid'),
    readingsAveraged: f.num(o, 'readingsAveraged', 'spec.inverse.readingsAveraged'),
    referenceUncertainty: f.num(o, 'referenceUncertainty', 'spec.inverse.referenceUncertainty'),
    maxWidth: o.maxIntervalWidth === null || o.maxIntervalWidth === undefined ? undefined : f.num(o, 'maxIntervalWidth', 'spec.inverse.maxIntervalWidth'),
  };
  return f.parse('spec.inverse', () => checkInverse(spec, RECORD_INVERSE_NAMES));
}

/** The record's key paths, for messages about spec.inverse. */
const RECORD_INVERSE_NAMES = {
  grid: 'spec.inverse.grid',
  readingsAveraged: 'spec.inverse.readingsAveraged',
  referenceUncertainty: 'spec.inverse.referenceUncertainty',
  maxWidth: 'spec.inverse.maxIntervalWidth',
};

/** spec.model (absent in records without model options): outcome, shapes, robust fitting, trials column. */
export function modelOf(v: unknown, f: Fields): { options: ModelOptions; trials?: string } {
  if (v === undefined || v === null) return { options: {} };
  if (typeof v !== 'object' || Array.isArray(v)) return f.fail('spec.model', 'must be an object');
  const m = v as Json;
  const options: { -readonly [K in keyof ModelOptions]: ModelOptions[K] } = {};
  if (m.outcome !== null && m.outcome !== undefined) options.outcome = f.parse('spec.model.outcome', () => parseOutcome(f.str(m, 'outcome', 'spec.model.outcome')));
  const shape = m.shape === undefined ? [] : f.arr(m, 'shape', 'spec.model.shape');
  if (shape.length) options.shape = f.parse('spec.model.shape', () => parseShapeList(shape.map(String).join(',')));
  if (m.robust === true) options.robust = true;
  else if (m.robust !== null && m.robust !== undefined) options.robust = { k: f.num(f.obj(m, 'robust', 'spec.model.robust'), 'k', 'spec.model.robust.k') };
  const trials = m.trials === null || m.trials === undefined ? undefined : f.str(m, 'trials', 'spec.model.trials');
  return trials !== undefined ? { options, trials } : { options };
}

/**
 * The record's object once its format and version are this Knotwise's: refuses a value that
 * is not a JSON object, another format, and a newer or older version (with what to do).
 */
function recordObject(json: unknown, where: string): Json {
  if (json === null || typeof json !== 'object' || Array.isArray(json)) throw new InputError('not a fit record: the file is not a JSON object', { file: where });
  const rec = json as Json;
  if (rec.format !== RECORD_FORMAT) throw new InputError(`not a fit record: "format" is ${JSON.stringify(rec.format)}, expected "${RECORD_FORMAT}"`, { file: where });
  const version = new Fields(where).num(rec, 'version');
  if (version > RECORD_VERSION) throw new InputError(`fit record version ${version} was written by a newer Knotwise; this one reads version ${RECORD_VERSION}`, { file: where });
  if (version < RECORD_VERSION)
    throw new InputError(
      `fit record version ${version} was written by an earlier Knotwise whose words have changed (see CHANGELOG.md); this one reads version ${RECORD_VERSION}: fit the data again to write a new record`,
      { file: where },
    );
  return rec;
}

/**
 * Reads a parsed fit record (format RECORD_FORMAT, version up to RECORD_VERSION) into its
 * plan and provenance. `where` names the record in messages. Throws InputError for another
 * format, a newer version, or a missing or mistyped field. O(size of the record).
 * Example: readRecord(JSON.parse(text), 'cal.fit.json').plan.options.seed.
 */
export function readRecord(json: unknown, where: string): RecordedRun {
  const f = new Fields(where);
  const rec = recordObject(json, where);
  const tool = f.obj(rec, 'tool');
  const data = f.obj(rec, 'data');
  const columns = f.obj(data, 'columns', 'data.columns');
  const spec = f.obj(rec, 'spec');
  const fit = f.obj(rec, 'fit');
  const table = f.obj(rec, 'table');
  const kind = f.parse('spec.curve', () => parseCurve(f.str(spec, 'curve', 'spec.curve')));
  const candidates = f.arr(spec, 'candidates', 'spec.candidates').map((v, i): number => {
    if (typeof v !== 'number' || !(v >= 1)) return f.fail(`spec.candidates[${i}]`, 'must be a number of at least 1');
    return v;
  });
  if (candidates.length === 0) f.fail('spec.candidates', 'must not be empty');
  const resample = spec.resampling === null || spec.resampling === undefined ? null : f.str(spec, 'resampling', 'spec.resampling');
  const tune = f.bool(spec, 'tuned', 'spec.tuned', resample !== null);
  const holdout = spec.holdout === null || spec.holdout === undefined ? undefined : f.num(spec, 'holdout', 'spec.holdout');
  const model = modelOf(spec.model, f);
  let options: AnalysisOptions;
  if (tune) {
    if (resample === null) return f.fail('spec.resampling', 'must be given for a tuned fit');
    options = {
      kind,
      candidates: f.bool(spec, 'candidatesDefault', 'spec.candidatesDefault', false) ? undefined : candidates,
      resample: f.parse('spec.resampling', () => parseResampling(resample)),
      rule: f.parse('spec.rule', () => parseRule(f.str(spec, 'rule', 'spec.rule'))),
      seed: f.num(spec, 'seed', 'spec.seed'),
      holdout,
      ...model.options,
    };
  } else {
    options = { kind, candidates: [candidates[0] as number], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0, ...model.options };
  }
  const requested = spec.columns === null || spec.columns === undefined ? undefined : f.parse('spec.columns', () => parseColumns(f.arr(spec, 'columns', 'spec.columns').map(String).join(',')));
  const output = {
    ...DEFAULT_OUTPUT,
    grid: f.bool(spec, 'gridDefault', 'spec.gridDefault', false) ? undefined : gridOf(spec.grid, f),
    extrapolate: f.bool(spec, 'extrapolate', 'spec.extrapolate'),
    digits: f.num(spec, 'digits', 'spec.digits'),
    columns: requested,
    flagNegative: f.bool(spec, 'flagNegative', 'spec.flagNegative', false),
    emit: emitOf(spec, f),
    report: f.bool(spec, 'report', 'spec.report', false),
    inverse: inverseOf(spec.inverse, f),
  };
  // With a trials column the record's weights column names the trials (they are the binomial
  // weights): the plan selects them as trials, not as weights as well.
  const weightsLabel = columns.weights === undefined || columns.weights === null ? undefined : f.str(columns, 'weights', 'data.columns.weights');
  const weights = model.trials !== undefined && weightsLabel === model.trials ? undefined : weightsLabel;
  const plan: FitPlan = {
    columns: { x: f.str(columns, 'x', 'data.columns.x'), y: f.str(columns, 'y', 'data.columns.y'), ...(weights !== undefined ? { weights } : {}) },
    tune,
    options,
    output,
    ...(model.trials !== undefined ? { trials: model.trials } : {}),
    // The memory budget given for the run (absent: the default), so check reads the file the same way.
    ...(spec.memoryBudget !== undefined && spec.memoryBudget !== null ? { memoryBudget: f.num(spec, 'memoryBudget', 'spec.memoryBudget') } : {}),
  };
  const files = [{ file: f.str(table, 'file', 'table.file'), sha256: f.str(table, 'sha256', 'table.sha256') }];
  if (rec.outputs !== undefined) {
    f.arr(rec, 'outputs').forEach((o, i) => {
      if (o === null || typeof o !== 'object') f.fail(`outputs[${i}]`, 'must be an object');
      files.push({ file: f.str(o as Json, 'file', `outputs[${i}].file`), sha256: f.str(o as Json, 'sha256', `outputs[${i}].sha256`) });
    });
  }
  const dataFile = f.str(data, 'file', 'data.file');
  return {
    plan,
    dataPath: data.path === undefined ? dataFile : f.str(data, 'path', 'data.path'),
    dataFile,
    dataSha256: f.str(data, 'sha256', 'data.sha256'),
    rowsUsed: f.num(data, 'rowsUsed', 'data.rowsUsed'),
    toolVersion: f.str(tool, 'version', 'tool.version'),
    df: f.num(fit, 'df', 'fit.df'),
    files,
  };
}

/** A record file read whole: its parsed JSON and the run it describes. */
export interface RecordFile {
  readonly json: Readonly<Record<string, unknown>>;
  readonly run: RecordedRun;
}

/** Schema problems named in one message before "and N more". */
const SCHEMA_PROBLEMS_SHOWN = 3;

/**
 * Reads a fit record file's bytes and refuses, naming the record, everything that is not a
 * whole record of this version: an empty file, bytes that are not UTF-8, a byte order mark,
 * text that is not JSON (a truncated file), another format or version, and a record that
 * breaks schema/fit-record.schema.json (a key missing, unknown or of the wrong type,
 * naming up to three); then reads its plan (readRecord). Throws InputError. O(size).
 * Example: readRecordFile(readFileSync('cal.fit.json'), 'cal.fit.json').run.plan.
 */
export function readRecordFile(bytes: Uint8Array, where: string): RecordFile {
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(bytes);
  } catch {
    throw new InputError('not a fit record: the file is not UTF-8 text', { file: where });
  }
  if (text.trim() === '') throw new InputError(`not a fit record: the file is empty${text.length ? ' (white space only)' : ''}`, { file: where });
  if (text.startsWith('\uFEFF')) throw new InputError('the fit record starts with a byte order mark, which Knotwise never writes', { file: where });
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (e) {
    const truncated = !/[}\]]\s*$/.test(text) ? '; the file looks truncated' : '';
    throw new InputError(`not valid JSON (${(e as Error).message})${truncated}`, { file: where });
  }
  const rec = recordObject(json, where);
  const problems = RECORD_SCHEMA.problems(rec);
  if (problems.length) {
    const listed = problems.slice(0, SCHEMA_PROBLEMS_SHOWN).map((p) => `"${p.path}" ${p.message}`);
    const more = problems.length > SCHEMA_PROBLEMS_SHOWN ? `; and ${problems.length - SCHEMA_PROBLEMS_SHOWN} more` : '';
    throw new InputError(`the fit record does not follow its schema (schema/fit-record.schema.json, version ${RECORD_VERSION}): ${listed.join('; ')}${more}`, { file: where });
  }
  return { json: rec, run: readRecord(rec, where) };
}
