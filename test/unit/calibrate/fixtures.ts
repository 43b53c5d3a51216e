/**
 * Data and brute-force references shared by the inverse-table tests.
 *
 * Data: MASS::mcycle (Silverman 1985) and datasets::cars (Ezekiel 1930) as exported by the
 * committed script test/reference/r/fits.R into test/reference/fixtures/fits.json;
 * datasets::DNase run 1 (Davidian & Giltinan 1995) as exported by test/reference/r/inverse.R
 * into test/reference/fixtures/inverse.json.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fitCurve } from '../../../core/fit/index';
import type { CurveKindId, FitResult } from '../../../core/types';
import { RandomStream } from '../../../core/tune/rng';

interface Pairs {
  readonly x: number[];
  readonly y: number[];
}

const FIXTURES = join(__dirname, '..', '..', 'reference', 'fixtures');
const fits = JSON.parse(readFileSync(join(FIXTURES, 'fits.json'), 'utf8')) as { datasets: Record<string, Pairs> };
const inverse = JSON.parse(readFileSync(join(FIXTURES, 'inverse.json'), 'utf8')) as { datasets: Record<string, Pairs> };

function typed(d: Pairs | undefined): { x: Float64Array; y: Float64Array } {
  if (!d) throw new Error('dataset missing from the fixture');
  return { x: Float64Array.from(d.x), y: Float64Array.from(d.y) };
}

/** MASS::mcycle: times [ms] -> head acceleration [g]; turns several times. */
export const mcycle = typed(fits.datasets.mcycle);
/** datasets::cars: speed [mph] -> stopping distance [ft]; increasing. */
export const cars = typed(fits.datasets.cars);
/** datasets::DNase run 1: concentration [ng/ml] -> optical density; increasing, saturating. */
export const dnase = typed(inverse.datasets.dnase);

/**
 * Sign changes of the curve's slope found by brute force: the curve on `points` + 1 equally
 * spaced x over the data range, the sign of each difference of neighbours (differences
 * within `flat` of zero skipped), and the grid point where the sign last flipped.
 * Returns the approximate turning points and the grid step.
 */
export function bruteTurns(fit: FitResult, points = 100_000, flat = 0): { turns: number[]; step: number; rises: boolean } {
  const { lower, upper } = fit.curve;
  const step = (upper - lower) / points;
  const turns: number[] = [];
  let last = 0;
  let first = 0;
  let prev = fit.curve.value(lower);
  for (let i = 1; i <= points; i++) {
    const v = fit.curve.value(lower + i * step);
    const d = v - prev;
    prev = v;
    const s = d > flat ? 1 : d < -flat ? -1 : 0;
    if (s === 0) continue;
    if (last !== 0 && s !== last) turns.push(lower + (i - 1) * step);
    if (first === 0) first = s;
    last = s;
  }
  return { turns, step, rises: first > 0 };
}

/** Standard normal variates from the project's seeded stream by the Box-Muller transform (Box & Muller 1958). */
export class Normals {
  private readonly rng: RandomStream;
  constructor(seed: number) {
    this.rng = new RandomStream(seed);
  }
  next(): number {
    const u1 = (this.rng.int(2 ** 30) + 0.5) / 2 ** 30;
    const u2 = (this.rng.int(2 ** 30) + 0.5) / 2 ** 30;
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  }
}

/** Slope of the curve at x by a central difference (step 1e-6 of the data range). */
export function slopeAt(fit: FitResult, x: number): number {
  const h = 1e-6 * (fit.curve.upper - fit.curve.lower);
  return (fit.curve.value(x + h) - fit.curve.value(x - h)) / (2 * h);
}

/**
 * A fit whose curve is `value` on [first knot, last knot], one polynomial between knots
 * (pieces built by hand), variance factor 0.1; the rest is a straight-line fit of cars.
 */
export function handFit(knots: readonly number[], value: (x: number) => number, kind: CurveKindId = 'natural-spline'): FitResult {
  const base = fitCurve(cars, { kind: 'polynomial', df: 2 });
  const lower = knots[0] as number;
  const upper = knots[knots.length - 1] as number;
  return {
    ...base,
    kind,
    knots: Float64Array.from(knots),
    fitted: Float64Array.of(value(lower), value(upper)),
    curve: { kind, df: base.df, lower, upper, value, varianceFactor: () => 0.1 },
  };
}
