/**
 * Validation of a parsed fit record against schema/fit-record.schema.json (JSON Schema
 * draft 2020-12), so `knotwise check` refuses a record whose keys or types are wrong before
 * it reads a plan from it. A small validator of its own for the keywords that schema uses
 * (the command line is one bundle, and a general validator would add about 290 kB to it);
 * a keyword it does not know is refused when the schema is loaded, so a schema that grows
 * a new keyword fails the tests instead of being half-checked.
 */
import schemaJson from '../../schema/fit-record.schema.json';

/** One place where a value breaks the schema. */
export interface SchemaProblem {
  /** Where, as a key path: `fit.df`, `spec.candidates[0]`; `(the record)` for the whole. */
  readonly path: string;
  /** What is wrong, to follow the path: "must be a number". */
  readonly message: string;
}

type Node = Readonly<Record<string, unknown>>;

/** Keywords that only annotate (no effect on validity). */
const ANNOTATIONS = new Set(['$schema', 'title', 'description']);
/** Keywords this validator applies. */
const APPLIED = new Set([
  '$defs',
  '$ref',
  'type',
  'const',
  'enum',
  'required',
  'properties',
  'additionalProperties',
  'items',
  'prefixItems',
  'minItems',
  'maxItems',
  'uniqueItems',
  'minimum',
  'maximum',
  'exclusiveMinimum',
  'pattern',
  'minLength',
  'oneOf',
]);

/** Canonical JSON text (object keys sorted) for equality of JSON values. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(',')}]`;
  if (v !== null && typeof v === 'object') {
    const o = v as Node;
    return `{${Object.keys(o)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`)
      .join(',')}}`;
  }
  return JSON.stringify(v);
}

/** The JSON type of a parsed value: null, boolean, number, string, array or object. */
function jsonType(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'array';
  return typeof v;
}

/** A key path joined with a property name or an index. */
function join(path: string, key: string | number): string {
  if (typeof key === 'number') return `${path}[${key}]`;
  const k = /^[A-Za-z_$][\w$]*$/.test(key) ? key : JSON.stringify(key);
  return path ? `${path}.${k}` : k;
}

/** A value quoted for a message, cut at 40 characters. */
function shown(v: unknown): string {
  const t = JSON.stringify(v) ?? String(v);
  return t.length > 40 ? `${t.slice(0, 40)}...` : t;
}

/** "a number", "a string or null" for a `type` keyword. */
function typeWords(t: unknown): string {
  const names: Record<string, string> = { null: 'null', boolean: 'true or false', number: 'a number', integer: 'a whole number', string: 'a string', array: 'an array', object: 'an object' };
  const list = (Array.isArray(t) ? t : [t]).map((x) => names[String(x)] ?? String(x));
  return list.join(' or ');
}

/** A compiled schema: the root and its `$defs`, with every keyword known. */
export class RecordSchema {
  private readonly patterns = new Map<string, RegExp>();

  /** Throws Error when the schema uses a keyword this validator does not apply. */
  constructor(private readonly root: Node) {
    this.survey(root, '#');
  }

  /** Refuses unknown keywords anywhere in the schema, and compiles the patterns once. */
  private survey(node: Node, where: string): void {
    for (const [k, v] of Object.entries(node)) {
      if (ANNOTATIONS.has(k)) continue;
      if (!APPLIED.has(k)) throw new Error(`fit record schema: keyword "${k}" at ${where} is not supported by core/outputs/recordSchema.ts`);
      if (k === 'properties' || k === '$defs') for (const [name, sub] of Object.entries(v as Node)) this.survey(sub as Node, `${where}/${k}/${name}`);
      else if (k === 'items' && typeof v === 'object') this.survey(v as Node, `${where}/items`);
      else if (k === 'additionalProperties' && typeof v === 'object') this.survey(v as Node, `${where}/additionalProperties`);
      else if (k === 'prefixItems' || k === 'oneOf') (v as Node[]).forEach((sub, i) => this.survey(sub, `${where}/${k}/${i}`));
      else if (k === 'pattern') this.patterns.set(v as string, new RegExp(v as string, 'u'));
      else if (k === '$ref' && !/^#\/\$defs\/[^/]+$/.test(v as string)) throw new Error(`fit record schema: only local references #/$defs/<name> are supported; got ${String(v)}`);
    }
  }

  /**
   * Every problem of `value` against the schema (empty when it is valid). O(size of the
   * value) times the number of `oneOf` branches on the way.
   * Example: RECORD_SCHEMA.problems({ format: 'knotwise-fit-record' })[0] -> { path: 'version', message: 'is missing' }.
   */
  problems(value: unknown): SchemaProblem[] {
    const out: SchemaProblem[] = [];
    this.check(this.root, value, '', out);
    return out;
  }

  private check(s: Node, v: unknown, path: string, out: SchemaProblem[]): void {
    const at = path || '(the record)';
    const fail = (message: string): void => void out.push({ path: at, message });
    if (typeof s.$ref === 'string') {
      const name = s.$ref.slice('#/$defs/'.length);
      const target = (this.root.$defs as Node | undefined)?.[name] as Node | undefined;
      if (target === undefined) throw new Error(`fit record schema: ${s.$ref} is not defined`);
      this.check(target, v, path, out);
    }
    const type = jsonType(v);
    if (s.type !== undefined) {
      const allowed = Array.isArray(s.type) ? (s.type as string[]) : [s.type as string];
      const ok = allowed.some((t) => t === type || (t === 'integer' && type === 'number' && Number.isInteger(v)));
      if (!ok) return fail(`must be ${typeWords(s.type)}; it is ${shown(v)}`);
    }
    if ('const' in s && canonical(v) !== canonical(s.const)) fail(`must be ${shown(s.const)}; it is ${shown(v)}`);
    if (Array.isArray(s.enum) && !s.enum.some((e) => canonical(e) === canonical(v))) fail(`must be one of ${s.enum.map((e) => shown(e)).join(', ')}; it is ${shown(v)}`);
    if (Array.isArray(s.oneOf)) {
      const matching = s.oneOf.filter((sub) => {
        const trial: SchemaProblem[] = [];
        this.check(sub as Node, v, path, trial);
        return trial.length === 0;
      }).length;
      if (matching !== 1) fail(matching === 0 ? `is none of the allowed forms; it is ${shown(v)}` : `matches more than one of the allowed forms`);
    }
    if (type === 'number') this.number(s, v as number, fail);
    else if (type === 'string') this.string(s, v as string, fail);
    else if (type === 'array') this.array(s, v as unknown[], path, out, fail);
    else if (type === 'object') this.object(s, v as Node, path, out);
  }

  private number(s: Node, v: number, fail: (m: string) => void): void {
    if (typeof s.minimum === 'number' && v < s.minimum) fail(`must be at least ${s.minimum}; it is ${v}`);
    if (typeof s.maximum === 'number' && v > s.maximum) fail(`must be at most ${s.maximum}; it is ${v}`);
    if (typeof s.exclusiveMinimum === 'number' && v <= s.exclusiveMinimum) fail(`must be above ${s.exclusiveMinimum}; it is ${v}`);
  }

  private string(s: Node, v: string, fail: (m: string) => void): void {
    if (typeof s.minLength === 'number' && [...v].length < s.minLength) fail(`must have at least ${s.minLength} character(s)`);
    if (typeof s.pattern === 'string' && !(this.patterns.get(s.pattern) as RegExp).test(v)) fail(`does not have the expected form; it is ${shown(v)}`);
  }

  private array(s: Node, v: readonly unknown[], path: string, out: SchemaProblem[], fail: (m: string) => void): void {
    if (typeof s.minItems === 'number' && v.length < s.minItems) fail(`must have at least ${s.minItems} item(s); it has ${v.length}`);
    if (typeof s.maxItems === 'number' && v.length > s.maxItems) fail(`must have at most ${s.maxItems} item(s); it has ${v.length}`);
    if (s.uniqueItems === true) {
      const seen = new Set<string>();
      for (const item of v) {
        const c = canonical(item);
        if (seen.has(c)) {
          fail(`must not repeat an item; ${shown(item)} appears twice`);
          break;
        }
        seen.add(c);
      }
    }
    const prefix = Array.isArray(s.prefixItems) ? (s.prefixItems as Node[]) : [];
    v.forEach((item, i) => {
      const sub = i < prefix.length ? prefix[i] : s.items;
      if (sub !== undefined && typeof sub === 'object') this.check(sub as Node, item, join(path, i), out);
    });
  }

  private object(s: Node, v: Node, path: string, out: SchemaProblem[]): void {
    const props = (s.properties ?? {}) as Node;
    if (Array.isArray(s.required)) for (const k of s.required as string[]) if (!Object.prototype.hasOwnProperty.call(v, k)) out.push({ path: join(path, k), message: 'is missing' });
    for (const k of Object.keys(v)) {
      if (Object.prototype.hasOwnProperty.call(props, k)) this.check(props[k] as Node, v[k], join(path, k), out);
      else if (s.additionalProperties === false) out.push({ path: join(path, k), message: 'is not a key of this record format' });
      else if (typeof s.additionalProperties === 'object' && s.additionalProperties !== null) this.check(s.additionalProperties as Node, v[k], join(path, k), out);
    }
  }
}

/** The fit record's schema, as bundled with this version of Knotwise. */
export const RECORD_SCHEMA = new RecordSchema(schemaJson as unknown as Node);
