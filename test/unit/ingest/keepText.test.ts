/**
 * The reader keeps the texts of one column on request (CsvReaderOptions.keepText): the
 * column that names each row's device for grouped fits. Quoting per RFC 4180; the names
 * are the cells' texts, trimmed, one entry per distinct text in order of first appearance.
 */
import { strict as assert } from 'node:assert';
import { parseCsvText } from '../../../core/ingest/reader';

describe('reader: kept texts of one column', () => {
  it('interns each distinct text, keeps quoted commas, marks empty cells -1 and follows the rows kept', () => {
    const text = ['device,x,y', '"rig A, left",1,2', 'B ,2,3', ',3,4', 'rig A; right,4,5', 'bad,row', '"rig A, left",5,6', 'B,6,7', ''].join('\n');
    const t = parseCsvText(text, { keepText: 'device' });
    assert.ok(t.text);
    assert.equal(t.text.column, 0);
    assert.deepEqual(t.text.names, ['rig A, left', 'B', 'rig A; right']);
    // Rows: the record with too few fields (line 6) is not a row.
    assert.deepEqual(Array.from(t.lines), [2, 3, 4, 5, 7, 8]);
    assert.deepEqual(Array.from(t.text.codes), [0, 1, -1, 2, 0, 1]);
  });

  it('finds the column by header text or label in any letter case, and keeps nothing for a name no column has', () => {
    const text = 'Device [id],x\nA,1\nB,2\n';
    assert.deepEqual(parseCsvText(text, { keepText: 'device' }).text?.names, ['A', 'B']);
    assert.deepEqual(parseCsvText(text, { keepText: 'Device [id]' }).text?.names, ['A', 'B']);
    assert.equal(parseCsvText(text, { keepText: 'lot' }).text, undefined);
    assert.equal(parseCsvText(text).text, undefined);
  });

  it('keeps the texts of a large file in one Int32Array as the rows grow', () => {
    const rows = ['g,x'];
    for (let i = 0; i < 5000; i++) rows.push(`dev${i % 7},${i}`);
    const t = parseCsvText(rows.join('\n') + '\n', { keepText: 'g' });
    assert.equal(t.text?.codes.length, 5000);
    assert.equal(t.text?.names.length, 7);
    assert.equal(t.text?.codes[4999], 4999 % 7);
  });
});
