/**
 * Tests of the C header emitter (core/emit/cHeader.ts): the header compiles with gcc in
 * strict C99 with every warning an error, and a small C program that includes it prints
 * values equal to the curve table's CSV. Data: datasets::cars (Ezekiel 1930) from
 * test/reference/fixtures/fits.json (written by test/reference/r/fits.R). Skipped, with a
 * message, only when gcc is not installed (CI has it).
 */
import { strict as assert } from 'node:assert';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { cHeader, cName } from '../../../core/emit/cHeader';
import type { EmitInput } from '../../../core/emit/common';
import { fitCurve } from '../../../core/fit/index';
import { shapeTable } from '../../../core/table/columns';
import { curveTable, type CurveTable } from '../../../core/table/curveTable';
import { curveTableCsv } from '../../../core/table/formatCsv';

const REPO = join(__dirname, '..', '..', '..');
const CARS = (JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;
const HAS_GCC = spawnSync('gcc', ['--version']).status === 0;

function input(table: CurveTable, over: Partial<EmitInput> = {}): EmitInput {
  return {
    stem: 'cars',
    table,
    digits: 8,
    source: { file: 'cars.csv', sha256: 'a'.repeat(64) },
    curve: 'natural cubic regression spline, df 4',
    labels: { x: 'speed', y: 'dist' },
    dataRange: [4, 25],
    step: 1.5,
    recordFile: 'cars.fit.json',
    regenerate: 'knotwise fit cars.csv --x speed --y dist --df 4 --out .',
    caution: 'An empirical fit is not a certified calibration.',
    ...over,
  };
}

/** A C program printing LENGTH, the macros and every array element, one per line. */
function program(header: string, name: string, table: CurveTable, step: boolean): string {
  const N = name.toUpperCase();
  const lines = [
    '#include <stdio.h>',
    `#include "${header}"`,
    'int main(void) {',
    '  int i;',
    `  printf("length %d\\n", (int)${N}_LENGTH);`,
    `  printf("xFirst %.17g\\nxLast %.17g\\n", ${N}_X_FIRST, ${N}_X_LAST);`,
    `  printf("dataXMin %.17g\\ndataXMax %.17g\\n", ${N}_DATA_X_MIN, ${N}_DATA_X_MAX);`,
    ...(step ? [`  printf("step %.17g\\n", ${N}_X_STEP);`] : []),
  ];
  for (const c of table.columns) {
    const flag = c === 'extrapolated' || c === 'negative';
    lines.push(`  for (i = 0; i < ${N}_LENGTH; i++) printf("${c} %d ${flag ? '%d' : '%.17g'}\\n", i, ${flag ? `(int)${name}_${c}[i]` : `${name}_${c}[i]`});`);
  }
  lines.push('  return 0;', '}');
  return lines.join('\n') + '\n';
}

/** Compiles and runs the program; returns its output lines split into words. */
function compileAndRun(dir: string, headerText: string, headerName: string, source: string): string[][] {
  writeFileSync(join(dir, headerName), headerText);
  writeFileSync(join(dir, 'main.c'), source);
  execFileSync('gcc', ['-std=c99', '-pedantic', '-Wall', '-Wextra', '-Werror', '-o', join(dir, 'main'), join(dir, 'main.c'), '-lm'], { cwd: dir });
  return execFileSync(join(dir, 'main'), { encoding: 'utf8' })
    .trim()
    .split('\n')
    .map((l) => l.split(' '));
}

describe('cHeader', () => {
  let dir = '';
  before(function () {
    if (!HAS_GCC) {
      console.log('    gcc was not found on PATH: skipping the C header compile tests');
      this.skip();
    }
    dir = mkdtempSync(join(tmpdir(), 'knotwise-c-'));
  });
  after(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });

  it('cHeader compiles with gcc -std=c99 -pedantic -Wall -Wextra -Werror, and a C program reading it prints the values of the CSV table exactly', () => {
    const fit = fitCurve({ x: Float64Array.from(CARS.x), y: Float64Array.from(CARS.y) }, { kind: 'natural-spline', df: 4 });
    // 4 to 25 mph in steps of 1.5 plus two extrapolated points (2.5 and 26.5 mph).
    const points = Float64Array.from({ length: 17 }, (_, i) => 2.5 + 1.5 * i);
    const table = shapeTable(curveTable(fit, points), undefined, true).table;
    const text = cHeader(input(table));
    const out = compileAndRun(dir, text, 'cars.curve.h', program('cars.curve.h', 'cars', table, true));
    // Expected: the CSV's text read as a double. Tolerance 0: C's strtod (C99 7.20.1.3) and
    // ECMAScript's Number() both round a decimal string to the nearest double, and %.17g
    // prints a double so that it reads back exactly (IEEE 754-2008, 5.12.2).
    const csv = curveTableCsv(table, 8).trim().split('\n');
    const header = (csv[0] as string).split(',');
    const get = (key: string): string[] => (out.find((w) => w[0] === key) as string[]) ?? [];
    assert.equal(get('length')[1], String(table.rows.length));
    assert.equal(Number(get('xFirst')[1]), 2.5);
    assert.equal(Number(get('xLast')[1]), 26.5);
    assert.equal(Number(get('dataXMin')[1]), 4);
    assert.equal(Number(get('dataXMax')[1]), 25);
    assert.equal(Number(get('step')[1]), 1.5);
    let compared = 0;
    for (const words of out) {
      const j = header.indexOf(words[0] as string);
      if (j < 0) continue;
      const row = Number(words[1]);
      const want = Number((csv[row + 1] as string).split(',')[j] as string);
      assert.equal(Number(words[2]), want, `${words[0]}[${row}]`);
      compared++;
    }
    assert.equal(compared, table.rows.length * table.columns.length);
  });

  it('cHeader writes NaN and infinities through <math.h> and still compiles', () => {
    const table: CurveTable = {
      columns: ['x', 'fit', 'se', 'extrapolated'],
      rows: [
        [1, 2, NaN, 0],
        [2, Infinity, -Infinity, 1],
      ],
    };
    const text = cHeader(input(table, { step: undefined }));
    assert.match(text, /#include <math\.h>/);
    const out = compileAndRun(dir, text, 'odd.curve.h', program('odd.curve.h', 'cars', table, false));
    const values = out.filter((w) => w[0] === 'fit' || w[0] === 'se').map((w) => w[2]);
    // glibc prints NaN as "nan" or "-nan" and infinities as "inf" / "-inf".
    assert.deepEqual(
      values.map((v) => (v as string).replace(/^-nan$/, 'nan')),
      ['2', 'inf', 'nan', '-inf'],
    );
    assert.doesNotMatch(text, /X_STEP/);
  });

  it('cHeader keeps a hostile file name and command inside the comment ("*/" cannot close it)', () => {
    const table: CurveTable = {
      columns: ['x', 'fit'],
      rows: [
        [1, 2],
        [2, 3],
      ],
    };
    const text = cHeader(input(table, { source: { file: 'evil */ int x = 1; /*.csv', sha256: 'b'.repeat(64) }, regenerate: "knotwise fit 'a */ b.csv' --out ." }));
    const out = compileAndRun(dir, text, 'evil.curve.h', program('evil.curve.h', 'cars', table, true));
    assert.equal(out.filter((w) => w[0] === 'fit').length, 2);
  });

  it('cHeader says it is generated, names the data file, its SHA-256, the regenerate command and the caution', () => {
    const table: CurveTable = { columns: ['x', 'fit'], rows: [[1, 2]] };
    const text = cHeader(input(table));
    assert.match(text, /^\/\*\n \* Generated by Knotwise\. Do not edit by hand/);
    assert.match(text, /Source data: cars\.csv/);
    assert.match(text, new RegExp(`SHA-256 of the data: ${'a'.repeat(64)}`));
    assert.match(text, /knotwise fit cars\.csv --x speed --y dist --df 4 --out \./);
    assert.match(text, /knotwise check cars\.fit\.json/);
    assert.match(text, /Caution: An empirical fit is not a certified calibration\./);
    assert.ok(text.endsWith('#endif /* KNOTWISE_CARS_CURVE_H */\n'));
    assert.ok(!text.includes('\r'));
  });
});

describe('cName', () => {
  it('cName makes a lower-case C identifier from a file stem', () => {
    assert.equal(cName('humidity-sensor'), 'humidity_sensor');
    assert.equal(cName('Fan Rise (2)'), 'fan_rise_2');
    assert.equal(cName('2024_cal'), 'kw_2024_cal');
    assert.equal(cName('---'), 'curve');
  });
});
