/**
 * Calibration use in the editor (issue 15): the panel's details carry the inverse table in
 * words and the drift from the record beside the data; the panel's switch sets
 * knotwise.inverse.write for the folder, after which a save writes the inverse table with
 * the same bytes as `knotwise fit --inverse`; a refit of shifted data shows the drift; the
 * Compare Two Fit Records command compares records. Data: datasets::cars (Ezekiel 1930).
 */
import assert from 'node:assert/strict';
import * as vscode from 'vscode';
import type { RunSummary, SaveSummary } from '../../../extension/api';
import type { RecordComparison } from '../../../extension/compareRecords';
import { api, cliOutputs, closeEverything, file, setSetting, shownDetail, text, waitFor, writeText } from './helpers';

const NAME = 'cal-cars.csv';
const COLUMNS = { columns: { x: 'speed', y: 'dist' } };

/** The outputs `knotwise fit` writes for the same inputs, replacing the same record as the editor did. */
function cliFiles(args: readonly string[], names: readonly string[]): Map<string, string> {
  const all = cliOutputs(NAME, args, ['cal-cars.fit.json']);
  return new Map(names.map((n) => [n, all.get(n) ?? '']));
}

describe('calibration use in the editor', function () {
  after(async function () {
    await closeEverything();
    await setSetting('candidates', undefined);
    await setSetting('resampling', undefined);
    await setSetting('rule', undefined);
    await setSetting('inverse.write', undefined);
    for (const n of [NAME, 'cal-cars.curve.csv', 'cal-cars.inverse.csv', 'cal-cars.fit.json', 'cal-cars-first.fit.json']) await vscode.workspace.fs.delete(file(n)).then(undefined, () => undefined);
  });

  it('the panel previews the inverse table; its switch makes saving write it as the command line does; a refit of shifted data shows the drift; two records compare', async function () {
    const cars = await text(file('cars.csv'));
    await writeText(file(NAME), cars);
    await setSetting('candidates', '2');
    await setSetting('resampling', 'leave-one-out');
    await setSetting('rule', 'least-error');
    const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', file(NAME), COLUMNS)) as RunSummary;
    assert.equal(run.status, 'done', run.message);
    const cal0 = (await shownDetail(file(NAME))).calibration;
    assert.ok(cal0, 'the details carry the calibration section');
    assert.ok('words' in cal0.inverse, JSON.stringify(cal0.inverse));
    assert.match(cal0.inverse.words, /the curve rises throughout the data range/);
    assert.equal(cal0.inverseSaved, false);
    assert.equal(cal0.drift, undefined, 'no record yet');

    // The panel's switch: the setting for the folder, and the panel shows it on.
    assert.ok(api().panelMessage(file(NAME), { type: 'inverseTable', save: true }));
    await waitFor('knotwise.inverse.write on', () => (vscode.workspace.getConfiguration('knotwise', file(NAME)).get('inverse.write') === true ? true : undefined));
    await waitFor('the panel showing the switch on', () => (api().panelState(file(NAME))?.payload.details[0]?.calibration?.inverseSaved === true ? true : undefined));

    const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file(NAME), { replaceForeignFiles: 'no' })) as SaveSummary;
    assert.equal(saved.status, 'done', saved.message);
    assert.ok(
      saved.files?.some((f) => f.endsWith('cal-cars.inverse.csv')),
      saved.files?.join(', '),
    );
    const names = ['cal-cars.curve.csv', 'cal-cars.inverse.csv', 'cal-cars.fit.json'];
    const cli = cliFiles(['--x', 'speed', '--y', 'dist', '--df', '2', '--resampling', 'leave-one-out', '--rule', 'least-error', '--inverse'], names);
    for (const n of names) assert.equal(await text(file(n)), cli.get(n), `${n} as the command line writes it`);
    await vscode.workspace.fs.copy(file('cal-cars.fit.json'), file('cal-cars-first.fit.json'), { overwrite: true });

    // Every distance 5 ft longer: the straight line moves up by 5 (least squares is linear in y).
    const shifted = cars
      .trim()
      .split('\n')
      .map((l, i) => (i === 0 ? l : `${l.split(',')[0]},${Number(l.split(',')[1]) + 5}`))
      .join('\n');
    await writeText(file(NAME), `${shifted}\n`);
    const again = (await vscode.commands.executeCommand('knotwise.tuneCurve', file(NAME), COLUMNS)) as RunSummary;
    assert.equal(again.status, 'done', again.message);
    const drift = (await shownDetail(file(NAME))).calibration?.drift;
    assert.ok(drift, 'the drift in the panel');
    assert.match(drift.words, /\b5 above the recorded curve/);
    assert.match(drift.svg, /^<svg /);

    const same = (await vscode.commands.executeCommand('knotwise.compareFitRecords', file('cal-cars.fit.json'), file('cal-cars-first.fit.json'))) as RecordComparison;
    assert.equal(same.within, true, same.words);
    const resaved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file(NAME), { replaceForeignFiles: 'no' })) as SaveSummary;
    assert.equal(resaved.status, 'done', resaved.message);
    const moved = (await vscode.commands.executeCommand('knotwise.compareFitRecords', file('cal-cars.fit.json'), file('cal-cars-first.fit.json'))) as RecordComparison;
    assert.match(moved.words, /\b5 above the recorded curve/);
  });
});
