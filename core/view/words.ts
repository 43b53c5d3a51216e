/**
 * Plain words the panel and the report show for residual checks and model reports (the
 * words of curve kinds, outcomes, resampling schemes and rules live in core/registry/).
 */
import type { Diagnostics, SizedVerdict } from '../analysis/types';
import { CHECK_LEVEL, EXCESS_KURTOSIS_MATTERS, LAG1_MATTERS, MISFIT_RATIO_MATTERS, SKEWNESS_MATTERS, SPREAD_RATIO_MATTERS } from '../analysis/checks';
import { OVERDISPERSED, UNDERDISPERSED } from '../analysis/dispersion';
import { breuschPaganNumbers, dispersionNumbers, durbinWatsonNumbers, lackOfFitNumbers, rowOrderNumbers, shapiroWilkNumbers } from '../words/checks';
import { shapeWords } from '../fit/shape';
import type { CheckView } from './model';
import { num } from '../plots/svg';
import { percent, sig } from '../words/numbers';
import { outcomeKind } from '../registry/outcomes/index';
import type { ModelReport, Outcome, Shape } from '../types';

export { CAUTION } from '../words/caution';

export { pText } from '../words/numbers';

/** How the Durbin-Watson p-value was obtained, spelled out. */
function methodWords(method: 'exact' | 'normal' | 'asymptotic'): string {
  const words = { exact: 'exact p-value', normal: 'normal approximation with the exact mean and variance', asymptotic: 'normal approximation with mean 2 and variance 4/n' } as const;
  return words[method];
}

/** What a test found, in words: flagged (significant and large enough), significant but small, large but not significant, or nothing. */
function verdictWords(pValue: number, v: SizedVerdict, words: { readonly found: string; readonly small: string; readonly none: string }): string {
  if (v.flagged) return words.found;
  if (pValue < CHECK_LEVEL) return `detectable (many rows make small departures significant), but ${words.small} is too small to matter`;
  return v.sizeMatters ? `no clear evidence: the size reaches its threshold, but with these rows the test cannot tell it from chance` : words.none;
}

/**
 * The residual checks of a Diagnostics, each in one line with its test, p-value and effect
 * size, flagged when the test is significant at CHECK_LEVEL and the size matters
 * (core/analysis/checks.ts); also the dispersion of counts and proportions and the drift in
 * row order.
 */
export function checkViews(d: Diagnostics): CheckView[] {
  const out: CheckView[] = [];
  if (d.shapiroWilk) {
    const s = d.shapiroWilk;
    const words = {
      found: 'the residuals depart from a normal distribution, so the prediction band may be off',
      small: `a skewness under ${sig(SKEWNESS_MATTERS)} and an excess kurtosis under ${sig(EXCESS_KURTOSIS_MATTERS)} in size`,
      none: 'no evidence against normal residuals',
    };
    const bySkew = Math.abs(s.skewness) / SKEWNESS_MATTERS >= Math.abs(s.excessKurtosis) / EXCESS_KURTOSIS_MATTERS;
    out.push({
      name: 'Shapiro-Wilk (are the residuals normal?)',
      text: `${shapiroWilkNumbers(s)}, n = ${s.n}: ${verdictWords(s.pValue, s, words)}${s.note ? ` (${s.note})` : ''}.`,
      flagged: s.flagged,
      effect: bySkew
        ? { name: 'skewness', value: s.skewness, threshold: SKEWNESS_MATTERS, matters: s.sizeMatters }
        : { name: 'excess kurtosis', value: s.excessKurtosis, threshold: EXCESS_KURTOSIS_MATTERS, matters: s.sizeMatters },
    });
  }
  if (d.durbinWatson) {
    const s = d.durbinWatson;
    const words = {
      found: 'neighbouring residuals are correlated, a sign of structure the curve misses or of drift',
      small: `a lag-1 correlation below ${sig(LAG1_MATTERS)}`,
      none: 'no evidence of correlated neighbours',
    };
    out.push({
      name: 'Durbin-Watson (do neighbours in x order move together?)',
      text: `${durbinWatsonNumbers(s, methodWords(s.method))}: ${verdictWords(s.pValue, s, words)}.`,
      flagged: s.flagged,
      effect: { name: 'lag-1 correlation', value: s.lag1, threshold: LAG1_MATTERS, matters: s.sizeMatters },
    });
  }
  if (d.breuschPagan) {
    const s = d.breuschPagan;
    const words = {
      found: 'the spread of the residuals changes along the curve, so one band width does not fit everywhere',
      small: `a spread ratio below ${sig(SPREAD_RATIO_MATTERS)}`,
      none: 'no evidence of changing spread',
    };
    out.push({
      name: 'Breusch-Pagan (does the spread change?)',
      text: `${breuschPaganNumbers(s)}: ${verdictWords(s.pValue, s, words)}.`,
      flagged: s.flagged,
      effect: { name: 'spread ratio', value: s.spreadRatio, threshold: SPREAD_RATIO_MATTERS, matters: s.sizeMatters },
    });
  }
  if (d.lackOfFit) {
    const s = d.lackOfFit;
    const words = {
      found: 'the curve misses the means of repeated readings by more than their scatter',
      small: `a misfit below ${sig(MISFIT_RATIO_MATTERS)} of the replicate SD`,
      none: 'the curve agrees with the means of repeated readings',
    };
    out.push({
      name: 'Lack-of-fit F test (repeated x values)',
      text: `${lackOfFitNumbers(s)}: ${verdictWords(s.pValue, s, words)}.`,
      flagged: s.flagged,
      effect: { name: 'misfit ratio', value: s.misfitRatio, threshold: MISFIT_RATIO_MATTERS, matters: s.sizeMatters },
    });
  }
  if (d.dispersion) {
    const s = d.dispersion;
    const words = {
      over: `more scatter than the distribution allows (above ${sig(OVERDISPERSED)}), so the bands are too narrow`,
      under: `less scatter than the distribution gives (below ${sig(UNDERDISPERSED, 2)}), so the bands are too wide`,
      'as-expected': `the scatter matches the distribution (between ${sig(UNDERDISPERSED, 2)} and ${sig(OVERDISPERSED)})`,
      binary: 'pass/fail readings one at a time cannot show over- or under-dispersion',
    } as const;
    const over = s.ratio >= 1;
    out.push({
      name: 'Dispersion (is the scatter what the distribution says?)',
      text: `${dispersionNumbers(s)}: ${words[s.verdict]}.`,
      flagged: s.verdict === 'over' || s.verdict === 'under',
      effect: { name: 'dispersion', value: s.ratio, threshold: over ? OVERDISPERSED : UNDERDISPERSED, matters: s.verdict === 'over' || s.verdict === 'under' },
    });
  }
  if (d.rowOrder) {
    const s = d.rowOrder;
    const words = {
      found: 'the residuals drift along the rows: the readings may have changed while they were taken',
      small: `a correlation of neighbouring rows below ${sig(LAG1_MATTERS)}`,
      none: 'no evidence of drift along the rows',
    };
    out.push({
      name: 'Row order (do the residuals drift along the file?)',
      text: `${rowOrderNumbers(s)}: ${s.sameAsX ? 'the rows are in x order, so this repeats the Durbin-Watson check' : verdictWords(s.runs.pValue, s, words)}.`,
      flagged: s.flagged,
      effect: { name: 'correlation of neighbouring rows', value: s.lag1, threshold: LAG1_MATTERS, matters: s.sizeMatters },
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
      `Pearson ${dispersionNumbers({ ratio: g.dispersion, residualDf, pearsonChi2: g.pearsonChi2 })}: about 1 when the spread follows the ${outcomeKind(r.outcome).distribution} distribution; above ${sig(OVERDISPERSED)} the bands are too narrow, below ${sig(UNDERDISPERSED, 2)} too wide (common practice).`,
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
