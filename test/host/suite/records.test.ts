/**
 * Fit records in the workspace, watched: a record whose data or curve table is no longer
 * the bytes it names is marked in the Problems panel (on the record file) and counted in
 * the status bar; saving again from the editor clears it. Data: R's `cars` (Ezekiel 1930;
 * test/e2e/fixtures/make-fixtures.R), copied under a new name. The command Check Every
 * Curve Table rebuilds each record's outputs and says which are current.
 */
import assert from 'node:assert/strict';
import * as vscode from 'vscode';
import type { RunSummary, StaleRecordView } from '../../../extension/api';
import type { RecordCheckView } from '../../../extension/checkTables';
import { staleText } from '../../../extension/records';
import { api, closeEverything, EXTENSION_ID, file, text, waitFor, writeText } from './helpers';

const CARS = { columns: { x: 'speed', y: 'dist' } };

/** The record's entry among the stale ones, once the checks are done (undefined: current). */
async function staleEntry(record: vscode.Uri): Promise<StaleRecordView | undefined> {
  return (await api().staleRecords()).records.find((r) => r.record === record.toString());
}

function entries(record: vscode.Uri): vscode.Diagnostic[] {
  return vscode.languages.getDiagnostics(record).filter((d) => d.source === 'Knotwise');
}

async function save(uri: vscode.Uri): Promise<void> {
  const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', uri, { ...CARS, replaceForeignFiles: 'no' })) as RunSummary;
  assert.equal(saved.status, 'done', saved.message);
}

describe('fit records in the workspace', function () {
  before(async function () {
    await vscode.extensions.getExtension(EXTENSION_ID)?.activate();
  });

  it('the status bar counts curve tables out of date in words', function () {
    assert.equal(staleText(0), undefined);
    assert.equal(staleText(1), '$(warning) 1 curve table out of date');
    assert.equal(staleText(2), '$(warning) 2 curve tables out of date');
  });

  it('a record whose data or table changed is marked on the record file and in the status bar; saving again clears it', async function () {
    const data = file('records-cars.csv');
    const record = file('records-cars.fit.json');
    const table = file('records-cars.curve.csv');
    await vscode.workspace.fs.copy(file('cars.csv'), data, { overwrite: true });
    try {
      await save(data);
      // No panel, so nothing refits: the record stays as written while the data changes.
      await closeEverything();
      assert.equal(await staleEntry(record), undefined, 'a record just written is current');
      assert.deepEqual(entries(record), []);

      await writeText(data, (await text(data)) + '26,95\n');
      const stale = await waitFor('the record to be out of date', () => staleEntry(record));
      assert.deepEqual(stale.reasons, ['the data records-cars.csv changed since the record was written (its SHA-256 differs)']);
      assert.equal(stale.data, data.toString());
      assert.match((await api().staleRecords()).statusText ?? '', /^\$\(warning\) \d+ curve tables? out of date$/);
      const marked = await waitFor('the Problems entry on the record', () => (entries(record).length ? entries(record) : undefined));
      assert.equal(marked.length, 1);
      assert.match(marked[0]?.message ?? '', /^Curve table out of date: the data records-cars\.csv changed/);
      // The entry sits on the data's SHA-256 in the record.
      const recordText = await text(record);
      const sha = (JSON.parse(recordText) as { data: { sha256: string } }).data.sha256;
      const line = recordText.split('\n')[marked[0]?.range.start.line ?? -1] ?? '';
      assert.ok(line.includes(sha), line);

      await save(data);
      await waitFor('the record to be current again', async () => ((await staleEntry(record)) === undefined && entries(record).length === 0 ? true : undefined));

      // A table edited by hand, then deleted.
      await writeText(table, (await text(table)).replace(/\n4,/, '\n4.0,'));
      const edited = await waitFor('the edited table', () => staleEntry(record));
      assert.deepEqual(edited.reasons, ['the curve table records-cars.curve.csv changed since the record was written (its SHA-256 differs)']);
      await vscode.workspace.fs.delete(table);
      const missing = await waitFor('the missing table', async () => {
        const e = await staleEntry(record);
        return e?.reasons.some((r) => r.endsWith('is missing')) ? e : undefined;
      });
      assert.deepEqual(missing.reasons, ['the curve table records-cars.curve.csv is missing']);
    } finally {
      await closeEverything();
      for (const u of [data, record, table]) await vscode.workspace.fs.delete(u).then(undefined, () => undefined);
    }
    await waitFor('a deleted record to be forgotten', async () => ((await staleEntry(record)) === undefined && entries(record).length === 0 ? true : undefined));
  });

  it('Check Every Curve Table in the Workspace rebuilds every record: one whose data changed is out of date with what changed, one untouched is current', async function () {
    const made = (stem: string) => ({ data: file(`${stem}.csv`), record: file(`${stem}.fit.json`), table: file(`${stem}.curve.csv`) });
    const stale = made('check-stale');
    const current = made('check-current');
    try {
      for (const f of [stale, current]) {
        await vscode.workspace.fs.copy(file('cars.csv'), f.data, { overwrite: true });
        await save(f.data);
      }
      await closeEverything();
      const before = await text(stale.data);
      const rows = before.trim().split('\n').length - 1;
      await writeText(stale.data, before + '26,95\n');

      const results = (await vscode.commands.executeCommand('knotwise.checkCurveTables')) as RecordCheckView[];
      const checked = results.map((r) => r.record);
      for (const f of [stale, current]) assert.equal(checked.filter((r) => r === f.record.toString()).length, 1, `${f.record.path} is checked once`);

      const changed = results.find((r) => r.record === stale.record.toString());
      assert.equal(changed?.status, 'changed', JSON.stringify(changed));
      const [first, ...rest] = changed.messages;
      // Rebuilt from the data: the new row counts, and any change of the chosen df is said.
      assert.match(first ?? '', new RegExp(`^data check-stale\\.csv changed: SHA-256 was [0-9a-f]{16}\\.\\.\\., now [0-9a-f]{16}\\.\\.\\.; rows used ${rows}, now ${rows + 1}$`));
      for (const m of rest.filter((m) => m.startsWith('the chosen df'))) assert.match(m, /^the chosen df would change from \d+ to \d+$/);
      assert.ok(
        rest.some((m) => m.startsWith('check-stale.fit.json differs from the rebuilt record')),
        rest.join('\n'),
      );
      assert.match(changed.update ?? '', /^knotwise fit check-stale\.csv --x /);

      const fine = results.find((r) => r.record === current.record.toString());
      assert.equal(fine?.status, 'current', JSON.stringify(fine));
      assert.deepEqual(fine.messages, []);
      assert.equal(fine.update, undefined);

      // The watch's entries are checked again: the changed record is listed, the current one is not.
      assert.deepEqual((await staleEntry(stale.record))?.reasons, ['the data check-stale.csv changed since the record was written (its SHA-256 differs)']);
      assert.equal(await staleEntry(current.record), undefined);
    } finally {
      for (const f of [stale, current]) for (const u of [f.data, f.record, f.table]) await vscode.workspace.fs.delete(u).then(undefined, () => undefined);
    }
  });
});
