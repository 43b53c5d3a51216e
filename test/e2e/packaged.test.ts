/**
 * The packaged extension, installed the way people install it: `npm run package` built
 * knotwise-<version>.vsix (test/e2e/run.mjs --packaged), code-server's --install-extension
 * put it into a fresh extensions folder, and the workbench starts without any development
 * payload. Then the main flow: right-click MASS::mcycle (see fixtures/make-fixtures.R) in the
 * explorer, pick the columns, the panel appears, save writes the curve table and fit record.
 * No request may leave 127.0.0.1.
 */
import assert from 'node:assert/strict';
import { copyFileSync, existsSync, mkdirSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { join, relative } from 'node:path';
import type { Frame, Page } from 'playwright-core';
import { pickCurveColumns, tuneFromExplorer } from './flows';
import type { CodeServer, LaunchedChromium } from '../../scripts/e2e-workbench.mjs' with { 'resolution-mode': 'import' };

const fixtures = join(__dirname, 'fixtures');
const artifacts = join(__dirname, '..', '..', 'test-artifacts');

/** Every file under `dir`, as paths relative to it with forward slashes. */
function filesUnder(dir: string): string[] {
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((d) => d.isFile())
    .map((d) => relative(dir, join(d.parentPath, d.name)).split('\\').join('/'))
    .sort();
}

describe('Knotwise installed from its .vsix (code-server workbench)', function () {
  let server: CodeServer;
  let browser: LaunchedChromium;
  let page: Page;
  let runDir: string;
  let workspace: string;
  let installed: string;
  let panel: Frame;
  let chosenDf = 0;
  let failed = false;

  before(async function () {
    const vsix = process.env.KNOTWISE_VSIX;
    assert.ok(vsix && existsSync(vsix), `the .vsix to install (KNOTWISE_VSIX=${vsix ?? ''})`);
    const wb = await import('../../scripts/e2e-workbench.mjs');
    runDir = wb.freshRunDir('packaged');
    workspace = join(runDir, 'workspace');
    mkdirSync(workspace, { recursive: true });
    copyFileSync(join(fixtures, 'mcycle.csv'), join(workspace, 'mcycle.csv'));
    wb.installVsix(runDir, vsix);
    const version = (JSON.parse(readFileSync(join(wb.repoRoot, 'package.json'), 'utf8')) as { version: string }).version;
    installed = join(runDir, 'extensions', `knotwise.knotwise-${version}`);
    server = await wb.startCodeServer({ runDir });
    browser = await wb.launchChromium({ viewport: { width: 1500, height: 950 } });
    page = browser.page;
    page.setDefaultTimeout(30000);
    // No payload: the workbench finds the extension only in its extensions folder.
    await page.goto(server.workbenchUrl(workspace));
  });

  afterEach(function () {
    if (this.currentTest?.state === 'failed') failed = true;
  });

  beforeEach(function () {
    if (failed) this.skip();
  });

  after(async function () {
    if (failed) await page?.screenshot({ path: join(artifacts, 'packaged-failure.png') }).catch(() => undefined);
    await browser?.close();
    await server?.stop();
    if (!failed && runDir) rmSync(runDir, { recursive: true, force: true });
  });

  it('the installed extension holds the run-time files and nothing of the sources', function () {
    const files = filesUnder(installed);
    for (const f of [
      'package.json',
      'package.nls.json',
      'README.md',
      'LICENSE.txt',
      'CHANGELOG.md',
      'dist/extension.js',
      'dist/resampleWorker.js',
      'dist/webview/main.js',
      'dist/webview/main.css',
      'media/icon.png',
    ]) {
      assert.ok(
        files.some((g) => g.toLowerCase() === f.toLowerCase()),
        `${f} is installed (found ${files.join(', ')})`,
      );
    }
    const unwanted = files.filter((f) => /\.(map|ts|tgz|vsix)$/.test(f) || /^(core|extension|webview|test|scripts|node_modules|docs|bench|\.e2e)\//.test(f));
    assert.deepEqual(unwanted, []);
    // The bundles are minified (lines of thousands of characters; unminified code averages
    // under a hundred) and point to no source map.
    for (const f of ['dist/extension.js', 'dist/resampleWorker.js', 'dist/webview/main.js']) {
      const text = readFileSync(join(installed, f), 'utf8');
      const perLine = text.length / text.split('\n').length;
      assert.ok(perLine > 1000, `${f}: ${Math.round(perLine)} characters per line`);
      assert.doesNotMatch(text, /sourceMappingURL/, f);
    }
  });

  it('the explorer context menu of the CSV offers Knotwise and quick picks ask for the columns', async function () {
    await tuneFromExplorer(page, 'mcycle.csv');
    await pickCurveColumns(page, 'mcycle.csv', 'times', 'accel');
  });

  it('the panel appears with a result', async function () {
    const deadline = Date.now() + 60000;
    search: while (Date.now() < deadline) {
      for (const f of page.frames()) {
        const ready = await f.$('#knotwise-root[data-state="ready"]').catch(() => null);
        if (ready) {
          panel = f;
          break search;
        }
      }
      // Wait for the next frame to load rather than for a fixed time.
      await page.waitForEvent('framenavigated', { timeout: 2000 }).catch(() => undefined);
    }
    assert.ok(panel, 'the Knotwise panel showed a result within 60 s');
    const badge = (await panel.textContent('#kw-chosen-df')) ?? '';
    assert.match(badge, /^df \d+$/);
    chosenDf = Number(badge.slice(3));
    // The webview's style sheet from the package loaded.
    const bg = (await panel.evaluate('getComputedStyle(document.querySelector("#kw-chosen-df")).backgroundColor')) as string;
    assert.notEqual(bg, 'rgba(0, 0, 0, 0)');
    await page.screenshot({ path: join(artifacts, 'packaged-panel.png') });
  });

  it('save writes the curve table and the fit record next to the CSV', async function () {
    await panel.click('#kw-save');
    await panel.locator('#kw-status', { hasText: /^Saved / }).waitFor();
    const table = join(workspace, 'mcycle.curve.csv');
    const record = join(workspace, 'mcycle.fit.json');
    assert.ok(existsSync(table) && existsSync(record));
    assert.equal(readFileSync(table, 'utf8').split('\n')[0], 'x,fit,se,ciLower,ciUpper,piLower,piUpper,extrapolated');
    const rec = JSON.parse(readFileSync(record, 'utf8')) as { format: string; selection: { df: number }; data: { file: string } };
    assert.equal(rec.format, 'knotwise-fit-record');
    assert.equal(rec.selection.df, chosenDf);
    assert.equal(rec.data.file, 'mcycle.csv');
  });

  it('no request left 127.0.0.1', function () {
    assert.deepEqual(browser.blocked, []);
  });
});
