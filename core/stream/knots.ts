/**
 * Knots and cells of a streamed natural-spline tuning (docs/design.md, "Knots" and
 * "Streaming"): the exact type-7 quantile knots of every candidate from order statistics
 * found in passes (core/stream/exactRanks.ts), and the cells of their union, placed row by
 * row with the arithmetic of core/fit/powerSums/cells.ts buildCells.
 */
import { InputError } from '../errors';
import { type7From, type7Ranks } from './exactRanks';

/** One candidate's knots: boundary and interior, or why it is skipped. */
export type CandidateKnots = { readonly df: number; readonly lower: number; readonly upper: number; readonly interior: Float64Array } | { readonly df: number; readonly skipped: string };

/** The quantile levels j / (df - 1), j = 1..df-2, of a natural spline's interior knots. */
function levels(df: number): Float64Array {
  const probs = new Float64Array(Math.max(0, df - 2));
  for (let j = 1; j <= df - 2; j++) probs[j - 1] = j / (df - 1);
  return probs;
}

/** Every rank the interior knots of the candidates need (the boundary knots are min and max). */
export function knotRanks(n: number, dfs: readonly number[]): number[] {
  return dfs.flatMap((df) => (df > 2 ? type7Ranks(n, levels(df)) : []));
}

/**
 * The knots of each candidate df, as naturalKnots (core/basis/naturalSpline.ts) places them,
 * from the sorted value at each rank (`at`) and the number of distinct x (`distinct`, exact
 * or a lower bound). A df above an exact distinct count is skipped with naturalKnots's
 * reason. Throws InputError, with what to do, where a streamed run cannot place knots as a
 * whole read would: a df above a lower bound of the distinct count, and knots that coincide
 * (a whole read moves them to quantiles of the distinct x, which passes do not find).
 */
export function streamedKnots(
  n: number,
  dfs: readonly number[],
  min: number,
  max: number,
  distinct: { readonly count: number; readonly exact: boolean },
  at: (rank: number) => number,
  file: string | undefined,
): CandidateKnots[] {
  return dfs.map((df) => {
    if (!(df >= 2) || !Number.isInteger(df)) return { df, skipped: `natural spline df must be a whole number of at least 2; got ${df}` };
    if (df > distinct.count) {
      if (distinct.exact) return { df, skipped: `natural spline with df ${df} needs at least ${df} distinct x values; the data has ${distinct.count}` };
      throw new InputError(
        `df ${df} needs at least ${df} distinct x values, and the passes over the file found only ${distinct.count} for certain; give candidates up to df ${distinct.count}, or raise --memory-budget so that the file is read whole`,
        { file, column: 'x' },
      );
    }
    const interior = df > 2 ? type7From(n, levels(df), at) : new Float64Array(0);
    let prev = min;
    for (const k of interior) {
      if (!(k > prev)) throw coincident(df, file);
      prev = k;
    }
    if (interior.length > 0 && !(max > prev)) throw coincident(df, file);
    return { df, lower: min, upper: max, interior };
  });
}

function coincident(df: number, file: string | undefined): InputError {
  return new InputError(
    `tied x values make the quantile knots of df ${df} coincide; a whole read would place them at quantiles of the distinct x values, which a file streamed in passes cannot do: leave df ${df} out of the candidates, or raise --memory-budget so that the file is read whole`,
    { file, column: 'x' },
  );
}

/** The cell starts of the union of knot sets: sorted, without repeats (buildCells's breaks). */
export function unionBreaks(knotSets: readonly Float64Array[]): Float64Array {
  const all: number[] = [];
  for (const k of knotSets) for (const v of k) all.push(v);
  all.sort((a, b) => a - b);
  const uniq: number[] = [];
  for (const v of all) if (uniq.length === 0 || v > (uniq[uniq.length - 1] as number)) uniq.push(v);
  return Float64Array.from(uniq);
}

/** The cell of x among `breaks` and x's position in it, written to out[0] (cell) and out[1] (t), as buildCells places a row. */
export function locate(breaks: Float64Array, x: number, out: Float64Array): void {
  let lo = 0;
  let hi = breaks.length - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (x < (breaks[mid] as number)) hi = mid;
    else lo = mid;
  }
  const start = breaks[lo] as number;
  const width = (breaks[lo + 1] as number) - start;
  out[0] = lo;
  out[1] = (x - start) / width;
}
