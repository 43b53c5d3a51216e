/**
 * Running out of memory is a message, not a stack trace: the ingest says how many rows it
 * had read and what to do. The memory limit is simulated by typed arrays that refuse to
 * grow past a size, raising the RangeError JavaScript raises when an ArrayBuffer cannot be
 * allocated (its message as Node 20 words it: "Array buffer allocation failed").
 */
import assert from 'node:assert/strict';
import { InputError, isAllocationFailure } from '../../../core/errors';
import { readCsvBytes } from '../../../core/node/readCsv';

/** Runs f while Float64Array refuses `limit` elements or more, as an exhausted memory would. */
function withArrayLimit<T>(limit: number, f: () => T): T {
  const Real = globalThis.Float64Array;
  class Limited extends Real {
    constructor(...args: unknown[]) {
      if (typeof args[0] === 'number' && args[0] >= limit) throw new RangeError('Array buffer allocation failed');
      super(...(args as [number]));
    }
  }
  globalThis.Float64Array = Limited as unknown as Float64ArrayConstructor;
  try {
    return f();
  } finally {
    globalThis.Float64Array = Real;
  }
}

describe('out of memory while reading', function () {
  const rows = ['x,y'];
  for (let i = 0; i < 50_000; i++) rows.push(`${i},${i % 7}`);
  const bytes = Buffer.from(rows.join('\n') + '\n');

  it('reads the file when memory allows (the limit below is what makes it fail)', function () {
    assert.equal(readCsvBytes(bytes, 'big.csv').rowCount, 50_000);
  });

  it('says how many rows were read, where, and what to do', function () {
    let caught: unknown;
    try {
      withArrayLimit(20_000, () => readCsvBytes(bytes, 'big.csv'));
    } catch (e) {
      caught = e;
    }
    assert.ok(caught instanceof InputError, `an InputError, not ${String(caught)}`);
    const m = /out of memory after ([\d,]+) data rows were read/.exec(caught.message);
    assert.ok(m, caught.message);
    const read = Number((m[1] as string).replace(/,/g, ''));
    assert.ok(read > 0 && read < 20_000, `rows read before the columns could not grow: ${read}`);
    assert.equal(caught.place.file, 'big.csv');
    // The header is line 1, so the row that found no room is on line read + 2.
    assert.equal(caught.place.line, read + 2);
    assert.match(caught.message, /Fit a part of the rows/);
    assert.doesNotMatch(caught.describe(), /at .*\(.*:\d+:\d+\)/, 'no stack trace');
  });

  it('tells allocation failures from other range errors', function () {
    assert.equal(isAllocationFailure(new RangeError('Array buffer allocation failed')), true);
    assert.equal(isAllocationFailure(new RangeError('Invalid typed array length: -1')), true);
    assert.equal(isAllocationFailure(new RangeError('Maximum call stack size exceeded')), false);
    assert.equal(isAllocationFailure(new Error('Array buffer allocation failed')), false);
  });
});
