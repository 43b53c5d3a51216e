/**
 * The editor panel measured in the real VS Code workbench, set up as the whole-editor
 * layer sets it up (docs/testing.md, "Whole editor"): code-server 4.100.3 in headless
 * Chromium, the extension loaded from the repository's development bundles (dist/, built
 * by npm run bench), the editor's default settings. A fresh workspace holds the
 * benchmark's invented readings; a person right-clicks the file, picks x and y and no
 * weights, and the time runs from the moment the last pick is accepted to the moment the
 * panel has drawn the chosen df's curve. The extension host's process is watched through
 * /proc (Linux). Nothing here passes or fails.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { cpus } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Frame, Page } from 'playwright-core';
import type * as Workbench from '../scripts/e2e-workbench.mjs' with { 'resolution-mode': 'import' };
import { closeAllEditors, pickCurveColumns, tuneFromExplorer } from '../test/e2e/flows';
import { writeBenchCsv } from './processes';

/** The data file's name in the workspace. */
const FILE = 'readings.csv';
/** Runs of the pick-to-panel time (the median is reported). */
const RUNS = 3;
/** Another run is started only while the part has used less than this (ms) in all. */
const BUDGET_MS = 120_000;
/** Longest wait for one step (ms): the panel, the extension host, the workbench. */
const STEP_MS = 120_000;
/** The extension host counts as settled once its resident set moved less than this (KiB) over SETTLE_MS. */
const SETTLE_KIB = 1024;
const SETTLE_MS = 2000;

/** One run: times in seconds from the moment the last pick was accepted. */
export interface EditorRun {
  /** The chosen curve drawn: the panel's DOM holds it and the browser has painted a frame after that. */
  readonly drawn: number;
  /** The chosen df's residual checks shown (they follow the curve), painted likewise. */
  readonly checked: number;
  /** The panel's page was created (its document's time origin). */
  readonly pageCreated: number;
  /** Progress texts the panel showed while the host worked, with the time each appeared. */
  readonly progress: readonly { readonly at: number; readonly text: string }[];
  /** The result message reached the panel's page, and its size as JSON (bytes). */
  readonly resultIn: number;
  readonly resultBytes: number;
  /** The panel had built the result's sections (its root says ready). */
  readonly built: number;
  readonly chosenDf: number;
}

/** What the part measured, or why it could not. */
export type EditorMeasure =
  | { readonly measured: false; readonly why: string }
  | {
      readonly measured: true;
      readonly codeServer: string;
      readonly chromium: string;
      readonly runs: readonly EditorRun[];
      /** Extension host memory (KiB): resident before the first right-click, peak until the first panel was drawn, resident then, peak over all runs. */
      readonly hostBefore: number;
      readonly hostPeakFirst: number;
      readonly hostAfterFirst: number;
      readonly hostPeakAll: number;
      /** How the peak was taken: since a reset of the high-water mark just before the right-click, or since the process started. */
      readonly peakSince: 'reset' | 'start';
      /** Processor cores other processes of the machine kept busy on average during the runs (not this benchmark, code-server or Chromium), of `cores`. */
      readonly otherCores: number;
      readonly cores: number;
    };

/** The resident set now and its peak (VmRSS, VmHWM of /proc/<pid>/status, KiB). */
function memoryOf(pid: number): { rss: number; hwm: number } {
  const status = readFileSync(`/proc/${pid}/status`, 'utf8');
  const field = (name: string): number => {
    const m = new RegExp(`^${name}:\\s+(\\d+) kB`, 'm').exec(status);
    if (!m) throw new Error(`no ${name} in /proc/${pid}/status`);
    return Number(m[1]);
  };
  return { rss: field('VmRSS'), hwm: field('VmHWM') };
}

/**
 * The extension host among code-server's processes: the process of group `group` whose
 * command line has `--type=extensionHost` (VS Code's server forks it so), the latest
 * started when there are several.
 */
function extensionHostPid(group: number): number | undefined {
  let found: { pid: number; start: number } | undefined;
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const stat = readFileSync(`/proc/${name}/stat`, 'utf8');
      // The fields after "(command)": state, ppid, pgrp, ...; the start time is the 22nd field of the line.
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      if (Number(fields[2]) !== group) continue;
      if (!readFileSync(`/proc/${name}/cmdline`, 'utf8').split('\0').includes('--type=extensionHost')) continue;
      const start = Number(fields[19]);
      if (!found || start > found.start) found = { pid: Number(name), start };
    } catch {
      // The process ended while it was read.
    }
  }
  return found?.pid;
}

/**
 * Busy processor time (s) of the whole machine, and of this process with every process it
 * started (their children that ended included), from /proc/stat and /proc/<pid>/stat in
 * Linux's clock ticks of 1/100 s.
 */
function cpuSeconds(): { machine: number; ours: number } {
  const TICK = 100;
  const total = (readFileSync('/proc/stat', 'utf8').split('\n')[0] as string).trim().split(/\s+/).slice(1).map(Number);
  // user, nice, system, irq, softirq: not idle, I/O wait or time taken by the hypervisor.
  const machine = [0, 1, 2, 5, 6].reduce((sum, k) => sum + (total[k] ?? 0), 0) / TICK;
  const children = new Map<number, number[]>();
  const ticks = new Map<number, number>();
  for (const name of readdirSync('/proc')) {
    if (!/^\d+$/.test(name)) continue;
    try {
      const stat = readFileSync(`/proc/${name}/stat`, 'utf8');
      // After "(command)": state, ppid, ... utime, stime, cutime, cstime are the 12th to 15th.
      const f = stat
        .slice(stat.lastIndexOf(')') + 2)
        .split(' ')
        .map(Number);
      const ppid = f[1] as number;
      children.set(ppid, [...(children.get(ppid) ?? []), Number(name)]);
      ticks.set(Number(name), (f[11] as number) + (f[12] as number) + (f[13] as number) + (f[14] as number));
    } catch {
      // The process ended while it was read.
    }
  }
  let ours = 0;
  const todo = [process.pid];
  for (let pid = todo.pop(); pid !== undefined; pid = todo.pop()) {
    ours += ticks.get(pid) ?? 0;
    todo.push(...(children.get(pid) ?? []));
  }
  return { machine, ours: ours / TICK };
}

/** Resolves after `ms` (the part polls the extension host's memory; no test waits on time). */
const pause = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

/** Waits (up to 10 s) until no process of group `group` is left, so nothing of the workbench outlives the part. */
async function groupGone(group: number): Promise<void> {
  const deadline = Date.now() + 10_000;
  const alive = (): boolean =>
    readdirSync('/proc').some((name) => {
      if (!/^\d+$/.test(name)) return false;
      try {
        const stat = readFileSync(`/proc/${name}/stat`, 'utf8');
        const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
        // A zombie (state Z) has ended; its parent has yet to collect it.
        return Number(fields[2]) === group && fields[0] !== 'Z';
      } catch {
        return false;
      }
    });
  while (alive()) {
    if (Date.now() > deadline) {
      console.error(`editor part: processes of code-server's group ${group} are still there after 10 s`);
      return;
    }
    await pause(100);
  }
}

/** Waits until the extension host exists and its resident set has settled; returns its pid. */
async function settledHost(group: number): Promise<number> {
  const deadline = Date.now() + STEP_MS;
  let pid: number | undefined;
  let last = -Infinity;
  for (;;) {
    pid ??= extensionHostPid(group);
    if (pid !== undefined) {
      const rss = memoryOf(pid).rss;
      if (Math.abs(rss - last) < SETTLE_KIB) return pid;
      last = rss;
    }
    if (Date.now() > deadline) throw new Error(pid === undefined ? "no extension host among code-server's processes" : "the extension host's memory did not settle");
    await pause(SETTLE_MS);
  }
}

/**
 * Runs inside the panel's frame: resolves once the root shows a run newer than
 * `previousRunId` with the chosen df's badge, its curve in the data figure (whose caption
 * names that df) and its dot marked in the error figure, and the browser has painted after
 * that (two animation frames), and the chosen df's residual details have been shown and
 * painted too. Meanwhile it notes the progress texts and when the result message arrived.
 * Times are the browser's wall clock (Date.now(), performance.timeOrigin), the same clock
 * as this process's.
 */
const WATCH_PANEL = `(previousRunId) => new Promise((resolve) => {
  const root = document.getElementById('knotwise-root');
  const progress = [];
  let lastText = '';
  let result;
  let built = 0;
  // This listener runs after the panel's own (listeners of one target run in the order they were
  // added); the event's time stamp says when the message's task began, before the panel handled it.
  const onMessage = (e) => {
    if (e.data && e.data.type === 'result') result = { at: performance.timeOrigin + e.timeStamp, data: e.data };
  };
  window.addEventListener('message', onMessage);
  const drawn = () => {
    const df = root.dataset.chosenDf;
    if (root.dataset.state !== 'ready' || !(Number(root.dataset.runId) > previousRunId) || !df) return false;
    const badge = document.getElementById('kw-chosen-df');
    const curve = document.querySelector('#fig-data path.kw-curve');
    const caption = document.querySelector('#fig-data figcaption');
    const dot = document.querySelector('#fig-error .kw-chosen[data-df="' + df + '"]');
    return !!badge && badge.textContent === 'df ' + df && !!curve && (curve.getAttribute('d') || '').length > 0 && !!caption && caption.textContent.includes('(df ' + df + ')') && !!dot;
  };
  // The residual details of the chosen df are in: the answer's fit statistics come with them.
  const checked = () => {
    const stats = document.getElementById('kw-fit-stats');
    return !!stats && stats.textContent.startsWith('residual SD');
  };
  // Each moment counts once the browser has painted after it (two animation frames).
  let drawnAt = 0;
  let checkedAt = 0;
  let drawnAsked = false;
  let checkedAsked = false;
  const painted = (set) => requestAnimationFrame(() => requestAnimationFrame(() => {
    set(Date.now());
    if (drawnAt && checkedAt) done();
  }));
  const check = () => {
    const status = root.querySelector('#kw-status');
    const text = status ? status.textContent : '';
    if (text && text !== lastText && root.dataset.state !== 'ready') progress.push({ at: Date.now(), text });
    lastText = text;
    if (!built && root.dataset.state === 'ready' && Number(root.dataset.runId) > previousRunId) built = Date.now();
    if (!drawn()) return;
    if (!drawnAsked) {
      drawnAsked = true;
      painted((at) => { drawnAt = at; });
    }
    if (!checkedAsked && checked()) {
      checkedAsked = true;
      painted((at) => { checkedAt = at; });
    }
  };
  const done = () => {
    observer.disconnect();
    window.removeEventListener('message', onMessage);
    resolve({
      drawn: drawnAt,
      checked: checkedAt,
      pageCreated: performance.timeOrigin,
      progress,
      resultIn: result ? result.at : 0,
      resultBytes: result ? new Blob([JSON.stringify(result.data)]).size : 0,
      built,
      chosenDf: Number(root.dataset.chosenDf),
      runId: Number(root.dataset.runId),
    });
  };
  const observer = new MutationObserver(check);
  observer.observe(root, { subtree: true, childList: true, attributes: true, characterData: true });
  check();
})`;

interface Watched {
  readonly drawn: number;
  readonly checked: number;
  readonly pageCreated: number;
  readonly progress: { at: number; text: string }[];
  readonly resultIn: number;
  readonly resultBytes: number;
  readonly built: number;
  readonly chosenDf: number;
  readonly runId: number;
}

/** The frame of a Knotwise panel not seen before (a webview sits two frames deep; its root marks it). */
async function newPanelFrame(page: Page, seen: ReadonlySet<Frame>): Promise<Frame> {
  const deadline = Date.now() + STEP_MS;
  while (Date.now() < deadline) {
    for (const f of page.frames()) {
      if (seen.has(f) || f.isDetached()) continue;
      if (await f.$('#knotwise-root').catch(() => null)) return f;
    }
    await page.waitForTimeout(50);
  }
  throw new Error(`no Knotwise panel within ${STEP_MS / 1000} s of the last pick`);
}

/** Why the workbench cannot be measured here, or undefined when it can. */
function missing(wb: typeof Workbench): string | undefined {
  if (process.platform !== 'linux') return "the extension host's memory is read from /proc, which only Linux has";
  if (!wb.codeServerInstalled()) return 'code-server 4.100.3 is not installed (bash scripts/e2e-install.sh installs it into .e2e/cs)';
  if (!wb.chromiumInstalled()) return 'no Chromium (apt-get install chromium, or set KNOTWISE_CHROMIUM)';
  if (!existsSync(join(wb.repoRoot, 'dist', 'extension.js')) || !existsSync(join(wb.repoRoot, 'dist', 'webview', 'main.js'))) return 'the extension is not built (npm run build)';
  return undefined;
}

/**
 * Measures the panel for `rows` readings in the workbench: up to RUNS runs (another only
 * while the part stays within BUDGET_MS), each in a new panel (the panel is closed, then the
 * file right-clicked and the columns picked again), and the extension host's memory around
 * the first. Everything it started is stopped before it returns, also on failure or an
 * interrupt; the run folder is removed after a measured run and kept after a failed one.
 */
export async function measureEditorPanel(repo: string, rows: number): Promise<EditorMeasure> {
  let wb: typeof Workbench;
  try {
    wb = (await import(pathToFileURL(join(repo, 'scripts', 'e2e-workbench.mjs')).href)) as typeof Workbench;
  } catch (err) {
    return { measured: false, why: `the workbench scripts did not load (npm ci installs playwright-core): ${String(err).split('\n')[0]}` };
  }
  const why = missing(wb);
  if (why) return { measured: false, why };
  const started = Date.now();
  const runDir = wb.freshRunDir('bench-editor');
  const workspace = join(runDir, 'workspace');
  mkdirSync(workspace, { recursive: true });
  let server: Workbench.CodeServer | undefined;
  let browser: Workbench.LaunchedChromium | undefined;
  const stopAll = async (): Promise<void> => {
    await browser?.close();
    await server?.stop();
    if (server) await groupGone(server.pid);
  };
  const interrupted = (): void => {
    void stopAll().finally(() => process.exit(130));
  };
  process.once('SIGINT', interrupted);
  process.once('SIGTERM', interrupted);
  let failed = true;
  try {
    writeBenchCsv(join(workspace, FILE), rows);
    const codeServer = (JSON.parse(readFileSync(join(repo, '.e2e', 'cs', 'node_modules', 'code-server', 'package.json'), 'utf8')) as { version: string }).version;
    // The editor's defaults: only the set-up's own settings (no trust prompt, no start page, no telemetry).
    server = await wb.startCodeServer({ runDir });
    browser = await wb.launchChromium({ viewport: { width: 1500, height: 950 } });
    const page = browser.page;
    page.setDefaultTimeout(STEP_MS);
    const chromium = /HeadlessChrome\/(\d+)/.exec((await page.evaluate('navigator.userAgent')) as string)?.[1] ?? '?';
    await page.goto(server.workbenchUrl(workspace, [['extensionDevelopmentPath', server.remotePath(wb.repoRoot)]]));
    await page.getByRole('treeitem', { name: FILE }).waitFor();
    const host = await settledHost(server.pid);
    // The peak from now on: clear_refs 5 sets the high-water mark to the resident set now (Linux 4.0 and later).
    let peakSince: 'reset' | 'start' = 'reset';
    try {
      writeFileSync(`/proc/${host}/clear_refs`, '5');
    } catch {
      peakSince = 'start';
    }
    const before = memoryOf(host);
    const cpuBefore = cpuSeconds();
    const wallBefore = Date.now();
    const runs: EditorRun[] = [];
    const seen = new Set<Frame>();
    let runId = 0;
    let firstPeak = 0;
    let firstAfter = 0;
    for (let k = 0; k < RUNS; k++) {
      const t = Date.now();
      if (k > 0) {
        // Another run only while the whole part stays within its budget (a run takes about as long as the one before).
        const last = runs[runs.length - 1] as EditorRun;
        if (t - started + (last.drawn + 10) * 1000 > BUDGET_MS) break;
        await closeAllEditors(page);
      }
      await tuneFromExplorer(page, FILE);
      const picked = await pickCurveColumns(page, FILE, 'x', 'y');
      const frame = await newPanelFrame(page, seen);
      seen.add(frame);
      const w = (await frame.evaluate(`(${WATCH_PANEL})(${runId})`)) as Watched;
      runId = w.runId;
      if (k === 0) {
        const m = memoryOf(host);
        firstPeak = m.hwm;
        firstAfter = m.rss;
      }
      const s = (at: number): number => (at - picked) / 1000;
      runs.push({
        drawn: s(w.drawn),
        checked: s(w.checked),
        pageCreated: s(w.pageCreated),
        progress: w.progress.map((p) => ({ at: s(p.at), text: p.text })),
        resultIn: w.resultIn ? s(w.resultIn) : NaN,
        resultBytes: w.resultBytes,
        built: s(w.built),
        chosenDf: w.chosenDf,
      });
    }
    const peakAll = memoryOf(host).hwm;
    const cpuAfter = cpuSeconds();
    const otherCores = Math.max(0, cpuAfter.machine - cpuBefore.machine - (cpuAfter.ours - cpuBefore.ours)) / ((Date.now() - wallBefore) / 1000);
    const blocked = browser.blocked.length;
    if (blocked > 0) throw new Error(`${blocked} requests tried to leave 127.0.0.1: ${browser.blocked.slice(0, 3).join(', ')}`);
    failed = false;
    return {
      measured: true,
      codeServer,
      chromium,
      runs,
      hostBefore: before.rss,
      hostPeakFirst: firstPeak,
      hostAfterFirst: firstAfter,
      hostPeakAll: peakAll,
      peakSince,
      otherCores,
      cores: cpus().length,
    };
  } catch (err) {
    if (browser) await browser.page.screenshot({ path: join(runDir, 'failure.png') }).catch(() => undefined);
    console.error(`editor part: ${err instanceof Error ? (err.stack ?? err.message) : String(err)}\n(run folder kept: ${runDir})`);
    return { measured: false, why: `the run failed: ${(err instanceof Error ? err.message : String(err)).split('\n')[0]}` };
  } finally {
    await stopAll();
    process.removeListener('SIGINT', interrupted);
    process.removeListener('SIGTERM', interrupted);
    if (!failed) rmSync(runDir, { recursive: true, force: true });
  }
}
