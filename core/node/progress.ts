/**
 * Progress of a long `knotwise fit` on standard error, with an estimate of the time left.
 * On a terminal one line is rewritten in place (`\r`) and cleared at the end; elsewhere
 * (a log, with `--progress`) whole lines are written, at most one per LOG_INTERVAL_MS.
 * Nothing is shown until the run has taken SHOW_AFTER_MS. The clock and the stream are
 * injected, so tests drive it without real time.
 */
import type { Progress } from '../tune/types';

/** Nothing is shown for runs shorter than this (ms). */
export const SHOW_AFTER_MS = 1000;
/** Smallest interval between two redraws of the terminal line (ms). */
export const REDRAW_MS = 100;
/** Smallest interval between two lines when the stream is not a terminal (ms). */
export const LOG_INTERVAL_MS = 5000;
/** The estimate of the time left is given once the current step has run this long (ms)... */
const ESTIMATE_AFTER_MS = 500;
/** ...and this many of its units are done. */
const ESTIMATE_AFTER_UNITS = 2;

/** Where progress goes: standard error, or a test's collector. */
export interface ProgressStream {
  write(text: string): unknown;
  /** True for a terminal: the line is rewritten in place. */
  readonly isTTY?: boolean | undefined;
  /** Terminal width in characters, when known; longer lines are cut to fit. */
  readonly columns?: number | undefined;
}

/** Milliseconds from an arbitrary start. */
export type Clock = () => number;

/**
 * Seconds as a short estimate: "about 40 s", "about 3 min 10 s", "about 2 h 5 min".
 * Example: timeLeftWords(190_000) === 'about 3 min 10 s'.
 */
export function timeLeftWords(ms: number): string {
  const s = Math.max(1, Math.round(ms / 1000));
  if (s < 60) return `about ${s} s`;
  if (s < 3600) {
    const m = Math.floor(s / 60);
    const r = s % 60;
    return r ? `about ${m} min ${r} s` : `about ${m} min`;
  }
  const h = Math.floor(s / 3600);
  const m = Math.round((s % 3600) / 60);
  return m ? `about ${h} h ${m} min` : `about ${h} h`;
}

/**
 * A Progress that writes to `stream`. The tuning core reports steps as (done, total,
 * message): the candidate fits, then one report per finished resample. The time left is
 * extrapolated from the rate of the current step: the units done since the step was first
 * heard of, over the time since (a new total or a count going back starts a new step). Call `finish()` when the run ends, also
 * on failure: it clears the terminal line so an error message starts on a clean line.
 * Example: const p = new ProgressLine(process.stderr); await analyse(data, o, runner, p); p.finish().
 */
export class ProgressLine implements Progress {
  private readonly started: number;
  private stepStart: number;
  /** Units done when the current step was first heard of (the rate counts the units since). */
  private stepFirstDone = 0;
  private stepTotal = -1;
  private lastDone = 0;
  private lastDraw = -Infinity;
  /** Length of the line on the terminal now (0: nothing to clear). */
  private shown = 0;
  private wrote = false;
  readonly cancelled = (): boolean => false;

  constructor(
    private readonly stream: ProgressStream,
    private readonly clock: Clock = Date.now,
  ) {
    this.started = clock();
    this.stepStart = this.started;
  }

  report(done: number, total: number, message: string): void {
    const now = this.clock();
    if (total !== this.stepTotal || done < this.lastDone) {
      this.stepTotal = total;
      this.stepStart = now;
      this.stepFirstDone = done;
    }
    this.lastDone = done;
    if (now - this.started < SHOW_AFTER_MS) return;
    const tty = this.stream.isTTY === true;
    // The last unit of a step is always drawn on a terminal, so the line does not stop short.
    if (now - this.lastDraw < (tty ? REDRAW_MS : LOG_INTERVAL_MS) && !(tty && done === total)) return;
    this.lastDraw = now;
    this.draw(this.line(done, total, message, now), tty);
  }

  /** The text of one progress line. */
  private line(done: number, total: number, message: string, now: number): string {
    const parts = [`knotwise: ${message}`];
    if (total > 1) parts[0] += ` (${Math.floor((100 * done) / total)} %)`;
    const spent = now - this.stepStart;
    const units = done - this.stepFirstDone;
    if (total > 1 && units >= ESTIMATE_AFTER_UNITS && done < total && spent >= ESTIMATE_AFTER_MS) {
      parts.push(`${timeLeftWords((spent / units) * (total - done))} left`);
    }
    return parts.join(', ');
  }

  private draw(text: string, tty: boolean): void {
    this.wrote = true;
    if (!tty) {
      this.stream.write(text + '\n');
      return;
    }
    const width = this.stream.columns;
    const cut = width !== undefined && width > 1 && text.length > width - 1 ? text.slice(0, width - 1) : text;
    // Pad over the rest of a longer previous line.
    this.stream.write('\r' + cut + ' '.repeat(Math.max(0, this.shown - cut.length)));
    this.shown = cut.length;
  }

  /** Clears the terminal line (nothing to do when nothing was shown or the stream is a log). */
  finish(): void {
    if (this.shown > 0 && this.stream.isTTY === true) this.stream.write('\r' + ' '.repeat(this.shown) + '\r');
    this.shown = 0;
  }

  /** True once anything was written. */
  get active(): boolean {
    return this.wrote;
  }
}
