/**
 * Calibration use from the command line (issue 15): `fit --inverse` writes the inverse
 * table, its code and report section and lists them in the record, and `check` rebuilds
 * them; a curve that turns is refused, saying where; the record keeps the curve it replaced
 * and the drift from it, which `fit`, `check` and the report state; `knotwise compare`
 * compares two records. Data: datasets::cars (Ezekiel 1930) and MASS::mcycle (Silverman
 * 1985) from test/e2e/fixtures. The straight-line inverse intervals are checked against the
 * closed form computed in base R (test/reference/r/inverse.R, Draper & Smith 1998, section
 * 3.2); the drift against a brute-force loop over the recorded sample.
 */
import { strict as assert } from 'node:assert';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { bandsAt } from '../../../core/fit/bands';
import { fitCurve } from '../../../core/fit/index';
import { RECORD_SCHEMA } from '../../../core/outputs/recordSchema';
import { copyFixture, REPO, runCheckIn, runMain } from './runMain';

type Json = Record<string, unknown>;

/** The straight-line entries of the base-R reference (test/reference/fixtures/inverse.json). */
interface StraightRef {
  readonly dataset: string;
  readonly reading: number;
  readonly readingsAveraged: number;
  readonly level: number;
  readonly estimate: number;
  /** Both roots of the quadratic, and whether each lies in the data range (else that end is open). */
  readonly rootLower: number;
  readonly rootUpper: number;
  readonly lowerInRange: boolean;
  readonly upperInRange: boolean;
}

const reference = JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'inverse.json'), 'utf8')) as { straight: StraightRef[] };

/** Rows of a CSV as numbers by column name. */
function csvRows(text: string): Record<string, number>[] {
  const [head, ...lines] = text.trim().split('\n');
  const names = (head as string).split(',');
  return lines.map((l) => Object.fromEntries(l.split(',').map((v, i) => [names[i] as string, Number(v)])));
}

/** Adds `by` to every reading (the second column) of a CSV file, in place. */
function shiftReadings(path: string, by: number): void {
  const [head, ...lines] = readFileSync(path, 'utf8').trim().split('\n');
  writeFileSync(path, [head, ...lines.map((l) => `${l.split(',')[0]},${Number(l.split(',')[1]) + by}`)].join('\n') + '\n');
}

describe('calibration use on the command line', function () {
  this.timeout(120_000);
  let dir: string;
  let cars: string;
  const fitArgs = (...more: string[]): string[] => ['fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2', ...more, '--quiet'];

  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'kw-cal-'));
    cars = copyFixture('cars.csv', join(dir, 'cars.csv'));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  for (const m of [1, 3]) {
    it(`the straight line, ${m} reading(s) averaged: the inverse table gives the closed-form inverse-prediction interval of base R, open ends as NaN`, async () => {
      // Readings inside what the line reaches over 4 to 25 mph (about -1.8 to 80.7 ft).
      const refs = reference.straight.filter((r) => r.dataset === 'cars' && r.readingsAveraged === m && r.level === 0.95 && r.reading <= 80);
      assert.ok(refs.length >= 4, 'the reference has straight-line readings of cars');
      const run = await runMain(...fitArgs('--inverse-grid', refs.map((r) => r.reading).join(','), '--readings-averaged', String(m), '--digits', '12'));
      assert.equal(run.code, 0, run.stderr);
      const rows = csvRows(readFileSync(join(dir, 'cars.inverse.csv'), 'utf8'));
      assert.equal(rows.length, refs.length);
      for (const [i, r] of refs.entries()) {
        const row = rows[i] as Record<string, number>;
        assert.ok(Math.abs((row.reading as number) - r.reading) < 1e-9);
        assert.ok(Math.abs((row.quantity as number) - r.estimate) < 1e-8, `x^ at ${r.reading}: ${row.quantity} vs R ${r.estimate}`);
        const ends = [
          ['lower', r.rootLower, r.lowerInRange],
          ['upper', r.rootUpper, r.upperInRange],
        ] as const;
        for (const [end, want, inRange] of ends) {
          if (!inRange) assert.ok(Number.isNaN(row[end]) && row.open === 1, `${end} end open at ${r.reading}`);
          else assert.ok(Math.abs((row[end] as number) - want) < 1e-7, `${end} at ${r.reading}: ${row[end]} vs R ${want}`);
        }
      }
    });
  }

  it('writes the inverse table with its C, TypeScript and JSON code and a report section; the record lists them and check rebuilds them', async () => {
    const run = await runMain(...fitArgs('--inverse', '--readings-averaged', '3', '--reference-uncertainty', '0.2', '--max-interval-width', '5', '--emit', 'c,ts,json', '--report'));
    assert.equal(run.code, 0, run.stderr);
    for (const f of ['cars.inverse.csv', 'cars.inverse.h', 'cars.inverse.ts', 'cars.inverse.json']) assert.ok(existsSync(join(dir, f)), f);
    const record = JSON.parse(readFileSync(join(dir, 'cars.fit.json'), 'utf8')) as Json;
    assert.deepEqual(RECORD_SCHEMA.problems(record), []);
    const spec = record.spec as Json;
    assert.deepEqual(spec.inverse, { grid: null, readingsAveraged: 3, referenceUncertainty: 0.2, maxIntervalWidth: 5 });
    const inv = record.inverse as Json;
    assert.equal(inv.file, 'cars.inverse.csv');
    assert.equal(inv.direction, 'increasing');
    const rows = csvRows(readFileSync(join(dir, 'cars.inverse.csv'), 'utf8'));
    assert.equal(inv.points, rows.length);
    assert.equal(inv.wide, rows.filter((r) => r.wide === 1).length);
    assert.ok((inv.wide as number) > 0, 'a 5 mph limit flags rows of this calibration');
    assert.match(record.regenerate as string, /--inverse --readings-averaged 3 --reference-uncertainty 0\.2 --max-interval-width 5/);
    const header = readFileSync(join(dir, 'cars.inverse.h'), 'utf8');
    assert.match(header, /#ifndef KNOTWISE_CARS_INVERSE_H/);
    assert.match(header, /static const double cars_inverse_quantity\[CARS_INVERSE_LENGTH\]/);
    assert.match(readFileSync(join(dir, 'cars.inverse.ts'), 'utf8'), /export const readingStep: number \| null = /);
    assert.match(readFileSync(join(dir, 'cars.report.md'), 'utf8'), /## Inverse table\n\n\[cars\.inverse\.csv\]/);
    assert.equal((await runCheckIn(dir)).code, 0);
    // A changed byte of the inverse table is caught by check.
    const path = join(dir, 'cars.inverse.csv');
    const text = readFileSync(path, 'utf8');
    writeFileSync(
      path,
      text.replace(/\n(\d)/, (_m, d: string) => `\n${(Number(d) + 1) % 10}`),
    );
    const changed = await runCheckIn(dir);
    assert.equal(changed.code, 1);
    assert.match(changed.stdout, /cars\.inverse\.csv differs from the rebuilt one/);
  });

  it('an automatic step of the inverse table keeps straight lines between its rows within the tolerance (in x) of the exact inverse, found by bisection', async () => {
    const run = await runMain(...fitArgs('--inverse-grid', 'auto:0.05', '--digits', '10').map((a) => (a === '2' ? '4' : a)), '--shape', 'increasing');
    assert.equal(run.code, 0, run.stderr);
    const rows = csvRows(readFileSync(join(dir, 'cars.inverse.csv'), 'utf8'));
    const record = JSON.parse(readFileSync(join(dir, 'cars.fit.json'), 'utf8')) as { inverse: { interpolation: { tolerance: number; maxError: number } } };
    assert.equal(record.inverse.interpolation.tolerance, 0.05);
    assert.ok(rows.length > 2 && rows.length < 200, `${rows.length} rows`);
    // The same fit, and its inverse by plain bisection on the curve (independent of the inverse code).
    const table = csvRows(readFileSync(cars, 'utf8').replace(/^.*\n/, 'speed,dist\n'));
    const fit = fitCurve({ x: Float64Array.from(table, (r) => r.speed as number), y: Float64Array.from(table, (r) => r.dist as number) }, { kind: 'natural-spline', df: 4, shape: ['increasing'] });
    const invert = (y0: number): number => {
      let lo = fit.curve.lower;
      let hi = fit.curve.upper;
      for (let k = 0; k < 200; k++) {
        const mid = (lo + hi) / 2;
        if (fit.curve.value(mid) < y0) lo = mid;
        else hi = mid;
      }
      return (lo + hi) / 2;
    };
    let worst = 0;
    for (let i = 0; i + 1 < rows.length; i++) {
      const a = rows[i] as Record<string, number>;
      const b = rows[i + 1] as Record<string, number>;
      for (let k = 1; k < 20; k++) {
        const r = (a.reading as number) + (((b.reading as number) - (a.reading as number)) * k) / 20;
        const linear = (a.quantity as number) + (((b.quantity as number) - (a.quantity as number)) * k) / 20;
        worst = Math.max(worst, Math.abs(linear - invert(r)));
      }
    }
    assert.ok(worst <= 0.05, `largest gap ${worst}`);
    assert.ok(worst > 0.005, `the step is not needlessly fine (largest gap ${worst})`);
  });

  it('a curve that turns is refused, naming where it turns and the shape that makes it monotone', async () => {
    const mcycle = copyFixture('mcycle.csv', join(dir, 'mcycle.csv'));
    const run = await runMain('fit', mcycle, '--x', 'times', '--y', 'accel', '--df', '8', '--inverse', '--quiet');
    assert.equal(run.code, 2);
    assert.match(run.stderr, /turns at x = /);
    assert.match(run.stderr, /--shape increasing|--shape decreasing/);
    assert.ok(!existsSync(join(dir, 'mcycle.fit.json')), 'nothing written');
  });

  it('a refit of changed data keeps the replaced curve and the drift from it; check says how far the curve would move', async () => {
    assert.equal((await runMain(...fitArgs())).code, 0);
    const first = JSON.parse(readFileSync(join(dir, 'cars.fit.json'), 'utf8')) as Json;
    assert.equal(first.baseline, null);
    assert.equal(first.drift, null);
    // The same data again: the same bytes (nothing replaced but the same curve).
    const firstText = readFileSync(join(dir, 'cars.fit.json'), 'utf8');
    assert.equal((await runMain(...fitArgs())).code, 0);
    assert.equal(readFileSync(join(dir, 'cars.fit.json'), 'utf8'), firstText);
    // Every distance 5 ft longer: the straight line moves up by exactly 5 (least squares is linear in y).
    shiftReadings(cars, 5);
    const stale = await runCheckIn(dir);
    assert.equal(stale.code, 1);
    assert.match(stale.stdout, /the curve would move: The new curve /);
    const run = await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2', '--report');
    assert.equal(run.code, 0, run.stderr);
    assert.match(run.stdout, /Drift from the curve the record replaced: /);
    const second = JSON.parse(readFileSync(join(dir, 'cars.fit.json'), 'utf8')) as Json;
    assert.deepEqual(RECORD_SCHEMA.problems(second), []);
    const baseline = second.baseline as { data: { sha256: string }; sample: { x: number[]; fit: number[]; se: number[]; t: number } };
    assert.equal(baseline.data.sha256, (first.data as Json).sha256);
    assert.deepEqual(baseline.sample, first.curveSample);
    // Brute force over the recorded points: every difference is 5; z = 5 / sqrt(se_old^2 + se_new^2), largest where se is smallest.
    const drift = second.drift as { largest: { difference: number }; largestRelative: { z: number; x: number }; withinRecordedBand: boolean };
    assert.ok(Math.abs(drift.largest.difference - 5) < 1e-6, String(drift.largest.difference));
    const x = Float64Array.from(baseline.sample.x);
    const fitNew = fitCurve(
      {
        x: Float64Array.from(csvRows(readFileSync(cars, 'utf8').replace(/^.*\n/, 'speed,dist\n')).map((r) => r.speed as number)),
        y: Float64Array.from(csvRows(readFileSync(cars, 'utf8').replace(/^.*\n/, 'speed,dist\n')).map((r) => r.dist as number)),
      },
      { kind: 'natural-spline', df: 2 },
    );
    const seNew = bandsAt(fitNew, x).se;
    let zMax = 0;
    let within = true;
    for (let i = 0; i < x.length; i++) {
      const seOld = baseline.sample.se[i] as number;
      zMax = Math.max(zMax, 5 / Math.hypot(seOld, seNew[i] as number));
      if (5 > baseline.sample.t * seOld) within = false;
    }
    assert.ok(Math.abs(drift.largestRelative.z - zMax) < 1e-6 * zMax, `${drift.largestRelative.z} vs ${zMax}`);
    assert.equal(drift.withinRecordedBand, within);
    assert.match(readFileSync(join(dir, 'cars.report.md'), 'utf8'), /## Drift from the recorded curve/);
    assert.ok(existsSync(join(dir, 'cars.report.drift.svg')));
    assert.equal((await runCheckIn(dir)).code, 0, 'check rebuilds the record with its baseline byte for byte');
  });

  it('knotwise compare: a record against itself stays within; against the shifted data it moves, with exit code 1', async () => {
    assert.equal((await runMain(...fitArgs())).code, 0);
    const a = join(dir, 'first.fit.json');
    writeFileSync(a, readFileSync(join(dir, 'cars.fit.json')));
    const same = await runMain('compare', a, join(dir, 'cars.fit.json'));
    assert.equal(same.code, 0, same.stdout + same.stderr);
    assert.match(same.stdout, /stays within the recorded curve's 95 % band everywhere/);
    shiftReadings(cars, 40);
    assert.equal((await runMain(...fitArgs())).code, 0);
    const moved = await runMain('compare', a, join(dir, 'cars.fit.json'), '--json');
    assert.equal(moved.code, 1);
    const j = JSON.parse(moved.stdout) as { drift: { largest: { difference: number }; withinRecordedBand: boolean } };
    assert.ok(Math.abs(j.drift.largest.difference - 40) < 1e-3, String(j.drift.largest.difference));
    assert.equal(j.drift.withinRecordedBand, false);
    const missing = await runMain('compare', a, join(dir, 'nope.fit.json'));
    assert.equal(missing.code, 2);
    assert.match(missing.stderr, /nope\.fit\.json.*no such file/);
  });
});
