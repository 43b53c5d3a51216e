/**
 * The surface figure of the benchmark (issue 17): the whole command line fitting a surface
 * to 1,000,000 rows of two inputs, tuning 9 x 9 candidate df pairs by 20 bootstrap resamples.
 */
import { closeSync, existsSync, openSync, renameSync, rmSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { RandomStream } from '../core/tune/rng';
import { medianRun, runCli } from './processes';

/** Rows of the surface figure. */
export const SURFACE_ROWS = 1_000_000;

/**
 * Writes `rows` invented readings of two inputs (seed 11: u uniform on [0, 100], v uniform on
 * [0, 10], y = sin(u / 15) log(1 + v) + uniform noise of width 0.1) as `u,v,y`; kept when it exists.
 */
export function writeSurfaceCsv(path: string, rows: number): void {
  if (existsSync(path)) return;
  const rng = new RandomStream(11, 0);
  const partial = `${path}.partial`;
  const fd = openSync(partial, 'w');
  try {
    writeSync(fd, 'u,v,y\n');
    const BLOCK = 100_000;
    for (let start = 0; start < rows; start += BLOCK) {
      const parts: string[] = [];
      for (let i = start; i < Math.min(rows, start + BLOCK); i++) {
        const u = (rng.int(1e9) / 1e9) * 100;
        const v = (rng.int(1e9) / 1e9) * 10;
        const noise = (rng.int(1e6) / 1e6 - 0.5) * 0.1;
        parts.push(`${u.toFixed(6)},${v.toFixed(6)},${(Math.sin(u / 15) * Math.log(1 + v) + noise).toFixed(6)}\n`);
      }
      writeSync(fd, parts.join(''));
    }
  } finally {
    closeSync(fd);
  }
  renameSync(partial, path);
}

/** The table line of the surface figure: the whole process (read, tune 81 pairs by bootstrap:20, fit, table, record), target 20 s. */
export function surfaceLine(dir: string, cliPath: string): string {
  const csv = join(dir, `surface-${SURFACE_ROWS}.csv`);
  writeSurfaceCsv(csv, SURFACE_ROWS);
  const out = join(dir, 'out-surface');
  const run = medianRun(1, () => {
    rmSync(out, { recursive: true, force: true });
    return runCli(cliPath, ['fit', csv, '--x', 'u', '--x2', 'v', '--y', 'y', '--df', '1..9', '--resampling', 'bootstrap:20', '--seed', '1', '--extrapolate', '--out', out], dir);
  });
  const met = run.seconds <= 20 ? 'met' : 'not met';
  return `| surface, ${SURFACE_ROWS.toLocaleString('en-US')} rows, 9 x 9 df pairs, bootstrap:20 (whole process) | ${run.seconds.toFixed(1)} s (target 20 s: ${met}), peak ${run.peakMiB.toFixed(0)} MiB |`;
}
