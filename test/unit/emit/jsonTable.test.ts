/**
 * Tests of the JSON emitter (core/emit/jsonTable.ts): it parses, its columns equal the CSV
 * table, and non-finite values become null. Data: datasets::cars (Ezekiel 1930) from
 * test/reference/fixtures/fits.json (test/reference/r/fits.R).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { EmitInput } from '../../../core/emit/common';
import { jsonTable } from '../../../core/emit/jsonTable';
import { fitCurve } from '../../../core/fit/index';
import { curveTable, type CurveTable } from '../../../core/table/curveTable';
import { curveTableCsv } from '../../../core/table/formatCsv';

const REPO = join(__dirname, '..', '..', '..');
const CARS = (JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;

function input(table: CurveTable, digits = 6): EmitInput {
  return {
    stem: 'cars',
    table,
    digits,
    source: { file: 'cars.csv', sha256: 'd'.repeat(64) },
    curve: 'polynomial (orthogonal basis), df 3',
    labels: { x: 'speed', y: 'dist' },
    dataRange: [4, 25],
    step: 3,
    recordFile: 'cars.fit.json',
    regenerate: 'knotwise fit cars.csv --x speed --y dist --curve polynomial --df 3 --out .',
    caution: 'An empirical fit is not a certified calibration.',
  };
}

describe('jsonTable', () => {
  it('jsonTable holds every column of the table with the CSV values (6 digits), and the provenance', () => {
    const fit = fitCurve({ x: Float64Array.from(CARS.x), y: Float64Array.from(CARS.y) }, { kind: 'polynomial', df: 3 });
    const table = curveTable(
      fit,
      Float64Array.from({ length: 8 }, (_, i) => 4 + 3 * i),
    );
    const doc = JSON.parse(jsonTable(input(table))) as Record<string, any>;
    const csv = curveTableCsv(table, 6).trim().split('\n');
    const header = (csv[0] as string).split(',');
    assert.deepEqual(Object.keys(doc.columns), header);
    header.forEach((c, j) => {
      // Tolerance 0: both sides are the nearest double to the same decimal text.
      (doc.columns[c] as number[]).forEach((v, i) => assert.equal(v, Number((csv[i + 1] as string).split(',')[j] as string), `${c}[${i}]`));
    });
    assert.equal(doc.length, 8);
    assert.equal(doc.xFirst, 4);
    assert.equal(doc.xLast, 25);
    assert.equal(doc.xStep, 3);
    assert.deepEqual([doc.dataXMin, doc.dataXMax], [4, 25]);
    assert.deepEqual(doc.source, { file: 'cars.csv', sha256: 'd'.repeat(64) });
    assert.equal(doc.generatedBy, 'knotwise');
    assert.equal(doc.record, 'cars.fit.json');
    assert.match(doc.regenerate, /^knotwise fit /);
    assert.match(doc.caution, /not a certified calibration/);
  });

  it('jsonTable writes non-finite values as null, LF line ends and a final newline', () => {
    const text = jsonTable(
      input({
        columns: ['x', 'fit'],
        rows: [
          [1, NaN],
          [2, Infinity],
        ],
      }),
    );
    const doc = JSON.parse(text) as { columns: { fit: unknown[] } };
    assert.deepEqual(doc.columns.fit, [null, null]);
    assert.ok(text.endsWith('}\n') && !text.includes('\r'));
  });
});
