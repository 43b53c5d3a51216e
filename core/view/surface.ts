/**
 * The panel's view of a surface (a reading over two inputs, core/surface/): the choice in
 * words, the error landscape of the df pairs, the fitted surface on a grid of nodes with the
 * nodes the readings do not reach, some of the readings, slices of the surface at chosen
 * values of one input with their bands, and the residuals against each input. Plain data,
 * its size bounded by the grid and the constants below, not by the rows: readings are
 * thinned evenly and residuals binned when there are many.
 */
import { quantileType7 } from '../stats/quantile';
import { coverageOf, DEFAULT_REACH } from '../surface/coverage';
import type { PreparedSurface } from '../surface/data';
import { pairWords, type SurfaceFit } from '../surface/fit';
import { selectPair } from '../surface/select';
import type { SurfaceTuneResult } from '../surface/tune';
import { landscapeLines } from '../surface/words';
import { metricLabel } from '../tune/format';
import { SURFACE_CAUTION } from '../words/caution';
import { sig } from '../words/numbers';
import { roundAll, roundSig } from './round';

/** Nodes of the view's grid along each input (the surface table's default, core/surface/tableGrid.ts). */
export const VIEW_NODES = 21;
/** Most readings the view marks on the heat figure (more are thinned evenly in row order). */
export const VIEW_READINGS = 600;
/** Most slice values of one input. */
export const MAX_SLICES = 5;
/** Points along each slice curve. */
export const SLICE_POINTS = 41;
/** Up to this many rows the residuals are shown one by one; above, as bins. */
export const RESIDUAL_POINTS = 400;
/** Bins of the residuals along each input when there are many rows. */
export const RESIDUAL_BINS = 40;
/** Significant digits of the view's numbers (display only). */
const VIEW_DIGITS = 6;

/** Which input: the first (`x`, the command line's --x) or the second (`x2`, --x2). */
export type SurfaceInput = 'x' | 'x2';

/** The error landscape: mean error of each pair, mean[i * dfX2.length + j] at (dfX[i], dfX2[j]); null where skipped. */
export interface SurfaceLandscapeView {
  /** The metric's label (RMSE, MAE, ...). */
  readonly metric: string;
  readonly dfX: readonly number[];
  readonly dfX2: readonly number[];
  readonly mean: readonly (number | null)[];
  readonly se: readonly (number | null)[];
  /** The pair the rule chose (the one shown is `pair`, which differs when a pair was picked by hand). */
  readonly ruled: { readonly x: number; readonly x2: number };
  /** The landscape as the command line prints it (title line first). */
  readonly lines: readonly string[];
}

/** The surface at SLICE_POINTS values of the other input, at one value of `input`. */
export interface SurfaceSliceView {
  readonly at: number;
  readonly fit: readonly number[];
  readonly ciLower: readonly number[];
  readonly ciUpper: readonly number[];
  readonly piLower: readonly number[];
  readonly piUpper: readonly number[];
}

/** Residuals against one input: every row (`kind` points) or the mean residual in bins of the input (`kind` bins: `x` the bins' centres). */
export interface SurfaceResidualView {
  readonly kind: 'points' | 'bins';
  readonly x: readonly number[];
  readonly r: readonly number[];
  /** Rows per bin (bins only). */
  readonly count?: readonly number[];
}

/** What the panel shows of one surface. */
export interface SurfaceView {
  readonly runId: number;
  readonly fileName: string;
  readonly labels: { readonly x: string; readonly x2: string; readonly y: string };
  readonly rows: { readonly used: number; readonly rejected: number };
  /** The pair on show. */
  readonly pair: { readonly x: number; readonly x2: number };
  /** True when the person picked the pair in the panel. */
  readonly byHand: boolean;
  /** The choice in words (the rule's explanation as the command line prints it, or the pick). */
  readonly explanation: string;
  /** The fit in one line (residual SD, R², leave-one-out RMSE). */
  readonly fitLine: string;
  readonly notes: readonly string[];
  /** Absent when the pair was fitted as given without tuning. */
  readonly landscape?: SurfaceLandscapeView;
  /** The fitted surface at the nodes xs × x2s (fit[i * x2s.length + j]), and 1 where no reading reaches the node. */
  readonly grid: { readonly xs: readonly number[]; readonly x2s: readonly number[]; readonly fit: readonly number[]; readonly uncovered: readonly number[] };
  /** Readings marked on the heat figure (at most VIEW_READINGS). */
  readonly readings: { readonly x: readonly number[]; readonly x2: readonly number[]; readonly every: number };
  /** Slices of the surface at values of `input`, along the other input at `along`. */
  readonly slices: { readonly input: SurfaceInput; readonly along: readonly number[]; readonly curves: readonly SurfaceSliceView[] };
  readonly residuals: { readonly x: SurfaceResidualView; readonly x2: SurfaceResidualView };
  readonly caution: string;
}

/** What buildSurfaceView needs. */
export interface SurfaceViewInput {
  readonly runId: number;
  readonly fileName: string;
  readonly labels: { readonly u: string; readonly v: string; readonly y: string };
  readonly rejected: number;
  readonly prepared: PreparedSurface;
  readonly fit: SurfaceFit;
  /** The tuning (undefined: the pair was fitted as given). */
  readonly tune?: SurfaceTuneResult | undefined;
  /** True when `fit`'s pair was picked by the person rather than by the rule. */
  readonly byHand: boolean;
  /** Slices: the input and its values (default: the first input at its quartiles). */
  readonly slices?: { readonly input: SurfaceInput; readonly at?: readonly number[] | undefined } | undefined;
  /** The reach of the coverage test (default DEFAULT_REACH, as the command line). */
  readonly reach?: number;
}

/** `count` evenly spaced values from lo to hi (the ends exact). */
function spaced(lo: number, hi: number, count: number): Float64Array {
  const out = new Float64Array(count);
  for (let k = 0; k < count; k++) out[k] = k === count - 1 ? hi : lo + ((hi - lo) * k) / (count - 1);
  return out;
}

/** The quartiles (type 7) of `values`, without repeats: the default slice values. */
export function defaultSliceValues(values: Float64Array): number[] {
  const sorted = Float64Array.from(values).sort();
  const q = quantileType7(sorted, [0.25, 0.5, 0.75]);
  return [...new Set(Array.from(q))];
}

/** Residuals `r` against `x`: every row up to RESIDUAL_POINTS rows, else the mean residual in RESIDUAL_BINS equal bins of x (empty bins left out). O(n). */
export function residualView(x: Float64Array, r: Float64Array): SurfaceResidualView {
  const n = x.length;
  if (n <= RESIDUAL_POINTS) return { kind: 'points', x: roundAll(x, VIEW_DIGITS), r: roundAll(r, VIEW_DIGITS) };
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = x[i] as number;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const width = (hi - lo) / RESIDUAL_BINS;
  const sum = new Float64Array(RESIDUAL_BINS);
  const count = new Float64Array(RESIDUAL_BINS);
  for (let i = 0; i < n; i++) {
    const b = width > 0 ? Math.min(RESIDUAL_BINS - 1, Math.floor(((x[i] as number) - lo) / width)) : 0;
    sum[b] = (sum[b] as number) + (r[i] as number);
    count[b] = (count[b] as number) + 1;
  }
  const xs: number[] = [];
  const rs: number[] = [];
  const cs: number[] = [];
  for (let b = 0; b < RESIDUAL_BINS; b++) {
    const c = count[b] as number;
    if (c === 0) continue;
    xs.push(roundSig(lo + (b + 0.5) * width, VIEW_DIGITS));
    rs.push(roundSig((sum[b] as number) / c, VIEW_DIGITS));
    cs.push(c);
  }
  return { kind: 'bins', x: xs, r: rs, count: cs };
}

/** The landscape of a tuning as plain data, with the command line's lines. */
function landscapeView(tune: SurfaceTuneResult, names: { readonly u: string; readonly v: string }): SurfaceLandscapeView {
  const l = tune.landscape;
  const nullable = (a: Float64Array): (number | null)[] => Array.from(a, (v) => (Number.isFinite(v) ? roundSig(v, VIEW_DIGITS) : null));
  return {
    metric: metricLabel(tune.metric),
    dfX: [...l.dfU],
    dfX2: [...l.dfV],
    mean: nullable(l.mean),
    se: nullable(l.se),
    ruled: { x: tune.selected.dfU, x2: tune.selected.dfV },
    lines: landscapeLines(tune, names),
  };
}

/** The explanation of a pair picked by hand: the pick rule's words over the tuned candidates, or a plain sentence when the pair was not among them. */
function byHandWords(tune: SurfaceTuneResult | undefined, fit: SurfaceFit, names: { readonly u: string; readonly v: string }): string {
  const ruled = tune ? ` The rule chose ${pairWords(tune.selected.dfU, tune.selected.dfV)}.` : '';
  if (tune && tune.candidates.some((c) => c.dfU === fit.dfU && c.dfV === fit.dfV && c.skipped === undefined)) {
    try {
      return `${selectPair(tune.candidates, { kind: 'pick', dfU: fit.dfU, dfV: fit.dfV }, tune.metric, names).ruleReason}${ruled}`;
    } catch {
      // Falls through to the plain sentence.
    }
  }
  return `${pairWords(fit.dfU, fit.dfV)} picked by hand (not among the tuned candidates).${ruled}`;
}

/**
 * The panel's view of a surface fit: the choice in words, the landscape, the fitted surface
 * on VIEW_NODES × VIEW_NODES nodes over the data ranges with the nodes outside the readings'
 * hull or beyond their reach (core/surface/coverage.ts, as the 2-D table flags them), up to
 * VIEW_READINGS readings, slices with 95 % bands (fit.bands), residuals against each input.
 * Cost: O(n) plus O(VIEW_NODES² + MAX_SLICES × SLICE_POINTS) evaluations of the surface and
 * its bands.
 * Example: buildSurfaceView({ runId: 1, fileName: 'trees.csv', labels, rejected: 0, prepared, fit, tune, byHand: false }).grid.xs.length -> 21.
 */
export function buildSurfaceView(input: SurfaceViewInput): SurfaceView {
  const { fit, prepared, tune } = input;
  const { u, v } = prepared.data;
  const names = { u: input.labels.u, v: input.labels.v };
  const xs = spaced(fit.rangeU[0], fit.rangeU[1], VIEW_NODES);
  const x2s = spaced(fit.rangeV[0], fit.rangeV[1], VIEW_NODES);
  const cov = coverageOf(u, v, input.reach ?? DEFAULT_REACH);
  const gridFit: number[] = [];
  const uncovered: number[] = [];
  for (const a of xs) {
    for (const b of x2s) {
      gridFit.push(roundSig(fit.predict(a, b), VIEW_DIGITS));
      uncovered.push(cov.outsideHull(a, b) || cov.far(a, b) ? 1 : 0);
    }
  }
  const n = u.length;
  const every = Math.max(1, Math.ceil(n / VIEW_READINGS));
  const ru: number[] = [];
  const rv: number[] = [];
  for (let i = 0; i < n; i += every) {
    ru.push(roundSig(u[i] as number, VIEW_DIGITS));
    rv.push(roundSig(v[i] as number, VIEW_DIGITS));
  }
  const sliceInput: SurfaceInput = input.slices?.input ?? 'x';
  const sliceValues = (input.slices?.at?.length ? [...input.slices.at] : defaultSliceValues(sliceInput === 'x' ? u : v)).slice(0, MAX_SLICES);
  const along = sliceInput === 'x' ? spaced(fit.rangeV[0], fit.rangeV[1], SLICE_POINTS) : spaced(fit.rangeU[0], fit.rangeU[1], SLICE_POINTS);
  const curves = sliceValues.map((at): SurfaceSliceView => {
    const fixed = new Float64Array(SLICE_POINTS).fill(at);
    const b = sliceInput === 'x' ? fit.bands(fixed, along) : fit.bands(along, fixed);
    return {
      at: roundSig(at, VIEW_DIGITS),
      fit: roundAll(b.fit, VIEW_DIGITS),
      ciLower: roundAll(b.ciLower, VIEW_DIGITS),
      ciUpper: roundAll(b.ciUpper, VIEW_DIGITS),
      piLower: roundAll(b.piLower, VIEW_DIGITS),
      piUpper: roundAll(b.piUpper, VIEW_DIGITS),
    };
  });
  const explanation = input.byHand ? byHandWords(tune, fit, names) : tune ? tune.selected.reason : `${pairWords(fit.dfU, fit.dfV)} as given (not tuned).`;
  return {
    runId: input.runId,
    fileName: input.fileName,
    labels: { x: input.labels.u, x2: input.labels.v, y: input.labels.y },
    rows: { used: fit.n, rejected: input.rejected },
    pair: { x: fit.dfU, x2: fit.dfV },
    byHand: input.byHand,
    explanation,
    fitLine: `Surface ${pairWords(fit.dfU, fit.dfV)} = ${fit.df} coefficients; residual SD ${sig(fit.sigma, 4)}, R² ${sig(fit.r2, 4)}, leave-one-out RMSE ${sig(fit.looRmse, 4)}.`,
    notes: [...(tune?.notes ?? []), ...fit.notes],
    ...(tune ? { landscape: landscapeView(tune, names) } : {}),
    grid: { xs: roundAll(xs, VIEW_DIGITS), x2s: roundAll(x2s, VIEW_DIGITS), fit: gridFit, uncovered },
    readings: { x: ru, x2: rv, every },
    slices: { input: sliceInput, along: roundAll(along, VIEW_DIGITS), curves },
    residuals: { x: residualView(u, fit.residuals), x2: residualView(v, fit.residuals) },
    caution: SURFACE_CAUTION,
  };
}
