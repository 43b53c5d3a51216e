/**
 * Tests of the memory budget (core/stream/budget.ts): its limits, and its estimate of a
 * whole read against the peak memory the benchmark measured for the command line's whole
 * reads (bench/results.md before streaming: 1,000,000 rows of two columns 259 MiB,
 * 10,000,000 rows 1,427 MiB; getrusage's maximum resident set at exit), within 15 %.
 */
import { strict as assert } from 'node:assert';
import { DEFAULT_MEMORY_BUDGET, estimatedMiB, parseMemoryBudget } from '../../../core/stream/budget';
import { InputError } from '../../../core/errors';

/** Bytes of one row of the benchmark's file: `12.345678,1.234567\n`. */
const ROW_BYTES = 19;

describe('memory budget', () => {
  it('estimates a whole read within 15 % of the peak the benchmark measured at 1,000,000 and 10,000,000 rows', () => {
    for (const [rows, measured] of [
      [1_000_000, 259],
      [10_000_000, 1427],
    ] as const) {
      const est = estimatedMiB(rows * ROW_BYTES, 1 << 20, Math.floor((1 << 20) / ROW_BYTES), 2);
      assert.ok(Math.abs(est / measured - 1) < 0.15, `${rows} rows: estimated ${est} MiB, measured ${measured} MiB`);
    }
  });

  it('reads whole up to about 1.7 million rows of two columns at the default budget, and streams above', () => {
    const at = (rows: number): number => estimatedMiB(rows * ROW_BYTES, 1 << 20, Math.floor((1 << 20) / ROW_BYTES), 2);
    assert.ok(at(1_600_000) <= DEFAULT_MEMORY_BUDGET);
    assert.ok(at(1_800_000) > DEFAULT_MEMORY_BUDGET);
  });

  it('takes a whole number of MiB from 1 to 1,048,576 and refuses others with the limits', () => {
    assert.equal(parseMemoryBudget(' 512 '), 512);
    for (const bad of ['0', '1.5', '-3', 'lots', '2000000'])
      assert.throws(
        () => parseMemoryBudget(bad),
        (e: unknown) => e instanceof InputError && /from 1 to 1048576/.test(e.message),
        bad,
      );
  });
});
