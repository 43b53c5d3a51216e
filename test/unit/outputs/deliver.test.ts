/**
 * Tests of building every output of a fit (core/outputs/deliver.ts): extrapolated rows and negative
 * values of a quantity declared non-negative are flagged in the table, the record, the
 * report and the warnings; the automatic step and the interpolation error reach the record;
 * the same inputs give the same bytes. Data: MASS::mcycle (Silverman 1985; its acceleration
 * goes below zero, so declaring it non-negative must raise flags) and datasets::cars
 * (Ezekiel 1930), from test/e2e/fixtures (make-fixtures.R).
 */
import { strict as assert } from 'node:assert';
import { createHash } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { buildDeliverables, type DeliverInput } from '../../../core/outputs/deliver';
import { diagnose } from '../../../core/analysis/diagnose';
import { InputError } from '../../../core/errors';
import { fitCurve } from '../../../core/fit/index';
import { DEFAULT_OUTPUT, type OutputOptions } from '../../../core/outputs/plan';
import { CAUTION } from '../../../core/outputs/record';
import type { XYData } from '../../../core/types';

const REPO = join(__dirname, '..', '..', '..');

function load(name: string): XYData {
  const rows = readFileSync(join(REPO, 'test', 'e2e', 'fixtures', name), 'utf8')
    .trim()
    .split('\n')
    .slice(1);
  return {
    x: Float64Array.from(rows, (r) => Number(r.split(',')[0])),
    y: Float64Array.from(rows, (r) => Number(r.split(',')[1])),
    lines: Int32Array.from(rows, (_, i) => i + 2),
  };
}

function input(data: XYData, df: number, output: Partial<OutputOptions>, stem: string): DeliverInput {
  const fit = fitCurve(data, { kind: 'natural-spline', df });
  return {
    plan: {
      columns: { x: 'x', y: 'y' },
      tune: false,
      options: { kind: 'natural-spline', candidates: [df], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0 },
      output: { ...DEFAULT_OUTPUT, ...output },
    },
    stem,
    dataFile: `${stem}.csv`,
    dataPath: `${stem}.csv`,
    dataSha256: '0'.repeat(64),
    rowsRead: data.x.length,
    selection: { data, rejected: [], labels: { x: 'x', y: 'y' } },
    fitted: data,
    fit,
    diagnostics: diagnose(data, fit),
    sha256: (t) => createHash('sha256').update(t).digest('hex'),
  };
}

const text = (d: ReturnType<typeof buildDeliverables>, kind: string): string => (d.files.find((f) => f.kind === kind) as { text: string }).text;

describe('buildDeliverables', () => {
  const cars = load('cars.csv');
  const mcycle = load('mcycle.csv');

  it('refuses grid points beyond the data unless extrapolation is asked for', () => {
    assert.throws(
      () => buildDeliverables(input(cars, 3, { grid: { kind: 'list', values: [2, 10, 30] } }, 'cars')),
      (e: unknown) => e instanceof InputError && /2 grid point\(s\) lie outside the data range \[4, 25\]/.test(e.message),
    );
  });

  it('flags extrapolated rows in the table, the record, the report, the C header and the warnings', () => {
    const d = buildDeliverables(input(cars, 3, { grid: { kind: 'list', values: [2, 10, 30] }, extrapolate: true, emit: ['c'], report: true }, 'cars'));
    const csv = text(d, 'table').trim().split('\n');
    const ext = (csv[0] as string).split(',').indexOf('extrapolated');
    assert.deepEqual(
      csv.slice(1).map((l) => l.split(',')[ext]),
      ['1', '0', '1'],
    );
    assert.deepEqual(d.summary.extrapolated, [2, 30]);
    assert.deepEqual((d.record.table as { extrapolated: number[] }).extrapolated, [2, 30]);
    assert.match(d.warnings[0] as string, /^2 table row\(s\) lie outside the data range \[4, 25\] and are extrapolated \(x = 2, 30\)/);
    assert.deepEqual(d.record.warnings, d.warnings);
    assert.match(text(d, 'report'), /\*\*Extrapolated rows: 2\*\* \(outside the data range 4 to 25; flagged in the `extrapolated` column\): x = 2, 30\./);
    assert.match(text(d, 'c'), /static const unsigned char cars_extrapolated\[CARS_LENGTH\] = \{\n {2}1, 0, 1\n\};/);
  });

  it('with nonnegative, flags where the curve goes below zero and the readings that are negative (MASS::mcycle)', () => {
    const d = buildDeliverables(input(mcycle, 8, { grid: { kind: 'count', start: 2.4, stop: 57.6, count: 47 }, flagNegative: true, report: true }, 'mcycle'));
    const csv = text(d, 'table').trim().split('\n');
    const header = (csv[0] as string).split(',');
    assert.equal(header[header.length - 1], 'negative');
    const fitAt = header.indexOf('fit');
    const negX = csv
      .slice(1)
      .map((l) => l.split(','))
      .filter((r) => Number(r[fitAt]) < 0)
      .map((r) => Number(r[0]));
    assert.ok(negX.length > 5, `${negX.length} negative rows`);
    assert.deepEqual(
      csv
        .slice(1)
        .filter((l) => l.endsWith(',1'))
        .map((l) => Number(l.split(',')[0])),
      negX,
    );
    assert.equal((d.record.table as { negative: number[] }).negative.length, negX.length);
    assert.ok(d.warnings.some((w) => new RegExp(`^The curve is below zero at ${negX.length} table row\\(s\\) .* although the quantity was declared non-negative`).test(w)));
    // mcycle: the first negative acceleration, -1.3 g, is on line 3 of the CSV.
    assert.ok(
      d.warnings.some((w) => /reading\(s\) are below zero although the quantity was declared non-negative \(the first on line 3\)/.test(w)),
      d.warnings.join('\n'),
    );
    assert.match(text(d, 'report'), new RegExp(`\\*\\*The curve is below zero at ${negX.length} rows\\*\\* although the quantity was declared non-negative`));
  });

  it('records the automatic step: the count grid it chose, the tolerance and an achieved error within it', () => {
    const d = buildDeliverables(input(mcycle, 8, { grid: { kind: 'auto', tolerance: 0.5 } }, 'mcycle'));
    const t = d.record.table as { grid: { kind: string; count: number }; interpolation: { maxError: number; tolerance: number; step: number }; points: number };
    assert.equal(t.grid.kind, 'count');
    assert.equal(t.points, t.grid.count);
    assert.equal(t.interpolation.tolerance, 0.5);
    // Coarsest step: the error sits near the tolerance (it scales as 1/m^2, so m - 1 intervals would exceed it).
    assert.ok(t.interpolation.maxError <= 0.5 && t.interpolation.maxError > 0.25, `maxError ${t.interpolation.maxError}`);
    // 2.4 to 57.6 ms in count - 1 equal steps.
    assert.ok(Math.abs(t.interpolation.step - (57.6 - 2.4) / (t.grid.count - 1)) <= 1e-12);
    assert.deepEqual((d.record.spec as { grid: unknown }).grid, { kind: 'auto', tolerance: 0.5 });
  });

  it('lists the table first and the record last, with every other file and its SHA-256 in the record; same inputs, same bytes', () => {
    const make = (): ReturnType<typeof buildDeliverables> => buildDeliverables(input(cars, 4, { emit: ['c', 'ts', 'json'], report: true, columns: ['x', 'fit', 'se'] }, 'cars'));
    const d = make();
    assert.equal(d.files[0]?.name, 'cars.curve.csv');
    assert.equal(d.files[d.files.length - 1]?.name, 'cars.fit.json');
    const listed = (d.record.outputs as { file: string; sha256: string }[]).map((o) => o.file);
    assert.deepEqual(
      listed,
      d.files.slice(1, -1).map((f) => f.name),
    );
    assert.equal((d.record.table as { sha256: string }).sha256, createHash('sha256').update(text(d, 'table')).digest('hex'));
    // Every file a person reads carries the caution (the CSV and the figures are data).
    for (const f of d.files)
      if (f.kind !== 'figure' && f.kind !== 'table') assert.ok(f.text.includes(f.kind === 'record' ? JSON.stringify(CAUTION) : 'not a certified calibration'), `${f.name} carries the caution`);
    const again = make();
    assert.deepEqual(
      again.files.map((f) => f.text),
      d.files.map((f) => f.text),
    );
  });

  it('reports the interpolation error of a given grid too (default grid: 101 points)', () => {
    const d = buildDeliverables(input(cars, 4, {}, 'cars'));
    const ip = d.summary.interpolation as NonNullable<typeof d.summary.interpolation>;
    assert.equal(ip.tolerance, null);
    assert.ok(ip.maxError > 0 && ip.maxError < 0.05, `maxError ${ip.maxError}`);
    assert.ok(Math.abs((ip.step as number) - 0.21) <= 1e-12);
  });

  it("names the table and the record as asked (the editor's output names), and the record lists the table by that name", () => {
    const d = buildDeliverables({ ...input(cars, 3, {}, 'cars'), names: { table: 'braking.csv', record: 'braking.json' } });
    assert.deepEqual(
      d.files.map((f) => f.name),
      ['braking.csv', 'braking.json'],
    );
    const rec = JSON.parse(text(d, 'record')) as { table: { file: string; sha256: string } };
    assert.equal(rec.table.file, 'braking.csv');
    assert.equal(rec.table.sha256, createHash('sha256').update(text(d, 'table')).digest('hex'));
    // Without names, the command line's: <stem>.curve.csv and <stem>.fit.json; same bytes otherwise.
    const plain = buildDeliverables(input(cars, 3, {}, 'cars'));
    assert.deepEqual(
      plain.files.map((f) => f.name),
      ['cars.curve.csv', 'cars.fit.json'],
    );
    assert.equal(text(plain, 'table'), text(d, 'table'));
  });
});
