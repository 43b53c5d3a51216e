/**
 * A test-only curve kind, written as one module the way DEVELOPERS.md says a new kind is
 * added: a piecewise-linear regression spline (degree-1 B-splines, "hat" functions) with
 * df - 2 interior knots at equally spaced quantiles of the distinct x. It exists to prove
 * that registering one module is all a new kind needs; it is not part of the product.
 */
import type { RowBasis } from '../../../core/basis/rowBasis';
import { FitError } from '../../../core/errors';
import { fitRowBasis, RowBasisCurve } from '../../../core/fit/linearFit';
import type { ModelBasis } from '../../../core/fit/model';
import type { PreparedData } from '../../../core/fit/prepared';
import { summariseFit } from '../../../core/fit/summary';
import type { CurveKind } from '../../../core/registry/curves/index';
import { rowBasisModelTrainers } from '../../../core/registry/curves/rowBasisTrainers';
import { basisTrainer } from '../../../core/tune/basisTrainer';

/** Hat functions on knots t_0 < ... < t_{m-1}: size m, at most 2 nonzero per row, linear beyond the ends. */
export class HatBasis implements RowBasis {
  readonly size: number;
  readonly width = 2;
  constructor(readonly knots: Float64Array) {
    this.size = knots.length;
  }
  row(x: number, out: Float64Array): number {
    const t = this.knots;
    const m = t.length;
    // The cell [t_j, t_j+1] holding x (the first or last cell beyond the ends).
    let j = 0;
    while (j < m - 2 && x > (t[j + 1] as number)) j++;
    const a = t[j] as number;
    const b = t[j + 1] as number;
    const u = (x - a) / (b - a);
    out[0] = 1 - u;
    out[1] = u;
    return j;
  }
}

/** Knots at equally spaced probability levels of the distinct x: df of them, df >= 2. */
function hatKnots(prepared: PreparedData, df: number): Float64Array {
  if (!Number.isInteger(df) || df < 2) throw new FitError(`linear spline df must be a whole number of at least 2; got ${df}`);
  if (df > prepared.distinct) throw new FitError(`linear spline with df ${df} needs at least ${df} distinct x values; the data has ${prepared.distinct}`);
  const distinct: number[] = [];
  for (const v of prepared.sortedX) if (distinct.length === 0 || v !== distinct[distinct.length - 1]) distinct.push(v);
  return Float64Array.from({ length: df }, (_, k) => distinct[Math.round((k * (distinct.length - 1)) / (df - 1))] as number);
}

function rowBasis(prepared: PreparedData, df: number): ModelBasis {
  const knots = hatKnots(prepared, df);
  return { basis: new HatBasis(knots), z: undefined, shape: undefined, knots, lower: knots[0] as number, upper: knots[knots.length - 1] as number, notes: [], what: `linear spline with df ${df}` };
}

export const linearSpline: CurveKind = {
  id: 'test-linear-spline',
  name: 'piecewise-linear regression spline (test only)',
  description: 'piecewise-linear regression spline, registered by a test',
  supports: { outcomes: ['continuous', 'counts', 'proportions'], shapes: false, robust: true },
  defaultCandidates: (distinct) => Array.from({ length: Math.max(0, Math.min(8, distinct) - 1) }, (_, i) => i + 2),
  fit(prepared, df) {
    const mb = rowBasis(prepared, df);
    const lin = fitRowBasis(prepared.data, mb.basis, undefined, mb.what);
    const curve = new RowBasisCurve(linearSpline.id, df, mb.lower, mb.upper, mb.basis, lin.theta, lin.cov);
    return summariseFit(prepared.data, { kind: linearSpline.id, df, curve, coefficients: lin.theta, knots: mb.knots, fitted: lin.fitted, leverage: lin.leverage, notes: [] });
  },
  rowBasis,
  trainers(input) {
    if (input.model) return rowBasisModelTrainers(linearSpline, input);
    return { trainers: input.dfs.map((df) => basisTrainer(input.x, input.yc, rowBasis(input.prepared, df).basis, `linear spline with df ${df}`)) };
  },
};
