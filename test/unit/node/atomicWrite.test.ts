/**
 * Tests of atomic writes and of the protocol's file operations on Node (core/node/atomicWrite.ts):
 * the target gets the whole text, no temporary file is left, a failed rename leaves the old
 * target and no temporary file; each protocol step does what core/outputs/commit.ts asks
 * (a missing folder lists empty, a new file never replaces one, removing a missing file is
 * no error); and a process id is alive exactly while its process runs.
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { folderStep, nodeWriter, processAlive, readIfExists, writeFileAtomic } from '../../../core/node/atomicWrite';

describe('writeFileAtomic', () => {
  let dir = '';
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-atomic-'));
  });
  afterEach(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('writeFileAtomic replaces the target with the whole text and leaves no temporary file', () => {
    const p = join(dir, 't.csv');
    writeFileSync(p, 'old\n');
    const text = 'x,fit\n' + '1,2\n'.repeat(100_000);
    writeFileAtomic(p, text);
    assert.equal(readFileSync(p, 'utf8'), text);
    assert.deepEqual(readdirSync(dir), ['t.csv']);
  });

  it('writeFileAtomic that cannot rename (the target is a folder) throws, keeps the target and removes its temporary file', () => {
    const p = join(dir, 'taken');
    mkdirSync(p);
    writeFileSync(join(p, 'inside'), 'keep');
    assert.throws(() => writeFileAtomic(p, 'new'));
    assert.deepEqual(readdirSync(dir), ['taken']);
    assert.equal(readFileSync(join(p, 'inside'), 'utf8'), 'keep');
  });

  it('readIfExists gives the text, or undefined for a missing file', () => {
    writeFileSync(join(dir, 'a'), 'é\n');
    assert.equal(readIfExists(join(dir, 'a')), 'é\n');
    assert.equal(readIfExists(join(dir, 'b')), undefined);
  });

  it('folderStep carries out each protocol step in its folder', () => {
    const folder = join(dir, 'out');
    const step = folderStep(folder, (foreign) => foreign.length === 1);
    assert.deepEqual(step({ op: 'list' }), [], 'a folder that does not exist yet lists empty');
    assert.equal(step({ op: 'read', name: 'a' }), undefined);
    assert.equal(step({ op: 'modified', name: 'a' }), undefined);
    step({ op: 'makeFolder' });
    step({ op: 'create', name: 'a', text: 'é' });
    assert.throws(() => step({ op: 'create', name: 'a', text: 'again' }), /EEXIST/, 'a new file never replaces one');
    assert.deepEqual([...(step({ op: 'read', name: 'a' }) as Uint8Array)], [0xc3, 0xa9]);
    assert.ok(Math.abs((step({ op: 'modified', name: 'a' }) as number) - Date.now()) < 60_000);
    writeFileSync(join(folder, 'b'), 'old');
    step({ op: 'rename', from: 'a', to: 'b' });
    assert.deepEqual(readdirSync(folder), ['b']);
    assert.equal(readFileSync(join(folder, 'b'), 'utf8'), 'é');
    step({ op: 'remove', name: 'b' });
    step({ op: 'remove', name: 'b' });
    assert.deepEqual(step({ op: 'list' }), []);
    assert.equal(step({ op: 'accept', foreign: ['x'] }), true);
  });

  it('processAlive: this process is alive, an ended child is not; nodeWriter is this process', () => {
    assert.equal(processAlive(process.pid), true);
    const child = spawnSync(process.execPath, ['-e', '']);
    assert.equal(processAlive(child.pid as number), false);
    const w = nodeWriter(dir);
    assert.equal(w.pid, process.pid);
    assert.match(w.host, /^[0-9a-f]{16}$/);
    assert.equal(nodeWriter(dir).writing, w.writing, 'one set of names being written per folder');
    assert.notEqual(w.random(), w.random());
  });
});
