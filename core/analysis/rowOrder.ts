import type { RowOrderCheck } from './types';
import { lag1Correlation, runsTest } from '../stats/effects';
import { LAG1_MATTERS, verdict } from './checks';

/** Rows of the row-order series sent whole; above this, means of consecutive blocks. */
export const ROW_ORDER_POINTS = 500;

/**
 * Drift of the residuals in row order (the order of the file, usually the order of
 * measurement): the lag-1 correlation of the residuals in that order (its size, judged by
 * LAG1_MATTERS) and the Wald-Wolfowitz runs test on their signs (core/stats/effects.ts), and
 * the residuals against row position for a plot, thinned to block means above
 * ROW_ORDER_POINTS rows. When the rows are in x order (or its reverse) this is the
 * Durbin-Watson check again, said by `sameAsX`, and it never flags. `residuals` are the
 * checked residuals in row order; `lines` the CSV lines. O(n).
 * Example: readings that creep upwards over a day of measuring give lag1 near 1 and a runs z far below 0.
 */
export function rowOrderCheck(residuals: Float64Array, x: Float64Array, lines: Int32Array | undefined): RowOrderCheck {
  const n = residuals.length;
  const lag1 = lag1Correlation(residuals);
  const runs = runsTest(residuals);
  const sameAsX = monotone(x);
  const judged = verdict(runs.pValue, lag1 >= LAG1_MATTERS);
  return { lag1, runs, sameAsX, sizeMatters: judged.sizeMatters, flagged: judged.flagged && !sameAsX, series: series(residuals, lines, n) };
}

/** True when x never decreases, or never increases, along the rows. */
function monotone(x: Float64Array): boolean {
  let up = true;
  let down = true;
  for (let i = 1; i < x.length && (up || down); i++) {
    const d = (x[i] as number) - (x[i - 1] as number);
    if (d < 0) up = false;
    if (d > 0) down = false;
  }
  return up || down;
}

function series(residuals: Float64Array, lines: Int32Array | undefined, n: number): RowOrderCheck['series'] {
  const blockSize = Math.max(1, Math.ceil(n / ROW_ORDER_POINTS));
  const row: number[] = [];
  const line: number[] = [];
  const residual: number[] = [];
  for (let start = 0; start < n; start += blockSize) {
    const end = Math.min(n, start + blockSize);
    let sum = 0;
    for (let i = start; i < end; i++) sum += residuals[i] as number;
    row.push(start + 1);
    line.push(lines ? (lines[start] as number) : 0);
    residual.push(sum / (end - start));
  }
  return { row, line, residual, blockSize };
}
