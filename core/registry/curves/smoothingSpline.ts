import { FitError } from '../../errors';
import { checkShapedSmoothingSize, fitShapedSmoothingSpline } from '../../fit/shapedSmoothing';
import { fitSmoothingSpline, smoothingSplineAtLambda } from '../../fit/smoothingSpline';
import { shapedSmoothTrainer } from '../../tune/modelTrainer';
import { trainingRows } from '../../tune/trainingRows';
import { dfRange } from './rowBasisTrainers';
import type { CurveKind, Trainer } from './types';

/** Largest default df (a product default: 2 .. min(12, distinct x - 1)). */
const DEFAULT_MAX_DF = 12;

/**
 * Refits a smoothing spline at the full-data lambda from the rows with positive weight.
 * `lambdaScaled` is the lambda for x mapped to [0, 1] over `xRange`, the range of all tuning
 * rows (finite at any scale of x, unlike lambda in x units).
 */
function smoothTrainer(x: Float64Array, yc: Float64Array, lambdaScaled: number, xRange: number, df: number): Trainer {
  let curve: { value(x: number): number } | undefined;
  return {
    train(weights: Float64Array): boolean {
      try {
        curve = smoothingSplineAtLambda(trainingRows(x, yc, weights), lambdaScaled, xRange).curve;
        return true;
      } catch (e) {
        if (e instanceof FitError) return false;
        throw new Error(`smoothing spline with df ${df} failed in a resample: ${(e as Error).message}`, { cause: e });
      }
    },
    predict(i: number): number {
      return (curve as { value(x: number): number }).value(x[i] as number);
    },
  };
}

/**
 * Cubic smoothing spline: penalised, a knot at every distinct x, lambda fixed by the df
 * (Reinsch 1967; Green & Silverman 1994). Its resamples refit at each candidate's
 * full-data lambda.
 */
export const smoothingSpline: CurveKind = {
  id: 'smoothing-spline',
  name: 'cubic smoothing spline',
  description: 'cubic smoothing spline: penalised, a knot at every distinct x, lambda set by the df',
  supports: { outcomes: ['continuous'], shapes: true, robust: false },
  // Its df must stay below the distinct count.
  defaultCandidates: (distinct) => dfRange(2, Math.max(2, Math.min(DEFAULT_MAX_DF, distinct - 1))),
  fit: (prepared, df) => fitSmoothingSpline(prepared.data, df),
  fitModel: (prepared, df, model) => fitShapedSmoothingSpline(prepared.data, df, model.shape),
  checkModel(model, distinct) {
    if (model.shape.length > 0) checkShapedSmoothingSize(distinct);
  },
  // lambda for x mapped to [0, 1] over the tuning rows' range: lambda in x units grows as the cube of that range and leaves double precision for x beyond about 1e100.
  resampleParams: (fits) => fits.map((f) => f.lambdaScaled as number),
  trainers(input) {
    const lambdas = input.params ?? [];
    const { x, model } = input;
    const sorted = input.prepared.sortedX;
    const xRange = (sorted[sorted.length - 1] as number) - (sorted[0] as number);
    if (model) return { trainers: input.dfs.map((_, k) => shapedSmoothTrainer(x, input.y, lambdas[k] as number, model.shape, input.ymean, input.yscale, xRange)) };
    return { trainers: input.dfs.map((df, k) => smoothTrainer(x, input.yc, lambdas[k] as number, xRange, df)) };
  },
};
