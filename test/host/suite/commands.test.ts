/**
 * Knotwise inside the real extension host. Data: MASS::mcycle, MASS::menarche and R's
 * `cars` (shipped with R; written by test/e2e/fixtures/make-fixtures.R). The expected
 * chosen df comes from that script: R's splines::ns + lm + hatvalues, exact leave-one-out
 * RMSE, lowest mean (test/e2e/fixtures/expected.json). The workspace settings of the
 * runner select the same method: knotwise.resampling = leave-one-out, knotwise.rule = least-error,
 * candidates 3..15. Binomial and robust fits are checked against R's glm and MASS::rlm
 * (test/reference/fixtures/physics.json, from test/reference/r/physics.R). Saved files
 * are compared byte for byte with what the command line writes for the same inputs.
 */
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import * as vscode from 'vscode';
import { selectDf } from '../../../core/tune/rules';
import type { KnotwiseApi, RunSummary } from '../../../extension/api';
import { shownDetail } from './helpers';

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

/** The value the extension's activate returned. */
function api(): KnotwiseApi {
  const ext = vscode.extensions.getExtension(EXTENSION_ID);
  assert.ok(ext?.isActive, 'Knotwise is active');
  return ext.exports as KnotwiseApi;
}

/** Polls `probe` until it returns a value (at most `ms`). */
async function waitFor<T>(what: string, probe: () => T | undefined, ms = 60000): Promise<T> {
  const deadline = Date.now() + ms;
  for (;;) {
    const v = probe();
    if (v !== undefined) return v;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/**
 * Runs the command line on a copy of a workspace file (in a fresh folder, writing next to
 * it as the editor does) and returns the table and record it wrote.
 */
function cliOutputs(name: string, args: readonly string[]): { table: string; record: string } {
  const out = mkdtempSync(join(tmpdir(), 'knotwise-cli-'));
  try {
    copyFileSync(file(name).fsPath, join(out, name));
    const stem = name.replace(/\.csv$/, '');
    // A record keeps the curve of the record it replaces (its baseline): the command line
    // replaces the same record as the editor did, the one now beside the data.
    const record = file(`${stem}.fit.json`).fsPath;
    if (existsSync(record)) copyFileSync(record, join(out, `${stem}.fit.json`));
    execFileSync(process.execPath, [join(extensionPath(), 'dist', 'cli.js'), 'fit', join(out, name), ...args, '--save']);
    return { table: readFileSync(join(out, `${stem}.curve.csv`), 'utf8'), record: readFileSync(join(out, `${stem}.fit.json`), 'utf8') };
  } finally {
    rmSync(out, { recursive: true, force: true });
  }
}

/** R reference fits (test/reference/r/physics.R). */
interface Physics {
  readonly glm: readonly { readonly dataset: string; readonly df: number; readonly deviance: number; readonly rCall: string }[];
  readonly rlm: readonly { readonly dataset: string; readonly df: number; readonly weights: readonly number[]; readonly scale: number; readonly rCall: string }[];
}

function physics(): Physics {
  return JSON.parse(readFileSync(join(extensionPath(), 'test', 'reference', 'fixtures', 'physics.json'), 'utf8')) as Physics;
}

/** |actual - expected| <= rel |expected|. */
function close(what: string, actual: number | undefined, expected: number, rel: number): void {
  assert.ok(actual !== undefined && Math.abs(actual - expected) <= rel * Math.abs(expected), `${what}: got ${actual}, R gives ${expected} (relative tolerance ${rel})`);
}

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
    assert.deepEqual(contributed.sort(), [
      'knotwise.checkCurveTables',
      'knotwise.compareFitRecords',
      'knotwise.forgetColumns',
      'knotwise.openDemoData',
      'knotwise.saveCurveTable',
      'knotwise.showStaleTables',
      'knotwise.stopTuning',
      'knotwise.tuneCurve',
      'knotwise.tuneSurface',
    ]);
    for (const c of contributed) assert.ok(all.includes(c), `${c} is registered`);
  });

  it('tuning MASS::mcycle by exact leave-one-out with the least-error rule chooses the df R chooses', async function () {
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
    assert.deepEqual(
      diags.map((d) => d.range.start.line + 1),
      [6, 11, 21],
    );
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
    assert.deepEqual(
      vscode.languages.getDiagnostics(uri).filter((d) => d.source === 'Knotwise'),
      [],
    );
  });

  it('saving writes the same curve table and fit record as the command line for the same inputs', async function () {
    const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('mcycle.csv'), { ...MCYCLE, replaceForeignFiles: 'no' })) as RunSummary & { files?: string[] };
    assert.equal(saved.status, 'done', saved.message);
    const table = await text(file('mcycle.curve.csv'));
    const record = await text(file('mcycle.fit.json'));
    assert.equal(table.split('\n')[0], 'x,fit,se,ciLower,ciUpper,piLower,piUpper,extrapolated');
    assert.equal(table.trimEnd().split('\n').length, 102, '101 grid points and a header');
    // The command line on a copy of the same file, writing next to it as the editor does.
    const cli = cliOutputs('mcycle.csv', ['--x', 'times', '--y', 'accel', '--resampling', 'leave-one-out', '--rule', 'least-error', '--df', '3..15']);
    assert.equal(table, cli.table);
    assert.equal(record, cli.record);
    const rec = JSON.parse(record) as { selection: { df: number } };
    assert.equal(rec.selection.df, expected().mcycle.chosenDf);
    // No temporary file is left next to the outputs.
    assert.deepEqual(
      readdirSync(folder().fsPath).filter((f) => f.includes('knotwise-tmp')),
      [],
    );
  });

  it('every grid form of the command line works from the settings: an automatic step and a stepped grid save what the command line writes', async function () {
    try {
      for (const grid of ['auto:0.5', '5:55:step=2.5']) {
        await setSetting('table.grid', grid);
        const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('mcycle.csv'), { ...MCYCLE, replaceForeignFiles: 'no', rule: { kind: 'least-error' } })) as RunSummary;
        assert.equal(saved.status, 'done', `${grid}: ${saved.message}`);
        const cli = cliOutputs('mcycle.csv', ['--x', 'times', '--y', 'accel', '--resampling', 'leave-one-out', '--rule', 'least-error', '--df', '3..15', '--grid', grid]);
        assert.equal(await text(file('mcycle.curve.csv')), cli.table, grid);
        assert.equal(await text(file('mcycle.fit.json')), cli.record, grid);
      }
      const rec = JSON.parse(await text(file('mcycle.fit.json'))) as { spec: { grid: { kind: string } }; table: { grid: { kind: string; step: number } } };
      assert.equal(rec.spec.grid.kind, 'step');
    } finally {
      await setSetting('table.grid', undefined);
    }
  });

  it('a setting change re-renders open panels where it matters: the rule re-renders the same run, resampling reruns it, table settings do neither', async function () {
    const uri = file('mcycle.csv');
    const run = (await vscode.commands.executeCommand('knotwise.tuneCurve', uri, MCYCLE)) as RunSummary;
    assert.equal(run.status, 'done', run.message);
    const s0 = api().panelState(uri);
    assert.ok(s0, 'the panel shows a result');
    assert.deepEqual(s0.payload.rule, { kind: 'least-error' });
    try {
      // A table setting matters only when saving; the rule changes the panel's choice.
      await setSetting('table.significantDigits', 6);
      await setSetting('rule', 'one-se');
      const s1 = await waitFor('the panel to show the one-SE rule', () => {
        const s = api().panelState(uri);
        return s && s.posted > s0.posted ? s : undefined;
      });
      assert.equal(s1.posted, s0.posted + 1, 'one re-render, for the rule');
      assert.equal(s1.analysed, s0.analysed, 'the rule does not rerun the analysis');
      assert.deepEqual(s1.payload.rule, { kind: 'one-se' });
      assert.notEqual(s1.payload.runId, s0.payload.runId, 'a new view, so the panel starts from the new rule');
      assert.equal(s1.payload.details[0]?.df, selectDf(s0.payload.candidates, { kind: 'one-se' }, s0.payload.metric).df);
      // Resampling changes the analysis: it runs again.
      await setSetting('resampling', 'folds:5');
      const s2 = await waitFor('the rerun with 5-fold cross-validation', () => {
        const s = api().panelState(uri);
        return s && s.analysed > s1.analysed && s.posted > s1.posted ? s : undefined;
      });
      assert.match(s2.payload.resamplingWords, /^5-fold cross-validation/);
    } finally {
      // Panels closed first, so restoring the settings reruns nothing in the background.
      await closeEverything();
      await setSetting('table.significantDigits', undefined);
      await setSetting('rule', 'least-error');
      await setSetting('resampling', 'leave-one-out');
    }
  });

  it('outcome, trials and robust settings reach the analysis: binomial MASS::menarche and robust MASS::mcycle match R and save what the command line writes', async function () {
    try {
      await setSetting('outcome', 'proportions');
      await setSetting('candidates', '3,5');
      await setSetting('resampling', 'folds:5');
      const menarche = file('menarche.csv');
      const bin = (await vscode.commands.executeCommand('knotwise.tuneCurve', menarche, { columns: { x: 'Age', y: 'Menarche', trials: 'Total' } })) as RunSummary;
      assert.equal(bin.status, 'done', bin.message);
      assert.equal(bin.model?.outcome, 'proportions');
      assert.equal(bin.model?.trials, 'Total');
      assert.equal(bin.model?.converged, true);
      const glm = physics().glm.find((c) => c.dataset === 'menarche' && c.df === bin.chosenDf);
      assert.ok(glm, `physics.json has menarche at df ${bin.chosenDf}`);
      // Reference: R glm(cbind(y, trials - y) ~ ns(x, df = k - 1), family = binomial), physics.json.
      close(`deviance (${glm.rCall})`, bin.model?.deviance, glm.deviance, 1e-7);
      const shown = api().panelState(menarche)?.payload;
      assert.equal(shown?.model.trialsLabel, 'Total');
      assert.equal(shown?.metric, 'deviance');
      close('deviance in the panel (7 significant digits)', (await shownDetail(menarche)).model?.glm?.deviance, glm.deviance, 1e-6);
      const savedBin = (await vscode.commands.executeCommand('knotwise.saveCurveTable', menarche, { replaceForeignFiles: 'no' })) as RunSummary;
      assert.equal(savedBin.status, 'done', savedBin.message);
      const cliBin = cliOutputs('menarche.csv', ['--x', 'Age', '--y', 'Menarche', '--outcome', 'proportions', '--trials', 'Total', '--df', '3,5', '--resampling', 'folds:5', '--rule', 'least-error']);
      assert.equal(await text(file('menarche.curve.csv')), cliBin.table);
      assert.equal(await text(file('menarche.fit.json')), cliBin.record);

      await closeEverything();
      await setSetting('outcome', undefined);
      await setSetting('robust', true);
      await setSetting('candidates', '5,8');
      const rob = (await vscode.commands.executeCommand('knotwise.tuneCurve', file('mcycle.csv'), MCYCLE)) as RunSummary;
      assert.equal(rob.status, 'done', rob.message);
      assert.equal(rob.model?.robustK, 1.345);
      const rlm = physics().rlm.find((c) => c.dataset === 'mcycle' && c.df === rob.chosenDf);
      assert.ok(rlm, `physics.json has the robust mcycle fit at df ${rob.chosenDf}`);
      // Reference: MASS::rlm(y ~ ns(x, df = k - 1), psi = psi.huber), physics.json; rows are CSV lines 2...
      close(`robust scale (${rlm.rCall})`, rob.model?.scale, rlm.scale, 1e-7);
      const rDown = new Set(rlm.weights.flatMap((w, i) => (w < 1 - 1e-6 ? [i + 2] : [])));
      assert.ok(
        (rob.model?.downweightedLines ?? []).length === rDown.size && (rob.model?.downweightedLines ?? []).every((l) => rDown.has(l)),
        `down-weighted lines ${rob.model?.downweightedLines?.join(', ')}`,
      );
      const savedRob = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('mcycle.csv'), { replaceForeignFiles: 'no' })) as RunSummary;
      assert.equal(savedRob.status, 'done', savedRob.message);
      const cliRob = cliOutputs('mcycle.csv', ['--x', 'times', '--y', 'accel', '--robust', '--df', '5,8', '--resampling', 'folds:5', '--rule', 'least-error']);
      assert.equal(await text(file('mcycle.curve.csv')), cliRob.table);
      assert.equal(await text(file('mcycle.fit.json')), cliRob.record);
    } finally {
      await closeEverything();
      await setSetting('outcome', undefined);
      await setSetting('robust', undefined);
      await setSetting('candidates', '3..15');
      await setSetting('resampling', 'leave-one-out');
    }
  });

  it('what the editor saves passes `knotwise check`, also under other output names and with a df chosen by hand', async function () {
    try {
      await setSetting('output.tableName', '${name}.table.csv');
      await setSetting('output.recordName', '${name}.record.json');
      const saved = (await vscode.commands.executeCommand('knotwise.saveCurveTable', file('cars.csv'), {
        columns: { x: 'speed', y: 'dist' },
        replaceForeignFiles: 'no',
        rule: { kind: 'pick', df: 5 },
      })) as RunSummary;
      assert.equal(saved.status, 'done', saved.message);
      assert.equal(saved.chosenDf, 5);
      const rec = JSON.parse(await text(file('cars.record.json'))) as { table: { file: string }; selection: { df: number; rule: string } };
      assert.equal(rec.table.file, 'cars.table.csv');
      assert.deepEqual([rec.selection.df, rec.selection.rule], [5, 'pick:5']);
      // The command line rebuilds the table from the data and the record and finds it current.
      const out = execFileSync(process.execPath, [join(extensionPath(), 'dist', 'cli.js'), 'check', file('cars.record.json').fsPath], { encoding: 'utf8' });
      assert.match(out, /^current /m);
    } finally {
      await setSetting('output.tableName', undefined);
      await setSetting('output.recordName', undefined);
      for (const f of ['cars.table.csv', 'cars.record.json']) await vscode.workspace.fs.delete(file(f)).then(undefined, () => undefined);
    }
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
      const rand = () => (s = (s * 1103515245 + 12345) >>> 0) / 2 ** 32;
      const rows = ['load [kN],strain [um]'];
      for (let i = 0; i < 40000; i++) {
        const x = 100 * rand();
        rows.push(`${x.toFixed(4)},${(Math.sqrt(x) * 30 + 5 * (rand() - 0.5)).toFixed(3)}`);
      }
      await vscode.workspace.fs.writeFile(big(), new TextEncoder().encode(rows.join('\n') + '\n'));
      await closeEverything();
      await setSetting('resampling', 'bootstrap:2000');
    });
    after(async function () {
      await closeEverything();
      await setSetting('resampling', undefined);
    });
    const drift = { columns: { x: 'load', y: 'strain' } };
    /** Run ids the big file's panel has been told about so far. */
    const runIds = (): Set<number> =>
      new Set(
        api()
          .panelLog(big())
          .flatMap((m) => ('runId' in m ? [m.runId] : [])),
      );
    /** Waits until a new run reports resampling progress in its panel (it is then mid-run, not before or after). */
    const resampling = (earlier: Set<number>): Promise<true> =>
      waitFor('a new run resampling', () =>
        api()
          .panelLog(big())
          .some((m) => m.type === 'running' && !earlier.has(m.runId) && (m.fraction ?? 0) > 0)
          ? true
          : undefined,
      );

    it('Stop Tuning cancels a save-and-tune run and leaves no files behind', async function () {
      const before = readdirSync(folder().fsPath).sort();
      const earlier = runIds();
      const pending = vscode.commands.executeCommand('knotwise.saveCurveTable', big(), { ...drift, replaceForeignFiles: 'yes' }) as Thenable<RunSummary>;
      await resampling(earlier);
      const stopped = (await vscode.commands.executeCommand('knotwise.stopTuning')) as number;
      assert.equal(stopped, 1, 'one run was running');
      const result = await pending;
      assert.equal(result.status, 'cancelled');
      assert.deepEqual(readdirSync(folder().fsPath).sort(), before);
    });

    it('a second run on the same file replaces the first', async function () {
      const earlier = runIds();
      const first = vscode.commands.executeCommand('knotwise.tuneCurve', big(), drift) as Thenable<RunSummary>;
      await resampling(earlier);
      await setSetting('resampling', 'folds:5');
      // The settings change reruns open panels; the explicit second run supersedes both.
      const second = (await vscode.commands.executeCommand('knotwise.tuneCurve', big(), drift)) as RunSummary;
      const firstResult = await first;
      assert.equal(firstResult.status, 'superseded');
      assert.equal(second.status, 'done', second.message);
    });
  });
});
