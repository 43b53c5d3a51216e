/**
 * Tests of the crash-safe output protocol (core/outputs/commit.ts) on an in-memory folder:
 * the names and the marker format, the recovery decision, and a kill at every step. A kill
 * is simulated exactly: the protocol's generator is stopped between two steps and never
 * resumed, so no `catch` or `finally` of the writer runs. Then another process writes the
 * same set: it must succeed without asking, leave exactly the new set and no temporary
 * file, also when it is itself killed while recovering. Texts are invented and short; the
 * protocol does not look inside them (docs/design.md, "Outputs").
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import {
  COMMIT_FORMAT,
  legacyTempTarget,
  markerName,
  markerText,
  parseMarker,
  parseMarkerName,
  parseTempName,
  planRecovery,
  recoverFolder,
  runSteps,
  STALE_AGE_MS,
  tempName,
  writerGone,
  writeSet,
  type CommitMarker,
  type SetFile,
  type Step,
  type Steps,
  type Writer,
} from '../../../core/outputs/commit';
import { InputError } from '../../../core/errors';
import { RECORD_FORMAT } from '../../../core/outputs/record';

const sha256 = (data: string | Uint8Array): string => createHash('sha256').update(data).digest('hex');
const enc = new TextEncoder();
const dec = new TextDecoder();

/** A folder in memory: name -> bytes and modification time. */
class MemoryFolder {
  readonly files = new Map<string, { bytes: Uint8Array; mtime: number }>();
  clock = 1_000_000;
  exists = true;

  /** Carries out one step; `accept` answers the question about foreign files. */
  exec(accept: (foreign: readonly string[]) => boolean = () => assert.fail('asked about foreign files')): (s: Step) => unknown {
    return (s) => {
      this.clock += 1;
      switch (s.op) {
        case 'list':
          return this.exists ? [...this.files.keys()] : [];
        case 'read':
          return this.files.get(s.name)?.bytes;
        case 'modified':
          return this.files.get(s.name)?.mtime;
        case 'makeFolder':
          this.exists = true;
          return undefined;
        case 'create':
          if (this.files.has(s.name)) throw new Error(`EEXIST ${s.name}`);
          this.files.set(s.name, { bytes: enc.encode(s.text), mtime: this.clock });
          return undefined;
        case 'rename': {
          const f = this.files.get(s.from);
          if (!f) throw new Error(`ENOENT ${s.from}`);
          this.files.delete(s.from);
          this.files.set(s.to, f);
          return undefined;
        }
        case 'remove':
          this.files.delete(s.name);
          return undefined;
        case 'accept':
          return accept(s.foreign);
      }
    };
  }

  put(name: string, text: string, mtime = this.clock): void {
    this.files.set(name, { bytes: enc.encode(text), mtime });
  }
  text(name: string): string | undefined {
    const f = this.files.get(name);
    return f && dec.decode(f.bytes);
  }
  /** Every file as name -> text. */
  snapshot(): Map<string, string> {
    return new Map([...this.files].map(([n, f]) => [n, dec.decode(f.bytes)]));
  }
  clone(): MemoryFolder {
    const c = new MemoryFolder();
    for (const [n, f] of this.files) c.files.set(n, f);
    c.clock = this.clock;
    c.exists = this.exists;
    return c;
  }
}

/** A writer process with id `pid`; `alive` lists the ids alive on this machine. */
function writer(pid: number, folder: MemoryFolder, alive: ReadonlySet<number> = new Set([pid])): Writer {
  let n = 0;
  return { pid, host: 'h1', writing: new Set(), alive: (p) => alive.has(p), now: () => folder.clock, random: () => (pid * 1000 + n++).toString(16).padStart(12, '0'), sha256 };
}

/** A fit record listing `files` (name -> text) by SHA-256, like the ones Knotwise writes. */
function record(files: Record<string, string>, tag: string): string {
  const [table, ...rest] = Object.entries(files);
  return (
    JSON.stringify({ format: RECORD_FORMAT, tag, table: table && { file: table[0], sha256: sha256(table[1]) }, outputs: rest.map(([file, text]) => ({ kind: 'c', file, sha256: sha256(text) })) }) +
    '\n'
  );
}

/** An output set: table, header and record (last), with texts marked by `tag`. */
function outputSet(tag: string): SetFile[] {
  const body = { 'a.curve.csv': `x,fit\n1,${tag}\n`, 'a.curve.h': `/* ${tag} */\n` };
  return [...Object.entries(body).map(([name, text]) => ({ name, text })), { name: 'a.fit.json', text: record(body, tag) }];
}

const asMap = (files: readonly SetFile[]): Map<string, string> => new Map(files.map((f) => [f.name, f.text]));

/** Runs `steps` for at most `limit` steps and abandons it there, as a kill does; returns the number of steps run. */
function runFor<R>(steps: Steps<R>, exec: (s: Step) => unknown, limit: number): { ran: number; done: boolean } {
  let ran = 0;
  let next = steps.next();
  while (!next.done) {
    if (ran === limit) return { ran, done: false };
    ran += 1;
    next = steps.next(exec(next.value));
  }
  return { ran, done: true };
}

/** How a folder relates to an old and a new set: exactly one of them, or a state with a commit marker. */
function classify(folder: MemoryFolder, oldSet: Map<string, string>, newSet: Map<string, string>): string {
  const snap = folder.snapshot();
  const names = [...snap.keys()];
  const outputs = names.filter((n) => parseTempName(n) === undefined && parseMarkerName(n) === undefined);
  const extra = names.filter((n) => parseTempName(n) !== undefined);
  const marker = names.some((n) => parseMarkerName(n) !== undefined);
  const same = (set: Map<string, string>): boolean => outputs.length === set.size && outputs.every((n) => snap.get(n) === set.get(n));
  const tail = `${marker ? '+marker' : ''}${extra.length ? '+temp' : ''}`;
  if (same(oldSet)) return `old${tail}`;
  if (same(newSet)) return `new${tail}`;
  const each = outputs.every((n) => snap.get(n) === oldSet.get(n) || snap.get(n) === newSet.get(n));
  return each && marker ? `mixed${tail}` : `broken: ${outputs.join(', ')}`;
}

describe('commit protocol: names and marker', () => {
  it('tempName carries the target and the process id, and only that pattern parses', () => {
    const t = tempName('cal.curve.csv', 4242, '9f2c01ab33e0');
    assert.equal(t, '.cal.curve.csv.knotwise-tmp-4242-9f2c01ab33e0');
    assert.deepEqual(parseTempName(t), { name: 'cal.curve.csv', pid: 4242 });
    for (const other of ['cal.curve.csv', '.cal.curve.csv.tmp', '.x.knotwise-tmp-0-abcdef', '.x.knotwise-tmp-12-XYZ123', '..knotwise-tmp-1-abcdef', '.a/b.knotwise-tmp-1-abcdef']) {
      assert.equal(parseTempName(other), undefined, other);
    }
  });

  it('markerName and parseMarkerName: .<record>.knotwise-commit; legacy temporary names are recognised by target', () => {
    assert.equal(markerName('a.fit.json'), '.a.fit.json.knotwise-commit');
    assert.equal(parseMarkerName('.a.fit.json.knotwise-commit'), 'a.fit.json');
    assert.equal(parseMarkerName('a.fit.json.knotwise-commit'), undefined);
    assert.equal(legacyTempTarget('.a.curve.csv.0123456789ab.tmp'), 'a.curve.csv');
    assert.equal(legacyTempTarget('.a.curve.csv.0123456789ab.knotwise-tmp'), 'a.curve.csv');
    assert.equal(legacyTempTarget('.a.curve.csv.0123.tmp'), undefined);
  });

  it('parseMarker reads what markerText writes and refuses markers that name other folders, foreign temporary names or a wrong record', () => {
    const good: CommitMarker = {
      format: COMMIT_FORMAT,
      version: 1,
      writer: { pid: 7, host: 'h1' },
      record: 'a.fit.json',
      files: [
        { file: 'a.curve.csv', temp: tempName('a.curve.csv', 7, 'aaaaaaaaaaaa'), sha256: sha256('t'), replaces: null },
        { file: 'a.fit.json', temp: tempName('a.fit.json', 7, 'bbbbbbbbbbbb'), sha256: sha256('r'), replaces: sha256('old') },
      ],
    };
    const name = markerName('a.fit.json');
    assert.deepEqual(parseMarker(markerText(good), name), good);
    const bad = (change: (m: any) => void): string => {
      const m = JSON.parse(markerText(good));
      change(m);
      return JSON.stringify(m);
    };
    assert.equal(parseMarker(markerText(good), markerName('b.fit.json')), undefined, "the file name must be the record's marker");
    assert.equal(
      parseMarker(
        bad((m) => (m.files[0].file = '../a.curve.csv')),
        name,
      ),
      undefined,
      'a path',
    );
    assert.equal(
      parseMarker(
        bad((m) => (m.files[0].temp = 'a.curve.csv')),
        name,
      ),
      undefined,
      'not a temporary name',
    );
    assert.equal(
      parseMarker(
        bad((m) => (m.files[0].temp = tempName('other.csv', 7, 'aaaaaaaaaaaa'))),
        name,
      ),
      undefined,
      'the temporary name of another file',
    );
    assert.equal(
      parseMarker(
        bad((m) => m.files.reverse()),
        name,
      ),
      undefined,
      'the record must come last',
    );
    assert.equal(
      parseMarker(
        bad((m) => (m.files[0].sha256 = 'abc')),
        name,
      ),
      undefined,
      'not a SHA-256',
    );
    assert.equal(
      parseMarker(
        bad((m) => (m.files[1] = m.files[0])),
        name,
      ),
      undefined,
      'a file twice',
    );
    assert.equal(
      parseMarker(
        bad((m) => (m.format = 'other')),
        name,
      ),
      undefined,
    );
    assert.equal(parseMarker('{ half', name), undefined);
  });

  it('writerGone: never while this process writes the file; after STALE_AGE_MS always; else by process id on this machine', () => {
    const self = { pid: 10, host: 'h1', alive: (p: number) => p === 10 || p === 11 };
    assert.equal(writerGone({ pid: 12, host: 'h1' }, self, false, 0, 1), true, 'dead process');
    assert.equal(writerGone({ pid: 11, host: 'h1' }, self, false, 0, 1), false, 'live process');
    assert.equal(writerGone({ pid: 11, host: 'h1' }, self, false, 0, STALE_AGE_MS + 1), true, 'a reused id, by age');
    assert.equal(writerGone({ pid: 12, host: 'h2' }, self, false, 0, 1), false, 'another machine: only by age');
    assert.equal(writerGone({ pid: 10, host: 'h1' }, self, false, 0, 1), true, 'this process, not writing it now');
    assert.equal(writerGone({ pid: 10, host: 'h1' }, self, true, 0, STALE_AGE_MS + 1), false, 'this process, writing it now');
    assert.equal(writerGone({ pid: 12 }, self, false, 0, 1), true, 'a temporary file: no machine tag');
  });

  it('planRecovery completes when every file is done or has its new bytes, and blocks (renaming nothing) otherwise', () => {
    const e = (file: string, sha: string, replaces: string | null) => ({ file, temp: tempName(file, 7, 'aaaaaaaaaaaa'), sha256: sha256(sha), replaces: replaces && sha256(replaces) });
    const marker: CommitMarker = { format: COMMIT_FORMAT, version: 1, writer: { pid: 7, host: 'h1' }, record: 'r', files: [e('t', 'T2', 'T1'), e('u', 'U2', null), e('r', 'R2', 'R1')] };
    const done = planRecovery(
      marker,
      new Map([
        ['t', { target: sha256('T2'), temp: sha256('T2') }],
        ['u', { target: undefined, temp: sha256('U2') }],
        ['r', { target: sha256('R1'), temp: sha256('R2') }],
      ]),
    );
    assert.equal(done.outcome, 'complete');
    assert.deepEqual(
      done.renames.map((x) => x.file),
      ['u', 'r'],
    );
    assert.deepEqual(done.removals, [tempName('t', 7, 'aaaaaaaaaaaa')], 'a temporary file whose target already has the bytes');
    const edited = planRecovery(
      marker,
      new Map([
        ['t', { target: sha256('edited by hand'), temp: sha256('T2') }],
        ['u', { target: undefined, temp: sha256('U2') }],
        ['r', { target: sha256('R1'), temp: sha256('R2') }],
      ]),
    );
    assert.equal(edited.outcome, 'blocked');
    assert.deepEqual(edited.renames, []);
    assert.equal(edited.removals.length, 3);
    assert.match(edited.blocked[0] as string, /^t: it changed after the interrupted write/);
    const data = planRecovery(marker, new Map([['u', { target: undefined, temp: sha256('U2') }]]), ['u']);
    assert.equal(data.outcome, 'blocked', 'a marker that names the data file is never carried out');
    assert.match(data.blocked.join('\n'), /u: it is the data file/);
    const lost = planRecovery(marker, new Map([['t', { target: sha256('T1'), temp: undefined }]]));
    assert.equal(lost.outcome, 'blocked');
    assert.match(lost.blocked.join('\n'), /t: its new bytes are gone/);
  });
});

describe('commit protocol: a kill at every step', () => {
  const oldFiles = outputSet('old');
  const newFiles = outputSet('new');

  /** Steps of an uncut write of the new set over `start`. */
  const stepsOf = (start: MemoryFolder): number => {
    const f = start.clone();
    return runFor(writeSet(writer(2, f), newFiles, 'a.fit.json'), f.exec(), Number.MAX_SAFE_INTEGER).ran;
  };

  for (const first of [false, true]) {
    it(`${first ? 'a first write' : 'a rewrite'}: after a kill at any step the folder is the old set, the new set or a state with a marker; the next write completes it without asking`, () => {
      const start = new MemoryFolder();
      if (first) start.exists = false;
      else runSteps(writeSet(writer(1, start), oldFiles, 'a.fit.json'), start.exec());
      const oldSet = first ? new Map<string, string>() : asMap(oldFiles);
      const newSet = asMap(newFiles);
      const total = stepsOf(start);
      const seen = new Map<string, number>();
      for (let k = 0; k <= total; k++) {
        const f = start.clone();
        runFor(writeSet(writer(2, f), newFiles, 'a.fit.json'), f.exec(), k);
        const state = classify(f, oldSet, newSet);
        assert.doesNotMatch(state, /^broken/, `kill after ${k} steps: ${state}`);
        seen.set(state, (seen.get(state) ?? 0) + 1);
        // Process 2 is gone; process 3 writes the same set, and is itself killed while recovering at every step.
        const totalRecovery = runFor(
          recoverFolder(
            writer(3, f.clone()),
            newFiles.map((x) => x.name),
          ),
          f.clone().exec(),
          Number.MAX_SAFE_INTEGER,
        ).ran;
        for (let j = 0; j <= totalRecovery; j++) {
          const g = f.clone();
          runFor(
            recoverFolder(
              writer(3, g),
              newFiles.map((x) => x.name),
            ),
            g.exec(),
            j,
          );
          assert.doesNotMatch(classify(g, oldSet, newSet), /^broken/, `kill after ${k} steps, recovery killed after ${j}`);
          const out = runSteps(writeSet(writer(4, g), newFiles, 'a.fit.json'), g.exec());
          assert.equal(out.written, true);
          assert.deepEqual(g.snapshot(), newSet, `kill after ${k} steps, recovery killed after ${j}: exactly the new set`);
        }
      }
      // Every kind of moment was hit: before anything, with temporary files only, with the marker, half renamed, done.
      const kinds = [...seen.keys()].sort();
      assert.ok(kinds.includes(first ? 'old+temp' : 'old+temp'), kinds.join(' '));
      assert.ok(kinds.includes('mixed+marker+temp'), kinds.join(' '));
      assert.ok(kinds.includes('new+marker'), kinds.join(' '));
      assert.ok(kinds.includes('new'), kinds.join(' '));
    });
  }

  it('a step that fails before the marker removes the temporary files and keeps the old set; after it, the next run completes the new set', () => {
    const start = new MemoryFolder();
    runSteps(writeSet(writer(1, start), oldFiles, 'a.fit.json'), start.exec());
    const total = stepsOf(start);
    let before = 0;
    let after = 0;
    for (let k = 0; k < total; k++) {
      const f = start.clone();
      let n = 0;
      let failed = false;
      const failing = (s: Step): unknown => {
        if (n++ === k && (s.op === 'create' || s.op === 'rename' || s.op === 'makeFolder')) {
          failed = true;
          throw new Error('disk full');
        }
        return f.exec()(s);
      };
      const w = writer(2, f);
      try {
        runSteps(writeSet(w, newFiles, 'a.fit.json'), failing);
      } catch (e) {
        assert.equal((e as Error).message, 'disk full');
      }
      if (!failed) continue;
      assert.equal(w.writing.size, 0, 'nothing is left marked as being written');
      const state = classify(f, asMap(oldFiles), asMap(newFiles));
      if (state === 'old') before += 1;
      else {
        assert.match(state, /marker/, `failure at step ${k}: ${state}`);
        after += 1;
      }
      // The same process tries again (its own files count as left over once it no longer writes them).
      runSteps(writeSet(w, newFiles, 'a.fit.json'), f.exec());
      assert.deepEqual(f.snapshot(), asMap(newFiles));
    }
    assert.ok(before > 0 && after > 0);
  });
});

describe('commit protocol: recovery rules', () => {
  const newFiles = outputSet('new');
  const oldFiles = outputSet('old');

  /** A folder with the old set and process 2 killed after `k` steps of writing the new set. */
  const killedAt = (k: number): MemoryFolder => {
    const f = new MemoryFolder();
    runSteps(writeSet(writer(1, f), oldFiles, 'a.fit.json'), f.exec());
    runFor(writeSet(writer(2, f), newFiles, 'a.fit.json'), f.exec(), k);
    return f;
  };
  /** The smallest kill point whose state is `state`. */
  const firstKill = (state: string): MemoryFolder => {
    for (let k = 0; k < 200; k++) {
      const f = killedAt(k);
      if (classify(f, asMap(oldFiles), asMap(newFiles)) === state) return f;
    }
    throw new Error(`no kill point gives ${state}`);
  };

  it('a writer still at work is not disturbed: its temporary files stay, and writing the same record is refused', () => {
    const f = firstKill('mixed+marker+temp');
    const before = f.snapshot();
    // Process 2 is alive.
    assert.throws(
      () => runSteps(writeSet(writer(3, f, new Set([2, 3])), newFiles, 'a.fit.json'), f.exec()),
      (e: unknown) => e instanceof InputError && /another Knotwise process \(id 2\) is writing a\.fit\.json in this folder/.test(e.message),
    );
    assert.deepEqual(f.snapshot(), before);
    // Another record in the same folder may be written meanwhile; process 2's files stay.
    const other = outputSet('b').map((x) => ({ ...x, name: x.name.replace(/^a\./, 'b.') }));
    runSteps(writeSet(writer(3, f, new Set([2, 3])), other, 'b.fit.json'), f.exec());
    for (const [n, t] of before) assert.equal(f.text(n), t, n);
  });

  it('left-over temporary files: removed when their process is gone or they are old; others and foreign dot-files stay', () => {
    const f = new MemoryFolder();
    f.put(tempName('a.curve.csv', 2, 'aaaaaaaaaaaa'), 'half');
    f.put(tempName('z.csv', 5, 'bbbbbbbbbbbb'), 'other record, dead writer');
    f.put(tempName('a.curve.h', 3, 'cccccccccccc'), 'live writer');
    f.put(tempName('a.curve.ts', 3, 'dddddddddddd'), 'live id, but old', f.clock - STALE_AGE_MS - 10);
    f.put('.a.curve.csv.0123456789ab.tmp', 'earlier version, new', f.clock);
    f.put('.a.curve.h.0123456789ab.tmp', 'earlier version, old', f.clock - STALE_AGE_MS - 10);
    f.put('.z.csv.0123456789ab.tmp', 'earlier version, not an output of this set', f.clock - STALE_AGE_MS - 10);
    f.put('.gitignore', 'mine\n');
    const rec = runSteps(recoverFolder(writer(4, f, new Set([3, 4])), ['a.curve.csv', 'a.curve.h', 'a.fit.json']), f.exec());
    assert.deepEqual(
      [...rec.removed].sort(),
      [tempName('a.curve.csv', 2, 'aaaaaaaaaaaa'), tempName('a.curve.ts', 3, 'dddddddddddd'), tempName('z.csv', 5, 'bbbbbbbbbbbb'), '.a.curve.h.0123456789ab.tmp'].sort(),
    );
    assert.deepEqual([...f.files.keys()].sort(), [tempName('a.curve.h', 3, 'cccccccccccc'), '.a.curve.csv.0123456789ab.tmp', '.gitignore', '.z.csv.0123456789ab.tmp'].sort());
  });

  it("a marker that cannot be completed (its new bytes deleted) is kept as a note: the files it wrote stay Knotwise's, and the next write needs no permission", () => {
    const f = firstKill('mixed+marker+temp');
    for (const n of [...f.files.keys()]) if (parseTempName(n)) f.files.delete(n);
    const rec = runSteps(recoverFolder(writer(3, f), []), f.exec());
    assert.equal(rec.kept.length, 1);
    assert.equal(rec.completed.length, 0);
    assert.ok(f.files.has(markerName('a.fit.json')), 'the marker stays');
    const out = runSteps(writeSet(writer(3, f), newFiles, 'a.fit.json'), f.exec());
    assert.deepEqual(out.foreign, []);
    assert.deepEqual(f.snapshot(), asMap(newFiles), 'the next commit replaces and removes the marker');
  });

  it("a file edited by hand after the kill is not replaced by recovery and counts as not Knotwise's", () => {
    const f = firstKill('old+marker+temp');
    f.put('a.curve.h', '/* my own edit */\n');
    const asked: string[][] = [];
    const out = runSteps(
      writeSet(writer(3, f), newFiles, 'a.fit.json'),
      f.exec((foreign) => (asked.push([...foreign]), false)),
    );
    assert.equal(out.written, false);
    assert.deepEqual(asked, [['a.curve.h']]);
    assert.equal(f.text('a.curve.h'), '/* my own edit */\n');
    assert.deepEqual(
      [...f.files.keys()].filter((n) => parseTempName(n)),
      [],
      'the temporary files of the stuck set are gone',
    );
    const forced = runSteps(
      writeSet(writer(3, f), newFiles, 'a.fit.json'),
      f.exec(() => true),
    );
    assert.equal(forced.written, true);
    assert.deepEqual(f.snapshot(), asMap(newFiles));
  });

  it('a declined write leaves every file as it was; a marker this version cannot read is replaced by the next commit', () => {
    const f = new MemoryFolder();
    f.put('a.curve.csv', 'hand-made\n');
    f.put(markerName('a.fit.json'), '{ not a marker');
    const before = f.snapshot();
    const out = runSteps(
      writeSet(writer(3, f), newFiles, 'a.fit.json'),
      f.exec(() => false),
    );
    assert.equal(out.written, false);
    assert.deepEqual(f.snapshot(), before);
    runSteps(
      writeSet(writer(3, f), newFiles, 'a.fit.json'),
      f.exec(() => true),
    );
    assert.deepEqual(f.snapshot(), asMap(newFiles));
  });
});
