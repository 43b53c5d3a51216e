/**
 * Tests of the progress line (core/node/progress.ts), driven by a fake clock and a fake
 * stream, so no test depends on real time: nothing for runs under a second; on a terminal
 * one line rewritten with \r, throttled, padded over a longer line and cleared at the end;
 * elsewhere whole lines at most every LOG_INTERVAL_MS; the time left extrapolated from the
 * rate of the current step. The expected estimates are worked out by hand in each test.
 */
import { strict as assert } from 'node:assert';
import { LOG_INTERVAL_MS, ProgressLine, REDRAW_MS, SHOW_AFTER_MS, timeLeftWords } from '../../../core/node/progress';

/** A stream that keeps what was written. */
function stream(isTTY: boolean, columns?: number): { write(t: string): boolean; readonly isTTY: boolean; readonly columns: number | undefined; text: string } {
  return {
    isTTY,
    columns,
    text: '',
    write(t: string) {
      this.text += t;
      return true;
    },
  };
}

/** A clock the test sets. */
function clock(): { now: number; read: () => number } {
  const c = { now: 0, read: () => c.now };
  return c;
}

describe('progress line (core/node/progress.ts)', () => {
  it('timeLeftWords rounds to seconds, then minutes and seconds, then hours and minutes', () => {
    assert.equal(timeLeftWords(400), 'about 1 s');
    assert.equal(timeLeftWords(59_400), 'about 59 s');
    assert.equal(timeLeftWords(60_000), 'about 1 min');
    assert.equal(timeLeftWords(190_000), 'about 3 min 10 s');
    assert.equal(timeLeftWords(3_600_000), 'about 1 h');
    assert.equal(timeLeftWords(7_500_000), 'about 2 h 5 min');
  });

  it('shows nothing for a run that ends within a second', () => {
    const s = stream(true);
    const c = clock();
    const p = new ProgressLine(s, c.read);
    for (let r = 1; r <= 50; r++) {
      c.now = r * ((SHOW_AFTER_MS - 1) / 50);
      p.report(r, 50, `resample ${r} of 50`);
    }
    p.finish();
    assert.equal(s.text, '');
    assert.equal(p.active, false);
  });

  it('on a terminal: one line rewritten with \\r, with the percentage and the time left, then cleared', () => {
    const s = stream(true);
    const c = clock();
    const p = new ProgressLine(s, c.read);
    // 100 resamples, one every 200 ms from t = 0: at resample 50 (t = 10 s) 49 units took
    // 9.8 s since the first was heard of, so 50 left take 50 * 0.2 s = 10 s.
    for (let r = 1; r <= 50; r++) {
      c.now = r * 200;
      p.report(r, 100, `resample ${r} of 100`);
    }
    const frames = s.text.split('\r').filter((f) => f !== '');
    assert.ok(frames.length > 0);
    assert.equal(frames[frames.length - 1], 'knotwise: resample 50 of 100 (50 %), about 10 s left');
    assert.ok(!s.text.includes('\n'), 'no new lines on a terminal');
    // Redraws at most every REDRAW_MS: reports every 200 ms are all drawn after the first second.
    assert.equal(frames.length, 50 - Math.floor(SHOW_AFTER_MS / 200) + 1);
    const before = s.text.length;
    p.finish();
    const cleared = s.text.slice(before);
    assert.equal(cleared, '\r' + ' '.repeat((frames[frames.length - 1] as string).length) + '\r');
    assert.equal(p.active, true);
  });

  it('on a terminal: redraws are throttled, the last unit is always drawn, and a shorter line pads over a longer one', () => {
    const s = stream(true);
    const c = clock();
    const p = new ProgressLine(s, c.read);
    c.now = SHOW_AFTER_MS;
    // Ten reports within one REDRAW_MS: only the first is drawn...
    for (let r = 1; r <= 10; r++) {
      c.now = SHOW_AFTER_MS + (r - 1) * (REDRAW_MS / 10);
      p.report(r, 11, `resample ${r} of 11`);
    }
    assert.equal(s.text.split('\r').filter((f) => f !== '').length, 1);
    // ...but the last unit is drawn at once.
    p.report(11, 11, 'resample 11 of 11');
    const frames = s.text.split('\r').filter((f) => f !== '');
    assert.equal(frames.length, 2);
    assert.match(frames[1] as string, /^knotwise: resample 11 of 11 \(100 %\)$/);
    // A new, shorter message pads with spaces over the rest of the longer one.
    c.now += REDRAW_MS;
    p.report(0, 1, 'fit');
    const last = s.text.slice(s.text.lastIndexOf('\r') + 1);
    assert.equal(last, 'knotwise: fit' + ' '.repeat('knotwise: resample 11 of 11 (100 %)'.length - 'knotwise: fit'.length));
  });

  it('on a narrow terminal the line is cut to the width less one', () => {
    const s = stream(true, 20);
    const c = clock();
    const p = new ProgressLine(s, c.read);
    c.now = 2 * SHOW_AFTER_MS;
    p.report(1, 3, 'resample 1 of 3');
    assert.equal(s.text, '\r' + 'knotwise: resample 1 of 3 (33 %)'.slice(0, 19));
  });

  it('not on a terminal: whole lines at most every LOG_INTERVAL_MS, nothing to clear at the end', () => {
    const s = stream(false);
    const c = clock();
    const p = new ProgressLine(s, c.read);
    // One resample per second for 20 s: lines at 1 s, then every LOG_INTERVAL_MS.
    for (let r = 1; r <= 20; r++) {
      c.now = r * 1000;
      p.report(r, 20, `resample ${r} of 20`);
    }
    const lines = s.text.split('\n').filter((l) => l !== '');
    assert.equal(lines.length, 1 + Math.floor((20_000 - 1000) / LOG_INTERVAL_MS));
    assert.equal(lines[0], 'knotwise: resample 1 of 20 (5 %)');
    // At resample 6 (t = 6 s): 5 units in 5 s since the first, so 14 left take 14 s.
    assert.equal(lines[1], 'knotwise: resample 6 of 20 (30 %), about 14 s left');
    assert.ok(!s.text.includes('\r'));
    const before = s.text;
    p.finish();
    assert.equal(s.text, before);
  });

  it('a new step (another total) restarts the rate: no estimate until two of its units are done', () => {
    const s = stream(false);
    const c = clock();
    const p = new ProgressLine(s, c.read);
    // A slow first step...
    for (let r = 1; r <= 3; r++) {
      c.now = r * 10_000;
      p.report(r, 4, `slow ${r} of 4`);
    }
    // ...then a fast one: 1 unit per 100 ms.
    const lines: string[] = [];
    for (let r = 1; r <= 3; r++) {
      c.now = 40_000 + r * 100 + LOG_INTERVAL_MS * r;
      const at = s.text.length;
      p.report(r, 100, `fast ${r} of 100`);
      lines.push(s.text.slice(at).trim());
    }
    assert.equal(lines[0], 'knotwise: fast 1 of 100 (1 %)');
    assert.equal(lines[1], 'knotwise: fast 2 of 100 (2 %)');
    // Unit 3: 2 units in 2 * (100 + LOG_INTERVAL_MS) ms since the step began, 97 left.
    assert.equal(lines[2], `knotwise: fast 3 of 100 (3 %), ${timeLeftWords(97 * (100 + LOG_INTERVAL_MS))} left`);
  });
});
