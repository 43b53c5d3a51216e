/**
 * The cheap check of fit records: is a record's data file, and every output it lists, still
 * the bytes whose SHA-256 the record names? A file's size and modification time are looked
 * at first, and its bytes are hashed only when that stamp is new; the first look at a record
 * trusts files no newer than the record (Knotwise writes the record last), so opening a
 * workspace reads no data. The file system and the hash are handed in, so the editor
 * (workspace.fs), the command line or the benchmark (Node's fs) and the tests (a map in
 * memory) share the rule. The full check, which rebuilds every output, is core/node/check.ts.
 */
import { RECORD_FORMAT } from './record';
import { GROUP_RECORD_FORMAT } from '../groups/spec';
import { SURFACE_RECORD_FORMAT } from '../surface/format';

/** A file's size in bytes and modification time in milliseconds. */
export interface FileStamp {
  readonly size: number;
  readonly mtime: number;
}

/** What the scan needs of a file system. Paths are opaque strings to the scan (file paths, URIs as text). */
export interface ScanFileSystem {
  /** The stamp of a file, or undefined when there is none; other failures throw. */
  stat(path: string): Promise<FileStamp | undefined>;
  /** A file's bytes. */
  readFile(path: string): Promise<Uint8Array>;
  /**
   * Where a name from the record at `record` points: `name` is '/'-separated and relative to
   * the record's folder, or absolute when it starts with '/' (the record's data path only).
   * The file system says how, since only it knows its kind of path.
   */
  resolve(record: string, name: string): string;
}

/** A file a record names: as the record spells it, where it is, and the SHA-256 the record gives. */
export interface NamedFile {
  readonly name: string;
  readonly path: string;
  readonly sha256: string;
}

/** The columns as recorded (enough to fit the same data again). */
export interface RecordedColumns {
  readonly x: string;
  readonly y: string;
  readonly weights?: string;
  readonly trials?: string;
  /** A group record made with --per: the column naming each row's group. */
  readonly per?: string;
  /** A surface record: the second input. */
  readonly x2?: string;
}

/** What a record names, before the names are placed on a file system. */
export interface RecordNames {
  readonly data: { readonly name: string; readonly sha256: string };
  /** The curve table first, then the other outputs the record lists. */
  readonly outputs: readonly { readonly name: string; readonly sha256: string }[];
  readonly columns: RecordedColumns;
  /** 'group' for a group record (core/groups/deliver.ts): its tables, summary and code are the outputs; 'surface' for a surface record (core/surface/deliver.ts). */
  readonly kind: RecordKind;
}

/** The kinds of record the scan reads. */
export type RecordKind = 'fit' | 'group' | 'surface';

/** The files of one record, placed. */
export interface RecordFiles {
  readonly data: NamedFile;
  readonly outputs: readonly NamedFile[];
  readonly columns: RecordedColumns;
  readonly kind: RecordKind;
}

/** A record as read by `RecordScan.read`. */
export type RecordRead =
  | { readonly state: 'missing' }
  /** The bytes are not a Knotwise fit record (or lack what the check needs). */
  | { readonly state: 'foreign' }
  | { readonly state: 'record'; readonly path: string; readonly bytes: Uint8Array; readonly stamp: FileStamp; readonly files: RecordFiles };

/** A record as checked by `RecordScan.check`: a read record with why it is out of date (no reasons: current). */
export type RecordCheck = Exclude<RecordRead, { state: 'record' }> | (Extract<RecordRead, { state: 'record' }> & { readonly reasons: readonly string[] });

/** Longest name or hash the scan accepts from a record (longer ones are not Knotwise's). */
const MAX_TEXT = 4096;

const isText = (v: unknown): v is string => typeof v === 'string' && v.length > 0 && v.length < MAX_TEXT;

/**
 * The files a fit, group or surface record's bytes name, or undefined when they are not a
 * Knotwise record with a data file, x and y columns and (a fit record) a curve table or (the
 * others) at least one output. Outputs whose name leaves the record's folder ('..' or
 * a leading '/') are left out, so a record cannot make the scan read files elsewhere.
 * O(record size).
 * Example: recordNames(bytes)?.outputs[0]?.name === 'cal.curve.csv'.
 */
export function recordNames(bytes: Uint8Array): RecordNames | undefined {
  let rec: unknown;
  try {
    rec = JSON.parse(new TextDecoder().decode(bytes));
  } catch {
    return undefined;
  }
  const o = rec as { format?: unknown; data?: Record<string, unknown>; table?: Record<string, unknown>; outputs?: unknown } | null;
  if (typeof o !== 'object' || o === null || typeof o.data !== 'object' || !o.data) return undefined;
  const kind: RecordKind | undefined = o.format === RECORD_FORMAT ? 'fit' : o.format === GROUP_RECORD_FORMAT ? 'group' : o.format === SURFACE_RECORD_FORMAT ? 'surface' : undefined;
  if (kind === undefined) return undefined;
  // A fit record names its table apart; the others list every output, the tables among them.
  const group = kind !== 'fit';
  if (!group && (typeof o.table !== 'object' || !o.table)) return undefined;
  const { data, table } = o;
  if (!isText(data.path) || !isText(data.sha256)) return undefined;
  if (!group && (!table || !isText(table.file) || !isText(table.sha256))) return undefined;
  const cols = (typeof data.columns === 'object' && data.columns !== null ? data.columns : {}) as Record<string, unknown>;
  if (!isText(cols.x) || !isText(cols.y)) return undefined;
  const listed = [...(!group && table ? [{ file: table.file, sha256: table.sha256 }] : []), ...(Array.isArray(o.outputs) ? (o.outputs as { file?: unknown; sha256?: unknown }[]) : [])];
  const outputs = listed
    .filter((e): e is { file: string; sha256: string } => typeof e === 'object' && e !== null && isText(e.file) && isText(e.sha256) && !e.file.includes('..') && !e.file.startsWith('/'))
    .map((e) => ({ name: e.file, sha256: e.sha256 }));
  if (outputs.length === 0) return undefined;
  return {
    data: { name: data.path, sha256: data.sha256 },
    outputs,
    columns: {
      x: cols.x,
      y: cols.y,
      ...(isText(cols.weights) ? { weights: cols.weights } : {}),
      ...(isText(cols.trials) ? { trials: cols.trials } : {}),
      ...(kind === 'group' && isText(data.groupBy) ? { per: data.groupBy } : {}),
      ...(kind === 'surface' && isText(cols.x2) ? { x2: cols.x2 } : {}),
    },
    kind,
  };
}

/** What the scan knows of a file: its stamp and, once known, the SHA-256 of the bytes with that stamp. */
interface Stamp extends FileStamp {
  sha256?: string;
  /** True when `sha256` was taken from a record at a first look rather than computed. */
  assumed?: boolean;
}

/**
 * The cheap check of fit records, with a cache of file stamps: a file whose size and
 * modification time are unchanged is not read again. One instance per file system; checks
 * of one instance are meant to run one after the other.
 */
export class RecordScan {
  private readonly stamps = new Map<string, Stamp>();
  /** Records looked at since they were last forgotten (a first look trusts older files). */
  private readonly looked = new Set<string>();
  private hashedFiles = 0;
  private hashedBytes = 0;

  constructor(
    private readonly fs: ScanFileSystem,
    private readonly sha256: (bytes: Uint8Array) => string,
  ) {}

  /** How many files and bytes the scan has hashed so far. */
  get hashed(): { readonly files: number; readonly bytes: number } {
    return { files: this.hashedFiles, bytes: this.hashedBytes };
  }

  /** Reads and parses a record (the files it names are not looked at). */
  async read(record: string): Promise<RecordRead> {
    const stamp = await this.stampOf(record);
    if (!stamp) return { state: 'missing' };
    const bytes = await this.fs.readFile(record);
    const names = recordNames(bytes);
    if (!names) return { state: 'foreign' };
    const place = (f: { name: string; sha256: string }): NamedFile => ({ name: f.name, sha256: f.sha256, path: this.fs.resolve(record, f.name) });
    return { state: 'record', path: record, bytes, stamp, files: { data: place(names.data), outputs: names.outputs.map(place), columns: names.columns, kind: names.kind } };
  }

  /**
   * Why a read record is out of date: each named file that is missing or whose bytes no
   * longer hash to the recorded SHA-256, in the record's order (data, curve table, other
   * outputs); empty when it is current. Hashes only files whose stamp is new to the scan,
   * and at the first look at a record only those newer than the record.
   */
  async compare(read: Extract<RecordRead, { state: 'record' }>): Promise<string[]> {
    const first = !this.looked.has(read.path);
    const reasons: string[] = [];
    const look = async (f: NamedFile, what: string): Promise<void> => {
      const st = await this.stampOf(f.path);
      if (!st) {
        reasons.push(`${what} ${f.name} is missing`);
        return;
      }
      if (st.sha256 === undefined && first && st.mtime <= read.stamp.mtime) {
        // Knotwise writes the record last: a file no newer than it is taken to hold the bytes it names.
        st.sha256 = f.sha256;
        st.assumed = true;
        return;
      }
      // Bytes taken on trust for another record's hash are read after all.
      if (st.assumed && st.sha256 !== f.sha256) delete st.sha256;
      if ((await this.hashOf(f.path, st)) !== f.sha256) reasons.push(`${what} ${f.name} changed since the record was written (its SHA-256 differs)`);
    };
    await look(read.files.data, 'the data');
    for (const [i, o] of read.files.outputs.entries()) await look(o, i === 0 && read.files.kind === 'fit' ? 'the curve table' : 'the output');
    this.looked.add(read.path);
    return reasons;
  }

  /** Reads a record and compares the files it names (`read`, then `compare`). */
  async check(record: string): Promise<RecordCheck> {
    const read = await this.read(record);
    if (read.state !== 'record') return read;
    return { ...read, reasons: await this.compare(read) };
  }

  /** Forgets a record (deleted or no longer a record): its next look is a first look again. */
  forget(record: string): void {
    this.looked.delete(record);
  }

  /** A file's stamp now (the cached one while size and modification time are unchanged), or undefined when it is missing. */
  private async stampOf(path: string): Promise<Stamp | undefined> {
    const st = await this.fs.stat(path);
    if (!st) {
      this.stamps.delete(path);
      return undefined;
    }
    const known = this.stamps.get(path);
    if (known && known.size === st.size && known.mtime === st.mtime) return known;
    const fresh: Stamp = { size: st.size, mtime: st.mtime };
    this.stamps.set(path, fresh);
    return fresh;
  }

  /** The SHA-256 of a file with this stamp, read once per stamp. */
  private async hashOf(path: string, stamp: Stamp): Promise<string> {
    if (stamp.sha256 === undefined) {
      const bytes = await this.fs.readFile(path);
      this.hashedFiles++;
      this.hashedBytes += bytes.length;
      stamp.sha256 = this.sha256(bytes);
      delete stamp.assumed;
    }
    return stamp.sha256;
  }
}
