import { basisFromSpec } from '../basis/naturalSpline';
import type { BasisSpec } from '../basis/rowBasis';
import type { DesignRows } from '../stats/design';
import { designCrossProducts, type DesignCrossProducts } from '../stats/designCrossProducts';
import { sharedCopy } from '../sharedMemory';
import { sparseRowsInXOrder } from './designRows';

/**
 * The cross products the residual checks' design tests need (Durbin-Watson, Breusch-Pagan;
 * core/stats/designCrossProducts.ts), summed on a helper thread while the asking thread
 * runs the other checks (core/analysis/diagnose.ts diagnoseAside). The arrays are in
 * shared memory, so posting the job copies nothing. The job is posted before the residuals
 * are known, so that the helper builds the basis meanwhile; it then waits until the asking
 * thread has written `residuals` and set `ready[0]` to 1 (-1: not wanted after all), and
 * makes the call `diagnose` makes on the same values, so the checks are the same to the
 * last bit.
 */
export interface DesignSumsJob {
  /** The basis (RowBasis.spec), built again on the helper thread. */
  readonly spec: BasisSpec;
  /** The null-space map E of the model's columns (RowBasisCurve.sparseDesign), if any. */
  readonly expand: Float64Array | undefined;
  /** Number of model columns. */
  readonly p: number;
  /** x sorted ascending, the order of the rows. */
  readonly xSorted: Float64Array;
  /** sqrt(w) in the same order, for weighted fits. */
  readonly rootW: Float64Array | undefined;
  /** The scaled residuals in x order, written by the asking thread after posting. */
  readonly residuals: Float64Array;
  /** ready[0]: 0 while the residuals are being written, 1 when they are there, -1 when the sums are not wanted. */
  readonly ready: Int32Array;
}

/** A helper that sums a DesignSumsJob on another thread (core/node/pool.ts workerRunner with `lend`). */
export interface ChecksAside {
  /** Starts the job; the promise gives the sums (undefined when the job was abandoned or the helper failed). Undefined when no thread is free. */
  designSums(job: DesignSumsJob): Promise<DesignCrossProducts | undefined> | undefined;
}

/** A job for `n` = xSorted.length rows, with x and sqrt(w) in shared memory (copied there if they are not) and room for the residuals. */
export function designSumsJob(spec: BasisSpec, expand: Float64Array | undefined, p: number, xSorted: Float64Array, rootW: Float64Array | undefined): DesignSumsJob {
  return {
    spec,
    expand,
    p,
    xSorted: sharedCopy(xSorted),
    rootW: rootW && sharedCopy(rootW),
    residuals: new Float64Array(new SharedArrayBuffer(8 * xSorted.length)),
    ready: new Int32Array(new SharedArrayBuffer(4)),
  };
}

/** Tells the helper that the residuals are written. */
export function releaseDesignSums(job: DesignSumsJob): void {
  Atomics.store(job.ready, 0, 1);
  Atomics.notify(job.ready, 0);
}

/** Tells the helper that the sums are not wanted (the fit leaves nothing to test, or the checks failed); a released job stays released. */
export function abandonDesignSums(job: DesignSumsJob): void {
  Atomics.compareExchange(job.ready, 0, 0, -1);
  Atomics.notify(job.ready, 0);
}

/** The helper thread's side: the sums once the residuals are ready; undefined when the job is abandoned. Blocks its thread while it waits. */
export function sumDesign(job: DesignSumsJob): DesignCrossProducts | undefined {
  const basis = basisFromSpec(job.spec);
  const sparse = sparseRowsInXOrder({ size: basis.size, width: basis.width, expand: job.expand, row: (x, out) => basis.row(x, out) }, job.xSorted, job.rootW);
  const design: DesignRows = {
    p: job.p,
    sparse,
    row(): void {
      throw new Error('the design sums read the sparse rows only');
    },
  };
  Atomics.wait(job.ready, 0, 0);
  if (Atomics.load(job.ready, 0) !== 1) return undefined;
  // The call durbinWatsonAndBreuschPagan makes (core/stats/designTests.ts).
  return designCrossProducts(design, job.xSorted.length, { squaresOf: job.residuals, differences: true });
}
