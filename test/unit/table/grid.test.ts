/**
 * Tests of the curve-table grid (core/table/grid.ts): parseGrid, gridPoints, defaultGrid and
 * checkInRange. The grid forms are those of docs/design.md, "Grids" (a grid the user
 * chooses: start/stop/step, a count, the distinct data x, or a list), and "Safety"
 * (grid points outside the data range are refused unless extrapolation is asked for).
 * Data for the `data` grid: the speeds of R's datasets::cars (Ezekiel 1930), typed in from
 * R 4.2 `cars$speed`.
 */
import { strict as assert } from 'node:assert';
import fc from 'fast-check';
import { InputError } from '../../../core/errors';
import { checkInRange, DEFAULT_GRID_COUNT, defaultGrid, formatGrid, gridPoints, MAX_GRID_POINTS, parseGrid } from '../../../core/table/grid';

/** datasets::cars$speed (R 4.2), already sorted in the dataset. */
const CARS_SPEED = Float64Array.of(
  4,
  4,
  7,
  7,
  8,
  9,
  10,
  10,
  10,
  11,
  11,
  12,
  12,
  12,
  12,
  13,
  13,
  13,
  13,
  14,
  14,
  14,
  14,
  15,
  15,
  15,
  16,
  16,
  17,
  17,
  17,
  18,
  18,
  18,
  18,
  19,
  19,
  19,
  20,
  20,
  20,
  20,
  20,
  22,
  23,
  24,
  24,
  24,
  24,
  25,
);

/** Asserts that `f` throws an InputError whose message matches every pattern. */
function throwsInput(f: () => unknown, ...patterns: RegExp[]): void {
  assert.throws(f, (e: unknown) => {
    assert.ok(e instanceof InputError, `expected InputError, got ${String(e)}`);
    for (const p of patterns) assert.match(e.message, p);
    return true;
  });
}

const finite = (min: number, max: number): fc.Arbitrary<number> => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });

describe('parseGrid', () => {
  it('parseGrid reads start:stop:count, start:stop:step=h, data and lists (sorted)', () => {
    assert.deepEqual(parseGrid('0:10:count=11'), { kind: 'count', start: 0, stop: 10, count: 11 });
    assert.deepEqual(parseGrid(' -2.5 : 7.5e1 : count=3 '), { kind: 'count', start: -2.5, stop: 75, count: 3 });
    assert.deepEqual(parseGrid('0:1:step=0.25'), { kind: 'step', start: 0, stop: 1, step: 0.25 });
    assert.deepEqual(parseGrid('data'), { kind: 'data' });
    assert.deepEqual(parseGrid('3, 1,2.5'), { kind: 'list', values: [1, 2.5, 3] });
    assert.deepEqual(parseGrid('42'), { kind: 'list', values: [42] });
  });

  it('parseGrid refuses a stop at or below the start, naming the grid', () => {
    throwsInput(() => parseGrid('10:0:5'), /grid "10:0:5"/, /stop must be greater than start/);
    throwsInput(() => parseGrid('1:1:5'), /stop must be greater than start/);
  });

  it('parseGrid refuses counts that are not whole numbers from 2 to the limit', () => {
    for (const count of ['1', '0', '-3', '2.5', String(MAX_GRID_POINTS + 1)]) {
      throwsInput(() => parseGrid(`0:1:count=${count}`), new RegExp(`grid "0:1:count=${count.replace('.', '\\.')}"`), /count must be a whole number from 2/);
    }
  });

  it('parseGrid refuses a step that is not positive or gives too many points', () => {
    throwsInput(() => parseGrid('0:1:step=0'), /step must be positive/);
    throwsInput(() => parseGrid('0:1:step=-0.1'), /step must be positive/);
    throwsInput(() => parseGrid('0:1e9:step=1e-3'), /more than 1000000 points/);
    throwsInput(() => parseGrid('0:1:step='), /step "" is not a number/);
  });

  it('parseGrid names the part that is not a number', () => {
    throwsInput(() => parseGrid('a:10:5'), /grid "a:10:5": start "a" is not a number/);
    throwsInput(() => parseGrid('0:b:5'), /stop "b" is not a number/);
    throwsInput(() => parseGrid('0:10:count=many'), /count "many" is not a number/);
    throwsInput(() => parseGrid('0:Infinity:5'), /stop "Infinity" is not a number/);
    throwsInput(() => parseGrid('1,,2'), /grid "1,,2": value "" is not a number/);
    throwsInput(() => parseGrid('1,NaN'), /value "NaN" is not a number/);
    throwsInput(() => parseGrid(''), /value "" is not a number/);
    // Two parts are neither a range nor a list of numbers.
    throwsInput(() => parseGrid('0:10'), /grid "0:10": value "0:10" is not a number/);
    throwsInput(() => parseGrid('0:10:5:2'), /is not a number/);
    // A bare third field is ambiguous (a count to some, a step to others): refused with the accepted forms.
    throwsInput(() => parseGrid('10:94:2'), /grid "10:94:2": the third field must say what it is/, /count=<n>/, /step=<h>/, /auto=<tolerance>/);
  });
});

describe('gridPoints', () => {
  it('gridPoints(count) spaces the points evenly with start and stop exact', () => {
    fc.assert(
      fc.property(finite(-1e6, 1e6), finite(1e-6, 1e6), fc.integer({ min: 2, max: 500 }), (start, span, count) => {
        const stop = start + span;
        fc.pre(stop > start);
        const p = gridPoints({ kind: 'count', start, stop, count }, new Float64Array(0));
        assert.equal(p.length, count);
        assert.equal(p[0], start);
        assert.equal(p[count - 1], stop);
        const h = (stop - start) / (count - 1);
        for (let i = 0; i < count; i++) {
          // Tolerance: rounding of start + i h, a few ulps of the largest magnitude involved.
          const tol = 4 * Number.EPSILON * Math.max(Math.abs(start), Math.abs(stop));
          assert.ok(Math.abs((p[i] as number) - (start + i * h)) <= tol, `point ${i}: ${p[i]} vs ${start + i * h}`);
          assert.ok((p[i] as number) >= start && (p[i] as number) <= stop, `point ${i} = ${p[i]} outside [${start}, ${stop}]`);
          if (i > 0) assert.ok((p[i] as number) >= (p[i - 1] as number), 'increasing');
        }
      }),
      { numRuns: 300, seed: 7101 },
    );
  });

  it('gridPoints(step) runs from start by the step and never passes stop, even when the step does not divide evenly in binary', () => {
    // 0:0.3:step=0.1 must give 0, 0.1, 0.2, 0.3: 3 x 0.1 is 0.30000000000000004 in binary, which
    // would lie outside a data range ending at 0.3 and be refused as extrapolation.
    const p = gridPoints(parseGrid('0:0.3:step=0.1'), new Float64Array(0));
    assert.equal(p.length, 4);
    assert.ok(Math.abs((p[2] as number) - 0.2) <= 1e-15, `third point ${p[2]} (tolerance 1e-15)`);
    assert.ok((p[3] as number) <= 0.3 && 0.3 - (p[3] as number) <= 1e-15, `last point ${p[3]} (at most 0.3, tolerance 1e-15)`);
    assert.equal(checkInRange(p, 0, 0.3, false), 0);
    fc.assert(
      fc.property(finite(-1000, 1000), fc.integer({ min: 1, max: 2000 }), finite(1e-3, 10), (start, steps, step) => {
        const stop = start + steps * step;
        fc.pre(stop > start);
        const q = gridPoints({ kind: 'step', start, stop, step }, new Float64Array(0));
        // Whole number of steps: steps + 1 points (the relative 1e-9 allowance absorbs rounding).
        assert.equal(q.length, steps + 1);
        for (let i = 0; i < q.length; i++) {
          assert.ok((q[i] as number) >= start && (q[i] as number) <= stop, `point ${i} = ${q[i]} outside [${start}, ${stop}]`);
          // Tolerance: rounding of start + i step, a few ulps of the largest magnitude.
          assert.ok(Math.abs((q[i] as number) - (start + i * step)) <= 8 * Number.EPSILON * Math.max(Math.abs(start), Math.abs(stop)), `point ${i}`);
        }
      }),
      { numRuns: 300, seed: 7102 },
    );
  });

  it('gridPoints(step) stops at the last step at or below stop when the range is not a whole number of steps', () => {
    const p = gridPoints(parseGrid('1:2:step=0.3'), new Float64Array(0));
    assert.equal(p.length, 4); // 1, 1.3, 1.6, 1.9
    assert.ok(Math.abs((p[3] as number) - 1.9) <= 1e-15, `last point ${p[3]} (tolerance 1e-15)`);
  });

  it('gridPoints(data) gives the sorted distinct x of the data (datasets::cars speeds)', () => {
    // datasets::cars has 19 distinct speeds: 4, 7, 8, ..., 25 (R: sort(unique(cars$speed))).
    const p = gridPoints(parseGrid('data'), CARS_SPEED);
    assert.deepEqual(Array.from(p), [4, 7, 8, 9, 10, 11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 22, 23, 24, 25]);
  });

  it('gridPoints(list) returns the listed values in increasing order', () => {
    assert.deepEqual(Array.from(gridPoints(parseGrid('5,-1,2'), CARS_SPEED)), [-1, 2, 5]);
  });

  it('defaultGrid covers the data range with DEFAULT_GRID_COUNT points', () => {
    const p = gridPoints(defaultGrid(CARS_SPEED), CARS_SPEED);
    assert.equal(p.length, DEFAULT_GRID_COUNT);
    assert.equal(p[0], 4);
    assert.equal(p[p.length - 1], 25);
  });
});

describe('checkInRange', () => {
  it('checkInRange accepts points inside the data range, boundaries included', () => {
    assert.equal(checkInRange(Float64Array.of(4, 10, 25), 4, 25, false), 0);
  });

  it('checkInRange refuses points outside the range, saying how many and the range, unless extrapolation is asked for', () => {
    const pts = Float64Array.of(3.5, 4, 25, 25.5, 30);
    throwsInput(() => checkInRange(pts, 4, 25, false), /^3 grid point\(s\) lie outside the data range \[4, 25\]/, /--extrapolate/);
    assert.equal(checkInRange(pts, 4, 25, true), 3);
  });
});

describe('parseGrid auto and formatGrid', () => {
  it('parseGrid reads auto:<tolerance> and <start>:<stop>:auto=<tolerance>', () => {
    assert.deepEqual(parseGrid('auto:0.001'), { kind: 'auto', tolerance: 0.001 });
    assert.deepEqual(parseGrid(' auto : 1e-4 '), { kind: 'auto', tolerance: 1e-4 });
    assert.deepEqual(parseGrid('10:90:auto=0.5'), { kind: 'auto', tolerance: 0.5, start: 10, stop: 90 });
  });

  it('parseGrid refuses a tolerance that is not a positive number, naming the grid', () => {
    throwsInput(() => parseGrid('auto:0'), /grid "auto:0": the tolerance of the automatic step must be a positive number/);
    throwsInput(() => parseGrid('auto:-1'), /must be a positive number/);
    throwsInput(() => parseGrid('auto:x'), /tolerance "x" is not a number/);
    throwsInput(() => parseGrid('0:1:auto='), /tolerance "" is not a number/);
  });

  it('gridPoints refuses an unresolved automatic step with a clear message', () => {
    throwsInput(() => gridPoints({ kind: 'auto', tolerance: 1 }, CARS_SPEED), /an automatic step needs the fitted curve/);
  });

  it('formatGrid is the inverse of parseGrid for every kind', () => {
    for (const text of ['0:10:count=11', '-2.5:75:step=0.25', 'data', '1,2.5,4', 'auto:0.001', '10:90:auto=0.5', '0.1:0.30000000000000004:count=3']) {
      const spec = parseGrid(text);
      assert.deepEqual(parseGrid(formatGrid(spec)), spec, text);
    }
    fc.assert(
      fc.property(finite(-1e6, 1e6), finite(1e-9, 1e6), finite(1e-12, 1e3), (start, span, tolerance) => {
        const spec = { kind: 'auto' as const, tolerance, start, stop: start + span };
        fc.pre(spec.stop > start);
        assert.deepEqual(parseGrid(formatGrid(spec)), spec);
      }),
      { numRuns: 200, seed: 7103 },
    );
  });
});
