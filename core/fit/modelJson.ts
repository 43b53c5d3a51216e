/**
 * Plain JSON forms of the model options and the model report, for the command line's
 * --json output and the fit record (keys documented in README, "Outcome, shape and robust
 * fitting").
 */
import { outcomeKind } from '../registry/outcomes/index';
import type { ModelOptions, ModelReport } from '../types';
import { resolveModel } from '../registry/curves/index';

const num = (v: number): number | null => (Number.isFinite(v) ? v : null);
const arr = (a: Float64Array): (number | null)[] => Array.from(a, num);

/** Which outcome family, link, shapes, robust fitting and trials column a run used. */
export interface ModelSpecJson {
  readonly outcome: 'continuous' | 'counts' | 'proportions';
  readonly link: 'identity' | 'log' | 'logit';
  readonly shape: readonly string[];
  readonly robust: { readonly k: number } | null;
  readonly trials: string | null;
}

/**
 * The model part of a run's spec: outcome, link, shapes (canonical order), Huber constant
 * (null when not robust) and trials column (null when none). Options are checked as
 * resolveModel does for the natural spline. Example: modelSpecJson({ outcome: 'counts' }) ->
 * { outcome: 'counts', link: 'log', shape: [], robust: null, trials: null }.
 */
export function modelSpecJson(options: ModelOptions, trials?: string): ModelSpecJson {
  const m = resolveModel('natural-spline', options);
  return {
    outcome: m.outcome,
    link: outcomeKind(m.outcome).link,
    shape: m.shape,
    robust: m.robustK !== undefined ? { k: m.robustK } : null,
    trials: trials ?? null,
  };
}

/**
 * The model report of a fit as JSON (null for a plain least-squares fit). Per-row arrays
 * follow the rows used, in input order; down-weighted rows are listed by CSV line.
 */
export function modelReportJson(report: ModelReport | undefined): Record<string, unknown> | null {
  if (!report) return null;
  const g = report.glm;
  const c = report.constraints;
  const r = report.robust;
  return {
    outcome: report.outcome,
    link: report.link,
    shape: report.shape,
    iterations: report.iterations,
    converged: report.converged,
    deviance: g ? num(g.deviance) : null,
    nullDeviance: g ? num(g.nullDeviance) : null,
    pearsonChi2: g ? num(g.pearsonChi2) : null,
    dispersion: g ? num(g.dispersion) : null,
    constraints: c ? { total: c.total, active: c.active, effectiveDf: c.effectiveDf } : null,
    robust: r
      ? { k: r.k, scale: num(r.scale), downweighted: { total: r.downweighted.total, rows: r.downweighted.rows.map((d) => ({ line: d.line, weight: d.weight })) }, weights: arr(r.weights) }
      : null,
    ...(g ? { linearPredictor: arr(g.linearPredictor), pearsonResiduals: arr(g.pearsonResiduals), devianceResiduals: arr(g.devianceResiduals) } : {}),
  };
}
