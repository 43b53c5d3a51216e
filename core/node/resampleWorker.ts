/**
 * Worker-thread entry: builds a ResampleEngine from the posted problem and evaluates the
 * resample indices it is given, posting each resample's errors as soon as it is done.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { ERRORS_PER_CANDIDATE, ResampleEngine, type ResampleProblem } from '../tune/engine';

interface Job {
  readonly problem: ResampleProblem;
  readonly indices: readonly number[];
}

const job = workerData as Job;
try {
  const engine = new ResampleEngine(job.problem);
  for (const r of job.indices) {
    const errors = new Float64Array(engine.size * ERRORS_PER_CANDIDATE);
    engine.run(r, errors);
    parentPort?.postMessage({ type: 'resample', r, errors }, [errors.buffer]);
  }
  parentPort?.postMessage({ type: 'done' });
} catch (e) {
  parentPort?.postMessage({ type: 'error', message: (e as Error).message });
}
