/**
 * Display helpers of core/ingest/text.ts. Control characters are the Unicode general
 * category Cc (The Unicode Standard, chapter 23: C0 U+0000-U+001F, DEL U+007F, C1
 * U+0080-U+009F); bidirectional formatting characters are those of Unicode Standard Annex
 * #9, section 2.
 */
import assert from 'node:assert/strict';
import { escapeHidden, findControl, isControl, MESSAGE_NAME_CHARS, quoteName, shorten } from '../../../core/ingest/text';

describe('isControl and findControl', () => {
  it('are true exactly for C0, DEL and C1', () => {
    const controls: number[] = [];
    for (let c = 0; c < 0x2000; c++) if (isControl(c)) controls.push(c);
    assert.equal(controls.length, 32 + 1 + 32);
    assert.deepEqual([controls[0], controls[31], controls[32], controls[33], controls[64]], [0, 31, 127, 128, 159]);
  });
  it('findControl gives the first position in the range', () => {
    assert.equal(findControl('ab\u0000c\u0001', 0, 5), 2);
    assert.equal(findControl('ab\u0000c\u0001', 3, 5), 4);
    assert.equal(findControl('abc', 0, 3), -1);
  });
});

describe('escapeHidden', () => {
  it('escapes control, invisible and bidirectional characters so a message is one visible line', () => {
    assert.equal(escapeHidden('a\u001b[31mb'), 'a\\u001b[31mb');
    assert.equal(escapeHidden('\u0085\u009b\u007f'), '\\u0085\\u009b\\u007f');
    assert.equal(escapeHidden('x\u202eevil\u2066'), 'x\\u202eevil\\u2066');
    assert.equal(escapeHidden('1\u00a0000\u200b\ufeff'), '1\\u00a0000\\u200b\\ufeff');
    assert.equal(escapeHidden('a\u2028b\nc'), 'a\\u2028b\\u000ac');
  });
  it('leaves printable text alone, including non-Latin scripts', () => {
    for (const text of ['flow [L/min]', 'Temperatur °C', 'Δp', 'מים', 'ضغط', '温度']) assert.equal(escapeHidden(text), text);
  });
});

describe('shorten and quoteName', () => {
  it(`names longer than ${MESSAGE_NAME_CHARS} characters end in an ellipsis after ${MESSAGE_NAME_CHARS}`, () => {
    assert.equal(quoteName('flow'), '"flow"');
    assert.equal(quoteName('n'.repeat(1 << 20)), `"${'n'.repeat(MESSAGE_NAME_CHARS)}\u2026"`);
    assert.equal(quoteName('y\u001b'), '"y\\u001b"');
  });
  it('never splits a surrogate pair', () => {
    assert.equal(shorten('ab\u{1F600}c', 3), 'ab\u2026');
    assert.equal(shorten('abc', 3), 'abc');
  });
});
