import { ExtrapolatingBSplineBasis, knotArray, naturalKnots } from '../basis/naturalSpline';
import { nullSpace } from '../linalg/nullSpace';
import type { FitResult } from '../types';
import { fitRowBasis, RowBasisCurve } from './linearFit';
import type { PreparedData } from './prepared';
import { summariseFit } from './summary';

/**
 * Natural cubic regression spline with df = k (docs/design.md, "Natural cubic regression spline"): k - 2 interior knots at
 * quantiles of x, cubic B-splines on the clamped knot vector restricted by the natural
 * boundary conditions f''(min x) = f''(max x) = 0 (de Boor, A Practical Guide to Splines,
 * 2001, chapter IX; the same space as R's splines::ns with an intercept), linear beyond
 * the boundary knots. Weighted least squares through the banded B-spline Gram matrix:
 * O(n) with 4 nonzero basis values per row. df counts the intercept; df = 2 is a line.
 * Throws FitError when df exceeds the number of distinct x or the design is rank deficient.
 * Example: fitNaturalSpline(prepareData({ x, y }), 5).curve.value(2.5).
 */
export function fitNaturalSpline(prepared: PreparedData, df: number): FitResult {
  const knots = naturalKnots(prepared.sortedX, prepared.distinct, df);
  const basis = new ExtrapolatingBSplineBasis(knots.lower, knots.upper, knots.interior);
  const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
  const lin = fitRowBasis(prepared.data, basis, z, `natural spline with df ${df}`);
  const curve = new RowBasisCurve('natural-spline', df, knots.lower, knots.upper, basis, lin.centred, lin.cov, z, lin.offset);
  const allKnots = knotArray(knots);
  return summariseFit(prepared.data, {
    kind: 'natural-spline',
    df,
    curve,
    coefficients: lin.theta,
    knots: allKnots,
    fitted: lin.fitted,
    residuals: lin.residuals,
    leverage: lin.leverage,
    notes: knots.notes,
  });
}
