/**
 * Inverse tables (core/calibrate/inverse.ts).
 *
 * References:
 * - the defining inequality of the interval (Brown 1993, Measurement, Regression, and
 *   Calibration, chapter 1; Draper & Smith 1998, Applied Regression Analysis, 3rd ed.,
 *   section 3.2) with the reference-standard term of the law of propagation of uncertainty
 *   (JCGM 100:2008, section 5.1.2): at a closed end it holds with equality, with f' from a
 *   central difference of the curve;
 * - coverage: for Gaussian errors and a true curve inside the fitted space, a reading falls
 *   inside its prediction band with probability exactly `level` (Student t on the residual
 *   degrees of freedom; Weisberg, Applied Linear Regression, 4th ed., 2014, section 3.5),
 *   and the true quantity is in the interval exactly when that happens; checked by a
 *   seeded simulation of 2,000 calibrations;
 * - mirror symmetry (y -> -y), nesting in m, u and level: consequences of the definition.
 * Straight-line values against R are in test/reference/inverse.test.ts.
 * Data: datasets::cars and datasets::DNase (test/unit/calibrate/fixtures.ts); invented
 * curves only in the simulation.
 */
import { strict as assert } from 'node:assert';
import { INVERSE_COLUMNS, inverseTable, type InverseTable } from '../../../core/calibrate/inverse';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import { qt } from '../../../core/stats/distributions';
import type { FitResult } from '../../../core/types';
import { cars, dnase, mcycle, Normals, slopeAt } from './fixtures';

const COL = Object.fromEntries(INVERSE_COLUMNS.map((c, i) => [c, i])) as Record<(typeof INVERSE_COLUMNS)[number], number>;

function col(table: InverseTable, row: number, name: (typeof INVERSE_COLUMNS)[number]): number {
  return (table.rows[row] as readonly number[])[COL[name]] as number;
}

/** |y0 - f(x)| / (t sqrt(s^2/m + se^2 + (f' u)^2)) at x. */
function bandRatio(fit: FitResult, table: InverseTable, y0: number, x: number): number {
  const s2 = fit.sigma * fit.sigma;
  const w = Math.sqrt(s2 / table.readingsAveraged + s2 * fit.curve.varianceFactor(x) + (slopeAt(fit, x) * table.referenceUncertainty) ** 2);
  return Math.abs(y0 - fit.curve.value(x)) / (table.t * w);
}

describe('inverseTable: the interval', () => {
  const fit = fitCurve(dnase, { kind: 'natural-spline', df: 4 });

  it('at each closed end the reading lies exactly on the band edge, with m = 3 and u = 0.05 (Brown 1993; JCGM 100:2008, 5.1.2)', () => {
    const readings = [0.3, 0.5, 1, 1.4];
    const table = inverseTable(fit, readings, { readingsAveraged: 3, referenceUncertainty: 0.05 });
    readings.forEach((y0, i) => {
      for (const end of ['lower', 'upper'] as const) {
        const x = col(table, i, end);
        assert.ok(Number.isFinite(x), `${end} of ${y0} is closed`);
        assert.ok(Math.abs(bandRatio(fit, table, y0, x) - 1) <= 1e-7, `${end} of ${y0}: ratio ${bandRatio(fit, table, y0, x)}`);
      }
      const q = col(table, i, 'quantity');
      assert.ok(col(table, i, 'lower') < q && q < col(table, i, 'upper'));
    });
  });

  it('t is the Student t quantile (1 + level) / 2 on the residual degrees of freedom', () => {
    assert.equal(inverseTable(fit, [1], { level: 0.9 }).t, qt(0.95, fit.residualDf));
  });

  it('averaging more readings and a lower level narrow the interval; a reference uncertainty widens it', () => {
    const base = inverseTable(fit, [0.5, 1]);
    const narrower = [inverseTable(fit, [0.5, 1], { readingsAveraged: 4 }), inverseTable(fit, [0.5, 1], { level: 0.8 })];
    const wider = inverseTable(fit, [0.5, 1], { referenceUncertainty: 0.1 });
    for (let i = 0; i < 2; i++) {
      for (const t of narrower) assert.ok(col(t, i, 'lower') > col(base, i, 'lower') && col(t, i, 'upper') < col(base, i, 'upper'));
      assert.ok(col(wider, i, 'lower') < col(base, i, 'lower') && col(wider, i, 'upper') > col(base, i, 'upper'));
    }
  });

  it('an open end is NaN with the open flag, never a number: readings near the bottom and the top of the range', () => {
    const table = inverseTable(fit, [0.05, 1.71]);
    assert.ok(Number.isNaN(col(table, 0, 'lower')) && Number.isFinite(col(table, 0, 'upper')));
    assert.ok(Number.isFinite(col(table, 1, 'lower')) && Number.isNaN(col(table, 1, 'upper')));
    for (const i of [0, 1]) {
      assert.equal(col(table, i, 'open'), 1);
      assert.equal(col(table, i, 'outside'), 0);
    }
    // The band at the data's lower end indeed still holds the first reading.
    assert.ok(bandRatio(fit, table, 0.05, fit.curve.lower) <= 1);
  });

  it('readings outside the reading range: quantity NaN and `outside`; an end where the band still reaches them', () => {
    const [lo, hi] = inverseTable(fit, []).readingRange;
    const table = inverseTable(fit, [lo - 1, hi + 0.03, hi + 1]);
    for (let i = 0; i < 3; i++) {
      assert.equal(col(table, i, 'outside'), 1);
      assert.ok(Number.isNaN(col(table, i, 'quantity')));
      assert.equal(col(table, i, 'open'), 1);
    }
    // Just above the range the band still reaches the reading near the top: a closed lower end.
    assert.ok(Number.isFinite(col(table, 1, 'lower')));
    assert.ok(Math.abs(bandRatio(fit, table, hi + 0.03, col(table, 1, 'lower')) - 1) <= 1e-7);
    for (const i of [0, 2]) assert.ok(Number.isNaN(col(table, i, 'lower')) && Number.isNaN(col(table, i, 'upper')));
  });

  it('rows wider than the tolerance, or with an open end, are flagged wide; without a tolerance none is', () => {
    const readings = [0.05, 0.2, 0.5, 1, 1.3, 1.5, 1.71];
    const plain = inverseTable(fit, readings);
    const widths = readings.map((_, i) => col(plain, i, 'upper') - col(plain, i, 'lower'));
    const closed = widths.filter((w) => Number.isFinite(w)).sort((a, b) => a - b);
    const tol = closed[Math.floor(closed.length / 2)] as number;
    const flagged = inverseTable(fit, readings, { widthTolerance: tol });
    readings.forEach((_, i) => {
      assert.equal(col(plain, i, 'wide'), 0);
      const expected = !Number.isFinite(widths[i] as number) || (widths[i] as number) > tol ? 1 : 0;
      assert.equal(col(flagged, i, 'wide'), expected, `row ${i}, width ${widths[i]}, tolerance ${tol}`);
    });
    assert.equal(flagged.widthTolerance, tol);
    assert.equal(plain.widthTolerance, undefined);
  });

  it('a decreasing curve (y negated) gives the same quantities and intervals for the negated readings', () => {
    const up = inverseTable(fit, [0.05, 0.4, 1.2, 1.75], { readingsAveraged: 2, referenceUncertainty: 0.02 });
    const downFit = fitCurve({ x: dnase.x, y: dnase.y.map((v) => -v) }, { kind: 'natural-spline', df: 4 });
    const down = inverseTable(downFit, [-0.05, -0.4, -1.2, -1.75], { readingsAveraged: 2, referenceUncertainty: 0.02 });
    assert.equal(up.direction, 'increasing');
    assert.equal(down.direction, 'decreasing');
    for (let i = 0; i < 4; i++) {
      for (const c of ['quantity', 'lower', 'upper', 'open', 'outside'] as const) {
        const a = col(up, i, c);
        const b = col(down, i, c);
        assert.ok((Number.isNaN(a) && Number.isNaN(b)) || Math.abs(a - b) <= 1e-9 * 12.5, `row ${i} ${c}: ${a} vs ${b}`);
      }
    }
  });

  it('rows keep the order and the values of the readings; the columns are INVERSE_COLUMNS', () => {
    const table = inverseTable(fit, Float64Array.of(1.2, 0.3, 1.2));
    assert.deepEqual(table.columns, INVERSE_COLUMNS);
    assert.deepEqual(
      table.rows.map((r) => r[0]),
      [1.2, 0.3, 1.2],
    );
    assert.deepEqual(table.rows[0], table.rows[2]);
    assert.equal(inverseTable(fit, []).rows.length, 0);
  });

  it('the method names the method and its sources, and the reference-standard term when used', () => {
    assert.match(inverseTable(fit, [1]).method, /Brown 1993.*Draper & Smith 1998/);
    assert.doesNotMatch(inverseTable(fit, [1]).method, /JCGM/);
    assert.match(inverseTable(fit, [1], { referenceUncertainty: 0.1, readingsAveraged: 3 }).method, /mean of 3 readings.*JCGM 100:2008/);
  });

  it('a shape-constrained fit with level stretches is inverted, with a note on them', () => {
    const table = inverseTable(fitCurve(mcycle, { kind: 'natural-spline', df: 8, shape: ['increasing'] }), [0]);
    assert.equal(table.direction, 'increasing');
    assert.ok(table.notes.some((n) => /is level from x = /.test(n)));
  });
});

describe('inverseTable: refusals', () => {
  const fit = fitCurve(cars, { kind: 'natural-spline', df: 3 });

  it('options out of range', () => {
    const bad = [
      { level: 0 },
      { level: 1 },
      { level: NaN },
      { readingsAveraged: 0 },
      { readingsAveraged: 1.5 },
      { referenceUncertainty: -1 },
      { referenceUncertainty: Infinity },
      { widthTolerance: 0 },
      { widthTolerance: NaN },
    ];
    for (const options of bad) assert.throws(() => inverseTable(fit, [40], options), InputError, JSON.stringify(options));
  });

  it('a reading that is not a finite number, naming its position', () => {
    assert.throws(
      () => inverseTable(fit, [40, NaN]),
      (e: unknown) => e instanceof InputError && /reading 2 of the inverse table is NaN/.test(e.message),
    );
  });

  it('a fit without residual degrees of freedom', () => {
    const x = Float64Array.of(1, 2, 3, 4);
    assert.throws(
      () => inverseTable(fitCurve({ x, y: Float64Array.of(1, 3, 4, 8) }, { kind: 'polynomial', df: 4 }), [3]),
      (e: unknown) => e instanceof InputError && /residual degrees of freedom/.test(e.message),
    );
  });

  it('a curve that turns and a counts fit', () => {
    assert.throws(() => inverseTable(fitCurve(mcycle, { kind: 'natural-spline', df: 6 }), [0]), /turns at x = /);
    const counts = fitCurve({ x: cars.x, y: cars.y.map((v) => Math.round(v)) }, { kind: 'natural-spline', df: 3, outcome: 'counts' });
    assert.throws(() => inverseTable(counts, [40]), /continuous outcome/);
  });
});

describe('inverseTable: coverage', () => {
  it('2,000 seeded calibrations of a curved monotone truth inside the fitted space: the 95 % interval covers the true quantity 93-97 % of the time', () => {
    // Design: 40 points on [0, 10]. Truth: the natural spline with df 4 fitted to
    // 10 log(1 + x) without noise, so it lies in the space every simulated fit searches.
    const n = 40;
    const x = Float64Array.from({ length: n }, (_, i) => (10 * i) / (n - 1));
    const truthFit = fitCurve({ x, y: x.map((v) => 10 * Math.log1p(v)) }, { kind: 'natural-spline', df: 4 });
    const truth = (v: number): number => truthFit.curve.value(v);
    const sd = 0.4;
    const g = new Normals(20260302);
    const runs = 2000;
    let covered = 0;
    const y = new Float64Array(n);
    for (let r = 0; r < runs; r++) {
      for (let i = 0; i < n; i++) y[i] = truth(x[i] as number) + sd * g.next();
      // True quantities spread over the range; every other run averages 3 readings.
      const x0 = 0.25 + (9.5 * ((r % 19) + 0.5)) / 19;
      const m = r % 2 === 0 ? 1 : 3;
      const y0 = truth(x0) + (sd / Math.sqrt(m)) * g.next();
      const fit = fitCurve({ x, y }, { kind: 'natural-spline', df: 4 });
      const row = inverseTable(fit, [y0], { readingsAveraged: m }).rows[0] as readonly number[];
      const lo = row[COL.lower] as number;
      const hi = row[COL.upper] as number;
      // An open end reaches at least to the end of the data range, which holds x0.
      if ((Number.isNaN(lo) || lo <= x0) && (Number.isNaN(hi) || x0 <= hi)) covered++;
    }
    const coverage = covered / runs;
    // Binomial standard error sqrt(0.95 * 0.05 / 2000) = 0.0049: +-2 % is four of them.
    assert.ok(Math.abs(coverage - 0.95) <= 0.02, `coverage ${coverage}`);
  });
});
