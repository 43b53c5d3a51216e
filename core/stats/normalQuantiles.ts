import { InputError } from '../errors';
import { argsortStable } from './argsort';
import { qnorm } from './distributions';
import { selectRanks } from './selectRanks';

/** Points of a normal quantile (QQ) plot, sorted by sample value. */
export interface NormalQuantiles {
  /** Normal quantiles of the plotting positions of the kept ranks. */
  readonly theoretical: Float64Array;
  /** Sorted sample values at the kept ranks. */
  readonly sample: Float64Array;
  /** 0-based rank (in the sorted finite sample) of each kept point. */
  readonly rank: Uint32Array;
  /** 0-based index in the input of each kept point (to name rows). */
  readonly index: Uint32Array;
  /** Number of finite values (n of the plotting positions). */
  readonly n: number;
  /** Non-finite inputs left out. */
  readonly omitted: number;
}

/**
 * Normal quantile plot data: the sorted finite values against Phi^-1 of the plotting
 * positions p_i = (i - a) / (n + 1 - 2a), i = 1..n, with a = 3/8 for n <= 10 and 1/2
 * otherwise (Blom 1958, "Statistical Estimates and Transformed Beta-Variables"; R's
 * ppoints). When n exceeds `maxPoints`, the lowest and highest tenth of `maxPoints` ranks
 * are kept whole at each end (where departures from normality show) and the middle ranks
 * are thinned evenly; positions always use the full n. Non-finite inputs are skipped
 * and counted. Cost O(n): all ranks come from the radix `argsortStable`, the kept ranks of
 * a thinned sample from `selectRanks` (expected O(n log maxPoints), without ordering the rest).
 * Throws InputError when `maxPoints` is not a whole number >= 3.
 * Example: normalQuantiles(Float64Array.of(0.3, -1, 2)).theoretical =
 * qnorm([0.5/3.25, 1.5/3.25, 2.5/3.25]) (n = 3 uses a = 3/8).
 */
export function normalQuantiles(standardizedResiduals: Float64Array, maxPoints = 2000): NormalQuantiles {
  if (!(Number.isInteger(maxPoints) && maxPoints >= 3)) {
    throw new InputError(`normal quantile plot: maxPoints must be a whole number >= 3, got ${maxPoints}`);
  }
  const values = standardizedResiduals;
  let n = 0;
  for (let i = 0; i < values.length; i++) if (Number.isFinite(values[i] as number)) n++;
  // With non-finite values: the finite ones, in input order, and where each came from.
  let source: Uint32Array | undefined;
  let finite = values;
  if (n < values.length) {
    finite = new Float64Array(n);
    source = new Uint32Array(n);
    for (let i = 0, k = 0; i < values.length; i++) {
      const v = values[i] as number;
      if (Number.isFinite(v)) {
        finite[k] = v;
        source[k++] = i;
      }
    }
  }
  const kept = Math.min(n, maxPoints);
  const rank = new Uint32Array(kept);
  if (kept === n) {
    for (let k = 0; k < n; k++) rank[k] = k;
  } else {
    const tail = Math.floor(maxPoints / 10);
    const middle = kept - 2 * tail;
    for (let k = 0; k < tail; k++) {
      rank[k] = k;
      rank[kept - 1 - k] = n - 1 - k;
    }
    // Evenly spaced ranks strictly between the two tails (inclusive ends tail and n-1-tail).
    const span = n - 1 - 2 * tail;
    for (let k = 0; k < middle; k++) rank[tail + k] = tail + (middle === 1 ? 0 : Math.round((k * span) / (middle - 1)));
  }
  // Ascending, ties in input order (both are stable and `source` increases): the row at each kept rank.
  const atRank = kept === n ? argsortStable(finite) : selectRanks(finite, rank);
  const a = n <= 10 ? 0.375 : 0.5;
  const theoretical = new Float64Array(kept);
  const sample = new Float64Array(kept);
  const index = new Uint32Array(kept);
  for (let k = 0; k < kept; k++) {
    const r = rank[k] as number;
    const o = atRank[k] as number;
    const i = source ? (source[o] as number) : o;
    theoretical[k] = qnorm((r + 1 - a) / (n + 1 - 2 * a));
    sample[k] = values[i] as number;
    index[k] = i;
  }
  return { theoretical, sample, rank, index, n, omitted: values.length - n };
}
