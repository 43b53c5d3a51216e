/**
 * Seeded property tests over the ingest and the whole command-line path (issue 10): for
 * generated CSV texts (numbers in many spellings, missing tokens, quotes, control
 * characters, stray bytes, odd line endings and delimiters) the reader and `knotwise fit`
 * never crash (no internal error, no stack trace), every row is either used or rejected with
 * a line inside the file, and a run is repeatable. Invented text, made by the seeded
 * generator below (no reference values). KNOTWISE_FUZZ_RUNS raises the number of cases
 * (`npm run fuzz` runs many more than CI).
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { InputError } from '../../../core/errors';
import { selectColumns } from '../../../core/ingest/select';
import { readCsvBytes } from '../../../core/node/readCsv';
import { runMain } from './runMain';

const SCALE = Math.max(1, Number(process.env.KNOTWISE_FUZZ_RUNS ?? 1));
const SEED = 20261203;

/** One cell: a number in one of many spellings, a missing token, or something hostile. */
const cell = fc.oneof(
  { weight: 12, arbitrary: fc.double({ min: -1e6, max: 1e6, noNaN: true }).map((v) => String(v)) },
  { weight: 6, arbitrary: fc.integer({ min: -1000, max: 1000 }).map(String) },
  { weight: 1, arbitrary: fc.constantFrom('', 'NA', 'NaN', 'null', 'n/a', '-', 'Inf', '-Infinity', '1e309', '1e-400', '0x10', '1_000', '+5', '1,5', '"2.5"', '" 3 "', '4e', '.', '--1') },
  { weight: 1, arbitrary: fc.string({ maxLength: 6 }) },
  { weight: 1, arbitrary: fc.constantFrom('\u0000', '\u001b[31m', '\u007f', '\u200b1', '١٢', '１２', '"a""b"', '"multi\nline"', '"open') },
);

/** A row: usually as many cells as the header has names, sometimes one more or one fewer. */
const row = (width: number) => fc.oneof({ weight: 8, arbitrary: fc.array(cell, { minLength: width, maxLength: width }) }, { weight: 1, arbitrary: fc.array(cell, { maxLength: width + 1 }) });

const csv = fc
  .record({
    names: fc.constantFrom(['a', 'b'], ['a', 'b', 'w'], ['"a"', '"b"'], [' a ', ' b '], ['a', 'a'], ['b', 'a']),
    bom: fc.constantFrom('', '', '', '\uFEFF'),
    sep: fc.constantFrom(',', ',', ';', '\t'),
    eol: fc.constantFrom('\n', '\n', '\r\n', '\r'),
    tail: fc.constantFrom('', '\n', '\n\n', '   \n', '\u001a'),
    seed: fc.integer(),
  })
  .chain(({ names, bom, sep, eol, tail }) => fc.array(row(names.length), { minLength: 0, maxLength: 25 }).map((rows) => bom + [names.join(sep), ...rows.map((r) => r.join(sep))].join(eol) + tail));

describe('fuzzed CSV texts (seeded)', function () {
  this.timeout(600_000);

  it(`the reader and column choice never crash and account for every row (${3000 * SCALE} cases)`, () => {
    fc.assert(
      fc.property(csv, (text) => {
        let table;
        try {
          table = readCsvBytes(new TextEncoder().encode(text), 'fuzz.csv');
        } catch (e) {
          assert.ok(e instanceof InputError, `not an InputError: ${String(e)}`);
          return;
        }
        try {
          const sel = selectColumns(table, { x: 'a', y: 'b' }, 'fuzz.csv');
          const lines = text.split(/\r\n|\r|\n/).length;
          for (const r of sel.rejected) assert.ok(r.line >= 1 && r.line <= lines + 1, `line ${r.line} of ${lines}`);
          // Rows the reader set aside (wrong field count) are rejected without being counted as read.
          assert.ok(sel.data.x.length <= table.rowCount && sel.data.x.length + sel.rejected.length >= table.rowCount, 'every row used or rejected');
          assert.equal(new Set(sel.rejected.map((r) => r.line)).size, sel.rejected.length, 'each rejected line once');
          for (let i = 0; i < sel.data.x.length; i++) assert.ok(Number.isFinite(sel.data.x[i]) && Number.isFinite(sel.data.y[i]), 'used values are finite');
        } catch (e) {
          assert.ok(e instanceof InputError, `not an InputError: ${String(e)}`);
        }
      }),
      { numRuns: 3000 * SCALE, seed: SEED },
    );
  });

  it(`knotwise fit on the same texts exits 0 or 2, never with a stack trace, and repeats itself (${1000 * SCALE} cases)`, async () => {
    const dir = mkdtempSync(join(tmpdir(), 'kw-fuzz-'));
    try {
      let i = 0;
      let fitted = 0;
      await fc.assert(
        fc.asyncProperty(csv, async (text) => {
          const file = join(dir, `f${i++}.csv`);
          writeFileSync(file, text);
          const args = ['fit', file, '--x', 'a', '--y', 'b', '--df', '2', '--print-only', '--json'];
          const r = await runMain(...args);
          assert.ok(r.code === 0 || r.code === 2, `exit ${r.code}: ${r.stderr}`);
          assert.doesNotMatch(r.stderr, /internal error|\n\s+at /);
          // eslint-disable-next-line no-control-regex -- what must not reach a terminal
          assert.doesNotMatch(r.stderr, /[\u0000-\u0008\u000b-\u001f\u007f]/);
          if (r.code === 0) {
            fitted++;
            const again = await runMain(...args);
            assert.equal(again.stdout, r.stdout, 'the same bytes give the same result');
          }
        }),
        { numRuns: 1000 * SCALE, seed: SEED + 1 },
      );
      // The generator must reach the fitting code often, or the property says little.
      console.log(`      (${fitted} of ${1000 * SCALE} texts fitted)`);
      assert.ok(fitted >= 100 * SCALE, `only ${fitted} of ${1000 * SCALE} texts were fitted`);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
