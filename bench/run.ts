/**
 * Speed and memory benchmark (npm run bench). Generates invented data with a fixed seed,
 * times each stage several ways and writes the figures to bench/results.md. Not a test:
 * nothing here passes or fails.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { appendFileSync, copyFileSync, mkdirSync, mkdtempSync, rmSync, statSync, utimesSync, writeFileSync, existsSync } from 'node:fs';
import { readFile, stat } from 'node:fs/promises';
import { cpus, totalmem } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { performance } from 'node:perf_hooks';
import { analyse } from '../core/analysis/analysis';
import { diagnose, diagnoseAside } from '../core/analysis/diagnose';
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
import { tuneCurve } from '../core/tune/tune';
import { curveKind } from '../core/registry/curves/index';
import { measureEditorPanel, type EditorMeasure } from './editor';
import { medianRun, runCli, writeBenchCsv, type ProcessRun } from './processes';
import { surfaceLine } from './surface';
import { wholeReadMiB } from '../core/node/pipeline';
import { DEFAULT_MEMORY_BUDGET } from '../core/stream/budget';

const ROWS = Number(process.env.KNOTWISE_BENCH_ROWS ?? 1_000_000);
/** One part only (`panel`, `editor`, `records`, ...; see the machine line in main), which writes nothing to bench/results.md. */
const PART = process.env.KNOTWISE_BENCH_PART;
const dir = join(__dirname, '..', 'bench', 'tmp');
const lines: string[] = [];
const log = (s: string): void => {
  console.log(s);
  lines.push(s);
};

/**
 * Milliseconds of a fixed loop (an xorshift stream, 10,000,000 steps, each adding one to a
 * random entry of a 16 MiB table and doing a little floating-point work: the memory and
 * processor traffic of a bootstrap draw), median of five: the machine's speed during a run,
 * to compare runs taken at different times on a shared machine. Never change it, or
 * earlier figures lose their reference.
 */
function referenceLoopMs(): number {
  const table = new Uint32Array(1 << 22);
  const times: number[] = [];
  let sink = 0;
  for (let r = 0; r < 5; r++) {
    const t0 = performance.now();
    let s = 0x9e3779b9 | 0;
    let acc = 0;
    for (let i = 0; i < 10_000_000; i++) {
      s ^= s << 13;
      s ^= s >>> 17;
      s ^= s << 5;
      const j = s & ((1 << 22) - 1);
      table[j] = (table[j] as number) + 1;
      acc += (s & 1023) * 0.5 - acc * 1e-3;
    }
    sink += acc;
    times.push(performance.now() - t0);
  }
  if (!Number.isFinite(sink)) throw new Error('reference loop');
  return times.sort((a, b) => a - b)[2] as number;
}

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
    writeBenchCsv(join(first, 'readings.csv'), RECORD_ROWS);
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

/** Groups in the grouped-fit figure, and rows of each. */
const GROUPS = 1000;
const GROUP_ROWS = 1000;

/**
 * Invented readings of many devices (seed 13): device d's readings follow the benchmark's
 * curve shifted by a device offset and scaled slightly, x in [0, 100), with uniform noise.
 */
function writeGroupCsv(path: string): void {
  if (existsSync(path)) return;
  const rng = new RandomStream(13, 0);
  const parts: string[] = ['device,x,y\n'];
  for (let d = 0; d < GROUPS; d++) {
    const offset = (rng.int(1e6) / 1e6 - 0.5) * 2;
    const scale = 1 + (rng.int(1e6) / 1e6 - 0.5) * 0.2;
    for (let i = 0; i < GROUP_ROWS; i++) {
      const xi = (rng.int(1e9) / 1e9) * 100;
      const noise = (rng.int(1e6) / 1e6 - 0.5) * 0.6;
      parts.push(`dev${String(d).padStart(4, '0')},${xi.toFixed(6)},${(scale * (Math.sin(xi / 12) * 3 + xi * 0.05) + offset + noise).toFixed(6)}\n`);
    }
  }
  writeFileSync(path, parts.join(''));
}

/** The grouped fit as a whole process: 1,000 devices of 1,000 rows, each tuned over 10 candidates with 50 bootstrap resamples. */
function groupTimings(): void {
  const csv = join(dir, `groups-${GROUPS}x${GROUP_ROWS}.csv`);
  writeGroupCsv(csv);
  const out = join(dir, 'groups-out');
  rmSync(out, { recursive: true, force: true });
  mkdirSync(out, { recursive: true });
  const r = medianRun(1, () =>
    runCli(
      join(__dirname, '..', 'dist', 'cli.js'),
      ['fit', csv, '--x', 'x', '--y', 'y', '--per', 'device', '--df', CANDIDATES, '--resampling', 'bootstrap:50', '--seed', '1', '--out', out, '--quiet'],
      out,
    ),
  );
  log(
    `| ${GROUPS} groups of ${GROUP_ROWS} rows (\`--per device\`, 10 candidates, bootstrap:50 each; a table per group, the summary and the group record; target 10 s) | ${r.seconds.toFixed(2)} s, peak ${r.peakMiB.toFixed(0)} MiB |`,
  );
  const shared = medianRun(1, () =>
    runCli(
      join(__dirname, '..', 'dist', 'cli.js'),
      ['fit', csv, '--x', 'x', '--y', 'y', '--per', 'device', '--df', CANDIDATES, '--resampling', 'bootstrap:50', '--seed', '1', '--shared-df', '--long-table', '--out', out, '--quiet'],
      out,
    ),
  );
  log(`| the same with \`--shared-df --long-table\` (pooled error, one long table, the one-curve test) | ${shared.seconds.toFixed(2)} s, peak ${shared.peakMiB.toFixed(0)} MiB |`);
  rmSync(out, { recursive: true, force: true });
}

/** The command the targets name: 10 natural-spline candidates, default table and record, no --json. */
const CANDIDATES = '2,3,4,5,6,7,8,10,12,15';
const cliPath = join(__dirname, 'cli.js');

const cliRuns = new Map<string, ProcessRun & { readonly runs: number }>();

/** The whole command line on `rows` rows with `scheme`, median of `reps` runs; the same measurement is not repeated within one bench run. */
function cliFit(rows: number, scheme: string, reps: number, extra: readonly string[] = []): ProcessRun & { readonly runs: number } {
  const key = `${rows} ${scheme} ${reps} ${extra.join(' ')}`;
  const known = cliRuns.get(key);
  if (known) return known;
  const run = measureCliFit(rows, scheme, reps, extra);
  cliRuns.set(key, run);
  return run;
}

function measureCliFit(rows: number, scheme: string, reps: number, extra: readonly string[]): ProcessRun & { readonly runs: number } {
  const csv = join(dir, `bench-${rows}.csv`);
  writeBenchCsv(csv, rows);
  const out = join(dir, `out-${rows}`);
  return medianRun(reps, () => {
    rmSync(out, { recursive: true, force: true });
    return runCli(cliPath, ['fit', csv, '--x', 'x', '--y', 'y', '--df', CANDIDATES, '--resampling', scheme, '--seed', '1', '--out', out, ...extra], dir);
  });
}

/** How the command line reads the bench file of `rows` rows at the default memory budget: 'whole' or 'streamed' (core/node/pipeline.ts wholeReadMiB). */
function readMode(rows: number): string {
  const csv = join(dir, `bench-${rows}.csv`);
  writeBenchCsv(csv, rows);
  const need = wholeReadMiB(csv) ?? 0;
  return need > DEFAULT_MEMORY_BUDGET ? `streamed (about ${need.toFixed(0)} MiB whole)` : 'whole';
}

/** "1.23 s" against a target, with whether it is met. */
function against(value: number, target: number, unit: string, digits = 2): string {
  return `${value.toFixed(digits)} ${unit} (target ${target} ${unit}: ${value <= target ? 'met' : 'not met'})`;
}

/** A peak in MiB against a target in MB (10^6 bytes, as the targets are stated), both units shown. */
function againstMB(peakMiB: number, targetMB: number): string {
  const mb = (peakMiB * 1024 * 1024) / 1e6;
  return `${peakMiB.toFixed(0)} MiB = ${mb.toFixed(0)} MB (target ${targetMB} MB: ${mb <= targetMB ? 'met' : 'not met'})`;
}

/**
 * The panel in the real workbench (bench/editor.ts) against the scale issue's targets: the
 * panel within 3 s of the last pick, the extension host growing by at most 300 MB.
 */
async function editorPanel(): Promise<void> {
  const rows = ROWS.toLocaleString('en-US');
  const m: EditorMeasure = await measureEditorPanel(join(__dirname, '..'), ROWS);
  if (!m.measured) {
    log(`| panel for ${rows} rows in the workbench | not measured: ${m.why} |`);
    return;
  }
  // Each run's steps on the terminal only (not in bench/results.md).
  for (const [k, r] of m.runs.entries()) {
    console.log(
      `  editor run ${k + 1}: page ${r.pageCreated.toFixed(2)} s, ${r.progress.map((p) => `${p.at.toFixed(2)} s ${p.text}`).join(' | ')}, result ${r.resultIn.toFixed(2)} s, built ${r.built.toFixed(2)} s, drawn ${r.drawn.toFixed(2)} s, residual checks ${r.checked.toFixed(2)} s`,
    );
  }
  const mid = (v: number[]): number => [...v].sort((a, b) => a - b)[Math.floor(v.length / 2)] as number;
  const drawn = m.runs.map((r) => r.drawn);
  const median = m.runs.find((r) => r.drawn === mid(drawn)) ?? (m.runs[0] as (typeof m.runs)[number]);
  const many = m.runs.length > 1;
  log(
    `| panel for ${rows} rows in the workbench (code-server ${m.codeServer}, headless Chromium ${m.chromium}, the editor's default settings): last pick accepted to the chosen curve drawn | ${against(median.drawn, 3, 's')}; ${many ? `median of ${m.runs.length} runs (in order: ${drawn.map((d) => d.toFixed(2)).join(', ')} s; the first with the extension host cold), each in a new panel: the panel closed, the file right-clicked and the columns picked again` : 'one run'}; other processes kept ${m.otherCores.toFixed(2)} of the machine's ${m.cores} cores busy on average meanwhile |`,
  );
  const p = median.progress;
  const progress = p.length ? `progress shown from ${(p[0] as { at: number }).at.toFixed(2)} to ${(p[p.length - 1] as { at: number }).at.toFixed(2)} (${p.length} texts)` : 'no progress shown';
  const result = Number.isFinite(median.resultIn)
    ? `result message in the panel's page ${median.resultIn.toFixed(2)} (${median.resultBytes.toLocaleString('en-US')} bytes of JSON)`
    : 'result message not seen';
  log(
    `| where that time goes (${many ? 'the median run' : 'that run'}; seconds after the last pick, df ${median.chosenDf} chosen) | panel page created ${median.pageCreated.toFixed(2)}; ${progress}; ${result}; panel built ${median.built.toFixed(2)}; drawn (painted) ${median.drawn.toFixed(2)}; the chosen df's residual checks, which follow the curve, shown ${median.checked.toFixed(2)} (median of the runs ${mid(m.runs.map((r) => r.checked)).toFixed(2)}) |`,
  );
  const mib = (kib: number): string => `${(kib / 1024).toFixed(0)} MiB`;
  const growth = (m.hostPeakFirst - m.hostBefore) * 1024;
  const since = m.peakSince === 'reset' ? 'its high-water mark reset just before the right-click' : 'VmHWM since the process started: it could not be reset';
  log(
    `| extension host (its process's VmRSS and VmHWM from /proc, worker threads included; ${since}): resident before the right-click, peak until the first panel was drawn, growth | ${mib(m.hostBefore)} before, ${mib(m.hostPeakFirst)} peak, growth ${mib(m.hostPeakFirst - m.hostBefore)} = ${(growth / 1e6).toFixed(0)} MB (target 300 MB: ${growth <= 300e6 ? 'met' : 'not met'}); resident ${mib(m.hostAfterFirst)} once drawn${many ? `; peak over the ${m.runs.length} runs ${mib(m.hostPeakAll)}` : ''} |`,
  );
}

/** The targets of the speed and memory issue, each measured as the issue defines it. */
async function targets(): Promise<void> {
  log('## Targets (whole command-line process, median of three runs)');
  log('');
  log(
    `\`knotwise fit data.csv --x x --y y --df ${CANDIDATES} --resampling <scheme> --seed 1\`, writing the default table and record; peak memory is the process's maximum resident set (worker threads included) from getrusage at exit.`,
  );
  log('');
  log('| measure | figure |');
  log('| --- | --- |');
  const boot = cliFit(1_000_000, 'bootstrap:50', 3);
  log(`| 1,000,000 rows, bootstrap:50: time | ${against(boot.seconds, 2.5, 's')} |`);
  log(`| 1,000,000 rows, bootstrap:50: peak memory | ${againstMB(boot.peakMiB, 250)} |`);
  const folds = cliFit(1_000_000, 'folds:10', 3);
  log(`| 1,000,000 rows, folds:10: time | ${against(folds.seconds, 1.2, 's')} |`);
  log(`| 1,000,000 rows, folds:10: peak memory | ${folds.peakMiB.toFixed(0)} MiB |`);
  const csv = join(dir, 'bench-1000000.csv');
  const ingest = await medianSeconds(() => readCsvFile(csv));
  log(`| ingest of 1,000,000 rows (stream, decode, parse, SHA-256; in process) | ${against(ingest, 0.3, 's')} |`);
  const ten = cliFit(10_000_000, 'bootstrap:50', 3);
  // Above the default memory budget the file is streamed in passes and bootstrap:50 runs as bundles:50 (docs/design.md, "Streaming").
  log(`| 10,000,000 rows, bootstrap:50, ${readMode(10_000_000)}: time | ${against(ten.seconds, 30, 's', 1)} |`);
  log(`| 10,000,000 rows, bootstrap:50, ${readMode(10_000_000)}: peak memory | ${againstMB(ten.peakMiB, 400)} |`);
  const held = cliFit(10_000_000, 'bootstrap:50', 1, ['--memory-budget', '4096']);
  log(`| 10,000,000 rows, bootstrap:50, read whole (\`--memory-budget 4096\`, one run): time, peak memory | ${held.seconds.toFixed(1)} s, ${held.peakMiB.toFixed(0)} MiB |`);
  const wide = join(dir, 'wide-header.csv');
  if (!existsSync(wide)) writeFileSync(wide, Array.from({ length: 2_000_000 }, (_, k) => `c${k}`).join(',') + '\n1,2\n');
  const refused = runCli(cliPath, ['fit', wide, '--x', 'c0', '--y', 'c1', '--print-only'], dir);
  log(`| a header of 2,000,000 columns refused (exit ${refused.status}): time | ${against(refused.seconds, 1, 's')} |`);
  log(`| the same refusal: peak memory | ${againstMB(refused.peakMiB, 100)} |`);
  log('');
}

/** Median of three in-process timings (s). */
async function medianSeconds(f: () => Promise<unknown> | unknown): Promise<number> {
  const secs: number[] = [];
  for (let k = 0; k < 3; k++) {
    const t0 = performance.now();
    await f();
    secs.push((performance.now() - t0) / 1000);
  }
  return secs.sort((a, b) => a - b)[1] as number;
}

/** Time and peak memory from 10,000 rows up, bootstrap:50 (100,000,000 rows with KNOTWISE_BENCH_HUGE=1). */
function scaling(): void {
  log('## Scaling (whole process, bootstrap:50, the command above)');
  log('');
  log('| rows | read | time | time per 1,000,000 rows | peak memory |');
  log('| --- | --- | --- | --- | --- |');
  const sizes = [10_000, 100_000, 1_000_000, 10_000_000, ...(process.env.KNOTWISE_BENCH_HUGE === '1' ? [100_000_000] : [])];
  for (const rows of sizes) {
    const r = cliFit(rows, 'bootstrap:50', rows >= 100_000_000 ? 1 : 3);
    log(`| ${rows.toLocaleString('en-US')} | ${readMode(rows)} | ${r.seconds.toFixed(2)} s (median of ${r.runs}) | ${((r.seconds * 1e6) / rows).toFixed(2)} s | ${r.peakMiB.toFixed(0)} MiB |`);
  }
  log('');
}

/** Where the time of one 1,000,000-row run goes, stage by stage, in process (one run after a warm-up). */
async function stages(): Promise<void> {
  const csv = join(dir, 'bench-1000000.csv');
  const plan: FitPlan = {
    columns: { x: 'x', y: 'y' },
    tune: true,
    options: { kind: 'natural-spline', candidates: CANDIDATES.split(',').map(Number), resample: { kind: 'bootstrap', resamples: 50 }, rule: { kind: 'one-se' }, seed: 1 },
    output: DEFAULT_OUTPUT,
  };
  await runPipeline(csv, plan, dir);
  const t: [string, number][] = [];
  let t0 = performance.now();
  const mark = (label: string): void => {
    const now = performance.now();
    t.push([label, (now - t0) / 1000]);
    t0 = now;
  };
  const table = await readCsvFile(csv);
  mark('read (stream, decode, parse, SHA-256)');
  const data = selectColumns(table, { x: 'x', y: 'y' }).data;
  mark('choose the columns');
  const prepared = prepareData(data);
  mark('check the rows, order by x');
  const dfs = CANDIDATES.split(',').map(Number);
  curveKind('natural-spline').fitAll?.(prepared, dfs);
  mark('fit every candidate to all rows (power sums; repeated inside the tuning below, while the resamples run)');
  // The command line's arrangement: this thread resamples beside one worker per remaining core.
  const runner = workerRunner(undefined, { mainThreadShare: true, lend: true });
  const { result, fits } = await tuneCurve(prepared, { ...plan.options, rule: { kind: 'one-se' } }, runner);
  mark('tuning: 50 bootstrap resamples x 10 candidates, started first, on a worker and this thread once it has fitted every candidate to all rows');
  const chosen = fits.get(result.selected.df);
  if (!chosen) throw new Error('no chosen fit');
  void chosen.cooksDistance;
  mark("the chosen fit's rows (residuals, leverage, Cook's distance)");
  await diagnoseAside(data, chosen, runner);
  mark("residual checks (the design tests' cross products on the worker, as the command line sums them)");
  log('## Where the time goes (1,000,000 rows, bootstrap:50, in process, one run after a warm-up)');
  log('');
  log('| stage | time |');
  log('| --- | --- |');
  for (const [label, secs] of t) log(`| ${label} | ${secs.toFixed(3)} s |`);
  log('');
}

/** The same work in R (splines::ns with .lm.fit, the basis built once per candidate), whole processes at 100,000 rows. */
function sideBySide(): void {
  const rows = 100_000;
  const csv = join(dir, `bench-${rows}.csv`);
  writeBenchCsv(csv, rows);
  log('## Side by side with base R (100,000 rows, 10 candidates x 50 bootstrap resamples, whole processes, median of three)');
  log('');
  const ours = cliFit(rows, 'bootstrap:50', 3);
  const version = spawnSync('Rscript', ['--version'], { encoding: 'utf8' });
  if (version.status !== 0) {
    log(`| Knotwise | ${ours.seconds.toFixed(2)} s |`);
    log('| R | not installed here (apt-get install r-base-core) |');
    log('');
    return;
  }
  // Written for speed: each candidate's basis once, .lm.fit on the drawn rows, RMSE, MAE and maximum error on the out-of-bag rows.
  const script = `library(splines); d <- read.csv(${JSON.stringify(csv)}); n <- nrow(d); set.seed(1)
X <- lapply(c(${CANDIDATES}), function(k) if (k == 2) cbind(1, d$x) else cbind(1, ns(d$x, df = k - 1)))
for (b in 1:50) { i <- sample.int(n, n, replace = TRUE); oob <- which(tabulate(i, n) == 0)
  for (Xk in X) { f <- .lm.fit(Xk[i, , drop = FALSE], d$y[i]); e <- d$y[oob] - Xk[oob, , drop = FALSE] %*% f$coefficients; c(sqrt(mean(e^2)), mean(abs(e)), max(abs(e))) } }`;
  const scriptFile = join(dir, 'side-by-side.R');
  writeFileSync(scriptFile, script + '\n');
  const secs: number[] = [];
  for (let k = 0; k < 3; k++) {
    const t0 = performance.now();
    const r = spawnSync('Rscript', [scriptFile], { encoding: 'utf8' });
    if (r.status !== 0) throw new Error(`the R script failed: ${r.stderr}`);
    secs.push((performance.now() - t0) / 1000);
  }
  const theirs = secs.sort((a, b) => a - b)[1] as number;
  log('| program | time |');
  log('| --- | --- |');
  log(`| Knotwise (whole command: read, tune, choose, check residuals, write table and record) | ${ours.seconds.toFixed(2)} s |`);
  log(`| R ${(version.stdout || version.stderr).trim().replace(/^Rscript \(R\) version /, '')} (read.csv, the loop above; no residual checks, no outputs) | ${theirs.toFixed(2)} s |`);
  log(`| ratio | ${(theirs / ours.seconds).toFixed(1)} |`);
  log('');
}

/** Sizes of what ships: the packaged extension and its bundles, and the command-line package. */
function sizes(): void {
  log('## What ships');
  log('');
  const root = join(__dirname, '..');
  const vsix = join(dir, 'knotwise.vsix');
  // Packaging rebuilds the bundles minified (vscode:prepublish); the development build is restored after.
  execFileSync('npx', ['vsce', 'package', '--no-rewrite-relative-links', '--out', vsix], { cwd: root, stdio: 'ignore' });
  const kib = (f: string): string => `${(statSync(f).size / 1024).toFixed(0)} KiB`;
  log('| file | size |');
  log('| --- | --- |');
  log(`| the extension package (.vsix) | ${kib(vsix)} |`);
  for (const f of ['dist/extension.js', 'dist/resampleWorker.js', 'dist/webview/main.js']) log(`| ${f} (minified, in the .vsix) | ${kib(join(root, f))} |`);
  execFileSync(process.execPath, [join(root, 'scripts', 'build.mjs')], { cwd: root, stdio: 'ignore' });
  const tgz = execFileSync(process.execPath, [join(root, 'scripts', 'pack-cli.mjs')], { cwd: root, encoding: 'utf8' })
    .trim()
    .split('\n')
    .pop() as string;
  log(`| the command-line package (${tgz.replace(/-\d.*$/, '-<version>.tgz')}) | ${kib(join(root, tgz))} |`);
  rmSync(join(root, tgz), { force: true });
  rmSync(vsix, { force: true });
  log('');
}

async function main(): Promise<void> {
  mkdirSync(dir, { recursive: true });
  if (PART === 'records') {
    log('| stage | time |');
    log('| --- | --- |');
    await recordScanTimings();
    return;
  }
  if (PART === 'surface') {
    log('| run | time, peak memory |');
    log('| --- | --- |');
    log(surfaceLine(dir, cliPath));
    return;
  }
  const only = (part: string): boolean => PART === undefined || PART === part;
  const csv = join(dir, `bench-${ROWS}.csv`);
  writeBenchCsv(csv, ROWS);
  log(`# Knotwise benchmark`);
  log('');
  log(
    `Machine: ${cpus().length} x ${cpus()[0]?.model ?? 'unknown CPU'}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}. Data: invented readings (seed 7), two columns. Run with \`npm run bench\`; \`KNOTWISE_BENCH_PART=<targets|scaling|stages|panel|editor|fits|r|sizes|records|surface>\` runs one part (and writes nothing), \`KNOTWISE_BENCH_HUGE=1\` adds 100,000,000 rows to the scaling table.`,
  );
  log('');
  const speedBefore = referenceLoopMs();
  if (only('targets')) await targets();
  if (only('scaling')) scaling();
  if (only('stages')) await stages();
  if (only('panel') || only('editor')) {
    log('## The editor panel');
    log('');
    log(
      "In process (`panel`): analyse with the default settings, then the panel message. In the workbench (`editor`): a person's right-click and column picks in code-server's VS Code with the development bundles, timed to the panel's drawing.",
    );
    log('');
    log('| stage | time |');
    log('| --- | --- |');
    if (only('panel')) {
      const before = process.memoryUsage().rss;
      await panelTimings([100_000, ROWS]);
      log(`| resident memory grown over those two panels (target for the editor's host: 300 MB) | ${((process.memoryUsage().rss - before) / 2 ** 20).toFixed(0)} MiB |`);
    }
    if (only('editor')) await editorPanel();
    log('');
  }
  if (only('fits')) {
    log(`## Single fits and tunings (in process, ${ROWS.toLocaleString('en-US')} rows)`);
    log('');
    log('| stage | time |');
    log('| --- | --- |');
    const table = await timeMedian(`ingest (stream, parse, SHA-256) of ${ROWS} rows`, () => readCsvFile(csv));
    const data = selectColumns(table, { x: 'x', y: 'y' }).data;
    const prepared = prepareData(data);
    const fit = await timeMedian('natural spline df 10, full regression output', () => fitCurve(prepared, { kind: 'natural-spline', df: 10 }));
    await timeMedian('residual diagnostics of that fit', () => diagnose(data, fit));
    await timeMedian('polynomial df 8', () => fitCurve(prepared, { kind: 'polynomial', df: 8 }));
    await time('smoothing spline df 20 (lambda search)', () => fitCurve(prepared, { kind: 'smoothing-spline', df: 20 }));
    const counts = prepareData({ x: data.x, y: poissonCounts(data.x) });
    await timeMedian('Poisson natural spline df 10 (IRLS), full output', () => fitCurve(counts, { kind: 'natural-spline', df: 10, outcome: 'counts' }));
    await timeMedian('increasing natural spline df 10 (constrained least squares, NNLS), full output', () => fitCurve(prepared, { kind: 'natural-spline', df: 10, shape: ['increasing'] }));
    log('');
  }
  if (only('groups')) {
    log('## Many devices in one file (whole processes)');
    log('');
    log('| run | time, peak memory |');
    log('| --- | --- |');
    groupTimings();
    log('');
  }
  if (only('r')) sideBySide();
  if (only('records')) {
    log("## Fit records in the workspace (the editor's quick check)");
    log('');
    log('| stage | time |');
    log('| --- | --- |');
    await recordScanTimings();
    log('');
  }
  if (only('sizes')) sizes();
  if (only('surface')) {
    log('## Surfaces of two inputs (whole process)');
    log('');
    log('| run | time, peak memory |');
    log('| --- | --- |');
    log(surfaceLine(dir, cliPath));
    log('');
  }
  if (PART !== undefined) return;
  const speedAfter = referenceLoopMs();
  log('## Speed of the machine during the run');
  log('');
  log(
    `A fixed loop of random table updates and floating-point work (like a bootstrap draw) that no change to Knotwise touches (\`referenceLoopMs\` in bench/run.ts), median of five: ${speedBefore.toFixed(0)} ms before the parts above, ${speedAfter.toFixed(0)} ms after. The machines of this class are shared and their speed varies from hour to hour; compare this loop between runs: figures of a run whose loop took longer were taken on a slower machine, by about that ratio.`,
  );
  log('');
  writeFileSync(join(__dirname, '..', 'bench', 'results.md'), lines.join('\n') + '\n');
  console.log('\nwritten to bench/results.md');
}

void main();
