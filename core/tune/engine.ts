import { prepareData } from '../fit/prepared';
import { knownOrder, xInOrder } from '../stats/orderByX';
import { weightedMean } from '../stats/weightedMean';
import type { OutcomeFamily } from '../fit/glm';
import { isPlainModel } from '../fit/model';
import { accumulateByLabel, accumulateRow, type Cells, SUMS_PER_CELL } from '../fit/powerSums/cells';
import { absoluteErrors, type CellLayout, heldOutByLabel, heldOutRows, heldOutWhere, type HeldOutRows, layoutByCell, sumsByLabel, sumsFromCounts } from '../fit/powerSums/layout';
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
  /** Each candidate's knots, for kinds whose resamples need them (CurveKind.resampleKnots). */
  readonly knots?: readonly Float64Array[] | undefined;
  /** The power-sum path's rows, prepared once for every engine of a run (sharedRows); absent: each engine prepares them. With them, x and y may be left empty (the worker runner posts them so). */
  readonly rows?: PowerSumRows | undefined;
}

/**
 * What every engine of a natural-spline run prepares the same way, prepared once: y centred
 * and scaled, the cells of all candidates' knots and the rows grouped by cell. The worker
 * runner builds it on the main thread in shared memory, so that its workers neither repeat
 * the work nor hold a copy each.
 */
export interface PowerSumRows {
  readonly ymean: number;
  readonly yscale: number;
  readonly breaks: Float64Array;
  /** Each candidate's knots, in the order of ResampleProblem.dfs. */
  readonly knots: readonly Float64Array[];
  readonly layout: CellLayout;
}

/**
 * The power-sum rows of a problem in shared memory (the natural spline with plain least
 * squares), or undefined for the kinds and models that refit on weighted rows. Example:
 * const rows = sharedRows(problem); workers then get { ...problem, rows }.
 */
export function sharedRows(problem: ResampleProblem): PowerSumRows | undefined {
  return new ResampleEngine(problem, true).rows;
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
  /** y centred and scaled, by row (made at first use: the power-sum path reads its layout instead). */
  private ycRows: Float64Array | undefined;
  private get yc(): Float64Array {
    if (!this.ycRows) {
      const { y } = this.problem;
      const yc = new Float64Array(this.n);
      for (let i = 0; i < this.n; i++) yc[i] = ((y[i] as number) - this.ymean) / this.yscale;
      this.ycRows = yc;
    }
    return this.ycRows;
  }
  private readonly ymean: number;
  private readonly yscale: number;
  private readonly cells: Cells | undefined;
  private readonly trainers: Trainer[];
  /** Natural-spline candidates fitted from power sums (the fast path), parallel to trainers. */
  private readonly models: SplineFromSums[] | undefined;
  private readonly weights: Float64Array;
  /** Held-out row indices as the schemes that list them write them (allocated at first use: the bootstrap's power-sum path lists none). */
  private testRows: Int32Array | undefined;
  private get testIdx(): Int32Array {
    return (this.testRows ??= new Int32Array(this.n));
  }
  private readonly sums: Float64Array | undefined;
  private readonly testSums: Float64Array | undefined;
  /** What the resampling scheme fills for each resample (core/registry/resampling/). */
  private readonly drawState: DrawState;
  /** The hot path: the rows grouped by cell, and each resample's held-out rows in that order. */
  private readonly layout: CellLayout | undefined;
  private held: HeldOutRows | undefined;
  /** The hot path: every label's held-out rows of the labelling named `key` (heldOutByLabel). */
  private labelled: { key: number; rows: HeldOutRows[] } | undefined;
  /** The hot path's held-out rows of the bootstrap (fromCounts); `held` is them or one label's. */
  private readonly drawn: HeldOutRows | undefined;
  /** The hot path: set when the scheme filled the sums and the held-out rows from the rows' multiplicities. */
  private heldFilled = false;
  /** The hot path: 1 for the rows in testIdx, when the scheme gave the held-out rows that way. */
  private heldMask: Uint8Array | undefined;

  /** The power-sum path's prepared rows (given with the problem, or prepared here). */
  readonly rows: PowerSumRows | undefined;

  /** `shareRows`: the power-sum rows go into shared memory (sharedRows). */
  constructor(
    private readonly problem: ResampleProblem,
    shareRows = false,
  ) {
    const { x, y, w } = problem;
    const given = isPlainModel(problem.model) ? problem.rows : undefined;
    const n = given ? given.layout.perm.length : x.length;
    this.n = n;
    if (given) {
      // Prepared once for the run: the engine keeps no per-row copy of its own.
      this.ymean = given.ymean;
      this.yscale = given.yscale;
    } else {
      // The order came with the problem: preparing the rows below need not sort them again.
      knownOrder(x, problem.order);
      const { mean, weight: sw } = weightedMean(y, w);
      this.ymean = mean;
      let ss = 0;
      for (let i = 0; i < n; i++) ss += (w ? (w[i] as number) : 1) * ((y[i] as number) - this.ymean) ** 2;
      this.yscale = Math.sqrt(ss / sw) || 1;
    }
    const built = this.buildTrainers(given);
    this.trainers = built.trainers;
    this.cells = built.cells;
    this.models = built.models;
    // The power-sum trainers read the sums only: no per-row training weights to fill.
    this.weights = this.models ? EMPTY : new Float64Array(n);
    const cellCount = this.cells ? this.cells.breaks.length - 1 : 0;
    if (this.models && this.cells) {
      const C = this.models.length;
      this.trained = new Uint8Array(C);
      this.sae = new Float64Array(C);
      this.maxAbs = new Float64Array(C);
      this.layout = given?.layout ?? layoutByCell(this.cells.breaks, xInOrder(x), problem.order, { y, mean: this.ymean, scale: this.yscale }, w, shareRows);
      this.held = this.drawn = heldOutRows(cellCount, w !== undefined);
      this.rows = given ?? { ymean: this.ymean, yscale: this.yscale, breaks: this.cells.breaks, knots: built.knots ?? [], layout: this.layout };
    }
    this.sums = this.cells ? new Float64Array(cellCount * SUMS_PER_CELL) : undefined;
    this.testSums = this.cells ? new Float64Array(cellCount * SUMS_PER_CELL) : undefined;
    const cells = this.cells;
    const { layout, drawn } = this;
    // eslint-disable-next-line @typescript-eslint/no-this-alias -- the draw state's getter reads the engine's lazily allocated rows.
    const engine = this;
    this.drawState = {
      n,
      seed: problem.seed,
      order: problem.order,
      w,
      weights: this.models ? undefined : this.weights,
      get testIdx() {
        return engine.testIdx;
      },
      powerSums:
        cells && this.sums && this.testSums
          ? {
              train: this.sums,
              test: this.testSums,
              ...(layout
                ? { labelsByRank: true, addByLabel: (labels: Uint16Array, out: Float64Array) => sumsByLabel(layout, labels, out, (this.sums as Float64Array).length) }
                : {
                    add: (target: Float64Array, i: number, wi: number) => accumulateRow(target, cells.cell[i] as number, cells.t[i] as number, this.yc[i] as number, wi),
                    addByLabel: (labels: Uint16Array, out: Float64Array) => accumulateByLabel(cells, this.yc, w, labels, out, (this.sums as Float64Array).length),
                  }),
              ...(layout && drawn
                ? {
                    fromCounts: (counts: Uint32Array) => {
                      this.heldFilled = true;
                      this.held = drawn;
                      return sumsFromCounts(layout, counts, this.sums as Float64Array, this.testSums as Float64Array, drawn);
                    },
                    heldOutByLabel: (labels: Uint16Array, labelCount: number, key: number, label: number) => {
                      if (this.labelled?.key !== key) this.labelled = { key, rows: heldOutByLabel(layout, labels, labelCount) };
                      const rows = this.labelled.rows[label] as HeldOutRows;
                      this.heldFilled = true;
                      this.held = rows;
                      return rows.count;
                    },
                  }
                : {}),
            }
          : undefined,
      scratch: {},
    };
  }

  private buildTrainers(given: PowerSumRows | undefined): TrainerSet {
    const { x, kind, dfs } = this.problem;
    const plain = isPlainModel(this.problem.model);
    const w = this.problem.w;
    // eslint-disable-next-line @typescript-eslint/no-this-alias -- the getters below read the engine's rows when a kind asks for them.
    const engine = this;
    let prepared: ReturnType<typeof prepareData> | undefined;
    return curveKind(kind).trainers({
      // Prepared when a kind reads it (the power-sum path with knots does not).
      get prepared() {
        return (prepared ??= prepareData({ x, y: engine.yc, w }));
      },
      get yc() {
        return engine.yc;
      },
      knots: this.problem.knots,
      sumCells: given && { breaks: given.breaks, knots: given.knots },
      x,
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
    this.heldFilled = false;
    const nTest = scheme.draw(spec, r, this.drawState);
    const { weights } = this;
    const w = this.problem.w;
    const C = this.trainers.length;
    const models = this.models;
    const held = this.held;
    let wTest = 0;
    if (models && held && this.heldFilled) {
      // Added in x order, as the loop below adds the bootstrap's out-of-bag rows (the same bits).
      wTest = held.weight;
    } else {
      const testIdx = this.testIdx;
      for (let j = 0; j < nTest; j++) wTest += w ? (w[testIdx[j] as number] as number) : 1;
    }
    if (out.length > ERRORS_PER_CANDIDATE * this.trainers.length) out[ERRORS_PER_CANDIDATE * this.trainers.length] = wTest;
    if (models && held) {
      // The natural-spline hot path: every candidate's fit from the training sums, its squared
      // error from the test sums, and its absolute errors over the held-out rows cell by cell.
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
   * Absolute errors of every trained candidate on the held-out rows, grouped by cell (the
   * natural-spline hot path): the scheme gave them with the sums, or as testIdx, from which
   * they are gathered here. Fills sae and maxAbs.
   */
  private absoluteErrorsFromCells(models: readonly SplineFromSums[], nTest: number): void {
    let held = this.held as HeldOutRows;
    if (!this.heldFilled) {
      held = this.held = this.drawn as HeldOutRows;
      const mask = (this.heldMask ??= new Uint8Array(this.n));
      mask.fill(0);
      for (let j = 0; j < nTest; j++) mask[this.testIdx[j] as number] = 1;
      heldOutWhere(this.layout as CellLayout, mask, held);
    }
    const { trained, sae, maxAbs } = this;
    const result = this.pair;
    for (let k = 0; k < models.length; k++) {
      if (trained[k] === 0) continue;
      absoluteErrors(held, (models[k] as SplineFromSums).fitPoly, result);
      sae[k] = result[0] as number;
      maxAbs[k] = result[1] as number;
    }
  }

  private readonly pair = new Float64Array(2);
}
