/**
 * Knotwise inside the real extension host. Data: MASS::mcycle and R's `cars` (shipped
 * with R; written by test/e2e/fixtures/make-fixtures.R). The expected chosen df comes from
 * that script: R's splines::ns + lm + hatvalues, exact leave-one-out RMSE, lowest mean
 * (test/e2e/fixtures/expected.json). The workspace settings of the runner select the
 * same method: knotwise.resampling = loo, knotwise.rule = lowest, candidates 3..15.
 */
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { copyFileSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as vscode from 'vscode';
import type { RunSummary } from '../../../extension/controller';

const EXTENSION_ID = 'knotwise.knotwise';

interface Expected {
  readonly mcycle: { readonly chosenDf: number; readonly dfs: readonly number[] };
}

function extensionPath(): string {
  const ext = vscode.extensions.getExtension(EXTENSION_ID);
  assert.ok(ext, `${EXTENSION_ID} is installed`);
  return ext.extensionPath;
}

function expected(): Expected {
  return JSON.parse(readFileSync(join(extensionPath(), 'test', 'e2e', 'fixtures', 'expected.json'), 'utf8')) as Expected;
}

function folder(): vscode.Uri {
  const f = vscode.workspace.workspaceFolders?.[0];
  assert.ok(f, 'a workspace folder is open');
  return f.uri;
}

function file(name: string): vscode.Uri {
  return vscode.Uri.joinPath(folder(), name);
}

async function exists(uri: vscode.Uri): Promise<boolean> {
  try {
    await vscode.workspace.fs.stat(uri);
    return true;
  } catch {
    return false;
  }
}

async function text(uri: vscode.Uri): Promise<string> {
  return new TextDecoder().decode(await vscode.workspace.fs.readFile(uri));
}

async function closeEverything(): Promise<void> {
  await vscode.commands.executeCommand('workbench.action.closeAllEditors');
}

async function setSetting(key: string, value: unknown): Promise<void> {
  await vscode.workspace.getConfiguration('knotwise').update(key, value, vscode.ConfigurationTarget.Workspace);
}

const MCYCLE = { columns: { x: 'times', y: 'accel' } };

describe('Knotwise commands in the extension host', function () {
  before(async function () {
    const ext = vscode.extensions.getExtension(EXTENSION_ID);
    assert.ok(ext);
    await ext.activate();
  });

  afterEach(closeEverything);

  it('registers every command that package.json contributes', async function () {
    const all = await vscode.commands.getCommands(true);
    const ext = vscode.extensions.getExtension(EXTENSION_ID);
    const contributed = (ext?.packageJSON.contributes.commands as { command: string }[]).map((c) => c.command);
    assert.deepEqual(contributed.sort(), ['knotwise.forgetColumns', 'knotwise.saveCurveTable', 'knotwise.stopTuning', 'knotwise.tuneCurve']);
    for (const c of contributed) assert.ok(all.includes(c), `${c} is registered`);
  });

  it('tuning MASS::mcycle by exact leave-one-out with the lowest-error rule chooses the df R chooses', async function () {
    const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', file('mcycle.csv'), MCYCLE)) as RunSummary;
    assert.equal(run.status, 'done', run.message);
    // Reference: expected.json, from make-fixtures.R (R splines::ns, lm, hatvalues).
    assert.equal(run.chosenDf, expected().mcycle.chosenDf);
    assert.deepEqual(run.candidates, expected().mcycle.dfs);
    assert.equal(run.rowsUsed, 133);
    assert.equal(run.rejected, 0);
  });

  it('rejected rows appear in the Problems panel at their line and column, and go when the file is fixed', async function () {
    const uri = file('mcycle-bad.csv');
    const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', uri, MCYCLE)) as RunSummary;
    assert.equal(run.status, 'done', run.message);
    assert.equal(run.rejected, 3);
    const diags = vscode.languages.getDiagnostics(uri).filter((d) => d.source === 'Knotwise');
    // make-fixtures.R breaks lines 6 (accel "n/a"), 11 (times "abc") and 21 (a third field).
    assert.deepEqual(diags.map((d) => d.range.start.line + 1), [6, 11, 21]);
    const byLine = new Map(diags.map((d) => [d.range.start.line + 1, d]));
    const missing = byLine.get(6) as vscode.Diagnostic;
    assert.deepEqual([missing.range.start.character, missing.range.end.character], [4, 7]);
    assert.match(missing.message, /accel/);
    const text11 = byLine.get(11) as vscode.Diagnostic;
    assert.deepEqual([text11.range.start.character, text11.range.end.character], [0, 3]);
    assert.match(text11.message, /times/);
    assert.match((byLine.get(21) as vscode.Diagnostic).message, /field/i);

    // Fix the file on disk (the original MASS::mcycle rows) and run again: no entries left.
    await vscode.workspace.fs.writeFile(uri, await vscode.workspace.fs.readFile(file('mcycle.csv')));
    const again = (await vscode.commands.executeCommand('knotwise.tuneCurve', uri, MCYCLE)) as RunSummary;
    assert.equal(again.status, 'done');
    assert.equal(again.rejected, 0);
    assert.deepEqual(vscode.languages.getDiagnostics(uri).filter((d) => d.source === 'Knotwise'), []);
  });

  it('saving writes the same curve table and fit record as the command line for the same inputs', async function () {
    const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('mcycle.csv'), { ...MCYCLE, replaceForeignFiles: 'no' })) as RunSummary & { files?: string[] };
    assert.equal(saved.status, 'done', saved.message);
    const table = await text(file('mcycle.curve.csv'));
    const record = await text(file('mcycle.fit.json'));
    assert.equal(table.split('\n')[0], 'x,fit,se,ciLower,ciUpper,piLower,piUpper,extrapolated');
    assert.equal(table.trimEnd().split('\n').length, 102, '101 grid points and a header');
    // The command line on a copy of the same file, writing next to it as the editor does.
    const out = mkdtempSync(join(tmpdir(), 'knotwise-cli-'));
    try {
      copyFileSync(file('mcycle.csv').fsPath, join(out, 'mcycle.csv'));
      execFileSync(process.execPath, [join(extensionPath(), 'dist', 'cli.js'), 'fit', join(out, 'mcycle.csv'), '--x', 'times', '--y', 'accel', '--resample', 'loo', '--rule', 'lowest', '--df', '3..15', '--save']);
      assert.equal(table, readFileSync(join(out, 'mcycle.curve.csv'), 'utf8'));
      assert.equal(record, readFileSync(join(out, 'mcycle.fit.json'), 'utf8'));
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
    const rec = JSON.parse(record) as { selection: { df: number } };
    assert.equal(rec.selection.df, expected().mcycle.chosenDf);
    // No temporary file is left next to the outputs.
    assert.deepEqual(readdirSync(folder().fsPath).filter((f) => f.includes('knotwise-tmp')), []);
  });

  it('a file Knotwise did not write is replaced only when the person agrees', async function () {
    const foreign = file('cars.curve.csv');
    await vscode.workspace.fs.writeFile(foreign, new TextEncoder().encode('hand-made table, keep me\n'));
    const cars = { columns: { x: 'speed', y: 'dist' } };
    const declined = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('cars.csv'), { ...cars, replaceForeignFiles: 'no' })) as RunSummary;
    assert.equal(declined.status, 'dismissed');
    assert.equal(await text(foreign), 'hand-made table, keep me\n');
    assert.equal(await exists(file('cars.fit.json')), false, 'nothing is written when one file may not be replaced');
    const agreed = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('cars.csv'), { ...cars, replaceForeignFiles: 'yes' })) as RunSummary;
    assert.equal(agreed.status, 'done', agreed.message);
    assert.match(await text(foreign), /^x,fit,se,/);
    // Now Knotwise wrote both: saving again needs no permission.
    const third = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('cars.csv'), { ...cars, replaceForeignFiles: 'no' })) as RunSummary;
    assert.equal(third.status, 'done', third.message);
  });

  describe('long runs', function () {
    const big = () => file('drift.csv');
    before(async function () {
      // Invented seeded data, only to make a run long enough to stop (no reference value).
      let s = 987654321;
      const rand = () => ((s = (s * 1103515245 + 12345) >>> 0) / 2 ** 32);
      const rows = ['load [kN],strain [um]'];
      for (let i = 0; i < 40000; i++) {
        const x = 100 * rand();
        rows.push(`${x.toFixed(4)},${(Math.sqrt(x) * 30 + 5 * (rand() - 0.5)).toFixed(3)}`);
      }
      await vscode.workspace.fs.writeFile(big(), new TextEncoder().encode(rows.join('\n') + '\n'));
      await closeEverything();
      await setSetting('resampling', 'boot:2000');
    });
    after(async function () {
      await closeEverything();
      await setSetting('resampling', undefined);
    });
    const drift = { columns: { x: 'load', y: 'strain' } };

    it('Stop Tuning cancels a save-and-tune run and leaves no files behind', async function () {
      const before = readdirSync(folder().fsPath).sort();
      const pending = vscode.commands.executeCommand('knotwise.saveCurveTable', big(), { ...drift, replaceForeignFiles: 'yes' }) as Thenable<RunSummary>;
      await new Promise((r) => setTimeout(r, 1500));
      const stopped = (await vscode.commands.executeCommand('knotwise.stopTuning')) as number;
      assert.equal(stopped, 1, 'one run was running');
      const result = await pending;
      assert.equal(result.status, 'cancelled');
      assert.deepEqual(readdirSync(folder().fsPath).sort(), before);
    });

    it('a second run on the same file replaces the first', async function () {
      const first = vscode.commands.executeCommand('knotwise.tuneCurve', big(), drift) as Thenable<RunSummary>;
      await new Promise((r) => setTimeout(r, 800));
      await setSetting('resampling', 'cv:5');
      // The settings change reruns open panels; the explicit second run supersedes both.
      const second = (await vscode.commands.executeCommand('knotwise.tuneCurve', big(), drift)) as RunSummary;
      const firstResult = await first;
      assert.equal(firstResult.status, 'superseded');
      assert.equal(second.status, 'done', second.message);
    });
  });
});
