/**
 * The numbers of each residual check in one printed form, used by the warnings
 * (core/analysis/warnings.ts), the check lines of the panel and the report
 * (core/view/words.ts) and the command line's summary, so the same statistic never reads
 * with different digits in two places. Test statistics follow testText; effect sizes
 * sizeText beside their threshold.
 */
import type { Diagnostics } from '../analysis/types';
import { EXCESS_KURTOSIS_MATTERS, LAG1_MATTERS, MISFIT_RATIO_MATTERS, SKEWNESS_MATTERS, SPREAD_RATIO_MATTERS } from '../analysis/checks';
import { OVERDISPERSED, UNDERDISPERSED } from '../analysis/dispersion';
import type { InfluenceReport, InfluenceThreshold } from '../stats/influence';
import { digitsToTell, pText, sig, sizeText, testText } from './numbers';

type Check<K extends keyof Diagnostics> = NonNullable<Diagnostics[K]>;

/** "W = 0.981, p = 0.34; skewness 0.12, excess kurtosis 0.31". */
export function shapiroWilkNumbers(s: Check<'shapiroWilk'>): string {
  return `${testText('W', [], s.statistic, s.pValue)}; skewness ${sizeText(s.skewness, SKEWNESS_MATTERS)}, excess kurtosis ${sizeText(s.excessKurtosis, EXCESS_KURTOSIS_MATTERS)}`;
}

/** "DW = 1.97, p < 0.0001; lag-1 correlation 0.016", with how the p-value was found after it when `method` is given. */
export function durbinWatsonNumbers(s: Check<'durbinWatson'>, method?: string): string {
  return `${testText('DW', [], s.statistic, s.pValue)}${method ? ` (${method})` : ''}; lag-1 correlation ${sizeText(s.lag1, LAG1_MATTERS)}`;
}

/** "BP χ²(7) = 27, p = 0.00034; spread ratio 1.04 across thirds of x". */
export function breuschPaganNumbers(s: Check<'breuschPagan'>): string {
  return `${testText('BP χ²', [s.df], s.statistic, s.pValue)}; spread ratio ${sizeText(s.spreadRatio, SPREAD_RATIO_MATTERS)} across thirds of x`;
}

/** "F(7, 45) = 1.77, p = 0.12; misfit 0.3 of the replicate SD". */
export function lackOfFitNumbers(s: Check<'lackOfFit'>): string {
  return `${testText('F', [s.df1, s.df2], s.F, s.pValue)}; misfit ${sizeText(s.misfitRatio, MISFIT_RATIO_MATTERS)} of the replicate SD`;
}

/** "dispersion 2.41 from Pearson χ²(396) = 954": the diagnostics' dispersion, or a fit's model report (ratio = its Pearson dispersion). */
export function dispersionNumbers(d: { readonly ratio: number; readonly residualDf: number; readonly pearsonChi2: number }): string {
  // Three digits, as the fit's notes and model report have always printed the dispersion; more where it would read as its threshold.
  const bound = d.ratio >= 1 ? OVERDISPERSED : UNDERDISPERSED;
  return `dispersion ${sig(d.ratio, digitsToTell([d.ratio, bound]))} from Pearson χ²(${sig(d.residualDf, 4)}) = ${sig(d.pearsonChi2)}`;
}

/** "correlation of neighbouring rows 0.62; runs test z = -8.1, p < 0.0001". */
export function rowOrderNumbers(r: Check<'rowOrder'>): string {
  return `correlation of neighbouring rows ${sizeText(r.lag1, LAG1_MATTERS)}; runs test z = ${sig(r.runs.z)}, ${pText(r.runs.pValue)}`;
}

/** One influence threshold in words: "|studentized residual| above 3.69", "Cook's distance above 0.895", "leverage above 0.5". */
export function thresholdWords(t: InfluenceThreshold): string {
  const what = { outlier: '|studentized residual|', cooks: "Cook's distance", leverage: 'leverage' } as const;
  return `${what[t.rule]} above ${sig(t.value)}`;
}

/** How many flagged rows break each rule: "2 outliers, 1 with Cook's distance above 0.918". */
export function influenceBreakdown(report: InfluenceReport): string {
  const count = (rule: InfluenceThreshold['rule']): number => report.rows.filter((r) => r.exceeds.includes(rule)).length;
  const limit = (rule: InfluenceThreshold['rule']): string => sig(report.thresholds.find((t) => t.rule === rule)?.value ?? NaN);
  const parts: string[] = [];
  const outliers = count('outlier');
  if (outliers) parts.push(`${outliers} outlier${outliers === 1 ? '' : 's'} by the Bonferroni test`);
  const cooks = count('cooks');
  if (cooks) parts.push(`${cooks} with Cook's distance above ${limit('cooks')}`);
  const leverage = count('leverage');
  if (leverage) parts.push(`${leverage} with leverage above ${limit('leverage')}`);
  return parts.join(', ');
}

/** "lines 17, 230 and 4012" of the rows to show, and "(and 12 more)" for the rest. */
export function influenceLines(report: InfluenceReport): string {
  const lines = report.rows.slice(0, report.shown).map((r) => r.line);
  const rest = report.total - report.shown;
  return `line${lines.length === 1 ? '' : 's'} ${lines.join(', ')}${rest > 0 ? ` (and ${rest} more)` : ''}`;
}
