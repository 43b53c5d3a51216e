/**
 * Tests of the TypeScript emitter (core/emit/tsModule.ts): the module type-checks with the
 * project's TypeScript compiler in strict mode together with a consumer that uses its
 * exports, and its arrays hold the values of the CSV table. Data: MASS::mcycle (Silverman
 * 1985; test/e2e/fixtures/mcycle.csv written by make-fixtures.R).
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { EmitInput } from '../../../core/emit/common';
import { tsModule } from '../../../core/emit/tsModule';
import { fitCurve } from '../../../core/fit/index';
import { shapeTable } from '../../../core/table/columns';
import { curveTable, type CurveTable } from '../../../core/table/curveTable';
import { curveTableCsv } from '../../../core/table/formatCsv';

const REPO = join(__dirname, '..', '..', '..');
const TSC = join(REPO, 'node_modules', 'typescript', 'bin', 'tsc');
const rows = readFileSync(join(REPO, 'test', 'e2e', 'fixtures', 'mcycle.csv'), 'utf8')
  .trim()
  .split('\n')
  .slice(1);
const x = Float64Array.from(rows, (r) => Number(r.split(',')[0]));
const y = Float64Array.from(rows, (r) => Number(r.split(',')[1]));

function input(table: CurveTable, over: Partial<EmitInput> = {}): EmitInput {
  return {
    stem: 'mcycle',
    table,
    digits: 8,
    source: { file: 'mcycle.csv', sha256: 'c'.repeat(64) },
    curve: 'natural cubic regression spline, df 9',
    labels: { x: 'times', y: 'accel' },
    dataRange: [2.4, 57.6],
    step: undefined,
    recordFile: 'mcycle.fit.json',
    regenerate: 'knotwise fit mcycle.csv --x times --y accel --df 9 --out .',
    caution: 'An empirical fit is not a certified calibration.',
    ...over,
  };
}

/** Runs tsc in strict mode on the files; returns its output (empty when they type-check). */
function typeCheck(files: string[]): { status: number | null; output: string } {
  const r = spawnSync(
    process.execPath,
    [TSC, '--noEmit', '--strict', '--noUncheckedIndexedAccess', '--exactOptionalPropertyTypes', '--target', 'es2022', '--module', 'node16', '--moduleResolution', 'node16', ...files],
    { encoding: 'utf8' },
  );
  return { status: r.status, output: r.stdout + r.stderr };
}

describe('tsModule', () => {
  let dir = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-ts-'));
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('tsModule type-checks under strict tsc with a consumer of its exports, and its values equal the CSV table', function () {
    this.timeout(120_000);
    const fit = fitCurve({ x, y }, { kind: 'natural-spline', df: 9 });
    // The data's distinct times, which are unevenly spaced: xStep is null.
    const points = Float64Array.from(new Set(x));
    const table = shapeTable(curveTable(fit, points), undefined, true).table;
    const text = tsModule(input(table));
    writeFileSync(join(dir, 'mcycle.curve.ts'), text);
    writeFileSync(
      join(dir, 'use.ts'),
      [
        "import * as t from './mcycle.curve';",
        'const n: number = t.length;',
        'const f: number | undefined = t.fit[0];',
        'const flag: 0 | 1 | undefined = t.negative[3];',
        'const step: number | null = t.xStep;',
        'const sha: string = t.source.sha256;',
        'export const used = [n, f, flag, step, sha, t.xFirst, t.xLast, t.dataXMin, t.dataXMax, t.se, t.ciLower, t.ciUpper, t.piLower, t.piUpper, t.extrapolated];',
        '',
      ].join('\n'),
    );
    const r = typeCheck([join(dir, 'mcycle.curve.ts'), join(dir, 'use.ts')]);
    assert.equal(r.status, 0, r.output);
    // A misuse must fail, so the check above means something: the arrays are read-only.
    writeFileSync(join(dir, 'misuse.ts'), "import * as t from './mcycle.curve';\nt.fit.push(1);\n");
    const bad = typeCheck([join(dir, 'mcycle.curve.ts'), join(dir, 'misuse.ts')]);
    assert.notEqual(bad.status, 0);
    assert.match(bad.output, /Property 'push' does not exist on type 'readonly number\[\]'/);
    // Values: the module's numbers are the CSV's text read as numbers (tolerance 0: both are
    // the nearest double to the same decimal string).
    // eslint-disable-next-line @typescript-eslint/no-require-imports
    const mod = require(join(dir, 'mcycle.curve.ts')) as Record<string, unknown>;
    const csv = curveTableCsv(table, 8).trim().split('\n');
    const header = (csv[0] as string).split(',');
    assert.equal(mod.length, table.rows.length);
    assert.equal(mod.xStep, null);
    header.forEach((c, j) => {
      const values = mod[c] as number[];
      assert.equal(values.length, table.rows.length, c);
      values.forEach((v, i) => assert.equal(v, Number((csv[i + 1] as string).split(',')[j] as string), `${c}[${i}]`));
    });
  });

  it('tsModule writes Infinity and NaN literals and a numeric xStep for even grids', () => {
    const table: CurveTable = {
      columns: ['x', 'fit'],
      rows: [
        [0, Infinity],
        [0.5, NaN],
        [1, -Infinity],
      ],
    };
    const text = tsModule(input(table, { step: 0.5 }));
    assert.match(text, /export const fit: readonly number\[\] = \[\n {2}Infinity, NaN, -Infinity,\n\];/);
    assert.match(text, /export const xStep: number \| null = 0\.5;/);
    assert.match(text, /^\/\/ Generated by Knotwise\./);
    assert.match(text, /\/\/ {3}knotwise fit mcycle\.csv --x times --y accel --df 9 --out \./);
  });
});
