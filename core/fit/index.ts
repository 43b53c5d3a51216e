import { InputError } from '../errors';
import { curveKind, curveKinds } from '../registry/curves/index';
import type { FitResult, FitSpec, XYData } from '../types';
import { binomialFromTrials } from './glm';
import { fitModel, isPlainModel, resolveModelFor } from './model';
import { isPrepared, prepareData, type PreparedData } from './prepared';

export { prepareData, type PreparedData } from './prepared';

/**
 * Fits one curve family at one df with complete regression output (coefficients, fitted
 * values, residuals, leverage, Cook's distance, sigma, R^2, AIC/AICc/BIC, exact
 * leave-one-out RMSE and GCV). Pass PreparedData to fit several df without re-checking
 * and re-sorting the data. Throws InputError for bad data, FitError when the data cannot
 * support the df. Example: fitCurve({ x, y }, { family: 'natural-spline', df: 5 }).
 * With `outcome` (poisson, binomial, optionally `trials`), `shape` or `robust` the fit goes
 * through core/fit/model.ts (fitModel) and carries a `model` report; the trials of a
 * binomial outcome become prior weights of the proportions y / trials.
 * Example: fitCurve({ x, y }, { family: 'natural-spline', df: 5, outcome: 'counts', shape: ['increasing'] }).
 */
export function fitCurve(data: XYData | PreparedData, spec: FitSpec): FitResult {
  let prepared = isPrepared(data) ? data : prepareData(data);
  if (spec.trials !== undefined || !isPlainModel(spec)) {
    // Outcome families, shape constraints and robust fitting (core/fit/model.ts).
    if (spec.trials !== undefined) {
      if ((spec.outcome ?? 'continuous') !== 'proportions') throw new InputError('a trials column needs the proportions outcome');
      prepared = { ...prepared, data: binomialFromTrials(prepared.data, spec.trials) };
    }
    const kind = curveKind(spec.kind);
    return fitModel(prepared, kind, spec.df, resolveModelFor(kind, spec, curveKinds()));
  }
  return curveKind(spec.kind).fit(prepared, spec.df);
}
