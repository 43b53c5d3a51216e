import { prepareData } from '../fit/prepared';
import { knownOrder } from '../stats/orderByX';
import { weightedMean } from '../stats/weightedMean';
import type { OutcomeFamily } from '../fit/glm';
import { isPlainModel } from '../fit/model';
import { accumulateByLabel, accumulateRow, type Cells, interleaveCubics, SUMS_PER_CELL } from '../fit/powerSums/cells';
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
  /** Only the squared error is wanted: the natural spline's resamples leave MAE and the largest error out (NaN). */
  readonly squaredOnly?: boolean | undefined;
}

/**
 * Number of error values per candidate and resample: RMSE, MAE, maximum absolute error,
 * mean deviance (Poisson/binomial unit deviance, or squared error for a Gaussian outcome).
 */
export const ERRORS_PER_CANDIDATE = 4;

const EMPTY = new Float64Array(0);

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
    // The order came with the problem: preparing the rows below need not sort them again.
    knownOrder(x, problem.order);
    const n = x.length;
    this.n = n;
    const { mean, weight: sw } = weightedMean(y, w);
    this.ymean = mean;
    let ss = 0;
    for (let i = 0; i < n; i++) ss += (w ? (w[i] as number) : 1) * ((y[i] as number) - this.ymean) ** 2;
    this.yscale = Math.sqrt(ss / sw) || 1;
    this.yc = new Float64Array(n);
    for (let i = 0; i < n; i++) this.yc[i] = ((y[i] as number) - this.ymean) / this.yscale;
    this.testIdx = new Int32Array(n);
    const built = this.buildTrainers();
    this.trainers = built.trainers;
    this.cells = built.cells;
    this.models = built.models;
    // The power-sum trainers read the sums only: no per-row training weights to fill.
    this.weights = this.models ? EMPTY : new Float64Array(n);
    const cellCount = this.cells ? this.cells.breaks.length - 1 : 0;
    if (this.models) {
      const C = this.models.length;
      this.trained = new Uint8Array(C);
      this.sae = new Float64Array(C);
      this.maxAbs = new Float64Array(C);
      this.polys = new Float64Array(cellCount * C * 4);
    }
    this.sums = this.cells ? new Float64Array(cellCount * SUMS_PER_CELL) : undefined;
    this.testSums = this.cells ? new Float64Array(cellCount * SUMS_PER_CELL) : undefined;
    const cells = this.cells;
    const yc = this.yc;
    this.drawState = {
      n,
      seed: problem.seed,
      order: problem.order,
      w,
      weights: this.models ? undefined : this.weights,
      testIdx: this.testIdx,
      powerSums:
        cells && this.sums && this.testSums
          ? {
              train: this.sums,
              test: this.testSums,
              add: (target, i, wi) => accumulateRow(target, cells.cell[i] as number, cells.t[i] as number, yc[i] as number, wi),
              addByLabel: (labels, out) => accumulateByLabel(cells, yc, w, labels, out, (this.sums as Float64Array).length),
            }
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

  /** Length of run()'s output: ERRORS_PER_CANDIDATE values per candidate, then the weight of the rows scored. */
  get outputLength(): number {
    return this.trainers.length * ERRORS_PER_CANDIDATE + 1;
  }

  /**
   * Errors of resample r for every candidate: out[k] RMSE, out[C + k] MAE, out[2C + k]
   * maximum absolute error (NaN when candidate k is rank deficient in this resample), and
   * out[4C] the weight of the rows scored (their count without weights), when `out` has
   * room for it (outputLength): RMSE^2 x that weight is the resample's squared-error sum,
   * which pooled errors over groups add up.
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
    if (out.length > ERRORS_PER_CANDIDATE * this.trainers.length) out[ERRORS_PER_CANDIDATE * this.trainers.length] = wTest;
    const models = this.models;
    if (models) {
      // The natural-spline hot path: every candidate's fit from the training sums, its squared
      // error from the test sums, and the absolute errors of all candidates in one pass over the test rows.
      const trained = this.trained;
      for (let k = 0; k < C; k++) trained[k] = nTest > 0 && (this.trainers[k] as Trainer).train(weights, this.sums) ? 1 : 0;
      const absolute = this.problem.squaredOnly !== true;
      if (absolute) this.absoluteErrorsFromCells(models, nTest);
      for (let k = 0; k < C; k++) {
        if (trained[k] === 0) {
          out[k] = out[C + k] = out[2 * C + k] = out[3 * C + k] = NaN;
          continue;
        }
        const sse = (models[k] as SplineFromSums).sse(this.testSums as Float64Array);
        out[k] = this.yscale * Math.sqrt(sse / wTest);
        out[C + k] = absolute ? (this.yscale * (this.sae[k] as number)) / wTest : NaN;
        out[2 * C + k] = absolute ? this.yscale * (this.maxAbs[k] as number) : NaN;
        out[3 * C + k] = (this.yscale * this.yscale * sse) / wTest;
      }
      return;
    }
    for (let k = 0; k < C; k++) {
      const tr = this.trainers[k] as Trainer;
      if (nTest === 0 || !tr.train(weights, this.sums)) {
        out[k] = out[C + k] = out[2 * C + k] = out[3 * C + k] = NaN;
        continue;
      }
      const acc = this.testErrors(tr, nTest);
      out[k] = this.yscale * Math.sqrt(acc.sse / wTest);
      out[C + k] = (this.yscale * acc.sae) / wTest;
      out[2 * C + k] = this.yscale * acc.maxAbs;
      // Mean deviance per unit weight of the held-out rows (docs/design.md, "Errors"); Gaussian: mean squared error.
      out[3 * C + k] = tr.scoring ? this.testDeviance(tr, nTest) / wTest : (this.yscale * this.yscale * acc.sse) / wTest;
    }
  }

  /** Per candidate: 1 when it was fitted in this resample (the hot path). */
  private readonly trained = new Uint8Array(0);
  /** Per candidate: weighted sum of absolute test errors and the largest one (the hot path). */
  private readonly sae = new Float64Array(0);
  private readonly maxAbs = new Float64Array(0);
  /** The cubics of every candidate, cell-major: polys[(cell * C + k) * 4 + p] (the hot path). */
  private readonly polys = new Float64Array(0);

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

  /**
   * Absolute errors on the test rows of every trained candidate, from the per-cell cubics,
   * in one pass over the rows: each row is read once and its cell's cubics of all
   * candidates lie side by side (the natural-spline hot path). Fills sae and maxAbs.
   */
  private absoluteErrorsFromCells(models: readonly SplineFromSums[], nTest: number): void {
    const C = models.length;
    const cells = this.cells as Cells;
    const cellCount = cells.breaks.length - 1;
    const { polys, trained, sae, maxAbs, testIdx, yc } = this;
    // A candidate not fitted in this resample gets a zero cubic; its errors are not reported.
    interleaveCubics(
      models.map((m) => m.fitPoly),
      cellCount,
      polys,
      trained,
    );
    sae.fill(0);
    maxAbs.fill(0);
    const cell = cells.cell;
    const tt = cells.t;
    const w = this.problem.w;
    for (let j = 0; j < nTest; j++) {
      const i = testIdx[j] as number;
      const t = tt[i] as number;
      const y = yc[i] as number;
      const wi = w ? (w[i] as number) : 1;
      let o = (cell[i] as number) * C * 4;
      for (let k = 0; k < C; k++, o += 4) {
        const f = (polys[o] as number) + t * ((polys[o + 1] as number) + t * ((polys[o + 2] as number) + t * (polys[o + 3] as number)));
        const a = Math.abs(y - f);
        sae[k] = (sae[k] as number) + wi * a;
        if (a > (maxAbs[k] as number)) maxAbs[k] = a;
      }
    }
  }
}
