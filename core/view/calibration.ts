/**
 * What the panel shows of calibration use for one df: the inverse table in words (or why
 * the curve has none: where it turns), whether it is saved with the curve table, and the
 * drift from the curve of the fit record on disk, with its figure.
 */
import { InputError } from '../errors';
import { buildInverse, inverseWords } from '../calibrate/inverseOutput';
import type { InverseSpec } from '../calibrate/spec';
import { curveSample, driftFromRecord, type CurveSample } from '../calibrate/drift';
import { driftSvg } from '../plots/drift';
import { DRIFT_READING } from '../report/figures';
import type { FitResult } from '../types';
import { renderOptions } from '../words/options';
import type { CalibrationView } from './model';

export type { CalibrationView } from './model';

/**
 * The calibration view of `fit`: the inverse table as `spec` asks (previewed even when it is
 * not saved), and the drift from `recorded` (the curve sample of the record on disk), if any.
 * Cost: the inverse table's and O(sample points).
 */
export function calibrationView(fit: FitResult, spec: InverseSpec, saved: boolean, recorded: CurveSample | 'none' | 'unusable', labels: { readonly x: string; readonly y: string }): CalibrationView {
  let inverse: CalibrationView['inverse'];
  try {
    const out = buildInverse(fit, spec, (v) => v);
    inverse = { words: inverseWords(out.summary), method: out.summary.method };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    inverse = { refused: renderOptions(e.describe('editor'), 'editor') };
  }
  if (recorded === 'none') return { inverse, inverseSaved: saved };
  if (recorded === 'unusable') return { inverse, inverseSaved: saved, driftNote: 'The fit record beside the data holds no curve to compare with (written by an earlier Knotwise); saving writes one.' };
  const drift = driftFromRecord(recorded, fit);
  if (!drift) return { inverse, inverseSaved: saved, driftNote: 'The recorded curve and this one share no x range.' };
  const svg = driftSvg({ id: 'kw-fig-drift', recorded, current: curveSample(fit), drift, xLabel: labels.x, yLabel: labels.y, reading: DRIFT_READING });
  return { inverse, inverseSaved: saved, drift: { words: drift.words, svg, within: drift.withinRecordedBand } };
}
