/**
 * Grouped runs in the editor (issue "Many devices in one file", part 4): the tune command
 * with a group column (`columns.per`) tunes every group as `knotwise fit --per` does, the
 * panel holds every group's overview, a panel message switches the group shown, and the
 * save writes the same bytes as the command line for the same inputs (a table per group
 * or one long table, the summary and the group record). Data: datasets::CO2 (Potvin,
 * Lechowicz & Tardif 1990; written by test/e2e/fixtures/make-fixtures.R). The reference
 * for every number is the command line's own output for the same file and options, run
 * here on a copy of the file; its grouped fits are tested against R in
 * test/reference/groups.test.ts.
 */
import assert from 'node:assert/strict';
import { readdirSync } from 'node:fs';
import * as vscode from 'vscode';
import type { RunSummary, SaveSummary } from '../../../extension/api';
import { api, closeEverything, EXTENSION_ID, file, folder, setSetting, text, waitFor, writeText, cliOutputs, removeOutputs } from './helpers';

const NAME = 'co2.csv';
const CO2 = { columns: { x: 'conc', y: 'uptake', per: 'plant' } };
/** The settings this suite runs with, and the same as the command line's options. */
const SETTINGS: readonly [string, string][] = [
  ['resampling', 'leave-one-out'],
  ['rule', 'least-error'],
  ['candidates', '3..15'],
];
const WORKSPACE_OPTIONS = ['--resampling', 'leave-one-out', '--rule', 'least-error', '--df', '3..15'];

interface GroupRecord {
  readonly groups: readonly { readonly name: string; readonly df: number; readonly rowsUsed: number; readonly table: string }[];
  readonly shared: { readonly df: number; readonly reason: string } | null;
  readonly common: { readonly words: string } | null;
}

/** The numbers of one column of a curve table (CSV text with a header). */
function tableColumn(csv: string, column: string): number[] {
  const [head, ...rows] = csv.trimEnd().split('\n');
  const k = (head ?? '').split(',').indexOf(column);
  assert.ok(k >= 0, `the table has a ${column} column`);
  return rows.map((r) => Number(r.split(',')[k]));
}

/** |a - b| within `rel` of |b| (at least of 1). */
function near(what: string, a: number | undefined, b: number, rel: number): void {
  assert.ok(a !== undefined && Math.abs(a - b) <= rel * Math.max(1, Math.abs(b)), `${what}: ${a} against ${b}`);
}

/** Every file `knotwise fit` writes for the data file with `args`, by name. */
const cliFiles = (args: readonly string[]): Map<string, string> => cliOutputs(NAME, ['--x', 'conc', '--y', 'uptake', '--per', 'plant', ...args]);

describe('grouped runs in the extension host (datasets::CO2)', function () {
  let reference: Map<string, string>;
  let record: GroupRecord;

  before(async function () {
    await vscode.extensions.getExtension(EXTENSION_ID)?.activate();
    await closeEverything();
    for (const [key, value] of SETTINGS) await setSetting(key, value);
    reference = cliFiles(WORKSPACE_OPTIONS);
    record = JSON.parse(reference.get('co2.groups.fit.json') ?? '{}') as GroupRecord;
    assert.equal(record.groups.length, 12, 'the command line found the 12 plants');
  });

  after(async function () {
    await closeEverything();
    await removeOutputs('co2', NAME);
    for (const [key] of SETTINGS) await setSetting(key, undefined);
  });

  it('the tune command with a group column tunes every group as the command line does, and the panel holds every group', async function () {
    const uri = file(NAME);
    const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', uri, CO2)) as RunSummary;
    assert.equal(run.status, 'done', run.message);
    // Reference: the command line's group record for the same file and options.
    assert.deepEqual(
      run.groups?.map((g) => [g.name, g.chosenDf, g.rowsUsed]),
      record.groups.map((g) => [g.name, g.df, g.rowsUsed]),
    );
    assert.equal(run.sharedDf, undefined);
    assert.equal(run.rejected, 0);
    const state = await waitFor('the panel to show the grouped run', () => api().panelState(uri));
    const view = state.groups?.view;
    assert.ok(view, 'the panel state has the overview');
    assert.equal(state.groups?.index, 0, 'the first group is shown');
    assert.equal(view.groupLabel, 'plant');
    assert.deepEqual(
      view.groups.map((g) => [g.name, g.df, g.rows]),
      record.groups.map((g) => [g.name, g.df, g.rowsUsed]),
    );
    assert.equal(view.common, record.common?.words);
    // Each group's curve in the overview is its table's curve: 21 points on every fifth of the table's 101 rows.
    for (const [i, g] of view.groups.entries()) {
      const table = reference.get(record.groups[i]?.table ?? '');
      assert.ok(table, `the command line wrote ${g.name}'s table`);
      const xs = tableColumn(table, 'x');
      const fit = tableColumn(table, 'fit');
      assert.equal(xs.length, 101);
      near(`${g.name} lower end`, g.lo, xs[0] as number, 1e-7);
      near(`${g.name} upper end`, g.hi, xs[100] as number, 1e-7);
      g.curve.forEach((v, k) => near(`${g.name} curve at row ${5 * k + 1}`, v, fit[5 * k] as number, 1e-5));
      assert.ok(g.x.length === 7 && g.y.length === 7, `${g.name}: all 7 readings in the small figure`);
    }
    // The payload shown is the first group's panel, as a file of its own rows would show it.
    assert.equal(state.payload.rows.used, 7);
    assert.equal(state.payload.details[0]?.df, record.groups[0]?.df);
    // The panel's script received the overview and the group's result.
    const log = api().panelLog(uri);
    assert.ok(log.some((m) => m.type === 'groups' && m.view.setId === view.setId));
    assert.ok(log.some((m) => m.type === 'groupResult' && m.setId === view.setId && m.group === 0));
  });

  it("switching the group through the panel's message shows that group; a group or set that does not exist changes nothing", async function () {
    const uri = file(NAME);
    const s0 = await waitFor('the grouped panel', () => (api().panelState(uri)?.groups ? api().panelState(uri) : undefined));
    const setId = s0.groups?.view.setId as number;
    const want = record.groups[10];
    assert.ok(want);
    assert.equal(api().panelMessage(uri, { type: 'selectGroup', setId, group: 10 }), true);
    const s1 = await waitFor('the panel to show the eleventh plant', () => {
      const s = api().panelState(uri);
      return s && s.groups?.index === 10 ? s : undefined;
    });
    assert.equal(s1.posted, s0.posted + 1, 'one new result');
    assert.equal(s1.analysed, s0.analysed, 'nothing ran again');
    assert.ok(s1.payload.runId > s0.payload.runId, 'a new view, so the panel starts from this group’s own choice');
    assert.equal(s1.payload.rows.used, want.rowsUsed);
    assert.equal(s1.payload.details[0]?.df, want.df);
    // The group's curve at the ends of its range is its table's (reference: the command line's table of this plant).
    const table = reference.get(want.table) as string;
    const fit = tableColumn(table, 'fit');
    const curve = s1.payload.curves.find((c) => c.df === want.df);
    assert.ok(curve);
    near(`${want.name} at the lower end`, curve.fit[0], fit[0] as number, 1e-6);
    near(`${want.name} at the upper end`, curve.fit[curve.fit.length - 1], fit[100] as number, 1e-6);
    const last = api()
      .panelLog(uri)
      .filter((m) => m.type === 'groupResult')
      .at(-1);
    assert.ok(last?.type === 'groupResult' && last.group === 10 && last.setId === setId, 'the panel was sent group 10 of the same set');
    // Hostile or stale requests: refused by the guard, or ignored by the session.
    for (const bad of [
      { type: 'selectGroup', setId, group: -1 },
      { type: 'selectGroup', setId, group: 1.5 },
      { type: 'selectGroup', setId: String(setId), group: 1 },
      { type: 'selectGroup', setId, group: 1, extra: true },
    ])
      assert.equal(api().panelMessage(uri, bad), false, JSON.stringify(bad));
    assert.equal(api().panelMessage(uri, { type: 'selectGroup', setId, group: 12 }), true);
    assert.equal(api().panelMessage(uri, { type: 'selectGroup', setId: setId + 1000, group: 1 }), true);
    const s2 = api().panelState(uri);
    assert.equal(s2?.posted, s1.posted, 'nothing was shown for a group or set that does not exist');
    assert.equal(s2?.groups?.index, 10);
  });

  it('saving a grouped panel writes every group’s outputs, byte for byte what the command line writes', async function () {
    await removeOutputs('co2', NAME);
    const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file(NAME), { replaceForeignFiles: 'no' })) as SaveSummary;
    assert.equal(saved.status, 'done', saved.message);
    const names = (saved.files ?? []).map((u) => vscode.Uri.parse(u).path.split('/').pop());
    assert.deepEqual([...names].sort(), [...reference.keys()].sort(), 'the same files as the command line');
    assert.equal(names.at(-1), 'co2.groups.fit.json', 'the group record is written last');
    for (const [name, bytes] of reference) assert.equal(await text(file(name)), bytes, name);
    assert.deepEqual(
      readdirSync(folder().fsPath).filter((f) => f.includes('knotwise-tmp')),
      [],
      'no temporary file is left',
    );
    // Saving again replaces what Knotwise wrote without asking.
    const again = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file(NAME), { replaceForeignFiles: 'no' })) as SaveSummary;
    assert.equal(again.status, 'done', again.message);
    // The workspace's record watch covers the group record: one group's table edited by hand
    // marks it on the record file; the table's own bytes back make it current again.
    const recordUri = file('co2.groups.fit.json');
    const stale = async (): Promise<readonly string[] | undefined> => (await api().staleRecords()).records.find((r) => r.record === recordUri.toString())?.reasons;
    await waitFor('the group record to be current', async () => ((await stale()) === undefined ? true : undefined));
    const table = file('co2.Qn2.curve.csv');
    const original = await text(table);
    await writeText(
      table,
      original.replace(/\n(\d)/, (_m, d: string) => `\n${(Number(d) + 1) % 10}`),
    );
    const reasons = await waitFor('the group record to be out of date', stale);
    assert.deepEqual(reasons, ['the output co2.Qn2.curve.csv changed since the record was written (its SHA-256 differs)']);
    const marked = await waitFor('the Problems entry on the group record', () => {
      const d = vscode.languages.getDiagnostics(recordUri).filter((e) => e.source === 'Knotwise');
      return d.length ? d : undefined;
    });
    assert.match(marked[0]?.message ?? '', /^Group tables out of date: the output co2\.Qn2\.curve\.csv changed/);
    await writeText(table, original);
    await waitFor('the group record to be current again', async () => ((await stale()) === undefined ? true : undefined));
  });

  it('a table Knotwise did not write is replaced only when the person agrees', async function () {
    const foreign = file('co2.Qn1.curve.csv');
    await vscode.workspace.fs.writeFile(foreign, new TextEncoder().encode('kept by hand\n'));
    await vscode.workspace.fs.delete(file('co2.groups.fit.json'));
    const declined = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file(NAME), { replaceForeignFiles: 'no' })) as SaveSummary;
    assert.equal(declined.status, 'dismissed');
    assert.equal(await text(foreign), 'kept by hand\n');
    const agreed = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file(NAME), { replaceForeignFiles: 'yes' })) as SaveSummary;
    assert.equal(agreed.status, 'done', agreed.message);
    assert.equal(await text(foreign), reference.get('co2.Qn1.curve.csv'));
  });

  it('knotwise.groups.sharedDf and knotwise.groups.longTable reach the run and the save: the bytes of --shared-df --long-table', async function () {
    await closeEverything();
    await removeOutputs('co2', NAME);
    try {
      await setSetting('resampling', 'folds:7');
      await setSetting('groups.sharedDf', true);
      await setSetting('groups.longTable', true);
      const shared = cliFiles(['--resampling', 'folds:7', '--rule', 'least-error', '--df', '3..15', '--shared-df', '--long-table']);
      const rec = JSON.parse(shared.get('co2.groups.fit.json') ?? '{}') as GroupRecord;
      assert.ok(rec.shared, 'the command line shared one df');
      const uri = file(NAME);
      const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', uri, CO2)) as RunSummary;
      assert.equal(run.status, 'done', run.message);
      assert.equal(run.sharedDf, rec.shared.df);
      assert.ok(run.groups?.every((g) => g.chosenDf === rec.shared?.df));
      const view = api().panelState(uri)?.groups?.view;
      assert.equal(view?.shared?.df, rec.shared.df);
      assert.equal(view?.shared?.reason, rec.shared.reason);
      const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', uri, { replaceForeignFiles: 'no' })) as SaveSummary;
      assert.equal(saved.status, 'done', saved.message);
      assert.deepEqual([...shared.keys()].sort(), ['co2.groups.csv', 'co2.groups.curve.csv', 'co2.groups.fit.json']);
      for (const [name, bytes] of shared) assert.equal(await text(file(name)), bytes, name);
    } finally {
      await closeEverything();
      await setSetting('groups.sharedDf', undefined);
      await setSetting('groups.longTable', undefined);
      await setSetting('resampling', 'leave-one-out');
    }
  });
});
