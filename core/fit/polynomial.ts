import { OrthoPolyBasis } from '../basis/orthoPoly';
import { FitError } from '../errors';
import type { FitResult } from '../types';
import { fitRowBasis, RowBasisCurve } from './linearFit';
import type { PreparedData } from './prepared';
import { summariseFit } from './summary';

/**
 * Polynomial of degree df - 1 in an orthogonal basis (see OrthoPolyBasis), weighted least
 * squares via the Gram matrix of the orthogonal columns (nearly diagonal, so the condition
 * check passes unless the data truly cannot support the degree). df counts the intercept:
 * df = 1 is a constant, df = 2 a line. O(n df^2).
 * Throws FitError when df exceeds the number of distinct x.
 * Example: fitPolynomial(prepareData({ x, y }), 3) fits a parabola.
 */
export function fitPolynomial(prepared: PreparedData, df: number): FitResult {
  if (!(df >= 1) || !Number.isInteger(df)) throw new FitError(`polynomial df must be a whole number of at least 1; got ${df}`);
  if (df > prepared.distinct) throw new FitError(`polynomial with df ${df} needs at least ${df} distinct x values; the data has ${prepared.distinct}`);
  const { data, sortedX } = prepared;
  const lower = sortedX[0] as number;
  const upper = sortedX[sortedX.length - 1] as number;
  if (df === 1) {
    return constantFit(prepared);
  }
  const basis = new OrthoPolyBasis(sortedX, data.x, df - 1);
  const lin = fitRowBasis(data, basis, undefined, `polynomial with df ${df}`);
  const curve = new RowBasisCurve('polynomial', df, lower, upper, basis, lin.centred, lin.cov, undefined, lin.offset);
  return summariseFit(data, { kind: 'polynomial', df, curve, coefficients: lin.theta, knots: new Float64Array(0), fitted: lin.fitted, residuals: lin.residuals, leverage: lin.leverage, notes: [] });
}

/** The weighted mean as a df = 1 fit (also valid when all x are equal). */
function constantFit(prepared: PreparedData): FitResult {
  const { data, sortedX } = prepared;
  const constant = { size: 1, width: 1, row: (_x: number, out: Float64Array) => ((out[0] = 1), 0), unitCoefficients: (out: Float64Array) => void (out[0] = 1) };
  const lin = fitRowBasis(data, constant, undefined, 'constant');
  const curve = new RowBasisCurve('polynomial', 1, sortedX[0] as number, sortedX[sortedX.length - 1] as number, constant, lin.centred, lin.cov, undefined, lin.offset);
  return summariseFit(data, { kind: 'polynomial', df: 1, curve, coefficients: lin.theta, knots: new Float64Array(0), fitted: lin.fitted, residuals: lin.residuals, leverage: lin.leverage, notes: [] });
}
