import { ExtrapolatingBSplineBasis, knotArray, naturalKnots } from '../../basis/naturalSpline';
import { FitError } from '../../errors';
import type { ModelBasis, ResolvedModel } from '../../fit/modelTypes';
import { fitNaturalSpline } from '../../fit/naturalSpline';
import { fitNaturalSplineBatch } from '../../fit/naturalSplineBatch';
import type { PreparedData } from '../../fit/prepared';
import { shapeRows } from '../../fit/shape';
import { nullSpace } from '../../linalg/nullSpace';
import { buildCells } from '../../fit/powerSums/cells';
import { SplineFromSums } from '../../fit/powerSums/splineSums';
import { dfRange, rowBasisModelTrainers } from './rowBasisTrainers';
import type { CurveKind } from './types';

/** Largest default df (a product default: 2 .. min(12, distinct x)). */
const DEFAULT_MAX_DF = 12;

/**
 * Basis of a natural spline at df (knots as docs/design.md defines them, natural boundary
 * conditions through the null space), with the shape rows of core/fit/shape.ts. Shapes
 * other than non-negativity on counts or proportions apply to the linear predictor;
 * non-negativity is dropped there (the mean is always positive). Cost O(p^2).
 */
function rowBasis(prepared: PreparedData, df: number, model: ResolvedModel): ModelBasis {
  const { sortedX } = prepared;
  const k = naturalKnots(sortedX, prepared.distinct, df);
  const basis = new ExtrapolatingBSplineBasis(k.lower, k.upper, k.interior);
  const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
  const shapes = model.outcome === 'continuous' ? model.shape : model.shape.filter((s) => s !== 'nonnegative');
  const rows = shapes.length > 0 ? shapeRows(basis.knotVector, shapes, true) : undefined;
  return {
    basis,
    z,
    shape: rows,
    knots: knotArray(k),
    lower: sortedX[0] as number,
    upper: sortedX[sortedX.length - 1] as number,
    notes: k.notes,
    what: `natural spline with df ${df}`,
  };
}

/** Natural cubic regression spline with knots at quantiles of x (the default curve). */
export const naturalSpline: CurveKind = {
  id: 'natural-spline',
  name: 'natural cubic regression spline',
  description: 'natural cubic regression spline: df - 2 interior knots at quantiles of x, straight beyond the data (the default)',
  supports: { outcomes: ['continuous', 'counts', 'proportions'], shapes: true, robust: true },
  defaultCandidates: (distinct) => dfRange(2, Math.max(2, Math.min(DEFAULT_MAX_DF, distinct))),
  fit: fitNaturalSpline,
  fitAll: fitNaturalSplineBatch,
  rowBasis,
  resampleKnots(prepared, dfs) {
    const out = new Map<number, Float64Array | FitError>();
    for (const df of dfs) {
      try {
        out.set(df, knotArray(naturalKnots(prepared.sortedX, prepared.distinct, df)));
      } catch (e) {
        if (!(e instanceof FitError)) throw e;
        out.set(df, e);
      }
    }
    return out;
  },
  trainers(input) {
    if (input.model) return rowBasisModelTrainers(naturalSpline, input);
    // One pass of per-cell power sums per resample serves every candidate (docs/design.md, "Power sums").
    const { x, dfs, sumCells } = input;
    const given = sumCells?.knots ?? input.knots;
    const knots = given ? [...given] : dfs.map((df) => knotArray(naturalKnots(input.prepared.sortedX, input.prepared.distinct, df)));
    // Cells built once for the run carry no rows: the engine reads its rows from their layout.
    const cells = sumCells ? { breaks: sumCells.breaks, cell: new Int32Array(0), t: new Float64Array(0) } : buildCells(x, knots);
    const models = dfs.map((df, k) => {
      const kn = knots[k] as Float64Array;
      const basis = new ExtrapolatingBSplineBasis(kn[0] as number, kn[kn.length - 1] as number, kn.subarray(1, kn.length - 1));
      return new SplineFromSums(cells, basis, nullSpace(basis.naturalConstraint(), 2, basis.size), `natural spline with df ${df}`);
    });
    const trainers = models.map((model) => ({
      train: (_w: Float64Array, sums: Float64Array | undefined) => model.fit(sums as Float64Array),
      predict: (i: number) => model.valueAt(cells.cell[i] as number, cells.t[i] as number),
    }));
    return { trainers, cells, models, knots };
  },
};
