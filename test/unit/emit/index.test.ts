/**
 * Tests of the emitter list (core/emit/index.ts): parsing `--emit` and the file names.
 */
import { strict as assert } from 'node:assert';
import { InputError } from '../../../core/errors';
import { emitName, parseEmit } from '../../../core/emit/index';

describe('parseEmit', () => {
  it('parseEmit accepts c, ts and json in any order and case, once each, in a fixed order', () => {
    assert.deepEqual(parseEmit('json,c'), ['c', 'json']);
    assert.deepEqual(parseEmit(' TS , c,ts'), ['c', 'ts']);
    assert.deepEqual(parseEmit('c,ts,json'), ['c', 'ts', 'json']);
  });

  it('parseEmit refuses an unknown kind, naming it and the known ones', () => {
    assert.throws(
      () => parseEmit('c,rust'),
      (e: unknown) => e instanceof InputError && /unknown emitter "rust" in "c,rust"; use c, ts or json/.test(e.message),
    );
  });
});

describe('emitName', () => {
  it('emitName gives <stem>.curve.h, .ts and .json', () => {
    assert.deepEqual(
      (['c', 'ts', 'json'] as const).map((k) => emitName(k, 'fan rise')),
      ['fan rise.curve.h', 'fan rise.curve.ts', 'fan rise.curve.json'],
    );
  });
});
