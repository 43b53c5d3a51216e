/**
 * Speed and memory benchmark (npm run bench). Generates invented data with a fixed seed,
 * times each stage several ways and writes the figures to bench/results.md. Not a test:
 * nothing here passes or fails.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { appendFileSync, copyFileSync, mkdirSync, mkdtempSync, rmSync, utimesSync, writeFileSync, existsSync } from 'node:fs';
import { readFile, stat } from 'node:fs/promises';
import { cpus, totalmem } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';
import { analyse } from '../core/analysis/analysis';
import { diagnose } from '../core/analysis/diagnose';
import { fitCurve, prepareData } from '../core/fit/index';
import { selectColumns } from '../core/ingest/select';
import { writeOutputs } from '../core/node/outputs';
import { runPipeline } from '../core/node/pipeline';
import { readCsvFile } from '../core/node/readCsv';
import { DEFAULT_OUTPUT, type FitPlan } from '../core/outputs/plan';
import { RecordScan, type ScanFileSystem } from '../core/outputs/recordScan';
import { workerRunner } from '../core/node/pool';
import { RandomStream } from '../core/tune/rng';
import { buildPanelPayload } from '../core/view/payload';

const ROWS = Number(process.env.KNOTWISE_BENCH_ROWS ?? 1_000_000);
/** `panel`: only the panel figures; `records`: only the record scan (neither writes bench/results.md). */
const PART = process.env.KNOTWISE_BENCH_PART;
const dir = join(__dirname, '..', 'bench', 'tmp');
const lines: string[] = [];
const log = (s: string): void => {
  console.log(s);
  lines.push(s);
};

/** The invented readings of the benchmark (seed 7): y = 3 sin(x / 12) + 0.05 x + uniform noise, x in [0, 100). */
function makeRows(n: number): { x: Float64Array; y: Float64Array; lines: Int32Array } {
  const rng = new RandomStream(7, 0);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  const lines = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    const xi = (rng.int(1e9) / 1e9) * 100;
    const noise = (rng.int(1e6) / 1e6 - 0.5) * 0.6;
    // Rounded as the CSV prints them, so the in-memory rows equal the file's.
    x[i] = Number(xi.toFixed(6));
    y[i] = Number((Math.sin(xi / 12) * 3 + xi * 0.05 + noise).toFixed(6));
    lines[i] = i + 2;
  }
  return { x, y, lines };
}

function makeCsv(path: string, n: number): void {
  const { x, y } = makeRows(n);
  const parts: string[] = ['x,y'];
  for (let i = 0; i < n; i++) parts.push(`${(x[i] as number).toFixed(6)},${(y[i] as number).toFixed(6)}`);
  writeFileSync(path, parts.join('\n') + '\n');
}

/**
 * What the editor does between reading the columns and showing the panel, with the
 * settings' defaults (natural spline, default candidates, 50 bootstrap resamples on worker
 * threads, one-SE rule): analyse, then build the panel message; and the message's size.
 */
async function panelTimings(sizes: readonly number[]): Promise<void> {
  for (const n of sizes) {
    const data = makeRows(n);
    const t0 = performance.now();
    const analysis = await analyse(data, { kind: 'natural-spline', resample: { kind: 'bootstrap', resamples: 50 }, rule: { kind: 'one-se' }, seed: 1 }, workerRunner());
    const t1 = performance.now();
    const payload = buildPanelPayload({ runId: 1, analysis, source: { fileName: 'bench.csv', xLabel: 'x', yLabel: 'y' }, rejected: 0, heldOut: 0, tolerancePercent: 2 });
    const bytes = Buffer.byteLength(JSON.stringify(payload));
    const t2 = performance.now();
    log(
      `| panel for ${n} rows: analyse (default settings: natural-spline, ${analysis.tune.candidates.length} candidates, bootstrap:50, one-se) + panel message | ${((t2 - t0) / 1000).toFixed(2)} s (analyse ${((t1 - t0) / 1000).toFixed(2)} s, message ${((t2 - t1) / 1000).toFixed(2)} s, ${bytes} bytes) |`,
    );
  }
}

/** Invented counts: Poisson draws (by inversion, seed 11) around the mean exp(1 + sin(x / 12)). */
function poissonCounts(x: Float64Array): Float64Array {
  const rng = new RandomStream(11, 0);
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) {
    const mu = Math.exp(1 + Math.sin((x[i] as number) / 12));
    const u = (rng.int(1e9) + 0.5) / 1e9;
    let k = 0;
    let p = Math.exp(-mu);
    let cdf = p;
    while (u > cdf && k < 1000) {
      k++;
      p *= mu / k;
      cdf += p;
    }
    out[i] = k;
  }
  return out;
}

async function time<T>(label: string, f: () => Promise<T> | T): Promise<T> {
  const t0 = performance.now();
  const out = await f();
  const s = (performance.now() - t0) / 1000;
  log(`| ${label} | ${s.toFixed(2)} s |`);
  return out;
}

/** Runs f `reps` times and reports the median, and the first (cold, before the JIT warms up) run. */
async function timeMedian<T>(label: string, f: () => Promise<T> | T, reps = 3): Promise<T> {
  const secs: number[] = [];
  let out: T | undefined;
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    out = await f();
    secs.push((performance.now() - t0) / 1000);
  }
  const sorted = [...secs].sort((a, b) => a - b);
  log(`| ${label} | ${(sorted[Math.floor(reps / 2)] as number).toFixed(2)} s (median of ${reps}; first run ${(secs[0] as number).toFixed(2)} s) |`);
  return out as T;
}

/** Node's file system as the record scan sees it (the editor's is workspace.fs, extension/records.ts). */
const nodeScanFs: ScanFileSystem = {
  stat: async (path) => {
    try {
      const st = await stat(path);
      return { size: st.size, mtime: st.mtimeMs };
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return undefined;
      throw e;
    }
  },
  readFile: (path) => readFile(path),
  resolve: (record, name) => resolve(dirname(record), name),
};

const RECORD_FOLDERS = 1000;
const RECORD_ROWS = 10_000;
const RECORDS_CHANGED = 10;

/**
 * The cheap check of the editor's record watch (core/outputs/recordScan.ts) over a
 * workspace of 1,000 folders, each with a 10,000-row CSV, its curve table and its fit
 * record (one real fit, as `knotwise fit` writes it, copied byte for byte): a first look
 * with the records written last (nothing needs hashing), a first scan that hashes
 * everything (the records made older than their files, as after a clone), a scan with
 * nothing changed, and one after 10 data files changed.
 */
async function recordScanTimings(): Promise<void> {
  const root = mkdtempSync(join(dir, 'records-'));
  try {
    const first = join(root, 'f0000');
    mkdirSync(first);
    makeCsv(join(first, 'readings.csv'), RECORD_ROWS);
    const plan: FitPlan = {
      columns: { x: 'x', y: 'y' },
      tune: true,
      options: { kind: 'natural-spline', resample: { kind: 'bootstrap', resamples: 50 }, rule: { kind: 'one-se' }, seed: 1 },
      output: DEFAULT_OUTPUT,
    };
    const run = await runPipeline(join(first, 'readings.csv'), plan, first);
    const written = writeOutputs(first, run.deliverables.files, join(first, 'readings.csv'), false);
    // The data first and the record last, in every folder, as Knotwise writes them.
    const names = ['readings.csv', ...written.map((p) => p.slice(first.length + 1))];
    const records: string[] = [join(first, names[names.length - 1] as string)];
    for (let i = 1; i < RECORD_FOLDERS; i++) {
      const folder = join(root, `f${String(i).padStart(4, '0')}`);
      mkdirSync(folder);
      for (const n of names) copyFileSync(join(first, n), join(folder, n));
      records.push(join(folder, names[names.length - 1] as string));
    }
    const sha256 = (bytes: Uint8Array): string => createHash('sha256').update(bytes).digest('hex');
    const scanAll = async (label: string, scan: RecordScan): Promise<void> => {
      const before = scan.hashed;
      let stale = 0;
      const t0 = performance.now();
      for (const r of records) {
        const c = await scan.check(r);
        if (c.state !== 'record') throw new Error(`${r}: not read as a fit record (${c.state})`);
        if (c.reasons.length) stale++;
      }
      const secs = (performance.now() - t0) / 1000;
      const files = scan.hashed.files - before.files;
      const mib = (scan.hashed.bytes - before.bytes) / 2 ** 20;
      log(`| record scan, ${RECORD_FOLDERS} records of ${RECORD_ROWS}-row CSVs: ${label} | ${secs.toFixed(2)} s (${files} files hashed, ${mib.toFixed(0)} MiB; ${stale} out of date) |`);
    };
    const trusting = new RecordScan(nodeScanFs, sha256);
    await scanAll('first look, records written last', trusting);
    await scanAll('second look, nothing changed', trusting);
    // Records older than their files: a first look hashes every data file and table.
    const anHourAgo = new Date(Date.now() - 3_600_000);
    for (const r of records) utimesSync(r, anHourAgo, anHourAgo);
    const scan = new RecordScan(nodeScanFs, sha256);
    await scanAll('first scan, hashing everything', scan);
    await scanAll('second scan, nothing changed', scan);
    for (const r of records.slice(0, RECORDS_CHANGED)) appendFileSync(join(dirname(r), 'readings.csv'), '100.000000,0.000000\n');
    await scanAll(`after ${RECORDS_CHANGED} data files changed`, scan);
  } finally {
    rmSync(root, { recursive: true, force: true });
  }
}

async function main(): Promise<void> {
  mkdirSync(dir, { recursive: true });
  if (PART === 'records') {
    log('| stage | time |');
    log('| --- | --- |');
    await recordScanTimings();
    return;
  }
  const csv = join(dir, `bench-${ROWS}.csv`);
  if (!existsSync(csv)) makeCsv(csv, ROWS);
  log(`# Knotwise benchmark`);
  log('');
  log(`Machine: ${cpus().length} x ${cpus()[0]?.model ?? 'unknown CPU'}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}. Data: ${ROWS} rows, two columns (invented, seed 7).`);
  log('');
  log('| stage | time |');
  log('| --- | --- |');
  await panelTimings([100_000, ROWS]);
  if (PART === 'panel') return;
  const table = await timeMedian(`ingest (stream, parse, SHA-256) of ${ROWS} rows`, () => readCsvFile(csv));
  const data = selectColumns(table, { x: 'x', y: 'y' }).data;
  const prepared = prepareData(data);
  const fit = await timeMedian('natural spline df 10, full regression output', () => fitCurve(prepared, { kind: 'natural-spline', df: 10 }));
  await timeMedian('residual diagnostics of that fit', () => diagnose(data, fit));
  await timeMedian('natural spline df 10 with full regression output and residual diagnostics, together', () => diagnose(data, fitCurve(prepared, { kind: 'natural-spline', df: 10 })));
  await timeMedian('polynomial df 8', () => fitCurve(prepared, { kind: 'polynomial', df: 8 }));
  await time('smoothing spline df 20 (lambda search)', () => fitCurve(prepared, { kind: 'smoothing-spline', df: 20 }));
  const counts = prepareData({ x: data.x, y: poissonCounts(data.x) });
  await timeMedian('Poisson natural spline df 10 (IRLS), full output', () => fitCurve(counts, { kind: 'natural-spline', df: 10, outcome: 'counts' }));
  await timeMedian('increasing natural spline df 10 (constrained least squares, NNLS), full output', () => fitCurve(prepared, { kind: 'natural-spline', df: 10, shape: ['increasing'] }));
  const cands = [3, 4, 5, 6, 7, 8, 9, 10, 11, 12];
  await time('tuning: 10 natural-spline candidates x 50 bootstrap resamples (worker threads)', () =>
    analyse(data, { kind: 'natural-spline', candidates: cands, resample: { kind: 'bootstrap', resamples: 50 }, rule: { kind: 'one-se' }, seed: 1 }, workerRunner()),
  );
  await time('tuning: 10 natural-spline candidates x 10-fold CV', () =>
    analyse(data, { kind: 'natural-spline', candidates: cands, resample: { kind: 'folds', folds: 10, repeats: 1 }, rule: { kind: 'one-se' }, seed: 1 }, workerRunner()),
  );
  await recordScanTimings();
  log(`| peak resident memory of the whole run | ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB |`);
  const r = spawnSync('Rscript', ['--version'], { encoding: 'utf8' });
  if (r.status === 0) {
    const boots = 3;
    const script = `library(splines); d <- read.csv("${csv}"); n <- nrow(d); set.seed(1)
t0 <- proc.time()[["elapsed"]]
for (b in 1:${boots}) { i <- sample.int(n, n, replace = TRUE); oob <- setdiff(seq_len(n), i)
  for (k in c(${cands.join(',')})) { X <- ns(d$x, df = k - 1); f <- lm.fit(cbind(1, X[i, ]), d$y[i]); e <- d$y[oob] - cbind(1, X[oob, ]) %*% f$coefficients; sqrt(mean(e^2)) } }
cat(proc.time()[["elapsed"]] - t0)`;
    const secs = Number(execFileSync('Rscript', ['-e', script], { encoding: 'utf8', maxBuffer: 1 << 20 }).trim());
    log(`| R (lm.fit with splines::ns in a loop), ${boots} bootstrap resamples x 10 candidates, measured | ${secs.toFixed(1)} s |`);
    log(`| the same R loop scaled to 50 resamples (x ${(50 / boots).toFixed(1)}) | ${((secs * 50) / boots).toFixed(0)} s |`);
  } else {
    log('| R comparison | R not installed |');
  }
  writeFileSync(join(__dirname, '..', 'bench', 'results.md'), lines.join('\n') + '\n');
  console.log('\nwritten to bench/results.md');
}

void main();
