import { checkResiduals } from '../fit/modelResiduals';
import { externallyStudentized, influentialRows, likelihoodResiduals, standardizedResiduals, type InfluenceReport } from '../stats/influence';
import type { FitResult, XYData } from '../types';

/**
 * The influential rows of a fit (core/stats/influence.ts influentialRows) with the
 * studentized residuals that fit its kind: externally studentized residuals of sqrt(w)-scaled
 * residuals for least-squares, weighted and shape-constrained fits (Student's t reference);
 * likelihood residuals for counts and proportions and residuals standardized by the robust
 * scale for robust fits (normal reference). O(n + k log k) for k flagged rows.
 * Example: influenceOf(fit, data).rows[0]?.line is the CSV line of the row that stands out most.
 */
export function influenceOf(fit: FitResult, data: XYData): InfluenceReport {
  const glm = fit.model?.glm;
  const common = { leverage: fit.leverage, cooksDistance: fit.cooksDistance, df: fit.df, lines: data.lines };
  if (glm) return influentialRows({ ...common, studentized: likelihoodResiduals(glm.devianceResiduals, glm.pearsonResiduals, fit.leverage), reference: 'normal' });
  const checked = checkResiduals(fit, data.w);
  if (fit.model?.robust) return influentialRows({ ...common, studentized: standardizedResiduals(checked.residuals, fit.leverage, checked.scale), reference: 'normal' });
  return influentialRows({ ...common, studentized: externallyStudentized(checked.residuals, fit.leverage, fit.df), reference: 'student' });
}

/** The report of a fit that passes through every reading: the thresholds, and no row flagged (there is no scatter to judge by). */
export function noInfluence(fit: FitResult, data: XYData): InfluenceReport {
  const none = new Float64Array(fit.leverage.length);
  const report = influentialRows({ leverage: none, cooksDistance: none, studentized: none, df: fit.df, reference: 'student', lines: data.lines });
  return report;
}
