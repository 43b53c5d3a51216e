/**
 * Tests of the cheap record check (core/outputs/recordScan.ts) on a file system in memory
 * that counts its reads: what a record names, changed and missing files, and which files
 * the stamp cache spares from hashing. The file contents are invented short texts.
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { GROUP_RECORD_FORMAT } from '../../../core/groups/spec';
import { SURFACE_RECORD_FORMAT } from '../../../core/surface/format';
import { RECORD_FORMAT } from '../../../core/outputs/record';
import { RecordScan, recordNames, type FileStamp, type ScanFileSystem } from '../../../core/outputs/recordScan';

const sha = (bytes: Uint8Array | string): string => createHash('sha256').update(bytes).digest('hex');

/** A file system in memory with '/'-separated paths, a clock for modification times and a count of reads per path. */
class MemoryFs implements ScanFileSystem {
  readonly files = new Map<string, { bytes: Uint8Array; mtime: number }>();
  readonly reads = new Map<string, number>();
  private clock = 1000;

  /** Writes a file; each write is one tick later than the one before (unless `mtime` is given). */
  write(path: string, text: string, mtime = ++this.clock): void {
    this.files.set(path, { bytes: new TextEncoder().encode(text), mtime });
  }

  stat(path: string): Promise<FileStamp | undefined> {
    const f = this.files.get(path);
    return Promise.resolve(f ? { size: f.bytes.length, mtime: f.mtime } : undefined);
  }

  readFile(path: string): Promise<Uint8Array> {
    this.reads.set(path, (this.reads.get(path) ?? 0) + 1);
    const f = this.files.get(path);
    return f ? Promise.resolve(f.bytes) : Promise.reject(new Error(`${path}: no such file`));
  }

  resolve(record: string, name: string): string {
    return name.startsWith('/') ? name : `${record.slice(0, record.lastIndexOf('/'))}/${name}`;
  }

  readsOf(path: string): number {
    return this.reads.get(path) ?? 0;
  }
}

const DATA = 'x,y\n1,2\n2,4\n3,5\n';
const TABLE = 'x,fit\n1,2.1\n2,3.9\n';
const HEADER = '#define CURVE_N 2\n';

/** A record naming the data, the table and a C header with the SHA-256 of the texts given. */
function recordText(texts: { data: string; table: string; header: string }, more: Record<string, unknown> = {}): string {
  return JSON.stringify({
    format: RECORD_FORMAT,
    data: { path: 'cal.csv', sha256: sha(texts.data), columns: { x: 'x', y: 'y' } },
    table: { file: 'cal.curve.csv', sha256: sha(texts.table) },
    outputs: [{ kind: 'c', file: 'cal.h', sha256: sha(texts.header) }],
    ...more,
  });
}

/** The data, table and header written, then the record last (as Knotwise writes them). */
function workspace(): MemoryFs {
  const fs = new MemoryFs();
  fs.write('/w/cal.csv', DATA);
  fs.write('/w/cal.curve.csv', TABLE);
  fs.write('/w/cal.h', HEADER);
  fs.write('/w/cal.fit.json', recordText({ data: DATA, table: TABLE, header: HEADER }));
  return fs;
}

async function reasonsOf(scan: RecordScan, record: string): Promise<readonly string[]> {
  const c = await scan.check(record);
  assert.equal(c.state, 'record');
  return c.state === 'record' ? c.reasons : [];
}

describe('recordNames', () => {
  it('recordNames gives the data, the curve table first among the outputs, and the columns', () => {
    const names = recordNames(new TextEncoder().encode(recordText({ data: DATA, table: TABLE, header: HEADER })));
    assert.deepEqual(names, {
      data: { name: 'cal.csv', sha256: sha(DATA) },
      outputs: [
        { name: 'cal.curve.csv', sha256: sha(TABLE) },
        { name: 'cal.h', sha256: sha(HEADER) },
      ],
      columns: { x: 'x', y: 'y' },
      kind: 'fit',
    });
  });

  it('recordNames refuses what is not a Knotwise fit record: other formats, no table, no x column, not JSON', () => {
    const enc = (v: unknown): Uint8Array => new TextEncoder().encode(typeof v === 'string' ? v : JSON.stringify(v));
    const good = JSON.parse(recordText({ data: DATA, table: TABLE, header: HEADER })) as Record<string, unknown>;
    assert.equal(recordNames(enc({ ...good, format: 'another-format' })), undefined);
    assert.equal(recordNames(enc({ ...good, table: null })), undefined);
    assert.equal(recordNames(enc({ ...good, data: { path: 'cal.csv', sha256: sha(DATA), columns: { y: 'y' } } })), undefined);
    assert.equal(recordNames(enc('{"format": "knotwise-fit-record"')), undefined);
    assert.equal(recordNames(enc('null')), undefined);
    assert.equal(recordNames(new Uint8Array(0)), undefined);
  });

  it('recordNames leaves out outputs named outside the record folder', () => {
    const text = recordText(
      { data: DATA, table: TABLE, header: HEADER },
      {
        outputs: [
          { file: '../elsewhere.h', sha256: sha(HEADER) },
          { file: '/etc/passwd', sha256: sha(HEADER) },
          { file: 'cal.h', sha256: sha(HEADER) },
        ],
      },
    );
    assert.deepEqual(
      recordNames(new TextEncoder().encode(text))?.outputs.map((o) => o.name),
      ['cal.curve.csv', 'cal.h'],
    );
  });
});

/** A group record (core/groups/deliver.ts) naming the data and two groups' tables with the SHA-256 of the texts given. */
function groupRecordText(texts: { data: string; a: string; b: string }): string {
  return JSON.stringify({
    format: GROUP_RECORD_FORMAT,
    data: { path: 'rig.csv', sha256: sha(texts.data), columns: { x: 'x', y: 'y' }, groupBy: 'device', channels: null },
    outputs: [
      { kind: 'table', file: 'rig.A.curve.csv', sha256: sha(texts.a) },
      { kind: 'table', file: 'rig.B.curve.csv', sha256: sha(texts.b) },
    ],
  });
}

describe('group records in the scan', () => {
  it('recordNames reads a group record: its tables are the outputs and the group column comes with the columns; one without outputs is not a record', () => {
    const names = recordNames(new TextEncoder().encode(groupRecordText({ data: DATA, a: TABLE, b: HEADER })));
    assert.equal(names?.kind, 'group');
    assert.deepEqual(names?.columns, { x: 'x', y: 'y', per: 'device' });
    assert.deepEqual(
      names?.outputs.map((o) => o.name),
      ['rig.A.curve.csv', 'rig.B.curve.csv'],
    );
    const empty = { ...(JSON.parse(groupRecordText({ data: DATA, a: TABLE, b: HEADER })) as Record<string, unknown>), outputs: [] };
    assert.equal(recordNames(new TextEncoder().encode(JSON.stringify(empty))), undefined);
  });

  it("RecordScan.check of a group record: current, then one group's table changed is named", async () => {
    const fs = new MemoryFs();
    fs.write('/w/rig.csv', DATA);
    fs.write('/w/rig.A.curve.csv', TABLE);
    fs.write('/w/rig.B.curve.csv', HEADER);
    fs.write('/w/rig.groups.fit.json', groupRecordText({ data: DATA, a: TABLE, b: HEADER }));
    const scan = new RecordScan(fs, sha);
    assert.deepEqual(await reasonsOf(scan, '/w/rig.groups.fit.json'), []);
    fs.write('/w/rig.B.curve.csv', HEADER + 'changed\n');
    const reasons = await reasonsOf(scan, '/w/rig.groups.fit.json');
    assert.deepEqual(reasons, ['the output rig.B.curve.csv changed since the record was written (its SHA-256 differs)']);
  });
});

describe('surface records in the scan', () => {
  it('recordNames reads a surface record: its table among the outputs, the second input with the columns', () => {
    const text = JSON.stringify({
      format: SURFACE_RECORD_FORMAT,
      data: { path: 'map.csv', sha256: sha(DATA), columns: { x: 'speed', x2: 'load', y: 'efficiency', weights: null } },
      outputs: [{ kind: 'table', file: 'map.surface.csv', sha256: sha(TABLE) }],
    });
    const names = recordNames(new TextEncoder().encode(text));
    assert.equal(names?.kind, 'surface');
    assert.deepEqual(names?.columns, { x: 'speed', y: 'efficiency', x2: 'load' });
    assert.deepEqual(names?.outputs, [{ name: 'map.surface.csv', sha256: sha(TABLE) }]);
  });
});

describe('RecordScan', () => {
  it('RecordScan.check: a record whose files hold the bytes it names is current', async () => {
    const fs = workspace();
    assert.deepEqual(await reasonsOf(new RecordScan(fs, sha), '/w/cal.fit.json'), []);
  });

  it('RecordScan.check: a changed data file and a changed output are named, in the record order', async () => {
    const fs = workspace();
    const scan = new RecordScan(fs, sha);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
    fs.write('/w/cal.csv', DATA + '4,8\n');
    fs.write('/w/cal.h', '#define CURVE_N 3\n');
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), [
      'the data cal.csv changed since the record was written (its SHA-256 differs)',
      'the output cal.h changed since the record was written (its SHA-256 differs)',
    ]);
  });

  it('RecordScan.check: a missing file is reported, and a file written back with the recorded bytes is current again', async () => {
    const fs = workspace();
    const scan = new RecordScan(fs, sha);
    fs.files.delete('/w/cal.curve.csv');
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), ['the curve table cal.curve.csv is missing']);
    fs.write('/w/cal.curve.csv', TABLE);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
  });

  it('RecordScan.check: a file whose stamp is unchanged is not hashed again', async () => {
    const fs = workspace();
    // The data newer than the record, so the first look hashes it.
    fs.write('/w/cal.csv', DATA);
    const scan = new RecordScan(fs, sha);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
    assert.equal(fs.readsOf('/w/cal.csv'), 1);
    assert.deepEqual(scan.hashed, { files: 1, bytes: DATA.length });
    for (let i = 0; i < 3; i++) assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
    assert.equal(fs.readsOf('/w/cal.csv'), 1, 'the data was read once');
    assert.equal(scan.hashed.files, 1);
    // Only a new stamp reads it again.
    fs.write('/w/cal.csv', DATA);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
    assert.equal(fs.readsOf('/w/cal.csv'), 2);
  });

  it('RecordScan.check: the first look reads no file older than the record, and later looks at unchanged stamps read none either', async () => {
    const fs = workspace();
    const scan = new RecordScan(fs, sha);
    for (let i = 0; i < 2; i++) assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
    for (const p of ['/w/cal.csv', '/w/cal.curve.csv', '/w/cal.h']) assert.equal(fs.readsOf(p), 0, p);
    assert.equal(fs.readsOf('/w/cal.fit.json'), 2, 'the record itself is read at every look');
    assert.equal(scan.hashed.files, 0);
  });

  it('RecordScan.check: a file trusted for one record is hashed when another record names other bytes for it', async () => {
    const fs = workspace();
    fs.write('/w/other.fit.json', recordText({ data: 'x,y\n9,9\n', table: TABLE, header: HEADER }), 0);
    const scan = new RecordScan(fs, sha);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
    assert.equal(fs.readsOf('/w/cal.csv'), 0);
    // The other record names other bytes for the data: the data is read after all; the
    // table and the header, named with the same bytes by both, are not.
    assert.deepEqual(await reasonsOf(scan, '/w/other.fit.json'), ['the data cal.csv changed since the record was written (its SHA-256 differs)']);
    assert.equal(fs.readsOf('/w/cal.csv'), 1);
    assert.equal(fs.readsOf('/w/cal.curve.csv'), 0);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
    assert.equal(fs.readsOf('/w/cal.csv'), 1, 'the hash computed for the other record serves this one');
  });

  it('RecordScan.check: a data file changed while its size and modification time stay the same goes unnoticed (the stamp is the whole cheap test)', async () => {
    const fs = workspace();
    const scan = new RecordScan(fs, sha);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
    const before = fs.files.get('/w/cal.csv');
    assert.ok(before);
    fs.write('/w/cal.csv', DATA.replace('2,4', '2,5'), before.mtime);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
  });

  it('RecordScan.forget: the next look at a forgotten record is a first look again', async () => {
    const fs = workspace();
    const scan = new RecordScan(fs, sha);
    fs.write('/w/cal.csv', DATA + '4,8\n');
    assert.equal((await reasonsOf(scan, '/w/cal.fit.json')).length, 1);
    // The record written again after the data: a first look trusts the data, a later look does not.
    fs.write('/w/cal.fit.json', recordText({ data: DATA, table: TABLE, header: HEADER }));
    assert.equal((await reasonsOf(scan, '/w/cal.fit.json')).length, 1);
    scan.forget('/w/cal.fit.json');
    fs.write('/w/cal.csv', DATA + '4,8\n', 0);
    assert.deepEqual(await reasonsOf(scan, '/w/cal.fit.json'), []);
  });

  it('RecordScan.read: a missing record and bytes that are not a fit record are told apart from a record', async () => {
    const fs = workspace();
    fs.write('/w/notes.fit.json', '{"hello": 1}');
    const scan = new RecordScan(fs, sha);
    assert.deepEqual(await scan.check('/w/gone.fit.json'), { state: 'missing' });
    assert.deepEqual(await scan.check('/w/notes.fit.json'), { state: 'foreign' });
    const read = await scan.read('/w/cal.fit.json');
    assert.equal(read.state, 'record');
    if (read.state === 'record') {
      assert.deepEqual(
        [read.files.data, ...read.files.outputs].map((f) => f.path),
        ['/w/cal.csv', '/w/cal.curve.csv', '/w/cal.h'],
      );
    }
  });

  it('RecordScan.check: a read that fails for another reason than a missing file throws', async () => {
    const fs = workspace();
    fs.write('/w/cal.csv', DATA);
    const failing: ScanFileSystem = {
      stat: (p) => fs.stat(p),
      readFile: (p) => (p.endsWith('.csv') ? Promise.reject(new Error('permission denied')) : fs.readFile(p)),
      resolve: (r, n) => fs.resolve(r, n),
    };
    await assert.rejects(new RecordScan(failing, sha).check('/w/cal.fit.json'), /permission denied/);
  });
});
