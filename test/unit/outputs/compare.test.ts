/**
 * Tests of describing differences (core/outputs/compare.ts) on small hand-made texts, bytes
 * and JSON values.
 */
import { strict as assert } from 'node:assert';
import { compareFile, describeDifference, jsonDifferences, printable, textDifference } from '../../../core/outputs/compare';

describe('textDifference', () => {
  it('textDifference is undefined for equal texts and finds the first differing line', () => {
    assert.equal(textDifference('a\nb\n', 'a\nb\n'), undefined);
    assert.deepEqual(textDifference('a\nb\nc\n', 'a\nB\nc\n'), { line: 2, found: 'b', rebuilt: 'B', lines: 1 });
  });

  it('textDifference counts the changed block, not every shifted line, when a line is added or removed', () => {
    const rebuilt = ['h', ...Array.from({ length: 50 }, (_, i) => `r${i}`)].join('\n') + '\n';
    const found = ['h', 'extra', ...Array.from({ length: 50 }, (_, i) => `r${i}`)].join('\n') + '\n';
    assert.deepEqual(textDifference(found, rebuilt), { line: 2, found: 'extra', rebuilt: 'r0', lines: 1 });
    assert.deepEqual(textDifference('a\n', 'a\nb\n'), { line: 2, found: undefined, rebuilt: 'b', lines: 1 });
  });

  it('textDifference sees CRLF line ends and a missing final newline', () => {
    assert.deepEqual(textDifference('a\r\nb\r\n', 'a\nb\n'), { line: 1, found: 'a\r', rebuilt: 'a', lines: 2 });
    assert.deepEqual(textDifference('a\nb', 'a\nb\n'), { line: 2, found: 'b', rebuilt: 'b', lines: 0 });
  });
});

describe('describeDifference', () => {
  it('describeDifference names line, x, column and both values for a CSV table', () => {
    const d = textDifference('x,fit,se\n1,2.5,0.1\n2,3.25,0.1\n', 'x,fit,se\n1,2.5,0.1\n2,3.5,0.1\n');
    assert.equal(
      describeDifference('t.csv', d as NonNullable<typeof d>, ['x', 'fit', 'se']),
      't.csv differs from the rebuilt table at line 3 (x = 2), column fit: 3.25 in the file, 3.5 rebuilt; 1 line differs.',
    );
  });

  it('describeDifference quotes lines of other files and says when only line ends differ', () => {
    const d = textDifference('int a;\nint b;\n', 'int a;\nint c;\n') as NonNullable<ReturnType<typeof textDifference>>;
    assert.equal(describeDifference('t.h', d), 't.h differs from the rebuilt one at line 2: "int b;" in the file, "int c;" rebuilt; 1 line differs.');
    const e = textDifference('a', 'a\n') as NonNullable<ReturnType<typeof textDifference>>;
    assert.match(describeDifference('t.h', e), /only the line ends or the final newline differ/);
    const f = textDifference('x,fit\r\n1,2\r\n', 'x,fit\n1,2\n') as NonNullable<ReturnType<typeof textDifference>>;
    assert.match(describeDifference('t.csv', f, ['x', 'fit']), /line 1: "x,fit\\r" in the file, "x,fit" rebuilt; 2 lines differ/);
  });
});

describe('compareFile', () => {
  const bytes = (t: string): Uint8Array => new TextEncoder().encode(t);

  it('compareFile is undefined only for the same bytes, and describes a text difference as describeDifference does', () => {
    assert.equal(compareFile('t.h', bytes('int a;\n'), 'int a;\n'), undefined);
    assert.equal(compareFile('t.h', bytes('int b;\n'), 'int a;\n'), 't.h differs from the rebuilt one at line 1: "int b;" in the file, "int a;" rebuilt; 1 line differs.');
    assert.match(compareFile('t.h', bytes('\uFEFFint a;\n'), 'int a;\n') ?? '', /line 1: "\uFEFFint a;" in the file/);
  });

  it('compareFile names the first differing byte when the texts read alike but the bytes differ (not UTF-8)', () => {
    const found = Uint8Array.from([0x61, 0xff, 0x0a]);
    assert.equal(compareFile('t.txt', found, 'a\uFFFD\n'), 't.txt differs from the rebuilt one in its bytes from byte 2 on (it is not valid UTF-8 there).');
  });
});

describe('jsonDifferences', () => {
  it('jsonDifferences lists changed values, missing and extra keys and array lengths, by key path', () => {
    assert.deepEqual(jsonDifferences({ a: 1, b: [1, 2] }, { a: 1, b: [1, 2] }), []);
    assert.deepEqual(jsonDifferences({ a: [1, 2.5], c: 'x' }, { a: [1, 3, 4], b: null }), [
      { path: 'a[1]', found: '2.5', rebuilt: '3' },
      { path: 'a', found: '2 item(s)', rebuilt: '3 item(s)' },
      { path: 'b', found: 'missing', rebuilt: 'null' },
      { path: 'c', found: '"x"', rebuilt: 'missing' },
    ]);
    assert.deepEqual(jsonDifferences({ 'odd key': { x: [] } }, { 'odd key': { x: {} } }), [{ path: '"odd key".x', found: '[]', rebuilt: '{}' }]);
    assert.deepEqual(jsonDifferences(1, '1'), [{ path: '', found: '1', rebuilt: '"1"' }]);
  });

  it('jsonDifferences shows a SHA-256 whole and cuts longer values', () => {
    const sha = 'a'.repeat(64);
    assert.deepEqual(jsonDifferences({ s: sha }, { s: 'b'.repeat(64) })[0]?.found, `"${sha}"`);
    assert.match(jsonDifferences({ s: 'x'.repeat(100) }, { s: '' })[0]?.found ?? '', /^"x{79}\.\.\.$/);
  });
});

describe('printable', () => {
  it('printable writes control and format characters as \\u{...} and leaves other text alone', () => {
    assert.equal(printable('a\u001b[2Jb\u202ec\u0007'), 'a\\u{1b}[2Jb\\u{202e}c\\u{7}');
    assert.equal(printable('Messung ä µ Ω "x"'), 'Messung ä µ Ω "x"');
  });
});
