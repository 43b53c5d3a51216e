import { FitError } from '../errors';
import { congruence, times, transposeTimes } from '../fit/linearFit';
import { factorSpd } from '../linalg/spd';
import { resamplingScheme, type DrawState } from '../registry/resampling/index';
import { orderByX } from '../stats/orderByX';
import type { ResampleSpec } from '../tune/types';
import type { SurfaceBasis } from './basis';
import { accumulateSurfaceRow, axisProjection, buildSurfaceCells, candidateBreaks, projectU, projectV, SURFACE_SUMS_PER_CELL, unionBreaks, type AxisProjection, type SurfaceCells } from './cells';
import type { PreparedSurface } from './data';
import { pairWords } from './fit';
import { SurfaceFromSums } from './fromSums';

/** Errors of one resample: per candidate k, rmse[k], mae[k], maxAbs[k] (NaN when it could not be fitted). */
export interface ResampleErrors {
  readonly rmse: Float64Array;
  readonly mae: Float64Array;
  readonly maxAbs: Float64Array;
}

/** How resamples are evaluated: from the per-cell sums (the fast path) or by refitting from the weighted rows. */
export type SurfaceEngine = 'sums' | 'rows';

/**
 * Evaluates resamples of surface candidates (docs/design.md, "Surfaces", "Resampling"): the
 * rows of each resample come from the resampling scheme's `draw` (core/registry/resampling/),
 * the same for every candidate, stratified by u for folds (rows in u order). y is centred at
 * its weighted mean and scaled by its weighted SD first, and the errors scaled back.
 *
 * - 'sums': one pass of per-cell sums over the union grid of the candidates' knots per
 *   resample (the scheme fills training and test sums through PowerSumAccess); each
 *   candidate is fitted from the training sums and its squared error taken from the test
 *   sums. MAE and the largest absolute error need one more pass over the test rows per
 *   candidate; they are computed only when `rowErrors` is set.
 * - 'rows': each candidate refitted by weighted least squares on the drawn rows (the
 *   reference the sums are checked against).
 */
export class SurfaceResampler {
  private readonly n: number;
  private readonly yc: Float64Array;
  private readonly ymean: number;
  readonly yscale: number;
  private readonly cells: SurfaceCells | undefined;
  private readonly models: SurfaceFromSums[];
  /** Sums path: the projection of each candidate df of u and of v, by df. */
  private readonly projU = new Map<number, AxisProjection>();
  private readonly projV = new Map<number, AxisProjection>();
  /** Sums path, scratch: sums moved to the cells of one df of u (union cells of v), and to a pair's own cells. */
  private readonly byU: Float64Array = new Float64Array(0);
  private readonly byUTest: Float64Array = new Float64Array(0);
  private readonly byPair: Float64Array = new Float64Array(0);
  private readonly byPairTest: Float64Array = new Float64Array(0);
  private readonly weights: Float64Array | undefined;
  private readonly testIdx: Int32Array;
  private readonly train: Float64Array | undefined;
  private readonly test: Float64Array | undefined;
  private readonly state: DrawState;

  constructor(
    private readonly prepared: PreparedSurface,
    private readonly bases: readonly SurfaceBasis[],
    private readonly spec: ResampleSpec,
    seed: number,
    readonly engine: SurfaceEngine,
    private readonly rowErrors: boolean,
  ) {
    const { u, v, y, w } = prepared.data;
    const n = u.length;
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
    this.yc = Float64Array.from(y, (yi) => (yi - this.ymean) / this.yscale);
    this.testIdx = new Int32Array(n);
    if (engine === 'sums') {
      const su = prepared.u.sorted;
      const sv = prepared.v.sorted;
      const breaksU = unionBreaks(
        bases.map((b) => b.axisU),
        su[0] as number,
        su[n - 1] as number,
      );
      const breaksV = unionBreaks(
        bases.map((b) => b.axisV),
        sv[0] as number,
        sv[n - 1] as number,
      );
      this.cells = buildSurfaceCells(u, v, breaksU, breaksV);
      const len = (breaksU.length - 1) * (breaksV.length - 1) * SURFACE_SUMS_PER_CELL;
      this.train = new Float64Array(len);
      this.test = new Float64Array(len);
      for (const b of bases) {
        if (!this.projU.has(b.axisU.df)) this.projU.set(b.axisU.df, axisProjection(breaksU, candidateBreaks(b.axisU)));
        if (!this.projV.has(b.axisV.df)) this.projV.set(b.axisV.df, axisProjection(breaksV, candidateBreaks(b.axisV)));
      }
      const cellsOf = (p: AxisProjection): number => p.breaks.length - 1;
      const maxU = Math.max(...[...this.projU.values()].map(cellsOf));
      const maxV = Math.max(...[...this.projV.values()].map(cellsOf));
      const nvUnion = breaksV.length - 1;
      this.byU = new Float64Array(maxU * nvUnion * SURFACE_SUMS_PER_CELL);
      this.byUTest = new Float64Array(this.byU.length);
      this.byPair = new Float64Array(maxU * maxV * SURFACE_SUMS_PER_CELL);
      this.byPairTest = new Float64Array(this.byPair.length);
      this.models = bases.map((b) => new SurfaceFromSums(candidateBreaks(b.axisU), candidateBreaks(b.axisV), b, `surface with ${pairWords(b.axisU.df, b.axisV.df)}`));
    } else {
      this.models = [];
      this.weights = new Float64Array(n);
    }
    const cells = this.cells;
    const yc = this.yc;
    this.state = {
      n,
      seed,
      order: orderByX(u),
      w,
      weights: this.weights,
      testIdx: this.testIdx,
      powerSums:
        cells && this.train && this.test
          ? {
              train: this.train,
              test: this.test,
              add: (target, i, wi) => accumulateSurfaceRow(target, cells.cell[i] as number, cells.t[i] as number, cells.s[i] as number, yc[i] as number, wi),
            }
          : undefined,
      scratch: {},
    };
  }

  /** Number of candidates. */
  get size(): number {
    return this.bases.length;
  }

  /** The errors of resample r for every candidate, in the units of y. */
  run(r: number): ResampleErrors {
    const C = this.bases.length;
    const out: ResampleErrors = { rmse: new Float64Array(C).fill(NaN), mae: new Float64Array(C).fill(NaN), maxAbs: new Float64Array(C).fill(NaN) };
    const scheme = resamplingScheme(this.spec);
    if (!scheme.draw) throw new Error(`resampling ${scheme.id} has no resamples`);
    const nTest = scheme.draw(this.spec, r, this.state);
    if (nTest === 0) return out;
    const w = this.prepared.data.w;
    let wTest = 0;
    for (let j = 0; j < nTest; j++) wTest += w ? (w[this.testIdx[j] as number] as number) : 1;
    const report = (k: number, sse: number): void => {
      out.rmse[k] = this.yscale * Math.sqrt(sse / wTest);
      if (this.rowErrors || this.engine === 'rows') {
        out.mae[k] = (this.yscale * (out.mae[k] as number)) / wTest;
        out.maxAbs[k] = this.yscale * (out.maxAbs[k] as number);
      }
    };
    if (this.engine === 'sums') {
      this.eachFromSums(this.train as Float64Array, this.test as Float64Array, (k, m, test) => {
        if (this.rowErrors) this.absoluteErrors(k, nTest, out);
        report(k, m.sse(test));
      });
      return out;
    }
    for (let k = 0; k < C; k++) {
      const theta = this.refit(this.bases[k] as SurfaceBasis);
      if (theta) report(k, this.rowPass(this.bases[k] as SurfaceBasis, theta, nTest, k, out));
    }
    return out;
  }

  /**
   * Fits every candidate from the training sums moved to its own cells (grouped by the df
   * of u, so the move along u is done once per df of u), and hands each one fitted to
   * `then` with the test sums moved the same way (when `test` is given).
   */
  private eachFromSums(train: Float64Array, test: Float64Array | undefined, then: (k: number, m: SurfaceFromSums, test: Float64Array) => void, checkOnly = true): void {
    const cells = this.cells as SurfaceCells;
    const nvUnion = cells.breaksV.length - 1;
    for (const [dfU, pu] of this.projU) {
      const nku = pu.breaks.length - 1;
      const byU = this.byU.subarray(0, nku * nvUnion * SURFACE_SUMS_PER_CELL);
      const byUTest = this.byUTest.subarray(0, byU.length);
      projectU(train, pu, nvUnion, byU);
      if (test) projectU(test, pu, nvUnion, byUTest);
      this.bases.forEach((b, k) => {
        if (b.axisU.df !== dfU) return;
        const pv = this.projV.get(b.axisV.df) as AxisProjection;
        const len = nku * (pv.breaks.length - 1) * SURFACE_SUMS_PER_CELL;
        const pair = this.byPair.subarray(0, len);
        const pairTest = this.byPairTest.subarray(0, len);
        projectV(byU, pv, nku, pair);
        const m = this.models[k] as SurfaceFromSums;
        if (!m.fit(pair, checkOnly)) return;
        if (test) projectV(byUTest, pv, nku, pairTest);
        then(k, m, pairTest);
      });
    }
  }

  /** Sum of w |e| into out.mae[k] and the largest |e| into out.maxAbs[k] over the test rows (sums path), in units of the scaled y. */
  private absoluteErrors(k: number, nTest: number, out: ResampleErrors): void {
    const m = this.models[k] as SurfaceFromSums;
    const b = this.bases[k] as SurfaceBasis;
    const pu = this.projU.get(b.axisU.df) as AxisProjection;
    const pv = this.projV.get(b.axisV.df) as AxisProjection;
    const nkv = pv.breaks.length - 1;
    const cells = this.cells as SurfaceCells;
    const nvUnion = cells.breaksV.length - 1;
    const { testIdx, yc } = this;
    const w = this.prepared.data.w;
    let sae = 0;
    let max = 0;
    for (let j = 0; j < nTest; j++) {
      const i = testIdx[j] as number;
      const c = cells.cell[i] as number;
      const cu = Math.floor(c / nvUnion);
      const cv = c - cu * nvUnion;
      const t = (pu.alpha[cu] as number) + (pu.beta[cu] as number) * (cells.t[i] as number);
      const s = (pv.alpha[cv] as number) + (pv.beta[cv] as number) * (cells.s[i] as number);
      const a = Math.abs((yc[i] as number) - m.valueAt((pu.map[cu] as number) * nkv + (pv.map[cv] as number), t, s));
      sae += (w ? (w[i] as number) : 1) * a;
      if (a > max) max = a;
    }
    out.mae[k] = sae;
    out.maxAbs[k] = max;
  }

  /** Weighted least squares of the scaled y on the drawn rows (training weights), or undefined when rank deficient. */
  private refit(basis: SurfaceBasis): Float64Array | undefined {
    const { u, v } = this.prepared.data;
    const weights = this.weights as Float64Array;
    const P = basis.size;
    const W = basis.width;
    const Q = basis.df;
    const idx = new Int32Array(W);
    const val = new Float64Array(W);
    const g = new Float64Array(P * P);
    const rhs = new Float64Array(P);
    for (let i = 0; i < this.n; i++) {
      const wi = weights[i] as number;
      if (wi === 0) continue;
      basis.row(u[i] as number, v[i] as number, idx, val);
      const yi = this.yc[i] as number;
      for (let r = 0; r < W; r++) {
        const wr = wi * (val[r] as number);
        const ir = idx[r] as number;
        rhs[ir] = (rhs[ir] as number) + wr * yi;
        for (let s = 0; s <= r; s++) g[ir * P + (idx[s] as number)] = (g[ir * P + (idx[s] as number)] as number) + wr * (val[s] as number);
      }
    }
    for (let i = 0; i < P; i++) for (let j = 0; j < i; j++) g[j * P + i] = g[i * P + j] as number;
    try {
      const factor = factorSpd(congruence(g, basis.z, P, Q), Q, 'surface', undefined, true);
      return times(basis.z, factor.solve(transposeTimes(basis.z, rhs, P, Q)), P, Q);
    } catch (e) {
      if (e instanceof FitError) return undefined;
      throw e;
    }
  }

  /** Squared, absolute and largest errors of a row-path fit over the test rows (scaled y); returns the squared-error sum. */
  private rowPass(basis: SurfaceBasis, theta: Float64Array, nTest: number, k: number, out: ResampleErrors): number {
    const { u, v } = this.prepared.data;
    const w = this.prepared.data.w;
    const idx = new Int32Array(basis.width);
    const val = new Float64Array(basis.width);
    let sse = 0;
    let sae = 0;
    let max = 0;
    for (let j = 0; j < nTest; j++) {
      const i = this.testIdx[j] as number;
      basis.row(u[i] as number, v[i] as number, idx, val);
      let f = 0;
      for (let r = 0; r < basis.width; r++) f += (val[r] as number) * (theta[idx[r] as number] as number);
      const e = (this.yc[i] as number) - f;
      const wi = w ? (w[i] as number) : 1;
      sse += wi * e * e;
      sae += wi * Math.abs(e);
      if (Math.abs(e) > max) max = Math.abs(e);
    }
    out.mae[k] = sae;
    out.maxAbs[k] = max;
    return sse;
  }

  /**
   * Fits of every candidate to all rows from one pass of sums (sums engine): the residual
   * sum of squares in units of y^2, or the FitError message. O(n + candidates x cells).
   */
  allRows(): { readonly rss: Float64Array; readonly failed: readonly (string | undefined)[] } {
    const C = this.bases.length;
    const rss = new Float64Array(C).fill(NaN);
    const failed: (string | undefined)[] = Array.from({ length: C }, () => undefined);
    const cells = this.cells as SurfaceCells;
    const all = new Float64Array((this.train as Float64Array).length);
    const w = this.prepared.data.w;
    for (let i = 0; i < this.n; i++) accumulateSurfaceRow(all, cells.cell[i] as number, cells.t[i] as number, cells.s[i] as number, this.yc[i] as number, w ? (w[i] as number) : 1);
    const fitted = new Uint8Array(C);
    this.eachFromSums(
      all,
      all,
      (k, m, moved) => {
        fitted[k] = 1;
        rss[k] = this.yscale * this.yscale * m.sse(moved);
      },
      false,
    );
    for (let k = 0; k < C; k++) if (fitted[k] === 0) failed[k] = (this.models[k] as SurfaceFromSums).lastError;
    return { rss, failed };
  }
}
