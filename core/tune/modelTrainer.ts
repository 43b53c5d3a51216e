/**
 * Resample trainers for fits with an outcome family, shape constraints or Huber weights:
 * the resampling engine's way of refitting such a candidate on weighted rows.
 */
import { trainingRows } from './trainingRows';
import { FitError } from '../errors';
import { CachedRows } from '../fit/cachedRows';
import { irls, type OutcomeFamily } from '../fit/glm';
import { LinearSystem } from '../fit/linearSystem';
import type { ModelBasis, ResolvedModel } from '../fit/model';
import { outcomeKind } from '../registry/outcomes/index';
import type { PreparedData } from '../fit/prepared';
import { huberIrls } from '../fit/robust';
import { shapedSmoothingSplineAtLambda } from '../fit/shapedSmoothing';
import type { Curve, Shape } from '../types';

/** A candidate refitted on weighted rows (0 = not in training) and evaluated at rows. */
export interface ModelTrainer {
  /** Refits with the given row weights (bootstrap multiplicity or fold mask times prior weight); false when rank deficient. */
  train(weights: Float64Array, sums: Float64Array | undefined): boolean;
  /** Prediction of the mean at row i in the engine's centred, scaled units. */
  predict(i: number): number;
  /** Prediction of the mean at row i in the units of y. */
  mean(i: number): number;
  /** The outcome family (Poisson, binomial) whose deviance scores held-out rows; undefined for Gaussian. */
  readonly scoring: OutcomeFamily | undefined;
}

/**
 * Trainer of one candidate df: the basis rows are evaluated once on all rows (knots from
 * all tuning rows, as for every engine candidate), and each resample refits by one
 * constrained least-squares solve (Gaussian with shape), Huber IRLS, or Poisson/binomial
 * IRLS started from the fit to all rows (which saves iterations). Cost per resample:
 * O(n) per reweighting iteration. `y` are the raw outcomes; Gaussian fits without
 * non-negativity refit (y - ymean) / yscale and predict in those units, the others refit y
 * and map predictions to the engine's units by (mu - ymean) / yscale.
 */
export function modelTrainer(prepared: PreparedData, y: Float64Array, mb: ModelBasis, model: ResolvedModel, ymean: number, yscale: number): ModelTrainer {
  const { data } = prepared;
  const n = data.x.length;
  const rows = new CachedRows(mb.basis, data.x);
  const system = new LinearSystem(mb.basis.size, mb.z, mb.shape, mb.what);
  const p = mb.basis.size;
  const g = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  const fitted = new Float64Array(n);
  const fam = outcomeKind(model.outcome).glm;
  // Gaussian fits without non-negativity are equivariant under y -> (y - ymean) / yscale:
  // they fit the engine's centred, scaled y, which keeps the digits of a small signal on a
  // large offset (docs/design.md, "Power sums", step 8); the others fit y as read.
  const centred = !fam && !model.shape.includes('nonnegative');
  let yFit = y;
  if (centred) {
    yFit = new Float64Array(n);
    for (let i = 0; i < n; i++) yFit[i] = ((y[i] as number) - ymean) / yscale;
  }
  const prior = data.w ?? new Float64Array(n).fill(1);
  const freq = new Float64Array(n);
  let start: Float64Array | undefined;
  const fitOnce = (weights: Float64Array): Float64Array => {
    if (fam) {
      if (!start) start = irls(rows, system, y, prior, fam).theta;
      return irls(rows, system, y, weights, fam, start).theta;
    }
    if (model.robustK !== undefined) {
      // Bootstrap multiplicities are copies of rows, not prior weights, for the robust scale and weights.
      for (let i = 0; i < n; i++) freq[i] = Math.round((weights[i] as number) / (prior[i] as number));
      return huberIrls(rows, system, yFit, prior, model.robustK, freq).theta;
    }
    rows.gram(weights, yFit, g, rhs);
    return system.solve(g, rhs).theta;
  };
  return {
    scoring: fam,
    train(weights: Float64Array): boolean {
      try {
        const theta = fitOnce(weights);
        rows.apply(theta, fitted);
        if (fam) for (let i = 0; i < n; i++) fitted[i] = fam.linkinv(fitted[i] as number);
        return true;
      } catch (e) {
        if (e instanceof FitError) return false;
        throw e;
      }
    },
    predict(i: number): number {
      return centred ? (fitted[i] as number) : ((fitted[i] as number) - ymean) / yscale;
    },
    mean(i: number): number {
      return centred ? ymean + yscale * (fitted[i] as number) : (fitted[i] as number);
    },
  };
}

/**
 * Trainer of one shape-constrained smoothing-spline candidate: each resample refits the rows
 * with positive weight at `lambda`, the smoothing parameter of the candidate's df on all
 * tuning rows for x in units of `unit` (the engine passes the fit's lambdaScaled with unit =
 * the tuning rows' x range; as the unconstrained smoothing spline's resamples do), by
 * core/fit/shapedSmoothing/. It fits the raw `y` (non-negativity does not survive the
 * engine's centring) and maps predictions to the engine's units by (f - ymean) / yscale.
 * Cost per resample: O(n log n) plus the constrained solve, O(m^3) for m distinct x.
 */
export function shapedSmoothTrainer(x: Float64Array, y: Float64Array, lambda: number, shapes: readonly Shape[], ymean: number, yscale: number, unit = 1): ModelTrainer {
  let curve: Curve | undefined;
  return {
    scoring: undefined,
    train(weights: Float64Array): boolean {
      try {
        curve = shapedSmoothingSplineAtLambda(trainingRows(x, y, weights), lambda, shapes, unit).curve;
        return true;
      } catch (e) {
        if (e instanceof FitError) return false;
        throw e;
      }
    },
    predict(i: number): number {
      return ((curve as Curve).value(x[i] as number) - ymean) / yscale;
    },
    mean(i: number): number {
      return (curve as Curve).value(x[i] as number);
    },
  };
}
