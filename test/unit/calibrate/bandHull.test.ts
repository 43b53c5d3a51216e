/**
 * Ends of the set of quantities whose prediction band contains a reading
 * (core/calibrate/bandHull.ts), against brute force: the defining inequality
 * |y0 - f(x)| <= t sqrt(s^2 / m + s^2 v(x) + (f'(x) u)^2) evaluated directly on 100,001
 * equally spaced x (f' by central differences), whose first and last points inside must lie
 * within one grid step of the exact ends. Covers a curve that turns (mcycle), where the set
 * can fall apart into several stretches, so the pruning by per-piece bounds is exercised.
 * Data: MASS::mcycle, datasets::cars, datasets::DNase (test/unit/calibrate/fixtures.ts).
 */
import { strict as assert } from 'node:assert';
import { BandHull, type ReadingBand } from '../../../core/calibrate/bandHull';
import { curvePieces } from '../../../core/calibrate/pieces';
import { fitCurve } from '../../../core/fit/index';
import type { FitResult } from '../../../core/types';
import { cars, dnase, mcycle, slopeAt } from './fixtures';

const GRID = 100_000;

/** First and last grid x inside the set (NaN when none). */
function bruteEnds(fit: FitResult, y0: number, band: ReadingBand): { low: number; high: number; step: number } {
  const { lower, upper } = fit.curve;
  const step = (upper - lower) / GRID;
  const s2 = band.sigma * band.sigma;
  let low = NaN;
  let high = NaN;
  for (let i = 0; i <= GRID; i++) {
    const x = i === GRID ? upper : lower + i * step;
    const slope = slopeAt(fit, x);
    const w = Math.sqrt(s2 / band.readingsAveraged + s2 * fit.curve.varianceFactor(x) + (slope * band.referenceUncertainty) ** 2);
    if (Math.abs(y0 - fit.curve.value(x)) <= band.t * w) {
      if (Number.isNaN(low)) low = x;
      high = x;
    }
  }
  return { low, high, step };
}

function checkAgainstBruteForce(fit: FitResult, readings: readonly number[], band: ReadingBand, what: string): void {
  const hull = new BandHull(fit.curve, curvePieces(fit), 1, band);
  for (const y0 of readings) {
    const brute = bruteEnds(fit, y0, band);
    const low = hull.lowest(y0);
    const high = hull.highest(y0);
    if (Number.isNaN(brute.low)) {
      assert.ok(Number.isNaN(low) && Number.isNaN(high), `${what}, y0 = ${y0}: brute force finds no x; got ${low}..${high}`);
      continue;
    }
    // The exact end lies between the last grid point outside and the first inside.
    assert.ok(low <= brute.low + 1e-9 * brute.step && low >= brute.low - brute.step * (1 + 1e-6), `${what}, y0 = ${y0}: lowest ${low}, brute force ${brute.low}`);
    assert.ok(high >= brute.high - 1e-9 * brute.step && high <= brute.high + brute.step * (1 + 1e-6), `${what}, y0 = ${y0}: highest ${high}, brute force ${brute.high}`);
  }
}

describe('BandHull against brute force', () => {
  it('cars, natural spline df 3: one reading, no reference uncertainty', () => {
    const fit = fitCurve(cars, { kind: 'natural-spline', df: 3 });
    checkAgainstBruteForce(fit, [-30, 0, 10, 40, 60, 80, 100, 130], { t: 2.0117, sigma: fit.sigma, readingsAveraged: 1, referenceUncertainty: 0 }, 'cars');
  });

  it('DNase, natural spline df 4: mean of 3 readings, reference uncertainty 0.05 ng/ml', () => {
    const fit = fitCurve(dnase, { kind: 'natural-spline', df: 4 });
    checkAgainstBruteForce(fit, [0.02, 0.1, 0.5, 1, 1.5, 1.72, 1.76, 1.9], { t: 2.18, sigma: fit.sigma, readingsAveraged: 3, referenceUncertainty: 0.05 }, 'DNase');
  });

  it('DNase, smoothing spline df 6 (one piece per gap between distinct x)', () => {
    const fit = fitCurve(dnase, { kind: 'smoothing-spline', df: 6 });
    checkAgainstBruteForce(fit, [0.05, 0.3, 0.9, 1.4, 1.7], { t: 2.2, sigma: fit.sigma, readingsAveraged: 1, referenceUncertainty: 0.02 }, 'DNase smoothing');
  });

  it('mcycle, natural spline df 8 (turns three times): the set can come apart, its ends still match', () => {
    const fit = fitCurve(mcycle, { kind: 'natural-spline', df: 8 });
    checkAgainstBruteForce(fit, [-130, -100, -60, -20, 0, 20, 40, 80], { t: 1.98, sigma: fit.sigma, readingsAveraged: 1, referenceUncertainty: 0 }, 'mcycle');
  });

  it('polynomial of degree 5 on mcycle (one piece, band polynomial of degree 10)', () => {
    const fit = fitCurve(mcycle, { kind: 'polynomial', df: 6 });
    checkAgainstBruteForce(fit, [-110, -50, 0, 30], { t: 1.98, sigma: fit.sigma, readingsAveraged: 2, referenceUncertainty: 0.3 }, 'mcycle polynomial');
  });

  it('a decreasing curve mirrored by sign -1 gives the same ends as brute force', () => {
    const fit = fitCurve({ x: dnase.x, y: dnase.y.map((v) => -v) }, { kind: 'natural-spline', df: 4 });
    const band = { t: 2.18, sigma: fit.sigma, readingsAveraged: 1, referenceUncertainty: 0 };
    const hull = new BandHull(fit.curve, curvePieces(fit), -1, band);
    for (const y0 of [-0.1, -0.6, -1.2, -1.7]) {
      const brute = bruteEnds(fit, y0, band);
      assert.ok(Math.abs(hull.lowest(y0) - brute.low) <= brute.step, `lowest at ${y0}`);
      assert.ok(Math.abs(hull.highest(y0) - brute.high) <= brute.step || (Number.isNaN(brute.high) && Number.isNaN(hull.highest(y0))), `highest at ${y0}`);
    }
  });
});
