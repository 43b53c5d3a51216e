import { trainingRows } from './trainingRows';
import { ExtrapolatingBSplineBasis, naturalKnots } from '../basis/naturalSpline';
import { OrthoPolyBasis } from '../basis/orthoPoly';
import type { RowBasis } from '../basis/rowBasis';
import { FitError } from '../errors';
import { prepareData } from '../fit/prepared';
import { smoothingSplineAtLambda } from '../fit/smoothingSpline';
import { factorSpd } from '../linalg/spd';
import { nullSpace } from '../linalg/nullSpace';
import type { OutcomeFamily } from '../fit/glm';
import { isPlainModel, resolveModel } from '../fit/model';
import type { Family, ModelOptions } from '../types';
import { accumulateRow, buildCells, type Cells, SUMS_PER_CELL } from './cells';
import { bootstrapCounts, foldLabels } from './plan';
import { modelTrainer, shapedSmoothTrainer } from './modelTrainer';
import { SplineFromSums } from './splineSums';
import type { ResampleSpec } from './types';

/** Everything a worker needs to evaluate resamples; plain data, so it can be posted to a thread. */
export interface ResampleProblem {
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly w?: Float64Array | undefined;
  readonly family: Family;
  /** Candidate df that can be fitted to all tuning rows. */
  readonly dfs: readonly number[];
  /** Smoothing spline only: the lambda each candidate's df gives on all tuning rows. */
  readonly lambdas?: readonly number[] | undefined;
  /** 'boot' or 'cv'. */
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

/** Predicts at test rows after training on weighted rows: one per candidate. */
interface Trainer {
  /** Trains with the given row weights (0 = not in training); false when rank deficient. */
  train(weights: Float64Array, sums: Float64Array | undefined): boolean;
  /** Prediction for row i after training (in centred, scaled y units). */
  predict(i: number): number;
  /** Poisson/binomial trainers: the predicted mean in y units and the family scoring deviance. */
  mean?(i: number): number;
  readonly family?: OutcomeFamily | undefined;
}

/**
 * Evaluates resamples for all candidates of one family. The same resamples serve every
 * candidate. For natural splines one pass of per-cell power sums per resample serves all
 * candidates (DESIGN.md, Scale); k-fold training sums are total minus fold. Polynomials
 * and smoothing splines refit from the weighted rows. y is centred and scaled first so the
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
  private readonly counts: Uint32Array;
  private readonly weights: Float64Array;
  private readonly testIdx: Int32Array;
  private readonly sums: Float64Array | undefined;
  private readonly testSums: Float64Array | undefined;
  private cvRepeat = -1;
  private labels: Uint16Array | undefined;
  private foldSums: Float64Array | undefined;

  constructor(private readonly problem: ResampleProblem) {
    const { x, y, w } = problem;
    const n = x.length;
    this.n = n;
    let sw = 0;
    let swy = 0;
    for (let i = 0; i < n; i++) {
      const wi = w ? (w[i] as number) : 1;
      sw += wi;
      swy += wi * (y[i] as number);
    }
    this.ymean = swy / sw;
    let ss = 0;
    for (let i = 0; i < n; i++) ss += (w ? (w[i] as number) : 1) * ((y[i] as number) - this.ymean) ** 2;
    this.yscale = Math.sqrt(ss / sw) || 1;
    this.yc = new Float64Array(n);
    for (let i = 0; i < n; i++) this.yc[i] = ((y[i] as number) - this.ymean) / this.yscale;
    this.counts = new Uint32Array(n);
    this.weights = new Float64Array(n);
    this.testIdx = new Int32Array(n);
    const built = this.buildTrainers();
    this.trainers = built.trainers;
    this.cells = built.cells;
    this.models = built.models;
    const cellCount = this.cells ? this.cells.breaks.length - 1 : 0;
    this.sums = this.cells ? new Float64Array(cellCount * SUMS_PER_CELL) : undefined;
    this.testSums = this.cells ? new Float64Array(cellCount * SUMS_PER_CELL) : undefined;
  }

  private buildTrainers(): { trainers: Trainer[]; cells: Cells | undefined; models?: SplineFromSums[] } {
    const { x, family, dfs } = this.problem;
    const prepared = prepareData({ x, y: this.yc, w: this.problem.w });
    if (!isPlainModel(this.problem.model)) {
      // Outcome families, shapes, robust fits: refit on weighted rows (the power sums need plain least squares).
      const model = resolveModel(family, this.problem.model);
      if (family === 'smooth') {
        // Shape-constrained smoothing splines: refit at each candidate's full-data lambda.
        const lambdas = this.problem.lambdas ?? [];
        return { trainers: dfs.map((_, k) => shapedSmoothTrainer(x, this.problem.y, lambdas[k] as number, model.shape, this.ymean, this.yscale)), cells: undefined };
      }
      return { trainers: dfs.map((df) => modelTrainer(prepared, this.problem.y, family, df, model, this.ymean, this.yscale)), cells: undefined };
    }
    if (family === 'natural') {
      const bases = dfs.map((df) => {
        const k = naturalKnots(prepared.sortedX, prepared.distinct, df);
        const basis = new ExtrapolatingBSplineBasis(k.lower, k.upper, k.interior);
        return { df, basis, knots: Float64Array.of(k.lower, ...k.interior, k.upper) };
      });
      const cells = buildCells(x, bases.map((b) => b.knots));
      const models = bases.map(({ df, basis }) => new SplineFromSums(cells, basis, nullSpace(basis.naturalConstraint(), 2, basis.size), `natural spline with df ${df}`));
      const trainers = models.map((model) => ({
        train: (_w: Float64Array, sums: Float64Array | undefined) => model.fit(sums as Float64Array),
        predict: (i: number) => model.valueAt(cells.cell[i] as number, cells.t[i] as number),
      }));
      return { trainers, cells, models };
    }
    if (family === 'poly') {
      return { trainers: dfs.map((df) => basisTrainer(x, this.yc, df === 1 ? constantBasis : new OrthoPolyBasis(prepared.sortedX, x, df - 1), `polynomial with df ${df}`)), cells: undefined };
    }
    const lambdas = this.problem.lambdas ?? [];
    return { trainers: dfs.map((df, k) => smoothTrainer(x, this.yc, lambdas[k] as number, df)), cells: undefined };
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
    const { n, weights, testIdx } = this;
    const w = this.problem.w;
    let nTest = 0;
    if (spec.kind === 'boot') {
      bootstrapCounts(n, this.problem.seed, r, this.counts);
      this.sums?.fill(0);
      this.testSums?.fill(0);
      const { counts, yc, cells } = this;
      const train = this.sums as Float64Array;
      const test = this.testSums as Float64Array;
      for (let i = 0; i < n; i++) {
        const c = counts[i] as number;
        const wi = w ? (w[i] as number) : 1;
        weights[i] = c * wi;
        if (c === 0) testIdx[nTest++] = i;
        if (cells) accumulateRow(c > 0 ? train : test, cells.cell[i] as number, cells.t[i] as number, yc[i] as number, c > 0 ? c * wi : wi);
      }
    } else if (spec.kind === 'cv') {
      const repeat = Math.floor(r / spec.folds);
      const fold = r % spec.folds;
      this.prepareRepeat(repeat, spec.folds);
      const labels = this.labels as Uint16Array;
      for (let i = 0; i < n; i++) {
        const inFold = labels[i] === fold;
        weights[i] = inFold ? 0 : w ? (w[i] as number) : 1;
        if (inFold) testIdx[nTest++] = i;
      }
      if (this.cells) {
        const fs = this.foldSums as Float64Array;
        const len = (this.sums as Float64Array).length;
        const totalOff = spec.folds * len;
        for (let j = 0; j < len; j++) {
          const test = fs[fold * len + j] as number;
          (this.testSums as Float64Array)[j] = test;
          (this.sums as Float64Array)[j] = (fs[totalOff + j] as number) - test;
        }
      }
    } else {
      throw new Error(`resampling ${spec.kind} has no resamples`);
    }
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
      // Mean deviance per unit weight of the held-out rows (DESIGN.md "Errors"); Gaussian: mean squared error.
      out[3 * C + k] = tr.family ? this.testDeviance(tr, nTest) / wTest : (this.yscale * this.yscale * sse) / wTest;
    }
  }

  private readonly acc = { sae: 0, sse: 0, maxAbs: 0 };

  /** Sum of the outcome family's deviance over the test rows (prior weights included). */
  private testDeviance(tr: Trainer, nTest: number): number {
    const fam = tr.family as OutcomeFamily;
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

  /** Fold labels of one repeat and, for the power-sum path, the sums of every fold plus their total. */
  private prepareRepeat(repeat: number, folds: number): void {
    if (this.cvRepeat === repeat) return;
    this.cvRepeat = repeat;
    this.labels ??= new Uint16Array(this.n);
    foldLabels(this.problem.order, folds, this.problem.seed, repeat, this.labels);
    if (!this.cells) return;
    const len = (this.sums as Float64Array).length;
    this.foldSums ??= new Float64Array((folds + 1) * len);
    const fs = this.foldSums;
    fs.fill(0);
    const w = this.problem.w;
    const view = (k: number): Float64Array => fs.subarray(k * len, (k + 1) * len);
    const views = Array.from({ length: folds }, (_, k) => view(k));
    for (let i = 0; i < this.n; i++) {
      accumulateRow(views[this.labels[i] as number] as Float64Array, this.cells.cell[i] as number, this.cells.t[i] as number, this.yc[i] as number, w ? (w[i] as number) : 1);
    }
    const total = view(folds);
    for (let k = 0; k < folds; k++) {
      const v = views[k] as Float64Array;
      for (let j = 0; j < len; j++) total[j] = (total[j] as number) + (v[j] as number);
    }
  }
}

const constantBasis: RowBasis = { size: 1, width: 1, row: (_x: number, out: Float64Array) => ((out[0] = 1), 0) };

/** Refits a dense row basis (the orthogonal polynomials) from weighted rows: O(n p^2) per resample. */
function basisTrainer(x: Float64Array, yc: Float64Array, basis: RowBasis, label: string): Trainer {
  const p = basis.size;
  const buf = new Float64Array(p);
  const g = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  let theta: Float64Array = new Float64Array(p);
  return {
    train(weights: Float64Array): boolean {
      g.fill(0);
      rhs.fill(0);
      for (let i = 0; i < x.length; i++) {
        const wi = weights[i] as number;
        if (wi === 0) continue;
        basis.row(x[i] as number, buf);
        for (let a = 0; a < p; a++) {
          const wa = wi * (buf[a] as number);
          rhs[a] = (rhs[a] as number) + wa * (yc[i] as number);
          for (let b = 0; b <= a; b++) g[a * p + b] = (g[a * p + b] as number) + wa * (buf[b] as number);
        }
      }
      try {
        theta = factorSpd(g, p, label).solve(rhs);
        return true;
      } catch (e) {
        if (e instanceof FitError) return false;
        throw e;
      }
    },
    predict(i: number): number {
      basis.row(x[i] as number, buf);
      let f = 0;
      for (let a = 0; a < p; a++) f += (buf[a] as number) * (theta[a] as number);
      return f;
    },
  };
}

/** Refits a smoothing spline at the full-data lambda from the rows with positive weight. */
function smoothTrainer(x: Float64Array, yc: Float64Array, lambda: number, df: number): Trainer {
  let curve: { value(x: number): number } | undefined;
  return {
    train(weights: Float64Array): boolean {
      try {
        curve = smoothingSplineAtLambda(trainingRows(x, yc, weights), lambda).curve;
        return true;
      } catch (e) {
        if (e instanceof FitError) return false;
        throw new Error(`smoothing spline with df ${df} failed in a resample: ${(e as Error).message}`);
      }
    },
    predict(i: number): number {
      return (curve as { value(x: number): number }).value(x[i] as number);
    },
  };
}
