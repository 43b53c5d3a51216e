import { availableParallelism } from 'node:os';
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { Worker } from 'node:worker_threads';
import { CancelledError, isAllocationFailure } from '../errors';
import { ResampleEngine, type ResampleProblem, sharedRows } from '../tune/engine';
import { inlineRunner, type ResampleRunner } from '../tune/tune';
import { sharedCopy } from '../sharedMemory';
import type { ChecksAside, DesignSumsJob } from '../analysis/designSums';
import type { DesignCrossProducts } from '../stats/designCrossProducts';
import type { Progress } from '../tune/types';

const EMPTY = new Float64Array(0);

/** Below this many row-resamples the thread start-up costs more than it saves. */
const INLINE_BELOW = 200_000;
/** How often cancellation is polled while workers run (ms). */
const CANCEL_POLL_MS = 50;

/** Path of the worker script: the bundled one next to the CLI/extension, or the TypeScript source under tsx. */
function workerScript(): { file: string; execArgv: string[] } {
  const bundled = join(__dirname, 'resampleWorker.js');
  if (existsSync(bundled)) return { file: bundled, execArgv: [] };
  // tsx's CommonJS hook: with `--import tsx` a worker cannot load its .ts entry on Node 20
  // (ERR_UNKNOWN_FILE_EXTENSION, tsx issue #354); the project is CommonJS, so --require works.
  return { file: join(__dirname, 'resampleWorker.ts'), execArgv: ['--require', 'tsx/cjs'] };
}

/**
 * Runs resamples in worker threads (one per core, at most `threads`), each taking the next
 * resample index from a shared counter, so that all finish together. Each resample's errors
 * depend only on (seed, resample index), so results are identical to the inline runner.
 * With `mainThreadShare` this thread is one of the `threads` and resamples too, between
 * its other events (the command line, whose thread would otherwise wait: one thread fewer
 * to start and to hold in memory; the editor's host keeps its thread free). Progress is
 * reported per finished resample; when `progress.cancelled()` turns true the workers are
 * terminated and the promise rejects with CancelledError. Small problems run inline.
 * warm() starts the workers ahead of a run (startWorkersEarly), e.g. while columns are picked.
 * With `lend` one worker stays after a run that went well (idle, not keeping the process
 * alive) for the residual checks' design sums (designSums, core/analysis/designSums.ts) and
 * the next run; without it, or when none stayed, designSums lends nothing.
 */
export function workerRunner(threads = availableParallelism(), options: { readonly mainThreadShare?: boolean; readonly lend?: boolean } = {}): ResampleRunner & ChecksAside {
  // The worker kept after the last run, when lending.
  let kept: Worker | undefined;
  const keep = (w: Worker): void => {
    w.unref();
    // An idle worker that fails is dropped.
    w.once('error', () => {
      if (kept === w) kept = undefined;
    });
    kept = w;
  };
  const takeKept = (): Worker | undefined => {
    const w = kept;
    kept = undefined;
    w?.removeAllListeners('error');
    return w;
  };
  return {
    designSums(job: DesignSumsJob): Promise<DesignCrossProducts | undefined> | undefined {
      const worker = takeKept();
      if (!worker) return undefined;
      return new Promise((resolve) => {
        // A failed helper gives no sums: the checks then sum them on their own thread.
        const settle = (sums: DesignCrossProducts | undefined, healthy: boolean): void => {
          worker.off('message', onMessage);
          worker.off('error', onError);
          if (healthy) keep(worker);
          else retire(worker);
          resolve(sums);
        };
        const onMessage = (m: { type: string; sums?: DesignCrossProducts | null }): void => {
          if (m.type === 'design-sums') settle(m.sums ?? undefined, true);
          else if (m.type === 'error') settle(undefined, false);
        };
        const onError = (): void => settle(undefined, false);
        worker.ref();
        worker.on('message', onMessage);
        worker.on('error', onError);
        worker.postMessage({ designSums: job });
      });
    },
    warm() {
      startWorkersEarly(options.mainThreadShare === true ? threads - 1 : threads);
    },
    async run(problem: ResampleProblem, count: number, progress?: Progress): Promise<Float64Array[]> {
      const engines = Math.max(1, Math.min(threads, count));
      if (engines === 1 || problem.x.length * count < INLINE_BELOW) return inlineRunner.run(problem, count, progress);
      const onMain = options.mainThreadShare === true;
      const { file, execArgv } = workerScript();
      // The rows once in shared memory, so every worker reads the same bytes instead of a copy of its own;
      // the power-sum path's rows grouped by cell are prepared here once for all of them.
      const rows = problem.rows ?? sharedRows(problem);
      const shared: ResampleProblem = {
        ...problem,
        // With the prepared rows the workers read neither x nor y.
        x: rows ? EMPTY : sharedCopy(problem.x),
        y: rows ? EMPTY : sharedCopy(problem.y),
        w: problem.w && sharedCopy(problem.w),
        order: sharedCopy(problem.order),
        rows,
      };
      // The next resample index to take, shared by every thread that resamples.
      const next = new Int32Array(new SharedArrayBuffer(4));
      const results: Float64Array[] = new Array(count);
      let done = 0;
      const pool: Worker[] = [];
      return await new Promise<Float64Array[]>((resolve, reject) => {
        let settled = false;
        const finish = (err?: Error): void => {
          if (settled) return;
          settled = true;
          clearInterval(timer);
          for (const w of pool) {
            w.removeAllListeners('message');
            w.removeAllListeners('error');
            if (!err && options.lend === true && !kept) keep(w);
            else retire(w);
          }
          if (err) reject(err);
          else resolve(results);
        };
        const finished = (r: number, errors: Float64Array): void => {
          results[r] = errors;
          done++;
          progress?.report(done, count, `resample ${done} of ${count}`);
          if (done === count) finish();
        };
        const timer = setInterval(() => {
          if (progress?.cancelled()) finish(new CancelledError());
        }, CANCEL_POLL_MS);
        for (let k = onMain ? 1 : 0; k < engines; k++) {
          const worker = takeKept() ?? takeStarted() ?? new Worker(file, { execArgv });
          worker.ref();
          worker.postMessage({ problem: shared, next, count });
          pool.push(worker);
          worker.on('message', (m: { type: string; r?: number; errors?: Float64Array; message?: string }) => {
            if (m.type === 'resample') finished(m.r as number, m.errors as Float64Array);
            else if (m.type === 'error') {
              // Memory a worker could not get is the same condition as on the main thread (the pipeline says how many rows).
              const text = m.message ?? '';
              finish(isAllocationFailure(new RangeError(text)) ? new RangeError(text) : new Error(`resampling worker failed: ${text}`));
            }
          });
          worker.on('error', (e) => finish(e));
        }
        if (onMain) {
          // One resample at a time, then the events (workers' results, cancellation) get their turn.
          const engine = new ResampleEngine(shared);
          const step = (): void => {
            if (settled) return;
            const r = Atomics.add(next, 0, 1);
            if (r >= count) return;
            try {
              const errors = new Float64Array(engine.outputLength);
              engine.run(r, errors);
              finished(r, errors);
            } catch (e) {
              finish(e as Error);
              return;
            }
            setImmediate(step);
          };
          setImmediate(step);
        }
      });
    },
  };
}

/** Ends a worker; whatever it reports while it ends is no news. */
function retire(w: Worker): void {
  w.on('error', () => undefined);
  void w.terminate();
}

/** Workers started ahead of their job (startWorkersEarly), idle until a run takes them. */
const started: Worker[] = [];

function takeStarted(): Worker | undefined {
  return started.pop();
}

/**
 * Starts `count` resampling workers now, so that loading their code overlaps the reading and
 * fitting that come before the resampling; a run takes them instead of starting its own.
 * Idle workers do not keep the process alive. Example: startWorkersEarly() at the start of
 * a tuning command.
 */
export function startWorkersEarly(count = availableParallelism()): void {
  const { file, execArgv } = workerScript();
  while (started.length < count) {
    const w = new Worker(file, { execArgv });
    w.unref();
    // A started worker that fails before it has a job is dropped; a run then starts its own.
    w.on('error', () => {
      const at = started.indexOf(w);
      if (at >= 0) started.splice(at, 1);
    });
    started.push(w);
  }
}

/** A resample runner whose workers stay up between runs, and that ends them when closed. */
export interface StandingRunner extends ResampleRunner {
  close(): void;
}

/**
 * A runner for many small problems (the groups of a grouped fit): `threads` workers started
 * once and kept, each run given whole to the next free worker (the runs of several groups
 * then proceed side by side while the main thread fits and checks other groups). Results
 * are those of the inline runner (each resample depends only on seed and index). Every run
 * goes to a worker, in the order asked; a cancelled or failed run's worker is replaced.
 * close() ends the workers; runs after it throw.
 * Example: const r = poolRunner(); try { await analyseGroups(groups, opts, false, r); } finally { r.close(); }
 */
export function poolRunner(threads = availableParallelism()): StandingRunner {
  const { file, execArgv } = workerScript();
  const idle: Worker[] = [];
  const all: Worker[] = [];
  const waiting: ((w: Worker) => void)[] = [];
  let closed = false;
  for (let k = 0; k < Math.max(1, threads); k++) {
    const w = takeStarted() ?? new Worker(file, { execArgv });
    w.unref();
    all.push(w);
    idle.push(w);
  }
  const acquire = (): Promise<Worker> => {
    const w = idle.pop();
    return w ? Promise.resolve(w) : new Promise((resolve) => waiting.push(resolve));
  };
  const release = (w: Worker): void => {
    const next = waiting.shift();
    if (next) next(w);
    else idle.push(w);
  };
  return {
    async run(problem, count, progress) {
      if (closed) throw new Error('poolRunner: run after close');
      const worker = await acquire();
      const results: Float64Array[] = new Array(count);
      let done = 0;
      try {
        await new Promise<void>((resolve, reject) => {
          const timer = setInterval(() => {
            if (progress?.cancelled()) stop(new CancelledError());
          }, CANCEL_POLL_MS);
          const onMessage = (m: { type: string; r?: number; errors?: Float64Array; message?: string }): void => {
            if (m.type === 'resample') {
              results[m.r as number] = m.errors as Float64Array;
              done++;
              progress?.report(done, count, `resample ${done} of ${count}`);
            } else if (m.type === 'done') stop();
            else if (m.type === 'error') {
              const text = m.message ?? '';
              stop(isAllocationFailure(new RangeError(text)) ? new RangeError(text) : new Error(`resampling worker failed: ${text}`));
            }
          };
          const onError = (e: Error): void => stop(e);
          function stop(err?: Error): void {
            clearInterval(timer);
            worker.off('message', onMessage);
            worker.off('error', onError);
            if (err) reject(err);
            else resolve();
          }
          worker.ref();
          worker.on('message', onMessage);
          worker.on('error', onError);
          worker.postMessage({ problem, indices: Array.from({ length: count }, (_, r) => r) });
        });
      } catch (e) {
        // A cancelled or failed job leaves the worker busy or broken: end it and start a fresh one.
        void worker.terminate();
        const fresh = new Worker(file, { execArgv });
        fresh.unref();
        all[all.indexOf(worker)] = fresh;
        release(fresh);
        throw e;
      }
      worker.unref();
      release(worker);
      return results;
    },
    close() {
      closed = true;
      for (const w of all) void w.terminate();
    },
  };
}
