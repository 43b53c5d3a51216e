/**
 * The editor's save after a killed write (core/outputs/commit.ts through workspace.fs, in
 * extension/save.ts): a write killed after its commit marker, half renamed, and a left-over
 * temporary file of a process that is gone are completed and removed by the next save,
 * which needs no permission. The killed write is made by the protocol's own steps on Node's
 * file system, stopped before the record's rename as a kill stops it, under the id of a
 * process that has ended. Data: R's `cars`.
 */
import assert from 'node:assert/strict';
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import * as vscode from 'vscode';
import { folderStep, nodeWriter } from '../../../core/node/atomicWrite';
import { markerName, parseMarkerName, parseTempName, tempName, writeSet } from '../../../core/outputs/commit';
import type { RunSummary } from '../../../extension/api';
import { file, folder, text } from './helpers';

const cars = { columns: { x: 'speed', y: 'dist' } };

describe('saving after a killed write', function () {
  it('a save completes a write killed after its commit marker and removes left-over temporary files, without asking', async function () {
    const first = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('cars.csv'), { ...cars, replaceForeignFiles: 'no' })) as RunSummary;
    assert.equal(first.status, 'done', first.message);
    const table = await text(file('cars.curve.csv'));
    const record = await text(file('cars.fit.json'));

    // Another set (the table one row shorter, a record that lists it) written by a process that has ended, killed before the record's rename.
    const dir = folder().fsPath;
    const gone = spawnSync(process.execPath, ['-e', '']).pid as number;
    const otherTable = table.replace(/\n[^\n]*\n$/, '\n');
    const otherRecord = JSON.parse(record) as { table: { sha256: string } };
    otherRecord.table.sha256 = createHash('sha256').update(otherTable).digest('hex');
    const killed = { ...nodeWriter(dir), pid: gone, writing: new Set<string>() };
    const steps = writeSet(
      killed,
      [
        { name: 'cars.curve.csv', text: otherTable },
        { name: 'cars.fit.json', text: JSON.stringify(otherRecord, null, 2) + '\n' },
      ],
      'cars.fit.json',
    );
    const exec = folderStep(dir, () => assert.fail('no question'));
    for (let next = steps.next(); !next.done; next = steps.next(exec(next.value))) {
      if (next.value.op === 'rename' && next.value.to === 'cars.fit.json') break;
    }
    writeFileSync(join(dir, tempName('cars.curve.h', gone, '0123456789ab')), 'half a header');
    assert.ok(readdirSync(dir).includes(markerName('cars.fit.json')));
    assert.equal(await text(file('cars.curve.csv')), otherTable, 'the other table is in place, the old record still lists the first');

    // Without the recovery the table would not be Knotwise's by the record in place, and this save ('no') would be dismissed.
    const again = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('cars.csv'), { ...cars, replaceForeignFiles: 'no' })) as RunSummary;
    assert.equal(again.status, 'done', again.message);
    assert.equal(await text(file('cars.curve.csv')), table);
    assert.equal(await text(file('cars.fit.json')), record);
    assert.deepEqual(
      readdirSync(dir).filter((n) => parseTempName(n) !== undefined || parseMarkerName(n) !== undefined),
      [],
      'no temporary file or marker is left',
    );
  });
});
