/**
 * Whole-process measurements for the benchmark: the command line run as a user runs it,
 * timed from spawn to exit, with the process's peak resident memory (worker threads
 * included) read through getrusage at exit by a preloaded script; and the data files the
 * runs read, written as a stream so that files larger than one string can hold are made.
 */
import { spawnSync } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, renameSync, writeFileSync, writeSync } from 'node:fs';
import { join } from 'node:path';
import { performance } from 'node:perf_hooks';
import { RandomStream } from '../core/tune/rng';

/** One whole-process run: wall time (s), peak resident memory (MiB), exit code, standard error. */
export interface ProcessRun {
  readonly seconds: number;
  readonly peakMiB: number;
  readonly status: number | null;
  readonly stderr: string;
}

const PEAK_TAG = 'KNOTWISE_BENCH_PEAK_KIB';

/** The preload that prints the process's peak resident set at exit (getrusage, in KiB), written once into `dir`. */
function peakScript(dir: string): string {
  const file = join(dir, 'peak.cjs');
  if (!existsSync(file)) {
    writeFileSync(file, `process.on('exit', () => { require('node:fs').writeSync(2, '\\n${PEAK_TAG} ' + process.resourceUsage().maxRSS + '\\n'); });\n`);
  }
  return file;
}

/** Runs `node cli args` in `cwd` and measures it. */
export function runCli(cli: string, args: readonly string[], cwd: string): ProcessRun {
  mkdirSync(cwd, { recursive: true });
  const t0 = performance.now();
  const r = spawnSync(process.execPath, ['--require', peakScript(cwd), cli, ...args], { cwd, encoding: 'utf8', maxBuffer: 1 << 26 });
  const seconds = (performance.now() - t0) / 1000;
  const m = new RegExp(`${PEAK_TAG} (\\d+)`).exec(r.stderr ?? '');
  return { seconds, peakMiB: m ? Number(m[1]) / 1024 : NaN, status: r.status, stderr: (r.stderr ?? '').replace(new RegExp(`\\n?${PEAK_TAG} \\d+\\n?`), '') };
}

/** Median of `reps` runs (time and peak memory medians taken separately); throws when a run fails. */
export function medianRun(reps: number, run: () => ProcessRun): ProcessRun & { readonly runs: number } {
  const runs: ProcessRun[] = [];
  for (let k = 0; k < reps; k++) {
    const r = run();
    if (r.status !== 0) throw new Error(`a benchmark run failed (exit ${r.status}): ${r.stderr.slice(0, 2000)}`);
    runs.push(r);
  }
  const mid = (v: number[]): number => v.sort((a, b) => a - b)[Math.floor(v.length / 2)] as number;
  return { seconds: mid(runs.map((r) => r.seconds)), peakMiB: mid(runs.map((r) => r.peakMiB)), status: 0, stderr: '', runs: reps };
}

/**
 * Writes `rows` invented readings (seed 7: y = 3 sin(x / 12) + 0.05 x + uniform noise, x
 * in [0, 100), six decimals) to `path` in blocks, so any size fits in memory; kept for
 * later runs. The same rows as the in-memory generator of the benchmark.
 */
export function writeBenchCsv(path: string, rows: number): void {
  if (existsSync(path)) return;
  const rng = new RandomStream(7, 0);
  const partial = `${path}.partial`;
  const fd = openSync(partial, 'w');
  try {
    writeSync(fd, 'x,y\n');
    const BLOCK = 100_000;
    for (let start = 0; start < rows; start += BLOCK) {
      const parts: string[] = [];
      for (let i = start; i < Math.min(rows, start + BLOCK); i++) {
        const xi = (rng.int(1e9) / 1e9) * 100;
        const noise = (rng.int(1e6) / 1e6 - 0.5) * 0.6;
        parts.push(`${xi.toFixed(6)},${(Math.sin(xi / 12) * 3 + xi * 0.05 + noise).toFixed(6)}\n`);
      }
      writeSync(fd, parts.join(''));
    }
  } finally {
    closeSync(fd);
  }
  renameSync(partial, path);
}
