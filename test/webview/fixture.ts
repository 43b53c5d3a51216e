/**
 * Panel payloads built by the real core (ingest, analyse, view) from the open data sets
 * in test/e2e/fixtures (R's `cars`, MASS::mcycle, MASS::menarche; see make-fixtures.R there).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../core/analysis/analysis';
import type { Analysis, AnalysisOptions } from '../../core/analysis/types';
import { parseCsvText } from '../../core/ingest/reader';
import { selectColumns } from '../../core/ingest/select';
import { selectTrials } from '../../core/ingest/trials';
import type { PanelPayload } from '../../core/view/model';
import type { XYData } from '../../core/types';
import { buildPanelPayload } from '../../core/view/payload';

export const fixtureDir = join(__dirname, '..', 'e2e', 'fixtures');

/** One analysed fixture: the payload plus what the fake host needs to answer detail requests. */
export interface Fixture {
  readonly payload: PanelPayload;
  readonly analysis: Analysis;
  readonly data: XYData;
}

/**
 * Reads a fixture CSV (optionally with its header line replaced) and analyses columns x, y
 * (with `trials`, a binomial outcome's trials column, as the host does).
 */
export async function analysedFixture(file: string, x: string, y: string, options: AnalysisOptions, header?: string, trials?: string): Promise<Fixture> {
  let text = readFileSync(join(fixtureDir, file), 'utf8');
  if (header !== undefined) text = header + text.slice(text.indexOf('\n'));
  const table = parseCsvText(text, { file });
  const sel = trials !== undefined ? selectTrials(table, { x, y }, trials, file) : selectColumns(table, { x, y }, file);
  const analysis = await analyse(sel.data, options);
  const payload = buildPanelPayload({
    runId: 1,
    analysis,
    source: { fileName: file, xLabel: sel.labels.x, yLabel: sel.labels.y },
    rejected: sel.rejected.length,
    heldOut: 0,
    tolerancePercent: 2,
    trialsLabel: trials !== undefined ? sel.labels.weights : undefined,
  });
  return { payload, analysis, data: analysis.data };
}

/** MASS::mcycle, natural spline df 3..15, 10-fold cross-validation repeated 3 times (seed 1), one-SE rule. */
export function mcycleFixture(): Promise<Fixture> {
  return analysedFixture('mcycle.csv', 'times', 'accel', {
    kind: 'natural-spline',
    candidates: [3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14, 15],
    resample: { kind: 'folds', folds: 10, repeats: 3 },
    rule: { kind: 'one-se' },
    seed: 1,
  });
}
