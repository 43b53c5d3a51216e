/**
 * The panel's "Widen the candidates" button: a choice at an end of the candidates reruns
 * the analysis of the file with the wider candidates the explanation names, keeping the
 * person's rule, and the panel says the candidates were set in it.
 */
import assert from 'node:assert/strict';
import * as vscode from 'vscode';
import { selectDf } from '../../../core/tune/rules';
import type { RunSummary } from '../../../extension/api';
import { api, closeEverything, file, setSetting, waitFor, writeText } from './helpers';

/**
 * Invented readings for a behaviour test (where the choice sits, not a statistical value):
 * about one and a quarter periods of a wave over 240 rows with a small deterministic
 * wobble, so the resampled error keeps falling as the df grows through 3..6.
 */
function waveCsv(): string {
  const rows = ['t,level'];
  for (let i = 0; i < 240; i++) rows.push(`${i},${(Math.sin(i / 30) + 0.02 * (((i * 37) % 11) - 5)).toFixed(5)}`);
  return `${rows.join('\n')}\n`;
}

describe('widening the candidates from the panel', function () {
  const uri = (): vscode.Uri => file('widen-wave.csv');

  after(async function () {
    await closeEverything();
    await setSetting('candidates', undefined);
    await setSetting('rule', undefined);
    await setSetting('resampling', undefined);
    await vscode.workspace.fs.delete(uri()).then(undefined, () => undefined);
  });

  it('a candidates message reruns with the wider candidates, keeps the rule and marks them as set in the panel', async function () {
    await writeText(uri(), waveCsv());
    await setSetting('candidates', '3..6');
    await setSetting('rule', 'one-se');
    await setSetting('resampling', 'folds:10');
    const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', uri(), { columns: { x: 't', y: 'level' } })) as RunSummary;
    assert.equal(run.status, 'done', run.message);
    const before = api().panelState(uri());
    assert.ok(before);
    const p0 = before.payload;
    assert.deepEqual(
      p0.candidates.map((c) => c.df),
      [3, 4, 5, 6],
    );
    assert.equal(p0.candidatesFromPanel, undefined);
    // The person switches to the least-error rule in the panel; the rerun must keep it.
    const rule = { kind: 'least-error' } as const;
    const sel = selectDf(p0.candidates, rule, p0.metric, 'editor');
    assert.ok(api().panelMessage(uri(), { type: 'choice', runId: p0.runId, rule, df: sel.df }));
    const edge = sel.edge;
    assert.ok(edge, `the choice sits at an end of the candidates for this data (${sel.reason})`);
    assert.equal(edge.side, 'upper');
    const upper = Number(edge.widen.split('..')[1]);
    assert.ok(upper > 6, edge.widen);

    assert.equal(api().panelMessage(uri(), { type: 'candidates', runId: p0.runId, candidates: '6..2' }), false, 'the guard refuses a range going down');
    assert.ok(api().panelMessage(uri(), { type: 'candidates', runId: p0.runId, candidates: edge.widen }), 'the message passes the guard');
    const after = await waitFor('the rerun with the wider candidates', () => {
      const s = api().panelState(uri());
      return s && s.analysed > before.analysed && s.payload.runId > p0.runId ? s : undefined;
    });
    const dfs = after.payload.candidates.map((c) => c.df);
    assert.ok(dfs.includes(upper), `the new run's candidates ${dfs.join(', ')} include df ${upper}`);
    assert.equal(Math.max(...dfs), upper);
    assert.equal(after.payload.candidatesFromPanel, edge.widen, 'the panel is told the candidates were set in it');
    assert.deepEqual(after.payload.rule, rule, "the person's rule is kept");
    assert.equal(after.payload.model.fromPanel, false, 'the model options stay those of the settings');

    // A changed candidates setting replaces the panel's candidates.
    const analysed = after.analysed;
    await setSetting('candidates', '3..8');
    const third = await waitFor('the rerun after the candidates setting changed', () => {
      const s = api().panelState(uri());
      return s && s.analysed > analysed && s.payload.runId > after.payload.runId ? s : undefined;
    });
    assert.equal(third.payload.candidatesFromPanel, undefined);
    // The panel's page has loaded before the test closes it (a page closed while loading
    // could still ask for its script and style).
    await waitFor("the panel's script to load", () => api().panelState(uri())?.ready || undefined);
    assert.deepEqual(
      third.payload.candidates.map((c) => c.df),
      [3, 4, 5, 6, 7, 8],
    );
  });
});
