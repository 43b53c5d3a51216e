import assert from 'node:assert/strict';
import fc from 'fast-check';
import { columnNames, headerControl, headerText, MAX_NAME_CHARS, splitUnit } from '../../../core/ingest/header';

// Expected splits follow the header convention of docs/design.md, "Input" (`flow [L/min]`
// keeps the unit L/min for labels); no external reference exists for label rules.
describe('splitUnit', () => {
  const cases: [string, string, string | undefined][] = [
    ['flow [L/min]', 'flow', 'L/min'],
    ['temperature (°C)', 'temperature', '°C'],
    ['T(K)', 'T', 'K'],
    [' flow [ L/min ] ', 'flow', 'L/min'],
    ['a (b) (c)', 'a (b)', 'c'],
    ['pressure [kPa] gauge', 'pressure [kPa] gauge', undefined],
    ['speed', 'speed', undefined],
    ['[mm]', '[mm]', undefined],
    ['x []', 'x []', undefined],
    ['flow (2)', 'flow (2)', undefined],
    ['count [1/s]', 'count', '1/s'],
    ['', '', undefined],
  ];
  for (const [header, name, unit] of cases) {
    it(`splitUnit(${JSON.stringify(header)}) -> name ${JSON.stringify(name)}, unit ${JSON.stringify(unit)}`, () => {
      assert.deepEqual(splitUnit(header), { name, unit });
    });
  }
});

describe('columnNames', () => {
  it('labels are names without units; units and original header text are kept', () => {
    const names = columnNames(['time [s]', 'flow (L/min)'], 2);
    assert.deepEqual(names, [
      { label: 'time', header: 'time [s]', unit: 's' },
      { label: 'flow', header: 'flow (L/min)', unit: 'L/min' },
    ]);
  });
  it('duplicate names get (2), (3) and empty names get "column k"', () => {
    assert.deepEqual(
      columnNames(['x', 'x', '', 'x [m]', ' '], 5).map((n) => n.label),
      ['x', 'x (2)', 'column 3', 'x (3)', 'column 5'],
    );
  });
  it('a generated label never takes a label another column has', () => {
    assert.deepEqual(
      columnNames(['a', 'a', 'a (2)'], 3).map((n) => n.label),
      ['a', 'a (3)', 'a (2)'],
    );
    assert.deepEqual(
      columnNames(['', 'column 1'], 2).map((n) => n.label),
      ['column 1', 'column 1 (2)'],
    );
  });
  it('without a header every column is "column k" with empty header text', () => {
    assert.deepEqual(columnNames(undefined, 2), [
      { label: 'column 1', header: '', unit: undefined },
      { label: 'column 2', header: '', unit: undefined },
    ]);
  });
  it('a header row shorter than the count gives "column k" for the rest', () => {
    assert.deepEqual(
      columnNames(['x'], 2).map((n) => n.label),
      ['x', 'column 2'],
    );
  });
  it('labels are always unique (property, random headers from a small alphabet)', () => {
    const piece = fc.constantFrom('', 'a', 'b', ' ', '(2)', '[m]', 'column 1', 'column 2', 'a (2)');
    fc.assert(
      fc.property(
        fc.array(
          fc.array(piece, { maxLength: 3 }).map((p) => p.join(' ')),
          { minLength: 1, maxLength: 12 },
        ),
        (headers) => {
          const labels = columnNames(headers, headers.length).map((n) => n.label);
          assert.equal(new Set(labels).size, labels.length, JSON.stringify(headers));
        },
      ),
      { numRuns: 500 },
    );
  });
});

describe('headerText and headerControl', () => {
  it('runs of tabs and line breaks inside a (quoted) name become one space', () => {
    assert.equal(headerText('flow\r\n[L/min]'), 'flow [L/min]');
    assert.equal(headerText('a\t\tb\nc'), 'a b c');
    assert.equal(headerText('plain'), 'plain');
  });
  it(`names are cut after ${MAX_NAME_CHARS} characters with an ellipsis, never inside a surrogate pair`, () => {
    assert.equal(headerText('x'.repeat(MAX_NAME_CHARS)), 'x'.repeat(MAX_NAME_CHARS));
    assert.equal(headerText('x'.repeat(MAX_NAME_CHARS + 1)), `${'x'.repeat(MAX_NAME_CHARS)}\u2026`);
    // U+1F600 is two UTF-16 code units (The Unicode Standard, section 3.9): the pair is kept whole or left out.
    const cut = headerText(`${'x'.repeat(MAX_NAME_CHARS - 1)}\u{1F600}tail`);
    assert.equal(cut, `${'x'.repeat(MAX_NAME_CHARS - 1)}\u2026`);
  });
  it('finds C0, DEL and C1 control characters (Unicode Cc) but not printable text', () => {
    assert.equal(headerControl('temp\u0007'), 4);
    assert.equal(headerControl('\u007f'), 0);
    assert.equal(headerControl('a\u0085'), 1);
    assert.equal(headerControl('Temperatur \u00b0C \u0394p \u05d0'), -1);
  });
});
