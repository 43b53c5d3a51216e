/**
 * Tests of atomic writes (core/node/atomicWrite.ts): the target gets the whole text, no
 * temporary file is left, and a failed rename leaves the old target and no temporary file.
 */
import { strict as assert } from 'node:assert';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readIfExists, writeFileAtomic } from '../../../core/node/atomicWrite';

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
});
