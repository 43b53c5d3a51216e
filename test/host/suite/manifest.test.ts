/**
 * The manifest as the editor reads it: the icon, the `when` clauses that decide where the
 * commands appear, the translatable strings of package.nls.json, the scope of every
 * setting, the declared workspace capabilities and the walkthrough's demo-data step.
 */
import assert from 'node:assert/strict';
import * as vscode from 'vscode';

interface Manifest {
  icon: string;
  capabilities: { untrustedWorkspaces: { supported: unknown; description?: string }; virtualWorkspaces: { supported: unknown; description?: string } };
  contributes: {
    commands: { command: string; title: string }[];
    menus: Record<'explorer/context' | 'editor/title' | 'editor/context' | 'commandPalette', { command: string; when?: string }[]>;
    configuration: { properties: Record<string, { scope?: string }> };
    walkthroughs: { steps: { media: { markdown?: string }; completionEvents: string[] }[] }[];
  };
}

function knotwise(): vscode.Extension<unknown> {
  const ext = vscode.extensions.all.find((e) => e.packageJSON?.name === 'knotwise');
  assert.ok(ext, 'the Knotwise extension is loaded');
  return ext;
}

async function readJson<T>(uri: vscode.Uri): Promise<T> {
  return JSON.parse(new TextDecoder().decode(await vscode.workspace.fs.readFile(uri))) as T;
}

/** The regular expressions `resourceExtname =~ /.../flags` of a when clause. */
function extnamePatterns(when: string): RegExp[] {
  return [...when.matchAll(/resourceExtname =~ \/((?:\\.|[^/])+)\/([a-z]*)/g)].map((m) => new RegExp(m[1] ?? '', m[2]));
}

describe('manifest (package.json, package.nls.json)', function () {
  let raw: Manifest;
  let nls: Record<string, string>;

  before(async function () {
    const root = knotwise().extensionUri;
    raw = await readJson<Manifest>(vscode.Uri.joinPath(root, 'package.json'));
    nls = await readJson<Record<string, string>>(vscode.Uri.joinPath(root, 'package.nls.json'));
  });

  it('the icon is a 128 x 128 PNG in the extension', async function () {
    const bytes = await vscode.workspace.fs.readFile(vscode.Uri.joinPath(knotwise().extensionUri, raw.icon));
    assert.deepEqual([...bytes.subarray(0, 8)], [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a], 'PNG signature');
    const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
    assert.equal(new TextDecoder().decode(bytes.subarray(12, 16)), 'IHDR');
    assert.deepEqual([view.getUint32(16), view.getUint32(20)], [128, 128]);
  });

  it('the menus offer the file commands for .csv and .tsv in any letter case, and for nothing else', function () {
    const m = raw.contributes.menus;
    // Every entry but the one that compares fit records (checked below) acts on a data file.
    const fileEntries = [...m['explorer/context'], ...m['editor/title'], ...m['editor/context']].filter((e) => e.command !== 'knotwise.compareFitRecords');
    const compare = m['explorer/context'].filter((e) => e.command === 'knotwise.compareFitRecords');
    assert.equal(compare.length, 1);
    const recordName = /resourceFilename =~ \/((?:\\.|[^/])+)\/([a-z]*)/.exec(compare[0]?.when ?? '');
    assert.ok(recordName, `the compare entry names fit records: ${compare[0]?.when}`);
    const recordRe = new RegExp(recordName[1] ?? '', recordName[2]);
    for (const n of ['cal.fit.json', 'Cal.FIT.JSON']) assert.ok(recordRe.test(n), `compare accepts ${n}`);
    for (const n of ['cal.json', 'cal.csv', 'cal.fit.json.bak']) assert.ok(!recordRe.test(n), `compare refuses ${n}`);
    assert.ok(fileEntries.length >= 5);
    for (const entry of fileEntries) {
      const patterns = extnamePatterns(entry.when ?? '');
      assert.equal(patterns.length, 1, `${entry.command}: ${entry.when}`);
      const [re] = patterns as [RegExp];
      for (const ext of ['.csv', '.CSV', '.Csv', '.tsv', '.TSV']) assert.ok(re.test(ext), `${entry.command} accepts ${ext}`);
      for (const ext of ['.json', '.csvx', '.xcsv', '', '.fit.json']) assert.ok(!re.test(ext), `${entry.command} refuses ${ext || 'no extension'}`);
    }
  });

  it('the command palette shows a command only when it can act', function () {
    const palette = new Map(raw.contributes.menus.commandPalette.map((e) => [e.command, e.when ?? '']));
    for (const c of raw.contributes.commands) assert.ok(palette.has(c.command), `${c.command} has a palette entry`);
    assert.equal(palette.get('knotwise.stopTuning'), 'knotwise.tuning');
    // Workbench context keys (the active editor's file name), not keys the host sets after an
    // editor change, so a palette opened in that moment lists the same commands.
    for (const c of ['knotwise.tuneCurve', 'knotwise.saveCurveTable', 'knotwise.forgetColumns']) {
      const patterns = extnamePatterns(palette.get(c) ?? '');
      assert.equal(patterns.length, 1, `${c} for a CSV or TSV in front: ${palette.get(c)}`);
      const [re] = patterns as [RegExp];
      for (const ext of ['.csv', '.Csv', '.TSV']) assert.ok(re.test(ext), `${c} accepts ${ext}`);
      assert.ok(!re.test('.json'), `${c} refuses .json`);
    }
    for (const c of ['knotwise.tuneCurve', 'knotwise.saveCurveTable']) {
      assert.match(palette.get(c) ?? '', /activeWebviewPanelId == knotwise\.curveReview\b/, `${c} from the review panel`);
    }
  });

  it('every %key% of package.json resolves in package.nls.json, and the editor shows the text', async function () {
    const text = new TextDecoder().decode(await vscode.workspace.fs.readFile(vscode.Uri.joinPath(knotwise().extensionUri, 'package.json')));
    const keys = [...text.matchAll(/"%([^%"]+)%"/g)].map((m) => m[1] ?? '');
    assert.ok(keys.length > 40, `${keys.length} translatable strings`);
    for (const k of keys) assert.equal(typeof nls[k], 'string', `package.nls.json has ${k}`);
    for (const k of Object.keys(nls)) assert.ok(keys.includes(k), `${k} of package.nls.json is used`);
    // The loaded manifest has the texts in place of the keys.
    const loaded = knotwise().packageJSON as Manifest;
    const tune = loaded.contributes.commands.find((c) => c.command === 'knotwise.tuneCurve');
    assert.equal(tune?.title, nls['command.tuneCurve.title']);
  });

  it('every setting has a scope, per folder unless it concerns the window', function () {
    const props = raw.contributes.configuration.properties;
    assert.ok(Object.keys(props).length >= 20);
    for (const [name, p] of Object.entries(props)) {
      assert.ok(['application', 'machine', 'window', 'resource', 'language-overridable', 'machine-overridable'].includes(p.scope ?? ''), `${name} has scope ${p.scope}`);
    }
    for (const name of ['knotwise.output.folder', 'knotwise.output.tableName', 'knotwise.output.recordName', 'knotwise.curve', 'knotwise.resampling']) {
      assert.equal(props[name]?.scope, 'resource', name);
    }
  });

  it('the workspace capabilities are declared with reasons', function () {
    const { untrustedWorkspaces, virtualWorkspaces } = raw.capabilities;
    assert.equal(untrustedWorkspaces.supported, 'limited');
    assert.ok((untrustedWorkspaces.description ?? '').length > 0);
    assert.equal(virtualWorkspaces.supported, 'limited');
    assert.ok((virtualWorkspaces.description ?? '').length > 0);
  });

  it('the walkthrough media are in the extension and its demo-data step copies the bundled data into the workspace', async function () {
    const root = knotwise().extensionUri;
    const steps = raw.contributes.walkthroughs[0]?.steps ?? [];
    assert.ok(steps.length >= 4);
    for (const s of steps) {
      assert.ok(s.media.markdown, 'markdown media');
      await vscode.workspace.fs.stat(vscode.Uri.joinPath(root, s.media.markdown));
    }
    const folder = vscode.workspace.workspaceFolders?.[0];
    assert.ok(folder);
    const target = vscode.Uri.joinPath(folder.uri, 'humidity-sensor.csv');
    await vscode.workspace.fs.delete(target).then(undefined, () => undefined);
    try {
      await vscode.commands.executeCommand('knotwise.openDemoData');
      const copied = await vscode.workspace.fs.readFile(target);
      const bundled = await vscode.workspace.fs.readFile(vscode.Uri.joinPath(root, 'examples', 'humidity-sensor.csv'));
      assert.deepEqual(copied, bundled);
      assert.equal(vscode.window.activeTextEditor?.document.uri.toString(), target.toString(), 'the copy is open');
    } finally {
      await vscode.commands.executeCommand('workbench.action.closeActiveEditor');
      await vscode.workspace.fs.delete(target).then(undefined, () => undefined);
    }
  });
});
