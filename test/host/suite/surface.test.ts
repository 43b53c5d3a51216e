/**
 * Surfaces in the editor (issue #17, item 5): the tune command with a second input
 * (`columns.x2`) tunes a surface as `knotwise fit --x --x2 --y` does, the panel holds it, a
 * df pair picked through the panel's message changes the pair shown, and saving (the panel's
 * Save and the "Save Curve Table" command while a surface is shown) writes the same bytes as
 * the command line for the same inputs. Data: datasets::trees (Ryan, Joiner & Ryan 1976;
 * written by test/e2e/fixtures/make-fixtures.R). The reference for every number is the
 * command line's own output for the same file and options, run here on a copy of the file;
 * its surfaces are tested against R in test/reference/surface.test.ts.
 */
import assert from 'node:assert/strict';
import { readdirSync } from 'node:fs';
import * as vscode from 'vscode';
import type { RunSummary, SaveSummary } from '../../../extension/api';
import { api, closeEverything, EXTENSION_ID, file, folder, setSetting, text, waitFor, cliOutputs, removeOutputs } from './helpers';

const NAME = 'trees.csv';
const TREES = { columns: { x: 'Girth', x2: 'Height', y: 'Volume' } };
/** The settings this suite runs with (the default grid's corners lie beyond the readings of trees, so extrapolation is on), and the same as command-line options. */
const SETTINGS: readonly [string, unknown][] = [
  ['resampling', 'leave-one-out'],
  ['rule', 'least-error'],
  ['table.extrapolate', true],
];
const OPTIONS = ['--resampling', 'leave-one-out', '--rule', 'least-error', '--extrapolate'];

/** The df pair the command line's surface record names (its fit's df of each input). */
function recordPair(files: Map<string, string>): { x: number; x2: number } {
  const record = files.get('trees.surface.fit.json');
  assert.ok(record, `the command line wrote a surface record (${[...files.keys()].join(', ')})`);
  const df = (JSON.parse(record) as { fit: { df: { x: number; x2: number } } }).fit.df;
  return { x: df.x, x2: df.x2 };
}

/** Every file `knotwise fit` writes for the data file with `args`, by name. */
const cliFiles = (args: readonly string[]): Map<string, string> => cliOutputs(NAME, ['--x', 'Girth', '--x2', 'Height', '--y', 'Volume', ...args]);

describe('surfaces in the extension host (datasets::trees)', function () {
  let reference: Map<string, string>;

  before(async function () {
    await vscode.extensions.getExtension(EXTENSION_ID)?.activate();
    await closeEverything();
    for (const [key, value] of SETTINGS) await setSetting(key, value);
    reference = cliFiles(OPTIONS);
  });

  after(async function () {
    await closeEverything();
    await removeOutputs('trees', NAME);
    for (const [key] of SETTINGS) await setSetting(key, undefined);
  });

  it('the tune command with a second input tunes the surface the command line chooses, and the panel holds it', async function () {
    const uri = file(NAME);
    const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', uri, TREES)) as RunSummary;
    assert.equal(run.status, 'done', run.message);
    // Reference: the pair in the command line's surface record for the same file and options.
    assert.deepEqual(run.surface, recordPair(reference));
    assert.equal(run.rowsUsed, 31, 'R: nrow(trees) is 31');
    const state = await waitFor('the panel to show the surface', () => api().surfaceState(uri));
    assert.deepEqual(state.view.pair, run.surface);
    assert.deepEqual(state.view.labels, { x: 'Girth', x2: 'Height', y: 'Volume' });
    assert.equal(state.view.byHand, false);
    assert.ok(state.view.landscape, 'a tuned surface has its landscape');
    assert.ok(
      api()
        .panelLog(uri)
        .some((m) => m.type === 'surface' && m.view.runId === state.view.runId),
      'the panel’s script was sent the surface',
    );
  });

  it('a df pair picked through the panel changes the pair shown; hostile pairs are refused', async function () {
    const uri = file(NAME);
    const s0 = await waitFor('the surface', () => api().surfaceState(uri));
    const want = s0.view.pair.x === 3 && s0.view.pair.x2 === 2 ? { x: 2, x2: 3 } : { x: 3, x2: 2 };
    for (const bad of [
      { type: 'surfacePair', runId: s0.view.runId, x: 0, x2: 2 },
      { type: 'surfacePair', runId: s0.view.runId, x: 2.5, x2: 2 },
      { type: 'surfacePair', runId: String(s0.view.runId), x: 2, x2: 2 },
      { type: 'surfacePair', runId: s0.view.runId, x: 2, x2: 2, extra: 1 },
    ])
      assert.equal(api().panelMessage(uri, bad), false, JSON.stringify(bad));
    assert.equal(api().panelMessage(uri, { type: 'surfacePair', runId: s0.view.runId, ...want }), true);
    const s1 = await waitFor('the pair picked by hand', () => {
      const s = api().surfaceState(uri);
      return s && s.view.byHand ? s : undefined;
    });
    assert.deepEqual(s1.view.pair, want);
    assert.equal(s1.analysed, s0.analysed, 'nothing was tuned again');
    // Back to the rule's pair.
    assert.equal(api().panelMessage(uri, { type: 'surfaceRule', runId: s0.view.runId }), true);
    const s2 = await waitFor('the rule’s pair again', () => {
      const s = api().surfaceState(uri);
      return s && !s.view.byHand ? s : undefined;
    });
    assert.deepEqual(s2.view.pair, s0.view.pair);
  });

  it('"Save Curve Table" while the surface is shown writes byte for byte what the command line writes', async function () {
    await removeOutputs('trees', NAME);
    const uri = file(NAME);
    const before = await waitFor('the surface', () => api().surfaceState(uri));
    const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', uri, { replaceForeignFiles: 'no' })) as SaveSummary;
    assert.equal(saved.status, 'done', saved.message);
    assert.equal(api().surfaceState(uri)?.analysed, before.analysed, 'saved without tuning again');
    const names = (saved.files ?? []).map((u) => vscode.Uri.parse(u).path.split('/').pop());
    assert.deepEqual([...names].sort(), [...reference.keys()].sort(), 'the same files as the command line');
    for (const [name, bytes] of reference) assert.equal(await text(file(name)), bytes, name);
    assert.deepEqual(
      readdirSync(folder().fsPath).filter((f) => f.includes('knotwise-tmp')),
      [],
      'no temporary file is left',
    );
  });

  it("the panel's Save of a pair picked by hand writes what fit --df <x>x<x2> writes", async function () {
    await removeOutputs('trees', NAME);
    const uri = file(NAME);
    const s0 = await waitFor('the surface', () => api().surfaceState(uri));
    const pair = s0.view.pair.x === 3 && s0.view.pair.x2 === 2 ? { x: 2, x2: 3 } : { x: 3, x2: 2 };
    assert.equal(api().panelMessage(uri, { type: 'surfacePair', runId: s0.view.runId, ...pair }), true);
    await waitFor('the pair picked by hand', () => (api().surfaceState(uri)?.view.byHand ? true : undefined));
    // A pair given alone (no --resampling, no --rule) is fitted as given, as a pair picked by hand.
    const expected = cliFiles(['--extrapolate', '--df', `${pair.x}x${pair.x2}`]);
    const from = api().panelLog(uri).length;
    assert.equal(api().panelMessage(uri, { type: 'surfaceSave', requestId: 7, runId: s0.view.runId }), true);
    const answer = await waitFor('the save’s answer', () =>
      api()
        .panelLog(uri)
        .slice(from)
        .find((m) => (m.type === 'saved' || m.type === 'saveFailed') && m.requestId === 7),
    );
    assert.equal(answer.type, 'saved', JSON.stringify(answer));
    for (const [name, bytes] of expected) assert.equal(await text(file(name)), bytes, name);
  });
});
