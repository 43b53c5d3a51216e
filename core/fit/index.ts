import { FitError, InputError } from '../errors';
import type { FitResult, FitSpec, XYData } from '../types';
import { binomialFromTrials } from './glm';
import { fitModel, isPlainModel, resolveModel } from './model';
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
 * With `outcome` (poisson, binomial, optionally `trials`), `shape` or `robust` the fit goes
 * through core/fit/model.ts (fitModel) and carries a `model` report; the trials of a
 * binomial outcome become prior weights of the proportions y / trials.
 * Example: fitCurve({ x, y }, { family: 'natural', df: 5, outcome: 'poisson', shape: ['increasing'] }).
 */
export function fitCurve(data: XYData | PreparedData, spec: FitSpec): FitResult {
  let prepared = isPrepared(data) ? data : prepareData(data);
  if (spec.trials !== undefined || !isPlainModel(spec)) {
    // Outcome families, shape constraints and robust fitting (core/fit/model.ts).
    if (spec.trials !== undefined) {
      if ((spec.outcome ?? 'gaussian') !== 'binomial') throw new InputError('a trials column needs the binomial outcome');
      prepared = { ...prepared, data: binomialFromTrials(prepared.data, spec.trials) };
    }
    return fitModel(prepared, spec.family, spec.df, resolveModel(spec.family, spec));
  }
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
