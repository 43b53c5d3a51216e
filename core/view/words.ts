/**
 * Plain words the panel and the report show for residual checks and model reports (the
 * words of curve kinds, outcomes, resampling schemes and rules live in core/registry/).
 */
import type { Diagnostics } from '../analysis/types';
import { shapeWords } from '../fit/shape';
import type { CheckView } from './model';
import { num } from '../plots/svg';
import { percent, testText } from '../words/numbers';
import { outcomeKind } from '../registry/outcomes/index';
import type { ModelReport, Outcome, Shape } from '../types';

export { CAUTION } from '../words/caution';

export { pText } from '../words/numbers';

/** How the Durbin-Watson p-value was obtained, spelled out. */
function methodWords(method: 'exact' | 'normal' | 'asymptotic'): string {
  const words = { exact: 'exact p-value', normal: 'normal approximation with the exact mean and variance', asymptotic: 'normal approximation with mean 2 and variance 4/n' } as const;
  return words[method];
}

/** The residual checks of a Diagnostics, each in one line, flagged at the 5 % level. */
export function checkViews(d: Diagnostics): CheckView[] {
  const out: CheckView[] = [];
  if (d.shapiroWilk) {
    const s = d.shapiroWilk;
    const flagged = s.pValue < 0.05;
    out.push({
      name: 'Shapiro-Wilk (are the residuals normal?)',
      text: `${testText('W', [], s.statistic, s.pValue)}, n = ${s.n}: ${flagged ? 'the residuals depart from a normal distribution, so the prediction band may be off' : 'no evidence against normal residuals'}${s.note ? ` (${s.note})` : ''}.`,
      flagged,
    });
  }
  if (d.durbinWatson) {
    const s = d.durbinWatson;
    const flagged = s.pValue < 0.05;
    out.push({
      name: 'Durbin-Watson (do neighbours in x order move together?)',
      text: `${testText('DW', [], s.statistic, s.pValue)} (${methodWords(s.method)}): ${flagged ? 'neighbouring residuals are correlated, a sign of structure the curve misses or of drift' : 'no evidence of correlated neighbours'}.`,
      flagged,
    });
  }
  if (d.breuschPagan) {
    const s = d.breuschPagan;
    const flagged = s.pValue < 0.05;
    out.push({
      name: 'Breusch-Pagan (does the spread change?)',
      text: `${testText('BP χ²', [s.df], s.statistic, s.pValue)}: ${flagged ? 'the spread of the residuals changes along the curve, so one band width does not fit everywhere' : 'no evidence of changing spread'}.`,
      flagged,
    });
  }
  if (d.lackOfFit) {
    const s = d.lackOfFit;
    const flagged = s.pValue < 0.05;
    out.push({
      name: 'Lack-of-fit F test (repeated x values)',
      text: `${testText('F', [s.df1, s.df2], s.F, s.pValue)}: ${flagged ? 'the curve misses the means of repeated readings by more than their scatter' : 'the curve agrees with the means of repeated readings'}.`,
      flagged,
    });
  }
  return out;
}

/** What modelWords describes. */
export interface ModelWordsInput {
  readonly outcome: Outcome;
  readonly shape: readonly Shape[];
  /** Huber tuning constant, undefined for least squares. */
  readonly robustK: number | undefined;
  /** Binomial outcome: the trials column's label, if any. */
  readonly trialsLabel?: string | undefined;
}

/**
 * What the readings are, the shapes and robust fitting of a run in one phrase.
 * Example: modelWords({ outcome: 'counts', shape: ['increasing'], robustK: undefined }) ->
 * 'counts (Poisson, log link); shape: increasing, guaranteed everywhere in the data range'.
 */
export function modelWords(m: ModelWordsInput): string {
  const parts = [outcomeKind(m.outcome).words(m.robustK, m.trialsLabel)];
  if (m.shape.length > 0) parts.push(`shape: ${shapeWords(m.shape)}, guaranteed everywhere in the data range`);
  return parts.join('; ');
}

/**
 * A fit's model report in plain words, one fact per line: reweighting iterations and
 * convergence, deviance and Pearson dispersion (Poisson, binomial), active shape
 * constraints, Huber constant, robust scale and the number of down-weighted rows.
 * Example: modelReportLines(fit.model, fit.residualDf)[0] -> 'Fitted by iteratively reweighted least squares in 5 iterations; converged.'.
 */
export function modelReportLines(r: ModelReport, residualDf: number): string[] {
  const out: string[] = [];
  if (r.glm || r.robust) {
    out.push(
      `Fitted by iteratively reweighted least squares in ${r.iterations} iteration${r.iterations === 1 ? '' : 's'}; ${r.converged ? 'converged' : 'did NOT converge, so treat this curve with caution'}.`,
    );
  } else if (!r.converged) {
    out.push('The constrained least-squares solve did NOT converge; treat this curve with caution.');
  }
  if (r.glm) {
    const g = r.glm;
    out.push(`Deviance explained ${percent(1 - g.deviance / g.nullDeviance)}: deviance ${num(g.deviance, 5)} on ${num(residualDf, 4)} residual df, ${num(g.nullDeviance, 5)} for a flat curve.`);
    out.push(
      `Pearson dispersion ${num(g.dispersion, 3)}: about 1 when the spread follows the ${outcomeKind(r.outcome).distribution} distribution; well above 1 means overdispersion, and the bands are then too narrow.`,
    );
  }
  if (r.constraints) {
    const c = r.constraints;
    out.push(
      `Shape ${shapeWords(r.shape)}: ${c.active} of ${c.total} linear inequalities active${c.active ? `, effective df ${num(c.effectiveDf, 4)}` : ', so the curve equals the unconstrained fit'}.`,
    );
  }
  if (r.robust) {
    const b = r.robust;
    out.push(
      `Huber M-estimation with k = ${b.k}; robust scale ${num(b.scale, 4)} (median absolute residual / 0.6745); ${b.downweighted.total} row${b.downweighted.total === 1 ? '' : 's'} down-weighted.`,
    );
  }
  return out;
}
