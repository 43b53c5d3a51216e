/**
 * Fits with an outcome family (Poisson, binomial), shape constraints or Huber weights: the
 * routing, checks and result assembly shared by fitCurve and the resampling engine.
 */
import { InputError } from '../errors';
import type { CurveKind } from '../registry/curves/types';
import { OUTCOMES } from '../registry/outcomes/index';
import type { FitResult, ModelOptions, ModelReport, Shape } from '../types';
import { CachedRows } from './cachedRows';
import type { ModelBasis, ResolvedModel } from './modelTypes';

export type { ModelBasis, ResolvedModel } from './modelTypes';
import { checkOutcomeData, irls, type OutcomeFamily } from './glm';
import { summariseGlm } from './glmSummary';
import { RowBasisCurve, withOffset } from './linearFit';
import { LinearSystem } from './linearSystem';
import { LinkCurve } from './linkCurve';
import type { PreparedData } from './prepared';
import { HUBER_K, huberIrls } from './robust';
import { checkShapes, shapeWords } from './shape';
import { summariseFit } from './summary';

/** Most down-weighted rows listed by line in a robust fit's report (the count is always given). */
export const ROBUST_LIST_LIMIT = 1000;
/** Largest accepted Huber tuning constant; beyond it the fit is least squares in practice. */
export const MAX_HUBER_K = 100;

/** True when the options ask for plain (weighted) least squares: Gaussian, no shape, not robust. */
export function isPlainModel(m: ModelOptions | undefined): boolean {
  return !m || ((m.outcome ?? 'continuous') === 'continuous' && (m.shape ?? []).length === 0 && !m.robust);
}

/**
 * Checks model options against a curve kind's supports (core/registry/curves/) and
 * normalises them: the outcome must be one the kind takes, shape constraints and robust
 * fitting only where the kind supports them, robust fitting for continuous readings only.
 * `all` lists the kinds a refusal may suggest instead. Throws InputError with the reason.
 * Example: resolveModelFor(naturalSpline, { shape: ['convex'] }).
 */
export function resolveModelFor(kind: CurveKind, m: ModelOptions | undefined, all: readonly CurveKind[] = [kind]): ResolvedModel {
  const outcome = m?.outcome ?? 'continuous';
  if (!(outcome in OUTCOMES)) throw new InputError(`unknown outcome "${String(outcome)}"; use ${Object.keys(OUTCOMES).join(', ')}`);
  const shape = checkShapes(m?.shape ?? []);
  const robust = m?.robust;
  let robustK: number | undefined;
  if (robust === true) robustK = HUBER_K;
  else if (robust && typeof robust === 'object') {
    robustK = robust.k;
    if (!(robustK > 0 && robustK <= MAX_HUBER_K)) throw new InputError(`the robust fit's tuning constant must be above 0 and at most ${MAX_HUBER_K}; got ${robust.k}`);
  }
  const s = kind.supports;
  if (!s.outcomes.includes(outcome)) {
    throw new InputError(`the ${kind.name} takes ${s.outcomes.join(' or ')} readings only; ${outcome} need a curve that supports them (${supporting(all, (k) => k.outcomes.includes(outcome))})`);
  }
  if (robustK !== undefined && !s.robust) throw new InputError(`the ${kind.name} has no robust fit; robust fitting needs another curve (${supporting(all, (k) => k.robust)})`);
  if (shape.length > 0 && !s.shapes) throw new InputError(`the ${kind.name} takes no shape constraints; shapes need another curve (${supporting(all, (k) => k.shapes)})`);
  if (robustK !== undefined && outcome !== 'continuous') throw new InputError(`robust fitting applies to continuous readings only; it cannot be combined with ${outcome}`);
  return { outcome, shape, robustK };
}

/** Ids of the kinds whose support passes the test, for messages. */
function supporting(all: readonly CurveKind[], test: (s: CurveKind['supports']) => boolean): string {
  return (
    all
      .filter((k) => test(k.supports))
      .map((k) => k.id)
      .join(', ') || 'none'
  );
}

/**
 * Fits a curve kind at `df` with an outcome family, shape constraints and/or Huber weights
 * (see core/fit/glm.ts, core/fit/shape.ts, core/fit/robust.ts). The result is a complete
 * FitResult with a `model` report. Conventions:
 *
 * - df stays the number of free basis coefficients (the candidate df); with shape
 *   constraints `model.constraints.effectiveDf` = df minus the independent active
 *   constraints is the trace of the hat matrix at the active set (Meyer & Woodroofe 2000,
 *   "On the degrees of freedom in shape-restricted regression", Annals of Statistics 28);
 *   sigma, AIC and the bands keep n - df residual df, a conservative choice.
 * - Bands and leverage of a constrained fit use the covariance of the least-squares fit
 *   with the active constraints held as equalities (core/linalg/lsi.ts
 *   activeSetCovariance): an approximation that treats the active set as known.
 * - Robust fits report sigma = the robust scale and Huber's standard errors (robust.ts);
 *   leverage is the hat diagonal of the final weighted least-squares step.
 * - Poisson and binomial fits: fitted values are means, bands are built on the link scale
 *   (core/fit/linkCurve.ts), statistics as in core/fit/glmSummary.ts.
 * - The smoothing spline with shapes is fitted by core/fit/shapedSmoothing/ (same
 *   conventions, with the hat-matrix trace at the active set as effectiveDf).
 *
 * Cost: O(n) to cache the basis rows, then O(n) per reweighting iteration.
 * Throws InputError for data that do not fit the outcome (naming the line), FitError when
 * the data cannot support df.
 * Example: fitModel(prepareData({ x, y }), naturalSpline, 6, resolveModel('natural-spline', { outcome: 'counts' })).
 */
export function fitModel(prepared: PreparedData, curveKind: CurveKind, df: number, model: ResolvedModel): FitResult {
  if (curveKind.fitModel) return curveKind.fitModel(prepared, df, model);
  if (!curveKind.rowBasis) throw new InputError(`the ${curveKind.name} cannot be fitted with these options`);
  const kind = curveKind.id;
  const { data } = prepared;
  const glmFamily = OUTCOMES[model.outcome].glm;
  if (glmFamily) checkOutcomeData(glmFamily, data);
  const mb = curveKind.rowBasis(prepared, df, model);
  const rows = new CachedRows(mb.basis, data.x);
  const system = new LinearSystem(mb.basis.size, mb.z, mb.shape, mb.what);
  const n = data.x.length;
  const w = data.w ?? new Float64Array(n).fill(1);
  const shapeNotes = constraintNotes(model, mb, df);
  if (model.outcome !== 'continuous') {
    const fam = OUTCOMES[model.outcome].glm as OutcomeFamily;
    const res = irls(rows, system, data.y, w, fam);
    const { cov, rank } = system.covariance(res.solution);
    const leverage = new Float64Array(n);
    rows.quadratic(cov, res.workingWeights, leverage);
    const etaCurve = new RowBasisCurve(kind, df, mb.lower, mb.upper, mb.basis, res.theta, cov, mb.z);
    const curve = new LinkCurve(etaCurve, fam, fam.outcome === 'proportions' ? medianTrials(w) : 1);
    const notes = [...mb.notes, ...shapeNotes(rank, res.solution.activeCount)];
    const label = `${fam.distribution} outcome (${fam.link} link)`;
    notes.push(
      res.converged
        ? `${label} fitted by iteratively reweighted least squares in ${res.iterations} iterations.`
        : `${label}: the iteratively reweighted least squares did not converge (${res.problem ?? 'unknown reason'}); treat this curve with caution.`,
    );
    return summariseGlm(data, fam, {
      kind,
      df,
      curve,
      coefficients: res.theta,
      knots: mb.knots,
      eta: res.eta,
      mu: res.mu,
      leverage,
      notes,
      report: { ...reportBase(model, res.iterations, res.converged, fam.link), ...constraintReport(mb, df, rank, model) },
    });
  }
  // Least squares and Huber's estimate are equivariant under y -> y - c, and so are the shape
  // rows other than non-negativity (they vanish on constants): fit y - mean and add the mean
  // back, so a small signal on a large offset keeps its digits (see fitRowBasis).
  const { offset, y, unit } = centredY(mb, model, data.y, w);
  if (model.robustK !== undefined) {
    const k = model.robustK;
    const res = huberIrls(rows, system, y, w, k);
    const residuals = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      residuals[i] = (y[i] as number) - (res.fitted[i] as number);
      res.fitted[i] = (res.fitted[i] as number) + offset;
    }
    const total = new Float64Array(n);
    for (let i = 0; i < n; i++) total[i] = (w[i] as number) * (res.weights[i] as number);
    const weighted = system.covariance(res.solution);
    const leverage = new Float64Array(n);
    rows.quadratic(weighted.cov, total, leverage);
    // Huber's standard errors: tau^2 (B'WB)^-1 with the prior weights only, as tau^2 / s^2 times the covariance factor.
    const g = new Float64Array(mb.basis.size * mb.basis.size);
    const rhs = new Float64Array(mb.basis.size);
    rows.gram(w, data.y, g, rhs);
    const prior = system.covarianceFor(g, res.solution);
    const f2 = res.seFactor * res.seFactor;
    const cov = prior.cov.map((v) => v * f2);
    const curve = new RowBasisCurve(kind, df, mb.lower, mb.upper, mb.basis, res.theta, cov, mb.z, offset);
    const down = downweighted(res.weights, w, data.lines);
    const notes = [...mb.notes, ...shapeNotes(weighted.rank, res.solution.activeCount)];
    notes.push(
      `Robust fit (Huber M-estimation, k = ${k}, scale = median |residual| / 0.6745 = ${res.scale.toPrecision(4)}): ${down.total} of ${n} rows down-weighted` +
        (down.rows.length > 0
          ? ` (lowest weights at lines ${down.rows
              .slice(0, 5)
              .map((r) => r.line)
              .join(', ')})`
          : '') +
        (res.converged ? `; converged in ${res.iterations} iterations.` : `; did not converge: ${res.problem ?? ''}.`),
    );
    if (res.converged && res.problem) notes.push(`Robust fit: ${res.problem}.`);
    const base = summariseFit(data, { kind, df, curve, coefficients: withOffset(res.theta, offset, unit), knots: mb.knots, fitted: res.fitted, residuals, leverage, notes });
    const report: ModelReport = {
      ...reportBase(model, res.iterations, res.converged, 'identity'),
      ...constraintReport(mb, df, weighted.rank, model),
      robust: { k, scale: res.scale, weights: res.weights, downweighted: down },
    };
    return { ...base, sigma: res.scale, model: report };
  }
  const g = new Float64Array(mb.basis.size * mb.basis.size);
  const rhs = new Float64Array(mb.basis.size);
  rows.gram(w, y, g, rhs);
  const sol = system.solve(g, rhs);
  const { cov, rank } = system.covariance(sol);
  const fitted = new Float64Array(n);
  rows.apply(sol.theta, fitted);
  const residuals = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    residuals[i] = (y[i] as number) - (fitted[i] as number);
    fitted[i] = (fitted[i] as number) + offset;
  }
  const leverage = new Float64Array(n);
  rows.quadratic(cov, w, leverage);
  const curve = new RowBasisCurve(kind, df, mb.lower, mb.upper, mb.basis, sol.theta, cov, mb.z, offset);
  const notes = [...mb.notes, ...shapeNotes(rank, sol.activeCount)];
  const base = summariseFit(data, { kind, df, curve, coefficients: withOffset(sol.theta, offset, unit), knots: mb.knots, fitted, residuals, leverage, notes });
  return { ...base, model: { ...reportBase(model, 1, true, 'identity'), ...constraintReport(mb, df, rank, model) } };
}

/**
 * y - c with c the weighted mean of y, for continuous fits whose basis spans the constants
 * (`RowBasis.unitCoefficients`) and whose shape rows vanish on constants (every shape but
 * non-negativity); otherwise y itself with c = 0. O(n).
 */
function centredY(mb: ModelBasis, model: ResolvedModel, y: Float64Array, w: Float64Array): { offset: number; y: Float64Array; unit: Float64Array | undefined } {
  if (!mb.basis.unitCoefficients || imposedShapes(model).includes('nonnegative')) return { offset: 0, y, unit: undefined };
  const unit = new Float64Array(mb.basis.size);
  mb.basis.unitCoefficients(unit);
  let sw = 0;
  let swy = 0;
  for (let i = 0; i < y.length; i++) {
    sw += w[i] as number;
    swy += (w[i] as number) * (y[i] as number);
  }
  const offset = sw > 0 && Number.isFinite(swy / sw) ? swy / sw : 0;
  if (offset === 0) return { offset, y, unit };
  const yc = new Float64Array(y.length);
  for (let i = 0; i < y.length; i++) yc[i] = (y[i] as number) - offset;
  return { offset, y: yc, unit };
}

function reportBase(model: ResolvedModel, iterations: number, converged: boolean, link: ModelReport['link']): ModelReport {
  return { outcome: model.outcome, link, shape: model.shape, iterations, converged };
}

/** The shapes imposed as inequalities: non-negativity is implied by a Poisson or binomial outcome. */
function imposedShapes(model: ResolvedModel): readonly Shape[] {
  return model.outcome === 'continuous' ? model.shape : model.shape.filter((s) => s !== 'nonnegative');
}

function constraintReport(mb: ModelBasis, df: number, rank: number, model: ResolvedModel): Pick<ModelReport, 'constraints'> {
  if (imposedShapes(model).length === 0) return {};
  return { constraints: { total: mb.shape?.rows ?? 0, active: rank, effectiveDf: df - rank } };
}

/** Notes on the shape constraints of a fit, as a function of the active count. */
function constraintNotes(model: ResolvedModel, mb: ModelBasis, df: number): (rank: number, active: number) => string[] {
  return (rank, active) => {
    const notes: string[] = [];
    const shapes = imposedShapes(model);
    if (model.outcome !== 'continuous' && model.shape.includes('nonnegative'))
      notes.push(`Shape "nonnegative" is implied by the ${model.outcome} outcome (its mean is always positive) and was not imposed separately.`);
    if (shapes.length === 0) return notes;
    const total = mb.shape?.rows ?? 0;
    const scale = model.outcome === 'continuous' ? '' : ` on the ${OUTCOMES[model.outcome].link} scale`;
    notes.push(
      `Shape: ${shapeWords(shapes)}${scale}, guaranteed everywhere in the data range through ${total} linear inequalities on the B-spline coefficients; ` +
        (active === 0
          ? 'none is active, so the curve equals the unconstrained fit.'
          : `${active} active${rank < active ? ` (${rank} independent)` : ''}, so ${df - rank} of the ${df} coefficients remain free. The bands treat the active constraints as fixed equalities, an approximation that ignores the chance of a different active set.`),
    );
    if (shapes.includes('nonnegative')) notes.push('Non-negativity is guaranteed within the data range only: beyond it the natural spline continues linearly and may cross zero.');
    return notes;
  };
}

/** Rows whose Huber weight is below 1, lowest weight first, at most ROBUST_LIST_LIMIT. */
function downweighted(hw: Float64Array, w: Float64Array, lines: Int32Array | undefined): NonNullable<ModelReport['robust']>['downweighted'] {
  const idx: number[] = [];
  for (let i = 0; i < hw.length; i++) if ((hw[i] as number) < 1 && (w[i] as number) > 0) idx.push(i);
  idx.sort((a, b) => (hw[a] as number) - (hw[b] as number) || a - b);
  const rows = idx.slice(0, ROBUST_LIST_LIMIT).map((i) => ({ index: i, line: lines ? (lines[i] as number) : i + 1, weight: hw[i] as number }));
  return { total: idx.length, rows };
}

/** Median prior weight, rounded, at least 1: the trials of a new binomial reading. */
function medianTrials(w: Float64Array): number {
  const s = Float64Array.from(w).sort();
  const mid = s.length >> 1;
  const med = s.length % 2 === 1 ? (s[mid] as number) : 0.5 * ((s[mid - 1] as number) + (s[mid] as number));
  return Math.max(1, Math.round(med));
}
