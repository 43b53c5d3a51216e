/**
 * Unit tests of core/stats/influence.ts. The thresholds and R's flags on open datasets are
 * checked in test/reference/influence.test.ts; here: the order of the list, the kept and
 * shown rows, hand-worked studentized residuals, and bad input.
 */
import { strict as assert } from 'node:assert';
import { InputError } from '../../../core/errors';
import { externallyStudentized, INFLUENCE_SHOWN, influenceThresholds, influentialRows, likelihoodResiduals, standardizedResiduals } from '../../../core/stats/influence';

const zeros = (n: number): Float64Array => new Float64Array(n);

describe('influentialRows', () => {
  it('influenceThresholds names each rule with its source: Bonferroni outlier test, median of F(df, n - df), leverage above 0.5 and 3 df / n', () => {
    const t = influenceThresholds(100, 4, 'student');
    assert.deepEqual(
      t.map((x) => [x.rule, x.measure]),
      [
        ['outlier', 'studentized'],
        ['cooks', 'cooks'],
        ['leverage', 'leverage'],
      ],
    );
    assert.match(t[0]?.source ?? '', /Bonferroni/);
    assert.match(t[1]?.source ?? '', /median of F\(df, n - df\).*Cook 1977/);
    assert.match(t[2]?.source ?? '', /common practice/);
    // max(0.5, 3 df / n): 0.5 at n = 100, df = 4; 0.6 at n = 20, df = 4.
    assert.equal(t[2]?.value, 0.5);
    assert.equal(influenceThresholds(20, 4, 'student')[2]?.value, 0.6);
    // No residual df left for the leave-one-out SD: no outlier threshold.
    assert.ok(Number.isNaN(influenceThresholds(5, 4, 'student')[0]?.value));
  });

  it('influentialRows lists rows past any threshold, furthest past first, with CSV lines and the rules broken', () => {
    const n = 100;
    const leverage = zeros(n).fill(0.04);
    const cooks = zeros(n).fill(0.01);
    const t = zeros(n).fill(0.5);
    leverage[3] = 0.9; // leverage limit 0.5: 1.8 times it
    cooks[7] = 3; // Cook's limit about 0.85: 3.5 times it
    t[9] = 30; // Bonferroni limit about 3.6: 8 times it
    const lines = Int32Array.from({ length: n }, (_, i) => 2 * i + 3);
    const r = influentialRows({ leverage, cooksDistance: cooks, studentized: t, df: 4, reference: 'student', lines });
    assert.deepEqual(
      r.rows.map((row) => [row.index, row.line, row.exceeds]),
      [
        [9, 21, ['outlier']],
        [7, 17, ['cooks']],
        [3, 9, ['leverage']],
      ],
    );
    assert.equal(r.total, 3);
    assert.equal(r.shown, 3);
  });

  it('influentialRows keeps every flagged row but shows the first INFLUENCE_SHOWN; rows without lines are numbered from 1', () => {
    const n = 1000;
    const t = Float64Array.from({ length: n }, (_, i) => (i % 20 === 0 ? 10 + i / 1000 : 0));
    const r = influentialRows({ leverage: zeros(n), cooksDistance: zeros(n), studentized: t, df: 2, reference: 'normal' });
    assert.equal(r.total, 50);
    assert.equal(r.rows.length, 50);
    assert.equal(r.shown, INFLUENCE_SHOWN);
    assert.equal(r.rows[0]?.index, 980);
    assert.equal(r.rows[0]?.line, 981);
  });

  it('non-finite measures (leverage 1) flag only through what is finite', () => {
    const r = influentialRows({
      leverage: Float64Array.of(1, 0.1, 0.1, 0.1, 0.1, 0.1),
      cooksDistance: Float64Array.of(NaN, 0, 0, 0, 0, 0),
      studentized: Float64Array.of(NaN, 0, 0, 0, 0, 0),
      df: 1,
      reference: 'student',
    });
    assert.deepEqual(
      r.rows.map((row) => [row.index, row.exceeds]),
      [[0, ['leverage']]],
    );
  });

  it('influentialRows rejects mismatched lengths, no rows and df <= 0', () => {
    const base = { leverage: zeros(3), cooksDistance: zeros(3), studentized: zeros(3), df: 1, reference: 'student' as const };
    assert.throws(
      () => influentialRows({ ...base, cooksDistance: zeros(2) }),
      (e: unknown) => e instanceof InputError && /3 leverages but 2 Cook's distances/.test(e.message),
    );
    assert.throws(() => influentialRows({ ...base, studentized: zeros(2) }), /3 leverages but 2 studentized residuals/);
    assert.throws(() => influentialRows({ ...base, leverage: zeros(0), cooksDistance: zeros(0), studentized: zeros(0) }), /no rows/);
    assert.throws(() => influentialRows({ ...base, df: 0 }), /df must be > 0, got 0/);
    assert.throws(() => influentialRows({ ...base, lines: new Int32Array(4) }), /3 rows but 4 line numbers/);
  });
});

describe('studentized residuals', () => {
  it('externallyStudentized: e / (s_(i) sqrt(1 - h)) with the residual SD of the other rows (hand-worked)', () => {
    // e = (1, -1, 2, -2), h = 0.5, df = 1: s^2 = 10 / 3; for row 3, r^2 = 4 / (10/3 * 0.5) = 2.4,
    // s_(3)^2 = (10 - 4 / 0.5) / 2 = 1, so t = 2 / sqrt(0.5) = 2.828427...
    const t = externallyStudentized(Float64Array.of(1, -1, 2, -2), Float64Array.of(0.5, 0.5, 0.5, 0.5), 1);
    assert.ok(Math.abs((t[2] as number) - 2 / Math.sqrt(0.5)) < 1e-12, String(t[2]));
    assert.ok(Math.abs((t[3] as number) + 2 / Math.sqrt(0.5)) < 1e-12, String(t[3]));
    assert.ok(Number.isNaN(externallyStudentized(Float64Array.of(1, -1, 0), Float64Array.of(1, 0.5, 0.5), 1)[0] as number), 'leverage 1');
  });

  it('likelihoodResiduals: sign(d) sqrt(d^2 + h p^2 / (1 - h)) (Williams 1987), standardizedResiduals: e / (scale sqrt(1 - h))', () => {
    const l = likelihoodResiduals(Float64Array.of(-1, 2), Float64Array.of(-1.5, 3), Float64Array.of(0.5, 0.2));
    assert.ok(Math.abs((l[0] as number) + Math.sqrt(1 + 2.25)) < 1e-12);
    assert.ok(Math.abs((l[1] as number) - Math.sqrt(4 + (0.2 * 9) / 0.8)) < 1e-12);
    const s = standardizedResiduals(Float64Array.of(2), Float64Array.of(0.75), 2);
    assert.ok(Math.abs((s[0] as number) - 2) < 1e-12);
  });
});
