/**
 * The warnings of a fit's residual checks: one sentence for each check whose test is
 * significant and whose size matters (core/analysis/checks.ts), for over- or under-dispersion,
 * drift in row order, rows that stand out, and a curve through every reading. The numbers
 * come from core/words/checks.ts, so each reads as in the check lines.
 */
import type { Diagnostics } from './types';
import { OVERDISPERSED, UNDERDISPERSED } from './dispersion';
import { breuschPaganNumbers, dispersionNumbers, durbinWatsonNumbers, influenceBreakdown, influenceLines, lackOfFitNumbers, rowOrderNumbers, shapiroWilkNumbers } from '../words/checks';
import { sig } from '../words/numbers';
import { outcomeKind } from '../registry/outcomes/index';
import type { FitResult } from '../types';

/** The warnings of `d`, in the order the checks are listed. */
export function checkWarnings(d: Omit<Diagnostics, 'warnings'>, fit: FitResult, n: number): string[] {
  const out: string[] = [];
  const exact = d.exactFit;
  if (exact?.reason === 'no-residual-df' && n >= 3) {
    out.push(
      `The residual checks were not run: too few rows for the df (n = ${n}, df = ${sig(fit.df, 4)}); a curve with as many coefficients as rows passes through every reading and leaves no residual variation to check.`,
    );
  } else if (exact?.reason === 'rounding') {
    out.push(
      `The curve passes through every reading (largest residual ${sig(exact.maxResidual, 2)}, at the rounding level of the readings): there is no scatter left, so the residual checks (normality, correlation, spread, influence, drift) were not run.`,
    );
  }
  if (d.shapiroWilk?.flagged) out.push(`Residuals do not look normal (Shapiro-Wilk ${shapiroWilkNumbers(d.shapiroWilk)}); the prediction band assumes normal errors.`);
  if (d.durbinWatson?.flagged) out.push(`Neighbouring residuals in x order move together (Durbin-Watson ${durbinWatsonNumbers(d.durbinWatson)}): the curve may be too stiff, or the readings drift.`);
  if (d.breuschPagan?.flagged) out.push(`The spread of the residuals changes with x (Breusch-Pagan ${breuschPaganNumbers(d.breuschPagan)}); the bands assume constant spread. Consider weights.`);
  if (d.lackOfFit?.flagged)
    out.push(`The curve misses the means of replicated readings more than their scatter explains (lack-of-fit ${lackOfFitNumbers(d.lackOfFit)}); a more flexible curve may be needed.`);
  const disp = d.dispersion;
  const distribution = fit.model ? outcomeKind(fit.model.outcome).distribution : '';
  if (disp?.verdict === 'over')
    out.push(
      `The readings scatter more than a ${distribution} distribution allows (${dispersionNumbers(disp)}, above ${sig(OVERDISPERSED)}): the bands are too narrow, by a factor of about ${sig(Math.sqrt(disp.ratio), 2)}. Look for structure the curve misses (a more flexible curve, a missing variable), or widen the bands by that factor.`,
    );
  if (disp?.verdict === 'under')
    out.push(
      `The readings scatter less than a ${distribution} distribution would (${dispersionNumbers(disp)}, below ${sig(UNDERDISPERSED, 2)}): the bands are too wide. The readings may not be independent counts (rounded, capped or averaged); check how they were recorded.`,
    );
  if (d.rowOrder?.flagged)
    out.push(
      `The residuals drift in row order, the order of the file and usually of measurement (${rowOrderNumbers(d.rowOrder)}): the readings may have drifted while they were taken (warm-up, wear, a change of set-up); check the measurement log.`,
    );
  const inf = d.influential;
  if (inf.total > 0)
    out.push(
      `${inf.total} row${inf.total === 1 ? ' stands' : 's stand'} out (${influenceBreakdown(inf)}): ${influenceLines(inf)}; check ${inf.total === 1 ? 'it' : 'them'} before trusting the curve.`,
    );
  return out;
}
