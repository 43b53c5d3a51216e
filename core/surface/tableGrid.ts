/**
 * The grid of a surface table: one grid per input in the forms of curve tables
 * (core/table/grid.ts), and the automatic step for bilinear interpolation between the
 * printed nodes (docs/design.md, "Surface tables").
 */
import { InputError } from '../errors';
import { formatGrid, gridPoints, type GridSpec } from '../table/grid';
import { interpolationError } from '../table/interpolation';

/** Default number of nodes along each input of a surface table (over its data range). A Knotwise default: small enough for firmware, fine enough to read. */
export const DEFAULT_SURFACE_GRID_COUNT = 21;
/** Most nodes in one surface table (the bands cost df^2 per node). */
export const MAX_SURFACE_NODES = 250_000;
/** Most intervals along one input that the automatic step tries. */
const MAX_AXIS_INTERVALS = 4096;
/** Lines of the other input along which an automatic step is searched. */
const SEARCH_LINES = 33;
/** Evenly spaced check points per cell side (ends included: (k + 1)^2 per cell) of the final bilinear check. */
export const CHECK_PER_SIDE = 8;
/** Rounds of refinement when the final check fails. */
const MAX_REFINE = 40;

/** A grid of each input, resolved to points. */
export interface SurfaceGrid {
  /** The concrete grids (an automatic step becomes a count grid). */
  readonly specU: GridSpec;
  readonly specV: GridSpec;
  readonly us: Float64Array;
  readonly vs: Float64Array;
  /** Set when a grid asked for the automatic step: the tolerance, the steps and the largest bilinear error found on the dense check. */
  readonly auto?: { readonly tolerance: number; readonly stepU: number | null; readonly stepV: number | null; readonly maxError: number; readonly at: readonly [number, number] };
}

/** The default grid of an input: DEFAULT_SURFACE_GRID_COUNT nodes over its data range (one node for a constant input). */
export function defaultAxisGrid(lower: number, upper: number): GridSpec {
  return upper > lower ? { kind: 'count', start: lower, stop: upper, count: DEFAULT_SURFACE_GRID_COUNT } : { kind: 'list', values: [lower] };
}

/** Sorted distinct values of an input (the 'data' grid). */
function distinctSorted(values: Float64Array): Float64Array {
  return Float64Array.from(values).sort();
}

/**
 * Largest |f - bilinear interpolation of the printed nodes| over every cell of the grid,
 * checked at (CHECK_PER_SIDE + 1)^2 evenly spaced points per cell, corners included. The
 * node values pass through `round` (as the table prints them), so rounding counts too.
 * Stops once the error exceeds `stopAbove`. Cost O(nodes x CHECK_PER_SIDE^2) evaluations.
 * Example: bilinearError((u, v) => u * v, Float64Array.of(0, 1), Float64Array.of(0, 1), (x) => x).maxError -> 0 (bilinear is exact for u v).
 */
export function bilinearError(f: (u: number, v: number) => number, us: Float64Array, vs: Float64Array, round: (x: number) => number, stopAbove = Infinity): { maxError: number; at: [number, number] } {
  const nu = us.length;
  const nv = vs.length;
  const node = new Float64Array(nu * nv);
  for (let i = 0; i < nu; i++) for (let j = 0; j < nv; j++) node[i * nv + j] = round(f(us[i] as number, vs[j] as number));
  let maxError = 0;
  let at: [number, number] = [us[0] as number, vs[0] as number];
  const k = CHECK_PER_SIDE;
  // A single node along an input: check along that line only.
  const cellsU = Math.max(1, nu - 1);
  const cellsV = Math.max(1, nv - 1);
  for (let i = 0; i < cellsU; i++) {
    const i1 = Math.min(i + 1, nu - 1);
    const u0 = us[i] as number;
    const u1 = us[i1] as number;
    for (let j = 0; j < cellsV; j++) {
      const j1 = Math.min(j + 1, nv - 1);
      const v0 = vs[j] as number;
      const v1 = vs[j1] as number;
      const f00 = node[i * nv + j] as number;
      const f01 = node[i * nv + j1] as number;
      const f10 = node[i1 * nv + j] as number;
      const f11 = node[i1 * nv + j1] as number;
      for (let a = 0; a <= k; a++) {
        const s = a / k;
        const u = i1 === i ? u0 : u0 + (u1 - u0) * s;
        for (let b = 0; b <= k; b++) {
          const t = b / k;
          const v = j1 === j ? v0 : v0 + (v1 - v0) * t;
          const bil = (1 - s) * ((1 - t) * f00 + t * f01) + s * ((1 - t) * f10 + t * f11);
          const e = Math.abs(f(u, v) - bil);
          if (e > maxError) {
            maxError = e;
            at = [u, v];
            if (maxError > stopAbove) return { maxError, at };
          }
        }
      }
    }
  }
  return { maxError, at };
}

/**
 * The fewest equal intervals m over [start, stop] of one input for which linear
 * interpolation along that input stays within `share` of f on SEARCH_LINES evenly spaced
 * lines of the other input over [otherStart, otherStop] (interpolationError on each line,
 * printed values through `round`). Doubling from 1, then bisection, as the automatic step
 * of curves (core/table/autoStep.ts). Throws InputError beyond `maxIntervals`.
 */
function axisIntervals(
  along: (x: number, other: number) => number,
  start: number,
  stop: number,
  otherStart: number,
  otherStop: number,
  share: number,
  round: (x: number) => number,
  maxIntervals: number,
  label: string,
): number {
  const lines = otherStop > otherStart ? Array.from({ length: SEARCH_LINES }, (_, k) => otherStart + ((otherStop - otherStart) * k) / (SEARCH_LINES - 1)) : [otherStart];
  const passes = (m: number): boolean => {
    const xs = new Float64Array(m + 1);
    for (let i = 0; i <= m; i++) xs[i] = i === m ? stop : start + ((stop - start) * i) / m;
    const nx = xs.map(round);
    for (const o of lines) {
      const g = (x: number): number => along(x, o);
      const ny = xs.map((x) => round(g(x)));
      if (interpolationError(g, nx, ny, share).maxError > share) return false;
    }
    return true;
  };
  let lo = 0;
  let m = 1;
  while (!passes(m)) {
    lo = m;
    if (m >= maxIntervals)
      throw new InputError(`grid "${label}": bilinear interpolation needs more than ${maxIntervals + 1} nodes along this input to stay within the tolerance; choose a larger tolerance`);
    m = Math.min(2 * m, maxIntervals);
  }
  let hi = m;
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (passes(mid)) hi = mid;
    else lo = mid;
  }
  return hi;
}

/**
 * Resolves the grids of a surface table. Each input's grid is one of the curve forms
 * (count, step, list, data) or undefined (DEFAULT_SURFACE_GRID_COUNT nodes over its data
 * range). An automatic step `auto:<tol>` (or `<start>:<stop>:auto=<tol>`) on one or both
 * inputs asks for the coarsest even steps at which bilinear interpolation between the
 * printed nodes stays within tol (units of the readings) of the surface f. Bilinear
 * interpolation is linear interpolation along u of linear interpolation along v, so its
 * error is at most the error along u plus the error along v (each at most its share); an
 * automatic input gets tol/2 when both are automatic, else tol less the error the fixed
 * grid makes along its input. The steps are then checked on the whole grid by
 * bilinearError (CHECK_PER_SIDE + 1 points a side in every cell) and, should rounding push
 * the error over tol, refined by a quarter more intervals until they pass. The split is a
 * bound and often loose, so each automatic input is then coarsened in turn (bisection on
 * its interval count, the other held) while the whole grid still passes that check. Both
 * inputs automatic must share one tolerance. Throws InputError for a grid of more than
 * MAX_SURFACE_NODES nodes, a tolerance no grid can meet, or an automatic step over a
 * constant input. Cost: O(nodes x (SEARCH_LINES + CHECK_PER_SIDE^2)) evaluations of f.
 * Example: resolveSurfaceGrid({ kind: 'auto', tolerance: 0.01 }, undefined, data, fit.predict, round).auto.maxError <= 0.01.
 */
export function resolveSurfaceGrid(
  specU: GridSpec | undefined,
  specV: GridSpec | undefined,
  data: { readonly u: Float64Array; readonly v: Float64Array; readonly rangeU: readonly [number, number]; readonly rangeV: readonly [number, number] },
  f: (u: number, v: number) => number,
  round: (x: number) => number,
  names: { readonly u: string; readonly v: string } = { u: '--grid', v: '--grid2' },
): SurfaceGrid {
  const gu = specU ?? defaultAxisGrid(data.rangeU[0], data.rangeU[1]);
  const gv = specV ?? defaultAxisGrid(data.rangeV[0], data.rangeV[1]);
  const autoU = gu.kind === 'auto' ? gu : undefined;
  const autoV = gv.kind === 'auto' ? gv : undefined;
  const fixed = (g: GridSpec, values: Float64Array): Float64Array => (g.kind === 'auto' ? new Float64Array(0) : gridPoints(g, g.kind === 'data' ? distinctSorted(values) : new Float64Array(0)));
  let us = fixed(gu, data.u);
  let vs = fixed(gv, data.v);
  if (!autoU && !autoV) {
    checkNodes(us.length, vs.length);
    return { specU: gu, specV: gv, us, vs };
  }
  if (autoU && autoV && autoU.tolerance !== autoV.tolerance)
    throw new InputError(`${names.u} ${formatGrid(autoU)} and ${names.v} ${formatGrid(autoV)} ask for automatic steps with different tolerances; the table has one tolerance, give the same to both`);
  const tolerance = (autoU ?? autoV)?.tolerance as number;
  const range = (g: Extract<GridSpec, { kind: 'auto' }>, r: readonly [number, number], name: string): [number, number] => {
    const a = g.start ?? r[0];
    const b = g.stop ?? r[1];
    if (!(b > a)) throw new InputError(`${name} ${formatGrid(g)}: the input takes a single value, so there is no step to choose`);
    return [a, b];
  };
  const ru = autoU ? range(autoU, data.rangeU, names.u) : ([us[0] as number, us[us.length - 1] as number] as [number, number]);
  const rv = autoV ? range(autoV, data.rangeV, names.v) : ([vs[0] as number, vs[vs.length - 1] as number] as [number, number]);
  // The error the fixed grid of the other input makes along it (on the same lines), and the share left.
  const lineError = (along: (x: number, o: number) => number, xs: Float64Array, other: readonly [number, number]): number => {
    if (xs.length < 2) return 0;
    const lines = other[1] > other[0] ? Array.from({ length: SEARCH_LINES }, (_, k) => other[0] + ((other[1] - other[0]) * k) / (SEARCH_LINES - 1)) : [other[0]];
    let e = 0;
    for (const o of lines) {
      const g = (x: number): number => along(x, o);
      e = Math.max(
        e,
        interpolationError(
          g,
          xs.map(round),
          xs.map((x) => round(g(x))),
        ).maxError,
      );
    }
    return e;
  };
  const share = (fixedError: number, name: string, g: GridSpec): number => {
    const left = autoU && autoV ? tolerance / 2 : tolerance - fixedError;
    if (!(left > 0))
      throw new InputError(
        `${name} ${formatGrid(g)}: the other input's grid alone strays ${fixedError.toPrecision(2)} from the surface, not under the tolerance ${tolerance}; refine it or raise the tolerance`,
      );
    return left;
  };
  const maxIntervals = MAX_AXIS_INTERVALS;
  let mu = 0;
  let mv = 0;
  if (autoU) {
    const e = autoV ? 0 : lineError((x, o) => f(o, x), vs, ru);
    mu = axisIntervals((x, o) => f(x, o), ru[0], ru[1], rv[0], rv[1], share(e, names.u, autoU), round, maxIntervals, `${formatGrid(autoU)}`);
  }
  if (autoV) {
    const e = autoU ? 0 : lineError((x, o) => f(x, o), us, rv);
    mv = axisIntervals((x, o) => f(o, x), rv[0], rv[1], ru[0], ru[1], share(e, names.v, autoV), round, maxIntervals, `${formatGrid(autoV)}`);
  }
  const evenly = (m: number, r: readonly [number, number]): GridSpec => ({ kind: 'count', start: r[0], stop: r[1], count: m + 1 });
  for (let round_ = 0; round_ <= MAX_REFINE; round_++) {
    if (autoU) us = gridPoints(evenly(mu, ru), new Float64Array(0));
    if (autoV) vs = gridPoints(evenly(mv, rv), new Float64Array(0));
    checkNodes(us.length, vs.length);
    const check = bilinearError(f, us, vs, round, tolerance);
    if (check.maxError <= tolerance) break;
    if (round_ === MAX_REFINE)
      throw new InputError(
        `the automatic step: bilinear interpolation stays ${check.maxError.toPrecision(2)} from the surface even with ${us.length} x ${vs.length} nodes; raise the tolerance or --digits`,
      );
    if (autoU) mu = Math.ceil(mu * 1.25);
    if (autoV) mv = Math.ceil(mv * 1.25);
  }
  // The split of the tolerance is a bound, often loose: coarsen each automatic input in turn,
  // by bisection on its interval count with the other held, as long as the whole grid passes.
  const pointsOf = (m: number, r: readonly [number, number]): Float64Array => gridPoints(evenly(m, r), new Float64Array(0));
  const coarsen = (m: number, grid: (k: number) => [Float64Array, Float64Array]): number => {
    let lo = 0;
    let hi = m;
    while (hi - lo > 1) {
      const mid = Math.floor((lo + hi) / 2);
      const [a, b] = grid(mid);
      const e = bilinearError(f, a, b, round, tolerance);
      if (e.maxError <= tolerance) hi = mid;
      else lo = mid;
    }
    return hi;
  };
  if (autoU) {
    mu = coarsen(mu, (k) => [pointsOf(k, ru), vs]);
    us = pointsOf(mu, ru);
  }
  if (autoV) {
    mv = coarsen(mv, (k) => [us, pointsOf(k, rv)]);
    vs = pointsOf(mv, rv);
  }
  // The error of the grid returned (the last passing check may have been of another candidate).
  const check = bilinearError(f, us, vs, round);
  return {
    specU: autoU ? evenly(mu, ru) : gu,
    specV: autoV ? evenly(mv, rv) : gv,
    us,
    vs,
    auto: { tolerance, stepU: autoU ? (ru[1] - ru[0]) / mu : null, stepV: autoV ? (rv[1] - rv[0]) / mv : null, maxError: check.maxError, at: check.at },
  };
}

function checkNodes(nu: number, nv: number): void {
  if (nu * nv > MAX_SURFACE_NODES) throw new InputError(`the surface table would have ${nu} x ${nv} = ${nu * nv} nodes, more than ${MAX_SURFACE_NODES}; choose coarser grids`);
}
