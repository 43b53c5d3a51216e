/**
 * The editor follows the data: a change to the data file (an unsaved edit, a save, a
 * change on disk by another program, a deleted file) marks the panel's analysis out of
 * date at once and says what changed; a curve table is saved only from an analysis of the
 * bytes on disk; saving the file refits, keeping a df picked by hand, and says what moved;
 * Problems entries live as long as the panel that lists them; a line opens beside the
 * panel; a run stopped in the panel runs again from it. Data: R's `cars` (Ezekiel 1930;
 * test/e2e/fixtures/make-fixtures.R), copied under new names (one with two readings
 * broken) so the other suites' files stay as they are.
 */
import assert from 'node:assert/strict';
import { createHash } from 'node:crypto';
import * as vscode from 'vscode';
import { fitCurve } from '../../../core/fit/index';
import type { HostMessage } from '../../../core/protocol';
import type { RunSummary } from '../../../extension/api';
import { compareRows, dataRowCount } from '../../../extension/dataChange';
import { api, closeEverything, EXTENSION_ID, exists, file, setSetting, text, waitFor, writeText } from './helpers';

const CARS = { columns: { x: 'speed', y: 'dist' } };

/** A fresh copy of a workspace file under `name`. */
async function copyOf(from: string, name: string): Promise<vscode.Uri> {
  const uri = file(name);
  await vscode.workspace.fs.copy(file(from), uri, { overwrite: true });
  return uri;
}

async function tune(uri: vscode.Uri, columns = CARS): Promise<RunSummary> {
  const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', uri, columns)) as RunSummary;
  assert.equal(run.status, 'done', run.message);
  return run;
}

/** The panel's answer to save request `requestId`. */
function answer(uri: vscode.Uri, requestId: number): Promise<Extract<HostMessage, { type: 'saved' | 'saveFailed' }>> {
  return waitFor(`the answer to save request ${requestId}`, () =>
    api()
      .panelLog(uri)
      .find((m): m is Extract<HostMessage, { type: 'saved' | 'saveFailed' }> => (m.type === 'saved' || m.type === 'saveFailed') && m.requestId === requestId),
  );
}

/** Sends the panel's save (or Refit and save) for the shown run with its rule, as the button does. */
function pressSave(uri: vscode.Uri, requestId: number, refit = false): void {
  const p = api().panelState(uri)?.payload;
  assert.ok(p, 'the panel shows a result');
  assert.ok(api().panelMessage(uri, { type: refit ? 'refitAndSave' : 'save', requestId, runId: p.runId, rule: p.rule }), 'the panel message passes the guard');
}

const sha256 = (bytes: Uint8Array): string => createHash('sha256').update(bytes).digest('hex');

/** Reverts every data file with unsaved edits, so closing the editors asks nothing. */
async function revertAll(): Promise<void> {
  for (const doc of vscode.workspace.textDocuments.filter((d) => d.isDirty)) {
    await vscode.window.showTextDocument(doc);
    await vscode.commands.executeCommand('workbench.action.files.revert');
  }
}

async function remove(...names: string[]): Promise<void> {
  for (const n of names) await vscode.workspace.fs.delete(file(n)).then(undefined, () => undefined);
}

describe('the data and its panel (compareRows)', function () {
  // Identities of the definition in extension/dataChange.ts: rows compared as a multiset of lines.
  it('counts rows added, removed and changed, and a changed header', function () {
    const base = 'x,y\n1,2\n3,4\n5,6\n';
    assert.deepEqual(compareRows(base, base), { added: 0, removed: 0, changed: 0, header: false });
    assert.deepEqual(compareRows(base, `${base}7,8\n9,10\n`), { added: 2, removed: 0, changed: 0, header: false });
    assert.deepEqual(compareRows(base, 'x,y\n1,2\n5,6\n'), { added: 0, removed: 1, changed: 0, header: false });
    assert.deepEqual(compareRows(base, 'x,y\n1,2\n3,4.5\n5,6\n'), { added: 0, removed: 0, changed: 1, header: false });
    assert.deepEqual(compareRows(base, 'x,z\n1,2\n3,4\n5,6\n'), { added: 0, removed: 0, changed: 0, header: true });
    assert.deepEqual(compareRows(base, 'x,y\n1,2.5\n3,4\n5,6\n11,12\n'), { added: 1, removed: 0, changed: 1, header: false });
  });

  it('ignores line endings, blank lines, a byte order mark and rows that only moved', function () {
    const base = 'x,y\n1,2\n3,4\n5,6\n';
    assert.deepEqual(compareRows(base, '\uFEFFx,y\r\n1,2\r\n\r\n3,4\r\n5,6'), { added: 0, removed: 0, changed: 0, header: false });
    assert.deepEqual(compareRows(base, 'x,y\n5,6\n1,2\n3,4\n'), { added: 0, removed: 0, changed: 0, header: false });
    // A duplicated row is one more row.
    assert.deepEqual(compareRows(base, `${base}3,4\n`), { added: 1, removed: 0, changed: 0, header: false });
  });

  it('counts data rows in one pass', function () {
    assert.equal(dataRowCount(''), 0);
    assert.equal(dataRowCount('x,y'), 0);
    assert.equal(dataRowCount('x,y\n1,2\n\n3,4'), 2);
    assert.equal(dataRowCount('\uFEFFx,y\r\n1,2\r\n  \r\n3,4\r\n'), 2);
  });
});

describe('the editor follows the data', function () {
  before(async function () {
    await vscode.extensions.getExtension(EXTENSION_ID)?.activate();
  });

  afterEach(async function () {
    await revertAll();
    await closeEverything();
  });

  it('a change on disk by another program marks the analysis out of date with what changed; the panel refuses to save it; the save command refits and records the bytes on disk', async function () {
    const uri = await copyOf('cars.csv', 'follow-disk.csv');
    await setSetting('refit.onSave', false);
    try {
      await tune(uri);
      assert.deepEqual(api().dataState(uri), { analysed: 'disk', refit: 'manual', followedOnDisk: false });
      // Another program changes one value (line 3: 4,10 -> 4,11) and appends two rows.
      const lines = (await text(uri)).trimEnd().split('\n');
      assert.equal(lines[2], '4,10');
      lines[2] = '4,11';
      lines.push('26,95', '27,101');
      await writeText(uri, lines.join('\n') + '\n');
      const change = await waitFor('the banner about the change on disk', () => api().dataState(uri)?.change);
      assert.deepEqual(change, { where: 'disk', added: 2, removed: 0, changed: 1, header: false });
      const posted = api()
        .panelLog(uri)
        .filter((m) => m.type === 'dataState')
        .at(-1);
      assert.ok(posted?.type === 'dataState' && posted.state.change?.added === 2, 'the panel was told');

      pressSave(uri, 901);
      const refused = await answer(uri, 901);
      assert.equal(refused.type, 'saveFailed');
      assert.match(refused.type === 'saveFailed' ? refused.message : '', /^Nothing was saved: follow-disk\.csv changed since this analysis/);
      assert.equal(await exists(file('follow-disk.fit.json')), false);

      const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', uri, { replaceForeignFiles: 'no' })) as RunSummary;
      assert.equal(saved.status, 'done', saved.message);
      const record = JSON.parse(await text(file('follow-disk.fit.json'))) as { data: { sha256: string; rowsUsed: number } };
      assert.equal(record.data.sha256, sha256(await vscode.workspace.fs.readFile(uri)), 'the record names the bytes on disk');
      assert.equal(record.data.rowsUsed, 52);
      assert.equal(api().dataState(uri)?.change, undefined, 'the new analysis is of the data as it is');
      const refit = api().panelState(uri)?.payload.refit;
      assert.deepEqual([refit?.rowsBefore, refit?.rowsNow, refit?.reason], [50, 52, 'asked']);
    } finally {
      await setSetting('refit.onSave', undefined);
      await remove('follow-disk.csv', 'follow-disk.curve.csv', 'follow-disk.fit.json');
    }
  });

  it('at save time the bytes on disk are compared with the analysed ones, also before any event about the change arrived', async function () {
    const uri = await copyOf('cars.csv', 'follow-race.csv');
    await setSetting('refit.onSave', false);
    try {
      await tune(uri);
      await writeText(uri, (await text(uri)) + '26,95\n');
      // Pressed in the same turn as the write: the file watcher has not reported it yet.
      pressSave(uri, 902);
      const refused = await answer(uri, 902);
      assert.equal(refused.type, 'saveFailed');
      assert.match(refused.type === 'saveFailed' ? refused.message : '', /changed since this analysis|not the ones this analysis read/);
      assert.equal(await exists(file('follow-race.fit.json')), false);
    } finally {
      await setSetting('refit.onSave', undefined);
      await remove('follow-race.csv');
    }
  });

  it('an analysis of unsaved edits is reviewed but not saved as a table; the save command saves the CSV first when told to', async function () {
    const uri = await copyOf('cars.csv', 'follow-edit.csv');
    try {
      const doc = await vscode.workspace.openTextDocument(uri);
      await vscode.window.showTextDocument(doc, vscode.ViewColumn.One);
      const edit = new vscode.WorkspaceEdit();
      edit.insert(uri, doc.lineAt(doc.lineCount - 1).range.end, '26,95\n');
      assert.ok(await vscode.workspace.applyEdit(edit));
      assert.ok(doc.isDirty);
      const run = await tune(uri);
      assert.equal(run.rowsUsed, 51, 'the run read the unsaved row');
      assert.deepEqual(api().dataState(uri), { analysed: 'unsaved', refit: 'automatic', followedOnDisk: false });

      pressSave(uri, 903);
      const refused = await answer(uri, 903);
      assert.match(refused.type === 'saveFailed' ? refused.message : '', /read unsaved edits of follow-edit\.csv/);
      const declined = (await vscode.commands.executeCommand('knotwise.saveCurveTable', uri, { replaceForeignFiles: 'no', saveEditedData: 'no' })) as RunSummary;
      assert.equal(declined.status, 'dismissed');
      assert.equal(await exists(file('follow-edit.fit.json')), false);
      assert.ok(doc.isDirty, 'the CSV was not saved');

      const analysed = api().panelState(uri)?.analysed;
      const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', uri, { replaceForeignFiles: 'no', saveEditedData: 'yes' })) as RunSummary;
      assert.equal(saved.status, 'done', saved.message);
      assert.equal(doc.isDirty, false, 'the CSV was saved first');
      // The bytes saved are the bytes analysed: no refit was needed.
      assert.equal(api().panelState(uri)?.analysed, analysed);
      const record = JSON.parse(await text(file('follow-edit.fit.json'))) as { data: { sha256: string; rowsUsed: number } };
      assert.equal(record.data.sha256, sha256(await vscode.workspace.fs.readFile(uri)));
      assert.equal(record.data.rowsUsed, 51);
      assert.deepEqual(api().dataState(uri), { analysed: 'disk', refit: 'automatic', followedOnDisk: false });
    } finally {
      await remove('follow-edit.csv', 'follow-edit.curve.csv', 'follow-edit.fit.json');
    }
  });

  it('an unsaved edit shows at once; saving the file refits, keeps the df picked by hand and says what moved', async function () {
    const uri = await copyOf('cars.csv', 'follow-refit.csv');
    try {
      await tune(uri);
      const p0 = api().panelState(uri)?.payload;
      assert.ok(p0);
      const picked = 5;
      assert.ok(
        p0.candidates.some((c) => c.df === picked && c.skipped === undefined),
        'df 5 is an evaluated candidate',
      );
      assert.ok(api().panelMessage(uri, { type: 'choice', runId: p0.runId, rule: { kind: 'pick', df: picked }, df: picked }));

      const doc = await vscode.workspace.openTextDocument(uri);
      await vscode.window.showTextDocument(doc, vscode.ViewColumn.One);
      // Line 3 (4,10): the reading at speed 4 goes up by 20.
      const edit = new vscode.WorkspaceEdit();
      edit.replace(uri, doc.lineAt(2).range, '4,30');
      assert.ok(await vscode.workspace.applyEdit(edit));
      const change = await waitFor('the banner about the unsaved edit', () => api().dataState(uri)?.change, 5000);
      assert.deepEqual(change, { where: 'editor', added: 0, removed: 0, changed: 1, header: false });

      const before = api().panelState(uri)?.analysed ?? 0;
      assert.ok(await doc.save());
      const after = await waitFor('the refit after the save', () => {
        const s = api().panelState(uri);
        return s && s.analysed > before && s.payload.refit && !api().dataState(uri)?.change ? s : undefined;
      });
      assert.deepEqual(after.payload.rule, { kind: 'pick', df: picked }, 'the df picked by hand is kept');
      const moved = after.payload.refit;
      assert.ok(moved);
      assert.deepEqual([moved.reason, moved.dfBefore, moved.dfNow, moved.ruleDropped, moved.rowsBefore, moved.rowsNow], ['saved', picked, picked, false, 50, 50]);
      // Least squares is linear in y: raising one reading by 20 moves the curve at its x by
      // 20 times that row's leverage, so the largest change is at least that (x = 4 is the
      // first point compared).
      const lines = (await text(file('cars.csv')))
        .trimEnd()
        .split('\n')
        .slice(1)
        .map((l) => l.split(',').map(Number));
      const fit = fitCurve({ x: Float64Array.from(lines.map((r) => r[0] as number)), y: Float64Array.from(lines.map((r) => r[1] as number)) }, { kind: 'natural-spline', df: picked });
      const h = fit.leverage[1] as number;
      assert.ok(moved.largestChange >= 20 * h * (1 - 1e-9), `largest change ${moved.largestChange} against 20 h = ${20 * h}`);
      assert.ok(moved.largestChange <= 20, 'no point moves more than the reading did (leverage at most 1)');
    } finally {
      await remove('follow-refit.csv');
    }
  });

  it('above knotwise.refit.askAboveRows a save asks instead of refitting', async function () {
    const uri = await copyOf('cars.csv', 'follow-ask.csv');
    await setSetting('refit.askAboveRows', 10);
    try {
      await tune(uri);
      await writeText(uri, (await text(uri)) + '26,95\n');
      const state = await waitFor('the question instead of a refit', () => {
        const s = api().dataState(uri);
        return s?.refit === 'asked' ? s : undefined;
      });
      assert.deepEqual(state.change, { where: 'disk', added: 1, removed: 0, changed: 0, header: false });
      const log = api().panelLog(uri);
      const lastResult = log.map((m) => m.type).lastIndexOf('result');
      assert.deepEqual(
        log.slice(lastResult + 1).filter((m) => m.type === 'running'),
        [],
        'no run started after the result',
      );
    } finally {
      await setSetting('refit.askAboveRows', undefined);
      await remove('follow-ask.csv');
    }
  });

  it('a deleted data file is marked in the panel, and nothing can be saved from its analysis', async function () {
    const uri = await copyOf('cars.csv', 'follow-gone.csv');
    await tune(uri);
    await vscode.workspace.fs.delete(uri);
    const change = await waitFor('the banner about the missing file', () => api().dataState(uri)?.change);
    assert.equal(change.where, 'missing');
    pressSave(uri, 904);
    const refused = await answer(uri, 904);
    assert.equal(refused.type, 'saveFailed');
    assert.equal(await exists(file('follow-gone.fit.json')), false);
  });

  it('Problems entries stay while the panel lists them, also when the CSV is closed, and go with the panel', async function () {
    const uri = file('follow-problems.csv');
    // R's cars with two readings broken: line 3 (4,10) loses its reading, line 6 (8,16) its speed.
    const lines = (await text(file('cars.csv'))).split('\n');
    assert.deepEqual([lines[2], lines[5]], ['4,10', '8,16']);
    lines[2] = '4,n/a';
    lines[5] = 'abc,16';
    await writeText(uri, lines.join('\n'));
    try {
      const doc = await vscode.workspace.openTextDocument(uri);
      await vscode.window.showTextDocument(doc, vscode.ViewColumn.One);
      const run = await tune(uri);
      assert.equal(run.rejected, 2);
      const entries = (): number => vscode.languages.getDiagnostics(uri).filter((d) => d.source === 'Knotwise').length;
      assert.equal(entries(), 2);
      // A new language closes the document for extensions and opens it again: the close event fires now.
      const closed = new Promise<void>((resolve, reject) => {
        const limit = setTimeout(() => {
          sub.dispose();
          reject(new Error('no close event for the data file'));
        }, 10000);
        const sub = vscode.workspace.onDidCloseTextDocument((d) => {
          if (d.uri.toString() !== uri.toString()) return;
          clearTimeout(limit);
          sub.dispose();
          resolve();
        });
      });
      await vscode.languages.setTextDocumentLanguage(doc, doc.languageId === 'plaintext' ? 'markdown' : 'plaintext');
      await closed;
      assert.equal(entries(), 2, 'the panel still says "see Problems"');
      const panelTab = vscode.window.tabGroups.all.flatMap((g) => g.tabs).find((t) => t.input instanceof vscode.TabInputWebview && t.label.includes('follow-problems.csv'));
      assert.ok(panelTab, 'the panel is open');
      await vscode.window.tabGroups.close(panelTab);
      await waitFor('the entries to go with the panel', () => (entries() === 0 ? true : undefined), 10000);
    } finally {
      await remove('follow-problems.csv');
    }
  });

  it('a line of the data opens beside the panel, never over it', async function () {
    const uri = await copyOf('cars.csv', 'follow-reveal.csv');
    try {
      await tune(uri);
      const panelGroup = (): vscode.TabGroup | undefined =>
        vscode.window.tabGroups.all.find((g) => g.tabs.some((t) => t.input instanceof vscode.TabInputWebview && t.label.includes('follow-reveal.csv')));
      assert.ok(panelGroup(), 'the panel is open');
      assert.ok(api().panelMessage(uri, { type: 'revealLine', line: 7 }));
      const editor = await waitFor('the data file in an editor', () => {
        const e = vscode.window.activeTextEditor;
        return e?.document.uri.toString() === uri.toString() ? e : undefined;
      });
      assert.equal(editor.selection.start.line, 6, 'line 7 is selected');
      const group = panelGroup();
      assert.ok(group, 'the panel is still open');
      assert.notEqual(editor.viewColumn, group.viewColumn, 'the editor is in another group than the panel');
      assert.ok(group.activeTab?.input instanceof vscode.TabInputWebview, 'the panel is still the one shown in its group');
      // Again: the same editor beside the panel is used.
      assert.ok(api().panelMessage(uri, { type: 'revealLine', line: 20 }));
      await waitFor('line 20', () => (vscode.window.activeTextEditor?.selection.start.line === 19 ? true : undefined));
      assert.equal(vscode.window.activeTextEditor?.viewColumn, editor.viewColumn);
    } finally {
      await remove('follow-reveal.csv');
    }
  });

  it('a file too large for the editor to hand to extensions (50 MB) is followed on disk, and the panel says so', async function () {
    const uri = file('follow-large.csv');
    // Invented seeded rows with a long note each, only to pass 50 MB (no reference value).
    let s = 135792468;
    const rand = (): number => (s = (s * 1103515245 + 12345) >>> 0) / 2 ** 32;
    const note = 'n'.repeat(880);
    const rows = ['x,y,note'];
    for (let i = 0; i < 62000; i++) {
      const x = 10 * rand();
      rows.push(`${x.toFixed(5)},${(Math.sin(x) + 0.2 * (rand() - 0.5)).toFixed(5)},${note}`);
    }
    const content = rows.join('\n') + '\n';
    assert.ok(content.length > 50 * 1024 * 1024, 'precondition: more than 50 MB');
    await writeText(uri, content);
    try {
      const run = await tune(uri, { columns: { x: 'x', y: 'y' } });
      assert.equal(run.rowsUsed, 62000);
      assert.deepEqual(api().dataState(uri), { analysed: 'disk', refit: 'automatic', followedOnDisk: true });
      await setSetting('refit.onSave', false);
      await writeText(uri, `${content}5.5,-0.7,${note}\n`);
      const change = await waitFor('the banner about the change on disk', () => api().dataState(uri)?.change);
      assert.deepEqual(change, { where: 'disk', added: 1, removed: 0, changed: 0, header: false });
    } finally {
      await setSetting('refit.onSave', undefined);
      await closeEverything();
      await remove('follow-large.csv');
    }
  });

  describe('a long run in the panel', function () {
    const big = (): vscode.Uri => file('follow-long.csv');
    before(async function () {
      // Invented seeded data, only to make a run long enough to stop (no reference value).
      let s = 246813579;
      const rand = (): number => (s = (s * 1103515245 + 12345) >>> 0) / 2 ** 32;
      const rows = ['load [kN],strain [um]'];
      for (let i = 0; i < 40000; i++) {
        const x = 100 * rand();
        rows.push(`${x.toFixed(4)},${(Math.sqrt(x) * 30 + 5 * (rand() - 0.5)).toFixed(3)}`);
      }
      await writeText(big(), rows.join('\n') + '\n');
      await setSetting('resampling', 'bootstrap:2000');
    });
    after(async function () {
      await closeEverything();
      await setSetting('resampling', 'leave-one-out');
      await remove('follow-long.csv');
    });

    it('shows its progress in the panel, stops from the panel and runs again from it', async function () {
      const pending = vscode.commands.executeCommand('knotwise.tuneCurve', big(), { columns: { x: 'load', y: 'strain' } }) as Thenable<RunSummary>;
      const progress = await waitFor('progress in the panel', () =>
        api()
          .panelLog(big())
          .find((m) => m.type === 'running' && m.fraction !== undefined && m.fraction > 0),
      );
      assert.ok(progress.type === 'running' && (progress.fraction ?? 0) <= 1);
      assert.ok(api().panelMessage(big(), { type: 'stop' }));
      const result = await pending;
      assert.equal(result.status, 'cancelled');
      const said = api().panelLog(big()).at(-1);
      assert.ok(said?.type === 'failed' && /^Tuning was cancelled\./.test(said.message), JSON.stringify(said));
      // Run again with a quick method: the panel's button starts a run that finishes.
      await setSetting('resampling', 'gcv');
      assert.ok(api().panelMessage(big(), { type: 'rerun' }));
      const shown = await waitFor('the result of Run again', () => api().panelState(big()));
      assert.equal(shown.payload.rows.used, 40000);
      assert.match(shown.payload.resamplingWords, /generalised cross-validation|GCV/i);
    });
  });
});
