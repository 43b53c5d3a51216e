/**
 * Column selection for a binomial outcome given as successes (y) out of a number of trials
 * per row: the successes become proportions and the trials their prior weights.
 */
import { InputError } from '../errors';
import { binomialFromTrials } from '../fit/glm';
import { type ColumnChoice, selectColumns, type Selection } from './select';
import type { ParsedTable } from './types';

/**
 * Chooses x, successes (`choice.y`) and a trials column. Rows with a missing or invalid
 * cell, or with trials not above 0, are rejected and listed by line as by selectColumns
 * (the reason names the trials column); successes outside [0, trials] are refused with an
 * InputError naming the line and column. The returned data hold y = successes / trials and
 * w = trials, which gives the binomial likelihood of the counts (core/fit/glm.ts
 * binomialFromTrials); `labels.weights` names the trials column. A weights column cannot be
 * combined with trials. Cost O(rows).
 * Example: selectTrials(table, { x: 'age', y: 'yes' }, 'asked') -> data.y = yes / asked, data.w = asked.
 */
export function selectTrials(table: ParsedTable, choice: ColumnChoice, trials: string, file?: string): Selection {
  if (choice.weights !== undefined) throw new InputError('a trials column and a weights column cannot be combined: with a binomial outcome the trials are the weights', { file });
  const sel = selectColumns(table, { x: choice.x, y: choice.y, weights: trials }, file);
  const label = sel.labels.weights as string;
  const rejected = sel.rejected.map((r) => (r.column === label ? { ...r, reason: r.reason.replace(/^weight /, 'number of trials ') } : r));
  try {
    const data = binomialFromTrials({ x: sel.data.x, y: sel.data.y, lines: sel.data.lines }, sel.data.w as Float64Array);
    return { ...sel, data, rejected };
  } catch (e) {
    if (!(e instanceof InputError)) throw e;
    const column = e.place.column === 'y' ? sel.labels.y : e.place.column === 'trials' ? label : e.place.column;
    throw new InputError(e.message, { file, line: e.place.line, column });
  }
}
