/**
 * Worker-thread entry: builds a ResampleEngine from the posted problem and evaluates the
 * resample indices it is given, posting each resample's errors as soon as it is done. The
 * job is the worker's start data, or its first message when it was started ahead of it.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { ResampleEngine, type ResampleProblem } from '../tune/engine';

interface Job {
  readonly problem: ResampleProblem;
  readonly indices: readonly number[];
}

function work(job: Job): void {
  try {
    const engine = new ResampleEngine(job.problem);
    for (const r of job.indices) {
      const errors = new Float64Array(engine.outputLength);
      engine.run(r, errors);
      parentPort?.postMessage({ type: 'resample', r, errors }, [errors.buffer]);
    }
    parentPort?.postMessage({ type: 'done' });
  } catch (e) {
    parentPort?.postMessage({ type: 'error', message: (e as Error).message });
  }
}

// The job comes with the worker's start, or later as messages: a worker started early takes
// its first job that way, and a worker of a standing pool (poolRunner) takes one job after another.
if (workerData) work(workerData as Job);
else parentPort?.on('message', (job: Job) => work(job));
