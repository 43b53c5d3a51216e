import { FitError } from '../errors';
import type { FitResult, FitSpec, XYData } from '../types';
import { fitNaturalSpline } from './naturalSpline';
import { fitPolynomial } from './polynomial';
import { isPrepared, prepareData, type PreparedData } from './prepared';
import { fitSmoothingSpline } from './smoothingSpline';

export { prepareData, type PreparedData } from './prepared';

/**
 * Fits one curve family at one df with complete regression output (coefficients, fitted
 * values, residuals, leverage, Cook's distance, sigma, R^2, AIC/AICc/BIC, exact
 * leave-one-out RMSE and GCV). Pass PreparedData to fit several df without re-checking
 * and re-sorting the data. Throws InputError for bad data, FitError when the data cannot
 * support the df. Example: fitCurve({ x, y }, { family: 'natural', df: 5 }).
 */
export function fitCurve(data: XYData | PreparedData, spec: FitSpec): FitResult {
  const prepared = isPrepared(data) ? data : prepareData(data);
  switch (spec.family) {
    case 'natural':
      return fitNaturalSpline(prepared, spec.df);
    case 'poly':
      return fitPolynomial(prepared, spec.df);
    case 'smooth':
      return fitSmoothingSpline(prepared.data, spec.df);
    default: {
      const never: never = spec.family;
      throw new FitError(`unknown curve family ${String(never)}`);
    }
  }
}
