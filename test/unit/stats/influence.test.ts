import { strict as assert } from 'node:assert';
import { InputError } from '../../../core/errors';
import { influentialRows } from '../../../core/stats/influence';

describe('influentialRows', () => {
  it("influentialRows uses 2 df / n for leverage (Hoaglin & Welsch 1978), 4 / n (common practice) and 1 (Cook & Weisberg 1982) for Cook's D", () => {
    const n = 50;
    const r = influentialRows(new Float64Array(n).fill(0.04), new Float64Array(n).fill(0.01), 2);
    assert.deepEqual(
      r.thresholds.map((t) => [t.measure, t.rule, t.value]),
      [
        ['leverage', 'leverage > 2 df / n', 0.08],
        ['cooks', "Cook's D > 4 / n", 0.08],
        ['cooks', "Cook's D > 1", 1],
      ],
    );
    assert.match(r.thresholds[0]?.source ?? '', /Hoaglin & Welsch \(1978\)/);
    assert.match(r.thresholds[1]?.source ?? '', /common practice/);
    assert.match(r.thresholds[2]?.source ?? '', /Cook & Weisberg \(1982\)/);
    assert.equal(r.total, 0);
    assert.equal(r.rows.length, 0);
  });

  it('influentialRows lists rows above any threshold, most influential first, with CSV lines and the rules exceeded', () => {
    const leverage = Float64Array.of(0.1, 0.9, 0.2, 0.1, 0.1, 0.1, 0.1, 0.1, 0.1, 0.2);
    const cooks = Float64Array.of(0.01, 0.3, 1.5, 0.01, 0.45, 0.01, 0.01, 0.01, 0.01, 0.01);
    const lines = Int32Array.from({ length: 10 }, (_, i) => 2 * i + 3);
    // n = 10, df = 1: leverage > 0.2, Cook's > 0.4.
    const r = influentialRows(leverage, cooks, 1, lines);
    assert.deepEqual(
      r.rows.map((row) => [row.index, row.line, row.exceeds]),
      [
        [2, 7, ["Cook's D > 4 / n", "Cook's D > 1"]],
        [4, 11, ["Cook's D > 4 / n"]],
        [1, 5, ['leverage > 2 df / n']],
      ],
    );
    assert.equal(r.total, 3);
  });

  it('influentialRows caps the list but counts every flagged row; rows without lines are numbered from 1', () => {
    const n = 100;
    const cooks = Float64Array.from({ length: n }, (_, i) => (i % 2 === 0 ? 1 + i / 1000 : 0));
    const r = influentialRows(new Float64Array(n), cooks, 2, undefined, 5);
    assert.equal(r.total, 50);
    assert.equal(r.rows.length, 5);
    assert.equal(r.rows[0]?.index, 98);
    assert.equal(r.rows[0]?.line, 99);
  });

  it("influentialRows puts rows with undefined Cook's distance (leverage 1) last and flags them by leverage", () => {
    const r = influentialRows(Float64Array.of(1, 0.1, 0.1, 0.1), Float64Array.of(NaN, 2, 0, 0), 1);
    assert.deepEqual(
      r.rows.map((row) => [row.index, row.exceeds]),
      [
        [1, ["Cook's D > 4 / n", "Cook's D > 1"]],
        [0, ['leverage > 2 df / n']],
      ],
    );
  });

  it('influentialRows rejects mismatched lengths, no rows and df <= 0', () => {
    assert.throws(
      () => influentialRows(new Float64Array(3), new Float64Array(2), 1),
      (e: unknown) => e instanceof InputError && /3 leverages but 2 Cook's distances/.test(e.message),
    );
    assert.throws(() => influentialRows(new Float64Array(0), new Float64Array(0), 1), /no rows/);
    assert.throws(() => influentialRows(new Float64Array(2), new Float64Array(2), 0), /df must be > 0, got 0/);
    assert.throws(() => influentialRows(new Float64Array(2), new Float64Array(2), 1, new Int32Array(3)), /2 rows but 3 line numbers/);
  });
});
