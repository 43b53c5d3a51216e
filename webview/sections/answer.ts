/**
 * The answer, first on the panel: the chosen df with its fit statistics and the reason
 * for it, what the other rules would choose, what moved since the run before, how many
 * warnings the details hold, and the buttons that act on the answer (save, run again,
 * stop) with the run's status and progress.
 */
import { ruleWords } from '../../core/registry/rules/index';
import { sig } from '../../core/tune/format';
import type { PanelPayload, RefitView } from '../../core/view/model';
import { percent } from '../../core/words/numbers';
import { el, replaceChildren } from '../dom';
import { explain } from '../explanation';
import type { Choice, PanelActions, Section } from './section';

/** The warnings of a choice: the run's, the df's, and the held-out check when there is one. */
export function warningsOf(c: Choice): string[] {
  const p = c.payload;
  const out = [...p.warnings, ...(c.detail?.warnings ?? [])];
  if (p.holdout) out.push(`Held-out check on ${p.holdout.rows} rows: RMSE ${sig(p.holdout.rmse)} against ${sig(p.holdout.resampledRmse)} estimated by resampling.`);
  return out;
}

/** Builds the answer section of payload `p`. */
export function answerSection(p: PanelPayload, actions: PanelActions): Section {
  const button = (id: string, cls: string, text: string, act: () => void, hidden = false): HTMLButtonElement => {
    const b = el('button', { type: 'button', id, class: cls, hidden }, text);
    b.addEventListener('click', act);
    return b;
  };
  const badge = el('span', { class: 'kw-df-badge', id: 'kw-chosen-df' });
  const stats = el('span', { id: 'kw-fit-stats', class: 'kw-muted' });
  const reason = el('p', { id: 'kw-reason', 'aria-live': 'polite' });
  const moreText = el('span', { id: 'kw-reason-more-text' });
  // A choice at an end of the candidates: one click reruns with the wider candidates the warning names.
  let widenTo = '';
  const widen = button(
    'kw-widen',
    'kw-secondary',
    '',
    () => {
      if (widenTo !== '') actions.widenCandidates(widenTo);
    },
    true,
  );
  const more = el('p', { id: 'kw-reason-more', hidden: true }, moreText, ' ', widen);
  const others = el('ul', { id: 'kw-alternatives', class: 'kw-inline-list' });
  const warningText = el('span', { id: 'kw-warning-count' });
  const warningLink = button('kw-warning-link', 'kw-link', 'see the residual checks', () => actions.openFold('residual-checks'));
  const warningNote = el('p', { id: 'kw-warning-note', class: 'kw-warning', hidden: true }, warningText, ' ', warningLink);
  const element = el(
    'section',
    { class: 'kw-verdict', id: 'kw-answer', 'aria-labelledby': 'kw-verdict-title' },
    el(
      'div',
      { class: 'kw-verdict-head' },
      el('h2', { id: 'kw-verdict-title' }, 'Chosen flexibility'),
      badge,
      stats,
      el(
        'div',
        { class: 'kw-actions' },
        button('kw-save', 'kw-primary', 'Save table and record', () => actions.save()),
        button('kw-rerun', 'kw-secondary', 'Run again', () => actions.rerun()),
        button('kw-stop', 'kw-secondary', 'Stop', () => actions.stop(), true),
      ),
    ),
    reason,
    more,
    el('div', { class: 'kw-others' }, el('span', { class: 'kw-muted' }, 'Other rules: '), others),
    p.refit ? el('p', { id: 'kw-moved', class: 'kw-moved' }, movedText(p.refit, p)) : null,
    warningNote,
    el(
      'div',
      { class: 'kw-progress-row' },
      el('p', { id: 'kw-status', role: 'status', class: 'kw-status' }),
      el('progress', { id: 'kw-progress', max: 1, hidden: true, 'aria-label': 'Progress of the analysis' }),
    ),
  );
  return {
    element,
    show(c) {
      const { selection: sel, detail } = c;
      badge.textContent = `df ${sel.df}`;
      stats.textContent = detail
        ? `residual SD ${sig(detail.sigma, 4)}, ${detail.model?.glm ? `deviance explained ${percent(detail.r2)}` : `R² ${sig(detail.r2, 4)}`}, AIC ${sig(detail.aic, 5)}${detail.lambda !== undefined ? `, lambda ${sig(detail.lambda, 3)}` : ''}`
        : 'checking the residuals…';
      const e = explain(sel);
      reason.textContent = e.reason;
      moreText.textContent = e.more;
      more.hidden = e.more === '';
      widenTo = sel.edge?.widen ?? '';
      widen.hidden = widenTo === '';
      widen.textContent = widenTo === '' ? '' : `Widen the candidates to ${widenTo}`;
      // A choice at an end of the candidates is a warning: the best df may lie beyond them.
      more.className = sel.edge ? 'kw-warning' : 'kw-muted';
      replaceChildren(others, ...e.others.map((a) => el('li', {}, `${ruleWords(a.rule)} → df ${a.df}${a.df === sel.df ? ' (the same)' : ''}`)));
      const n = warningsOf(c).length;
      warningNote.hidden = n === 0;
      warningText.textContent = n === 0 ? '' : `${n} warning${n === 1 ? '' : 's'} for this df;`;
    },
  };
}

/** What moved when the analysis ran again on changed data. */
export function movedText(r: RefitView, p: PanelPayload): string {
  const why = r.reason === 'saved' ? `Refitted after ${p.source.fileName} changed` : 'Refitted';
  const rows = r.rowsBefore === r.rowsNow ? `${r.rowsNow} rows as before` : `${r.rowsBefore} → ${r.rowsNow} rows`;
  const df = r.ruleDropped
    ? `the earlier choice no longer applies, so the ${ruleWords(p.rule)} chose df ${r.dfNow} (df ${r.dfBefore} before)`
    : r.dfNow === r.dfBefore
      ? `the chosen df stayed at ${r.dfNow}`
      : `the chosen df moved from ${r.dfBefore} to ${r.dfNow}`;
  const share = r.ySpread > 0 ? ` (${percent(r.largestChange / r.ySpread)} of the spread of ${p.source.yLabel})` : '';
  return `${why}: ${rows}; ${df}; the curve moved by at most ${sig(r.largestChange, 3)} at ${p.source.xLabel} = ${sig(r.atX, 4)}${share}.`;
}
