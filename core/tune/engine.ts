import { prepareData } from '../fit/prepared';
import { weightedMean } from '../stats/weightedMean';
import type { OutcomeFamily } from '../fit/glm';
import { isPlainModel } from '../fit/model';
import { accumulateRow, type Cells, SUMS_PER_CELL } from '../fit/powerSums/cells';
import type { SplineFromSums } from '../fit/powerSums/splineSums';
import { curveKind, resolveModel, type Trainer, type TrainerSet } from '../registry/curves/index';
import { resamplingScheme, type DrawState } from '../registry/resampling/index';
import type { CurveKindId, ModelOptions } from '../types';
import type { ResampleSpec } from './types';

/** Everything a worker needs to evaluate resamples; plain data, so it can be posted to a thread. */
export interface ResampleProblem {
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly w?: Float64Array | undefined;
  readonly kind: CurveKindId;
  /** Candidate df that can be fitted to all tuning rows. */
  readonly dfs: readonly number[];
  /** Per-candidate numbers from the full fits that the kind's trainers need (the smoothing spline's lambdaScaled: lambda for x mapped to [0, 1] over the range of x). */
  readonly params?: readonly number[] | undefined;
  /** A scheme that draws resamples (bootstrap, folds). */
  readonly resample: ResampleSpec;
  readonly seed: number;
  /** Row indices in x order (for stratified folds). */
  readonly order: Int32Array;
  /** Outcome family, shape constraints, robust fitting (absent: plain least squares). */
  readonly model?: ModelOptions | undefined;
}

/**
 * Number of error values per candidate and resample: RMSE, MAE, maximum absolute error,
 * mean deviance (Poisson/binomial unit deviance, or squared error for a Gaussian outcome).
 */
export const ERRORS_PER_CANDIDATE = 4;

/**
 * Evaluates resamples for all candidates of one curve kind. The same resamples serve every
 * candidate. For natural splines one pass of per-cell power sums per resample serves all
 * candidates (docs/design.md, "Power sums"); k-fold training sums are total minus fold. Other kinds
 * refit from the weighted rows (their trainers come from core/registry/curves/); the rows
 * of each resample come from the resampling scheme (core/registry/resampling/). y is centred and scaled first so the
 * power-sum subtraction keeps its digits; errors are scaled back.
 */
export class ResampleEngine {
  private readonly n: number;
  private readonly yc: Float64Array;
  private readonly ymean: number;
  private readonly yscale: number;
  private readonly cells: Cells | undefined;
  private readonly trainers: Trainer[];
  /** Natural-spline candidates fitted from power sums (the fast path), parallel to trainers. */
  private readonly models: SplineFromSums[] | undefined;
  private readonly weights: Float64Array;
  private readonly testIdx: Int32Array;
  private readonly sums: Float64Array | undefined;
  private readonly testSums: Float64Array | undefined;
  /** What the resampling scheme fills for each resample (core/registry/resampling/). */
  private readonly drawState: DrawState;

  constructor(private readonly problem: ResampleProblem) {
    const { x, y, w } = problem;
    const n = x.length;
    this.n = n;
    const { mean, weight: sw } = weightedMean(y, w);
    this.ymean = mean;
    let ss = 0;
    for (let i = 0; i < n; i++) ss += (w ? (w[i] as number) : 1) * ((y[i] as number) - this.ymean) ** 2;
    this.yscale = Math.sqrt(ss / sw) || 1;
    this.yc = new Float64Array(n);
    for (let i = 0; i < n; i++) this.yc[i] = ((y[i] as number) - this.ymean) / this.yscale;
    this.weights = new Float64Array(n);
    this.testIdx = new Int32Array(n);
    const built = this.buildTrainers();
    this.trainers = built.trainers;
    this.cells = built.cells;
    this.models = built.models;
    const cellCount = this.cells ? this.cells.breaks.length - 1 : 0;
    this.sums = this.cells ? new Float64Array(cellCount * SUMS_PER_CELL) : undefined;
    this.testSums = this.cells ? new Float64Array(cellCount * SUMS_PER_CELL) : undefined;
    const cells = this.cells;
    const yc = this.yc;
    this.drawState = {
      n,
      seed: problem.seed,
      order: problem.order,
      w,
      weights: this.weights,
      testIdx: this.testIdx,
      powerSums:
        cells && this.sums && this.testSums
          ? { train: this.sums, test: this.testSums, add: (target, i, wi) => accumulateRow(target, cells.cell[i] as number, cells.t[i] as number, yc[i] as number, wi) }
          : undefined,
      scratch: {},
    };
  }

  private buildTrainers(): TrainerSet {
    const { x, kind, dfs } = this.problem;
    const plain = isPlainModel(this.problem.model);
    return curveKind(kind).trainers({
      prepared: prepareData({ x, y: this.yc, w: this.problem.w }),
      x,
      yc: this.yc,
      y: this.problem.y,
      w: this.problem.w,
      dfs,
      params: this.problem.params,
      // Outcomes, shapes, robust fits: the kind refits on weighted rows (the power sums need plain least squares).
      model: plain ? undefined : resolveModel(kind, this.problem.model),
      ymean: this.ymean,
      yscale: this.yscale,
    });
  }

  /** Number of candidates. */
  get size(): number {
    return this.trainers.length;
  }

  /**
   * Errors of resample r for every candidate: out[k] RMSE, out[C + k] MAE, out[2C + k]
   * maximum absolute error (NaN when candidate k is rank deficient in this resample).
   */
  run(r: number, out: Float64Array): void {
    const spec = this.problem.resample;
    const scheme = resamplingScheme(spec);
    if (!scheme.draw) throw new Error(`resampling ${scheme.id} has no resamples`);
    const nTest = scheme.draw(spec, r, this.drawState);
    const { weights, testIdx } = this;
    const w = this.problem.w;
    const C = this.trainers.length;
    let wTest = 0;
    for (let j = 0; j < nTest; j++) wTest += w ? (w[testIdx[j] as number] as number) : 1;
    for (let k = 0; k < C; k++) {
      const tr = this.trainers[k] as Trainer;
      if (nTest === 0 || !tr.train(weights, this.sums)) {
        out[k] = out[C + k] = out[2 * C + k] = out[3 * C + k] = NaN;
        continue;
      }
      const m = this.models?.[k];
      const acc = m ? this.testErrorsFromCells(m.fitPoly, nTest) : this.testErrors(tr, nTest);
      const sse = m ? m.sse(this.testSums as Float64Array) : acc.sse;
      out[k] = this.yscale * Math.sqrt(sse / wTest);
      out[C + k] = (this.yscale * acc.sae) / wTest;
      out[2 * C + k] = this.yscale * acc.maxAbs;
      // Mean deviance per unit weight of the held-out rows (docs/design.md, "Errors"); Gaussian: mean squared error.
      out[3 * C + k] = tr.scoring ? this.testDeviance(tr, nTest) / wTest : (this.yscale * this.yscale * sse) / wTest;
    }
  }

  private readonly acc = { sae: 0, sse: 0, maxAbs: 0 };

  /** Sum of the outcome family's deviance over the test rows (prior weights included). */
  private testDeviance(tr: Trainer, nTest: number): number {
    const fam = tr.scoring as OutcomeFamily;
    const { testIdx } = this;
    const { y, w } = this.problem;
    let dev = 0;
    for (let j = 0; j < nTest; j++) {
      const i = testIdx[j] as number;
      dev += fam.deviance(y[i] as number, (tr.mean as (i: number) => number)(i), w ? (w[i] as number) : 1);
    }
    return dev;
  }

  /** Absolute and squared errors on the test rows through a trainer's predictions. */
  private testErrors(tr: Trainer, nTest: number): { sae: number; sse: number; maxAbs: number } {
    const { testIdx, yc } = this;
    const w = this.problem.w;
    let sae = 0;
    let sse = 0;
    let maxAbs = 0;
    for (let j = 0; j < nTest; j++) {
      const i = testIdx[j] as number;
      const e = (yc[i] as number) - tr.predict(i);
      const wi = w ? (w[i] as number) : 1;
      const a = Math.abs(e);
      sae += wi * a;
      sse += wi * e * e;
      if (a > maxAbs) maxAbs = a;
    }
    this.acc.sae = sae;
    this.acc.sse = sse;
    this.acc.maxAbs = maxAbs;
    return this.acc;
  }

  /** Absolute errors on the test rows from per-cell cubics (the natural-spline hot path). */
  private testErrorsFromCells(fp: Float64Array, nTest: number): { sae: number; sse: number; maxAbs: number } {
    const { testIdx, yc } = this;
    const cells = this.cells as Cells;
    const cell = cells.cell;
    const tt = cells.t;
    const w = this.problem.w;
    let sae = 0;
    let maxAbs = 0;
    for (let j = 0; j < nTest; j++) {
      const i = testIdx[j] as number;
      const o = (cell[i] as number) * 4;
      const t = tt[i] as number;
      const f = (fp[o] as number) + t * ((fp[o + 1] as number) + t * ((fp[o + 2] as number) + t * (fp[o + 3] as number)));
      const a = Math.abs((yc[i] as number) - f);
      sae += w ? (w[i] as number) * a : a;
      if (a > maxAbs) maxAbs = a;
    }
    this.acc.sae = sae;
    this.acc.sse = NaN;
    this.acc.maxAbs = maxAbs;
    return this.acc;
  }
}
