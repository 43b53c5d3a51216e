/**
 * Tests of describing differences (core/outputs/compare.ts) on small hand-made texts.
 */
import { strict as assert } from 'node:assert';
import { describeDifference, textDifference } from '../../../core/outputs/compare';

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
    assert.equal(describeDifference('t.csv', d as NonNullable<typeof d>, ['x', 'fit', 'se']), 't.csv differs from the rebuilt table at line 3 (x = 2), column fit: 3.25 in the file, 3.5 rebuilt; 1 line differs.');
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
