/**
 * Runs every named bad input of badInputs.cases.ts through the ingest layer (readCsvBytes,
 * then selectColumns with the case's x and y) and checks what the case expects: an
 * InputError with the message, line and column, or a rejected row at its line with the
 * reason and column while the other rows are used. Each case names its source in the case
 * file; the checks below add the rules every case shares.
 */
import assert from 'node:assert/strict';
import { InputError } from '../../../core/errors';
import { parseCsvText } from '../../../core/ingest/reader';
import { selectColumns, type Selection } from '../../../core/ingest/select';
import { readCsvBytes } from '../../../core/node/readCsv';
import { BAD_INPUTS, type BadInput } from './badInputs.cases';

/** Reads the case's bytes as standard input would be read, and chooses its columns. */
function ingest(c: BadInput): Selection {
  const bytes = typeof c.bytes === 'string' ? new TextEncoder().encode(c.bytes) : c.bytes;
  const table = readCsvBytes(bytes, 'in.csv');
  return selectColumns(table, { x: c.x ?? 'x', y: c.y ?? 'y' }, 'in.csv');
}

/** Control characters (Unicode Cc: C0, DEL, C1) must never be in a message. */
// eslint-disable-next-line no-control-regex -- what must not appear
const RAW_CONTROL = /[\u0000-\u001f\u007f-\u009f]/;

describe('bad inputs of the ingest layer (badInputs.cases.ts)', () => {
  it('the catalogue holds at least 30 named cases with unique names, each with a source', () => {
    assert.ok(BAD_INPUTS.length >= 30, `${BAD_INPUTS.length} cases`);
    assert.equal(new Set(BAD_INPUTS.map((c) => c.name)).size, BAD_INPUTS.length);
    for (const c of BAD_INPUTS) assert.ok(c.source.length > 0, c.name);
    // A rejected row is only useful with its place: every such case names the line.
    for (const c of BAD_INPUTS) if (c.expect === 'rejected') assert.ok(c.line !== undefined, c.name);
  });

  for (const c of BAD_INPUTS) {
    it(`${c.name}: ${c.expect === 'error' ? 'refused' : `row at line ${c.line} rejected`}`, () => {
      if (c.expect === 'error') {
        assert.throws(
          () => ingest(c),
          (e: unknown) => {
            assert.ok(e instanceof InputError, `not an InputError: ${String(e)}`);
            assert.match(e.describe(), c.message);
            assert.equal(e.place.file, 'in.csv');
            if (c.line !== undefined) assert.equal(e.place.line, c.line, 'line');
            if (c.column !== undefined) assert.equal(e.place.column, c.column, 'column');
            assert.doesNotMatch(e.describe(), RAW_CONTROL, 'no raw control character in the message');
            assert.ok(e.describe().length < 1000, `message of ${e.describe().length} characters`);
            return true;
          },
        );
        return;
      }
      const sel = ingest(c);
      const hit = sel.rejected.find((r) => r.line === c.line && c.message.test(r.reason) && (c.column === undefined || r.column === c.column));
      assert.ok(hit !== undefined, `no rejected row at line ${c.line} matching ${String(c.message)}: ${JSON.stringify(sel.rejected)}`);
      assert.equal(sel.rejected.length, 1, `only the bad row is left out: ${JSON.stringify(sel.rejected)}`);
      assert.doesNotMatch(hit.reason, RAW_CONTROL, 'no raw control character in the reason');
      // The good rows are all used; none is dropped without a report.
      assert.ok(sel.data.x.length >= 20, `${sel.data.x.length} rows used`);
      assert.ok(!(sel.data.lines as Int32Array).includes(c.line as number), 'the rejected line is not among the rows used');
    });
  }

  it('text cases read the same through parseCsvText (the editor path) as through the bytes', () => {
    for (const c of BAD_INPUTS) {
      if (typeof c.bytes !== 'string') continue;
      const bytes = new TextEncoder().encode(c.bytes);
      let fromBytes: unknown;
      let fromText: unknown;
      try {
        const { sha256: _sha, bytes: _n, ...table } = readCsvBytes(bytes, 'in.csv');
        fromBytes = table;
      } catch (e) {
        fromBytes = e instanceof InputError ? e.message : e;
      }
      try {
        fromText = parseCsvText(c.bytes, { file: 'in.csv' });
      } catch (e) {
        fromText = e instanceof InputError ? e.message : e;
      }
      assert.deepEqual(fromText, fromBytes, c.name);
    }
  });
});
