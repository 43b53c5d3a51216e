/**
 * Worker-thread entry: builds a ResampleEngine from the posted problem and evaluates the
 * resample indices it is given or takes from a shared counter, posting each resample's errors as soon as it is done. The
 * job is the worker's start data, or its first message when it was started ahead of it.
 * A worker lent after a run (core/node/pool.ts) also sums the residual checks' design cross
 * products (core/analysis/designSums.ts), posting them as 'design-sums'.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { type DesignSumsJob, sumDesign } from '../analysis/designSums';
import { ResampleEngine, type ResampleProblem } from '../tune/engine';

/** A job: the resamples listed in `indices`, or those taken one by one from the shared counter `next` while below `count`. */
type Job = { readonly problem: ResampleProblem } & ({ readonly indices: readonly number[] } | { readonly next: Int32Array; readonly count: number });

function work(job: Job | { readonly designSums: DesignSumsJob }): void {
  if ('designSums' in job) {
    try {
      parentPort?.postMessage({ type: 'design-sums', sums: sumDesign(job.designSums) ?? null });
    } catch (e) {
      parentPort?.postMessage({ type: 'error', message: (e as Error).message });
    }
    return;
  }
  try {
    const engine = new ResampleEngine(job.problem);
    const take = 'indices' in job ? listed(job.indices) : shared(job.next, job.count);
    for (let r = take(); r >= 0; r = take()) {
      const errors = new Float64Array(engine.outputLength);
      engine.run(r, errors);
      parentPort?.postMessage({ type: 'resample', r, errors }, [errors.buffer]);
    }
    parentPort?.postMessage({ type: 'done' });
  } catch (e) {
    parentPort?.postMessage({ type: 'error', message: (e as Error).message });
  }
}

function listed(indices: readonly number[]): () => number {
  let k = 0;
  return () => (k < indices.length ? (indices[k++] as number) : -1);
}

function shared(next: Int32Array, count: number): () => number {
  return () => {
    const r = Atomics.add(next, 0, 1);
    return r < count ? r : -1;
  };
}

// The job comes with the worker's start, or later as messages: a worker started early takes
// its first job that way, and a worker of a standing pool (poolRunner) takes one job after another.
if (workerData) work(workerData as Job);
else parentPort?.on('message', (job: Job | { readonly designSums: DesignSumsJob }) => work(job));
