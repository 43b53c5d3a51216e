/**
 * One scenario in the real workbench, as a person would do it: right-click MASS::mcycle
 * (Silverman 1985, from R's MASS package; see fixtures/make-fixtures.R) in the explorer,
 * pick the columns, wait for the panel, read the explanation, press save, find the files
 * on disk, run it again from the panel, look at it in a light and a dark theme; click a
 * reading to open its line beside the panel, pick a df by hand, edit the CSV (a banner
 * within a second, no stale save), save it (the refit keeps the df), reload the window
 * (the panel comes back); then start a long run from the command palette, stop it with
 * the notification's Cancel button, which leaves no file behind, and run it again from
 * the panel; last, split datasets::CO2 (Potvin, Lechowicz & Tardif 1990) by plant with the
 * fourth pick, show a plant from its small figure and save every plant's table, the same
 * bytes as the command line's `--per`. No request may leave 127.0.0.1.
 */
import assert from 'node:assert/strict';
import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Frame, Locator, Page } from 'playwright-core';
import { closeAllEditors, pickCurveColumns, tuneFromExplorer } from './flows';
import type { CodeServer, LaunchedChromium } from '../../scripts/e2e-workbench.mjs' with { 'resolution-mode': 'import' };

const fixtures = join(__dirname, 'fixtures');
const artifacts = join(__dirname, '..', '..', 'test-artifacts');

describe('Knotwise in the whole editor (code-server workbench)', function () {
  let server: CodeServer;
  let browser: LaunchedChromium;
  let page: Page;
  let runDir: string;
  let workspace: string;
  let panel: Frame;
  let chosenDf = 0;
  // The badge background and explanation colour in the light theme, to compare with the dark one.
  let lightBadge = '';
  let lightText = '';
  let failed = false;

  before(async function () {
    const wb = await import('../../scripts/e2e-workbench.mjs');
    runDir = wb.freshRunDir('editor');
    workspace = join(runDir, 'workspace');
    mkdirSync(workspace, { recursive: true });
    copyFileSync(join(fixtures, 'mcycle.csv'), join(workspace, 'mcycle.csv'));
    copyFileSync(join(fixtures, 'co2.csv'), join(workspace, 'co2.csv'));
    copyFileSync(join(fixtures, 'trees.csv'), join(workspace, 'trees.csv'));
    server = await wb.startCodeServer({ runDir, settings: { 'workbench.colorTheme': 'Default Light Modern' } });
    browser = await wb.launchChromium({ viewport: { width: 1500, height: 950 } });
    page = browser.page;
    page.setDefaultTimeout(30000);

    await page.goto(server.workbenchUrl(workspace, [['extensionDevelopmentPath', server.remotePath(wb.repoRoot)]]));
  });

  afterEach(function () {
    if (this.currentTest?.state === 'failed') failed = true;
  });

  beforeEach(function () {
    // Steps build on each other: after a failure the rest cannot tell anything.
    if (failed) this.skip();
  });

  after(async function () {
    if (failed) await page?.screenshot({ path: join(artifacts, 'editor-failure.png') }).catch(() => undefined);
    await browser?.close();
    await server?.stop();
    if (!failed && runDir) rmSync(runDir, { recursive: true, force: true });
  });

  /** Opens the command palette from the workbench (not the panel, which may have the keyboard) and types `text`; returns its input. */
  async function openPalette(text: string): Promise<Locator> {
    const input = page.locator('.quick-input-widget input.input');
    // A panel that opens or takes focus in that moment closes the palette: open it again then.
    for (let attempt = 1; ; attempt++) {
      await page.locator('.part.sidebar .title-label').first().click();
      await page.keyboard.press('F1');
      await input.waitFor();
      try {
        await input.fill(text, { timeout: 5000 });
        return input;
      } catch (e) {
        if (attempt === 3) throw e;
      }
    }
  }

  /** Picks a colour theme through the command palette, as a person would, and waits until the workbench wears it. */
  async function chooseTheme(theme: string, workbenchClass: string): Promise<void> {
    const input = await openPalette('>Preferences: Color Theme');
    await page
      .getByRole('option', { name: /^Preferences: Color Theme\b(?! \()/ })
      .first()
      .click();
    // The theme picker is open once it lists the installed themes.
    await page.locator('.quick-input-widget .monaco-list-row[aria-label*="Light Modern"]').first().waitFor();
    await input.fill(theme);
    await page.locator(`.quick-input-widget .monaco-list-row[aria-label*="${theme}"]`).first().waitFor();
    await page.keyboard.press('Enter');
    await page.locator(`.monaco-workbench.${workbenchClass}`).waitFor({ timeout: 30000 });
  }

  /**
   * The colour a workbench theme variable names inside the panel, as the page computes colours
   * (rgb(...)): a probe element coloured with the variable, read back and removed.
   */
  async function themeColour(variable: string): Promise<string> {
    return (await panel.evaluate(`(() => {
      const probe = document.createElement('span');
      probe.style.color = 'var(${variable})';
      document.body.append(probe);
      const colour = getComputedStyle(probe).color;
      probe.remove();
      return colour;
    })()`)) as string;
  }

  /** Knotwise's own colours in the panel now: the df badge, the explanation and the fitted curve. */
  async function panelColours(): Promise<{ badge: string; text: string; curve: string }> {
    return (await panel.evaluate(`(() => ({
      badge: getComputedStyle(document.querySelector('#kw-chosen-df')).backgroundColor,
      text: getComputedStyle(document.querySelector('#kw-reason')).color,
      curve: getComputedStyle(document.querySelector('#fig-data .kw-curve')).stroke,
    }))()`)) as { badge: string; text: string; curve: string };
  }

  /** The Knotwise commands the command palette lists now (their titles), as a person would see them. */
  async function paletteCommands(): Promise<string[]> {
    const input = await openPalette('>Knotwise: ');
    // Every palette lists the walkthrough's command once the filter has applied.
    await page
      .getByRole('option', { name: /Knotwise: Open the Demo Data/ })
      .first()
      .waitFor();
    const names = await page.locator('.quick-input-widget .monaco-list-row').evaluateAll((rows) => rows.map((r) => r.getAttribute('aria-label') ?? ''));
    await page.keyboard.press('Escape');
    await input.waitFor({ state: 'hidden' });
    return names.filter((n) => n.startsWith('Knotwise: ')).map((n) => n.replace(/, .*$/, ''));
  }

  /** Waits until the panel shows a finished run newer than `before`. */
  async function newRun(before: number, after: string): Promise<void> {
    // Run ids only grow: a ready panel with another run id shows a newer run.
    await panel
      .locator(`#knotwise-root[data-state="ready"]:not([data-run-id="${before}"])`)
      .waitFor({ timeout: 60000 })
      .catch(() => {
        throw new Error(`no new run after ${after}`);
      });
  }

  async function findPanel(): Promise<Frame> {
    const deadline = Date.now() + 60000;
    while (Date.now() < deadline) {
      for (const f of page.frames()) {
        const ready = await f.$('#knotwise-root[data-state="ready"]').catch(() => null);
        if (ready) return f;
      }
      await page.waitForTimeout(250);
    }
    throw new Error('the Knotwise panel did not show a result within 60 s');
  }

  it('the explorer context menu of a CSV offers Knotwise', async function () {
    await tuneFromExplorer(page, 'mcycle.csv');
  });

  it('quick picks ask for x, y and weights, numeric columns first with previews', async function () {
    // The preview of the first values of `times` (MASS::mcycle starts 2.4, 2.6, 3.2, ...).
    await pickCurveColumns(page, 'mcycle.csv', 'times', 'accel', '2.4, 2.6, 3.2');
  });

  it('the panel appears and explains the chosen df in plain words', async function () {
    panel = await findPanel();
    const badge = (await panel.textContent('#kw-chosen-df')) ?? '';
    assert.match(badge, /^df \d+$/);
    chosenDf = Number(badge.slice(3));
    const reason = (await panel.textContent('#kw-reason')) ?? '';
    assert.match(reason, new RegExp(`One-SE threshold .* The smallest df at or under it is ${chosenDf} `));
    assert.equal(await panel.locator('figure.kw-figure svg[role="img"]').count(), 7);
    // The panel's own styles loaded: the badge, the explanation and the curve wear the workbench's theme variables.
    const light = await panelColours();
    assert.notEqual(light.badge, 'rgba(0, 0, 0, 0)');
    assert.equal(light.badge, await themeColour('--vscode-badge-background'));
    assert.equal(light.text, await themeColour('--vscode-foreground'));
    assert.equal(light.curve, await themeColour('--vscode-charts-blue'));
    lightBadge = light.badge;
    lightText = light.text;
    await page.screenshot({ path: join(artifacts, 'editor-light.png') });
  });

  it('pressing save writes the curve table and fit record next to the CSV', async function () {
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
    // The save's commit marker and temporary files are gone once it says Saved.
    assert.deepEqual(
      readdirSync(workspace).filter((f) => /knotwise/.test(f)),
      [],
    );
  });

  it('Run again in the panel runs the analysis again and shows the new run', async function () {
    const before = Number(await panel.getAttribute('#knotwise-root', 'data-run-id'));
    await panel.click('#kw-rerun');
    await newRun(before, 'Run again');
    // The same data and settings: the same choice, explained again.
    assert.equal(await panel.textContent('#kw-chosen-df'), `df ${chosenDf}`);
    assert.match((await panel.textContent('#kw-reason')) ?? '', /One-SE threshold/);
  });

  it('Calibration use: the curve of MASS::mcycle turns, so there is no inverse table; the rerun lies on the curve just saved', async function () {
    await panel.click('#kw-fold-calibration > summary');
    await panel.locator('#kw-fold-calibration[open]').waitFor();
    assert.match((await panel.textContent('#kw-inverse-refused')) ?? '', /^No inverse table: the fitted curve turns at x = .*the setting knotwise\.shape/);
    // The same data and choice as the record saved above: difference 0 everywhere.
    assert.match((await panel.textContent('#kw-drift-words')) ?? '', /stays within the recorded curve's 95 % band everywhere/);
    await panel.locator('#kw-fold-calibration').scrollIntoViewIfNeeded();
    await page.screenshot({ path: join(artifacts, 'editor-calibration.png') });
    // Folded again, as the tests after this one expect the panel.
    await panel.click('#kw-fold-calibration > summary');
  });

  it('the panel follows a dark theme', async function () {
    await chooseTheme('Dark Modern', 'vs-dark');
    // Knotwise's own panel follows: its badge, explanation and curve take the dark theme's colours, which differ from the light ones.
    await panel.locator('body.vscode-dark').waitFor({ timeout: 30000 });
    const dark = await panelColours();
    assert.equal(dark.badge, await themeColour('--vscode-badge-background'), 'the df badge wears the theme variable');
    assert.equal(dark.text, await themeColour('--vscode-foreground'), 'the explanation wears the theme variable');
    assert.equal(dark.curve, await themeColour('--vscode-charts-blue'), 'the curve wears the theme variable');
    assert.notEqual(dark.badge, lightBadge, 'the df badge changed colour with the theme');
    assert.notEqual(dark.text, lightText, 'the explanation text changed colour with the theme');
    await page.screenshot({ path: join(artifacts, 'editor-dark.png') });
  });

  it('the panel reads in high-contrast themes and at half width', async function () {
    for (const [theme, workbench, body] of [
      ['Dark High Contrast', 'hc-black', 'vscode-high-contrast'],
      ['Light High Contrast', 'hc-light', 'vscode-high-contrast-light'],
    ] as const) {
      await chooseTheme(theme, workbench);
      await panel.locator(`body.${body}`).waitFor({ timeout: 30000 });
      // High-contrast themes draw borders around the panel's controls.
      const border = (await panel.evaluate('getComputedStyle(document.querySelector("#kw-save")).borderTopStyle')) as string;
      assert.notEqual(border, 'none', `${theme}: the save button has a border`);
      // Knotwise's own: the df badge is outlined in the theme's contrast border.
      const outline = (await panel.evaluate('getComputedStyle(document.querySelector("#kw-chosen-df")).borderTopColor')) as string;
      assert.equal(outline, await themeColour('--vscode-contrastBorder'), `${theme}: the badge wears the contrast border`);
      await page.screenshot({ path: join(artifacts, `editor-${workbench}.png`) });
    }
    // Half width: an editor group of about 700 CSS pixels.
    const size = page.viewportSize();
    await page.setViewportSize({ width: 1000, height: 900 });
    await page.locator('.part.sidebar .title-label').first().waitFor();
    await panel.locator('#kw-chosen-df').waitFor();
    await page.screenshot({ path: join(artifacts, 'editor-half-width.png') });
    if (size) await page.setViewportSize(size);
  });

  it('ticking a shape in the panel reruns the analysis in the host with that constraint', async function () {
    const before = Number(await panel.getAttribute('#knotwise-root', 'data-run-id'));
    await panel.check('#kw-shape-nonnegative');
    await newRun(before, 'ticking the shape');
    assert.match((await panel.textContent('#kw-model-words')) ?? '', /shape: non-negative, guaranteed everywhere in the data range \(set in this panel/);
    assert.equal(await panel.isChecked('#kw-shape-nonnegative'), true);
    assert.match((await panel.textContent('#kw-model-lines')) ?? '', /Shape non-negative: \d+ of \d+ linear inequalities active/);
  });

  it('clicking a reading opens its line in an editor beside the panel, never over it', async function () {
    // The last reading of mcycle.csv (line 134: times 57.6, accel 10.7).
    const point = panel.locator('#fig-data circle.kw-point[data-line="134"]');
    await point.click();
    // Both stay in view: the panel is the active tab of its group, the CSV of another.
    const csvTab = page.locator('.editor-group-container .tab.active .label-name', { hasText: /^mcycle\.csv$/ });
    await csvTab.waitFor();
    await page.locator('.editor-group-container .tab.active .label-name', { hasText: 'Curve review · mcycle.csv' }).waitFor();
    assert.equal(await page.locator('.editor-group-container').count(), 2, 'two editor groups');
    await page.locator('[id="status.editor.selection"]', { hasText: /Ln 134,/ }).waitFor();
    assert.equal(await panel.locator('#kw-chosen-df').isVisible(), true, 'the panel still shows its result');
  });

  let picked = 0;
  let savedTable = '';
  it('after a df is picked by hand, an edit of the CSV shows a banner within a second and no stale table can be saved', async function () {
    // A df other than the one the rule chose, picked in the panel.
    const options = await panel.$$eval('#kw-df option', (os) => os.map((o) => Number(o.getAttribute('value'))));
    picked = options.find((df) => df !== chosenDf && df >= 5) ?? 0;
    assert.ok(picked > 0, `a df to pick among ${options.join(', ')}`);
    await panel.selectOption('#kw-df', String(picked));
    assert.equal(await panel.textContent('#kw-chosen-df'), `df ${picked}`);
    savedTable = readFileSync(join(workspace, 'mcycle.curve.csv'), 'utf8');
    const savedRecord = readFileSync(join(workspace, 'mcycle.fit.json'), 'utf8');
    // Type into the CSV beside the panel: line 134 becomes 57.6,10.71.
    await page.locator('.editor-group-container .tab .label-name', { hasText: /^mcycle\.csv$/ }).click();
    await page.locator('.monaco-editor.focused').waitFor();
    await page.keyboard.press('End');
    const typed = Date.now();
    await page.keyboard.type('1');
    await panel.locator('#kw-banner').waitFor({ state: 'visible', timeout: 1000 });
    assert.ok(Date.now() - typed <= 1000, `the banner took ${Date.now() - typed} ms`);
    assert.equal(await panel.textContent('#kw-banner-text'), 'Unsaved edits in mcycle.csv since this analysis: 1 row changed. Saving mcycle.csv refits the curve.');
    assert.equal(await panel.textContent('#kw-save'), 'Refit and save');
    // Refit and save asks to save the CSV first; declining saves nothing.
    await panel.click('#kw-save');
    const dialog = page.locator('.monaco-dialog-box', { hasText: 'mcycle.csv has unsaved edits' });
    await dialog.waitFor();
    await dialog.getByRole('button', { name: 'Cancel' }).click();
    await panel.locator('#kw-status', { hasText: 'Nothing was saved: mcycle.csv has unsaved edits' }).waitFor();
    assert.equal(readFileSync(join(workspace, 'mcycle.curve.csv'), 'utf8'), savedTable);
    assert.equal(readFileSync(join(workspace, 'mcycle.fit.json'), 'utf8'), savedRecord);
    await page.screenshot({ path: join(artifacts, 'editor-banner.png') });
  });

  it('saving the CSV refits at once, keeps the df picked by hand and says what moved; the status bar counts the stale table until it saves', async function () {
    const before = Number(await panel.getAttribute('#knotwise-root', 'data-run-id'));
    await page.locator('.editor-group-container .tab .label-name', { hasText: /^mcycle\.csv$/ }).click();
    await page.locator('.monaco-editor.focused').waitFor();
    await page.keyboard.press('Control+S');
    await newRun(before, 'saving the CSV');
    assert.equal(await panel.locator('#kw-banner').isVisible(), false);
    assert.equal(await panel.textContent('#kw-chosen-df'), `df ${picked}`);
    assert.equal(await panel.isChecked('#kw-rule-pick'), true);
    assert.match((await panel.textContent('#kw-moved')) ?? '', new RegExp(`^Refitted after mcycle\\.csv changed: 133 rows as before; the chosen df stayed at ${picked}; the curve moved by at most `));
    assert.equal(await panel.textContent('#kw-save'), 'Save table and record');
    // The saved table and record no longer match the data: the status bar says so until the save.
    const staleItem = page.locator('.statusbar-item', { hasText: '1 curve table out of date' });
    await staleItem.waitFor();
    await panel.click('#kw-save');
    await panel.locator('#kw-status', { hasText: /^Saved / }).waitFor();
    await staleItem.waitFor({ state: 'hidden' });
    const rec = JSON.parse(readFileSync(join(workspace, 'mcycle.fit.json'), 'utf8')) as { selection: { df: number }; data: { sha256: string } };
    assert.equal(rec.selection.df, picked);
    assert.equal(
      rec.data.sha256,
      createHash('sha256')
        .update(readFileSync(join(workspace, 'mcycle.csv')))
        .digest('hex'),
      'the record names the bytes on disk',
    );
    assert.notEqual(readFileSync(join(workspace, 'mcycle.curve.csv'), 'utf8'), savedTable);
  });

  it('Refit and save with unsaved edits saves the CSV when asked, refits and saves the table from the bytes on disk', async function () {
    await page.locator('.editor-group-container .tab .label-name', { hasText: /^mcycle\.csv$/ }).click();
    await page.locator('.monaco-editor.focused').waitFor();
    await page.keyboard.press('End');
    await page.keyboard.type('2');
    await panel.locator('#kw-banner').waitFor({ state: 'visible', timeout: 1000 });
    await panel.click('#kw-save');
    const dialog = page.locator('.monaco-dialog-box', { hasText: 'mcycle.csv has unsaved edits' });
    await dialog.waitFor();
    await dialog.getByRole('button', { name: 'Save and Refit' }).click();
    await panel.locator('#kw-status', { hasText: /^Saved / }).waitFor({ timeout: 60000 });
    const csv = readFileSync(join(workspace, 'mcycle.csv'), 'utf8');
    assert.match(csv, /\n57\.6,10\.712\n?$/, 'the CSV was saved with the edit');
    const rec = JSON.parse(readFileSync(join(workspace, 'mcycle.fit.json'), 'utf8')) as { selection: { df: number }; data: { sha256: string } };
    assert.equal(rec.data.sha256, createHash('sha256').update(csv).digest('hex'));
    assert.equal(rec.selection.df, picked);
    assert.equal(await panel.locator('#kw-banner').isVisible(), false);
    assert.equal(await panel.textContent('#kw-chosen-df'), `df ${picked}`);
  });

  it('a reload of the window restores the panel with the df picked by hand and the shape ticked in it', async function () {
    // Through the command palette, as a person would: the workbench keeps its editors' state and reloads.
    await page.locator('.part.sidebar .title-label').first().click();
    await page.keyboard.press('F1');
    const input = page.locator('.quick-input-widget input.input');
    await input.waitFor();
    await input.fill('>Developer: Reload Window');
    const oldPanel = panel;
    await page
      .getByRole('option', { name: /Developer: Reload Window/ })
      .first()
      .click();
    // The old panel's frame goes with the old page.
    await oldPanel
      .locator('#knotwise-root')
      .waitFor({ state: 'detached', timeout: 30000 })
      .catch(() => undefined);
    panel = await findPanel();
    assert.equal(await panel.textContent('#kw-chosen-df'), `df ${picked}`);
    assert.equal(await panel.isChecked('#kw-rule-pick'), true);
    assert.equal(await panel.isChecked('#kw-shape-nonnegative'), true);
    assert.match((await panel.textContent('#kw-model-words')) ?? '', /set in this panel/);
    await page.locator('.editor-group-container .tab .label-name', { hasText: 'Curve review · mcycle.csv' }).waitFor();
  });

  let cancelled: Frame | undefined;
  it("a long run started from the command palette stops with the notification's Cancel button and leaves no file behind", async function () {
    // Close the panel first, so the settings change below reruns nothing.
    await closeAllEditors(page);
    const input = page.locator('.quick-input-widget input.input');
    // With no data file in front, the palette lists only what can act without one.
    const idle = await paletteCommands();
    for (const absent of ['Tune a Curve', 'Save Curve Table', 'Stop Tuning', 'Forget the Column Choice']) {
      assert.ok(!idle.some((n) => n.includes(absent)), `${absent} is not listed with no data file open: ${idle.join(' | ')}`);
    }
    // Invented seeded readings, only to make a run long enough to stop (no reference value):
    // 500,000 rows and 5,000 bootstrap resamples take over a minute on this machine class
    // (200,000 rows became too quick once the resampling got faster; still read whole, below the memory budget).
    let seed = 987654321;
    const rand = (): number => (seed = (seed * 1103515245 + 12345) >>> 0) / 2 ** 32;
    const rows = ['load [kN],strain [um]'];
    for (let i = 0; i < 500000; i++) {
      const x = 100 * rand();
      rows.push(`${x.toFixed(4)},${(Math.sqrt(x) * 30 + 5 * (rand() - 0.5)).toFixed(3)}`);
    }
    writeFileSync(join(workspace, 'drift.csv'), rows.join('\n') + '\n');
    mkdirSync(join(workspace, '.vscode'), { recursive: true });
    writeFileSync(join(workspace, '.vscode', 'settings.json'), JSON.stringify({ 'knotwise.resampling': 'bootstrap:5000' }));
    const before = readdirSync(workspace).sort();
    // Open the file with quick open, then run the command from the palette.
    await page.keyboard.press('Control+P');
    await input.fill('drift.csv');
    await page.locator('.quick-input-widget .monaco-list-row', { hasText: 'drift.csv' }).first().waitFor();
    await page.keyboard.press('Enter');
    await page.locator('.tab.active', { hasText: 'drift.csv' }).first().waitFor();
    // The editor shows the file's text once it has loaded it; the palette is read after that.
    await page.locator('.editor-instance .view-line', { hasText: 'load [kN]' }).first().waitFor();
    const withData = await paletteCommands();
    for (const present of ['Tune a Curve', 'Save Curve Table', 'Forget the Column Choice']) {
      assert.ok(
        withData.some((n) => n.includes(present)),
        `${present} is listed with a CSV in front: ${withData.join(' | ')}`,
      );
    }
    assert.ok(!withData.some((n) => n.includes('Stop Tuning')), 'Stop Tuning is not listed while nothing runs');
    await page.keyboard.press('F1');
    await input.fill('>Knotwise: Tune a Curve');
    await page
      .getByRole('option', { name: /Knotwise: Tune a Curve for This Data/ })
      .first()
      .click();
    await pickCurveColumns(page, 'drift.csv', 'load', 'strain');
    const toast = page.locator('.notification-toast', { hasText: 'Knotwise: tuning the curve for drift.csv' });
    await toast.waitFor({ timeout: 30000 });
    // The run opens its panel, which takes the focus; the palette is opened after that.
    await page.locator('.tab', { hasText: 'Curve review · drift.csv' }).first().waitFor();
    assert.ok(
      (await paletteCommands()).some((n) => n.includes('Stop Tuning')),
      'Stop Tuning is listed while a run goes on',
    );
    // The run has read its settings; Run again below takes a quick method.
    writeFileSync(join(workspace, '.vscode', 'settings.json'), JSON.stringify({ 'knotwise.resampling': 'gcv' }));
    await toast
      .getByRole('button', { name: 'Cancel' })
      .click({ timeout: 15000 })
      .catch((e: unknown) => {
        throw new Error(`the run ended before Cancel was pressed (its notification is gone): ${String(e)}`);
      });
    // The panel says so, and nothing was written next to the data.
    const deadline = Date.now() + 30000;
    let said: Frame | undefined;
    while (!said && Date.now() < deadline) {
      for (const f of page.frames()) {
        // $ does not wait, so frames without the panel are passed over at once.
        const root = await f.$('#knotwise-root').catch(() => null);
        const text = root ? await root.textContent() : null;
        if (text && /Tuning was cancelled/.test(text)) said = f;
        const state = root ? await root.getAttribute('data-state') : null;
        assert.notEqual(state, 'ready', 'the run ended before Cancel was pressed; the test needs a longer run');
      }
      if (!said) await page.waitForTimeout(200);
    }
    assert.ok(said, 'the panel says the run was cancelled');
    await page.screenshot({ path: join(artifacts, 'editor-cancelled.png') });
    assert.deepEqual(readdirSync(workspace).sort(), before);
    cancelled = said;
  });

  it('after the cancel, Run again in the panel runs the analysis and shows its result', async function () {
    const frame = cancelled;
    assert.ok(frame);
    await frame.click('#kw-rerun');
    await frame.locator('#knotwise-root[data-state="ready"]').waitFor({ timeout: 60000 });
    assert.match((await frame.textContent('.kw-meta')) ?? '', /^drift\.csv · 500000 rows used/);
    assert.match((await frame.textContent('#kw-chosen-df')) ?? '', /^df \d+$/);
  });

  it('many devices in one file: the fourth pick splits datasets::CO2 by plant; a small figure shows its plant; save writes what `knotwise fit --per plant` writes', async function () {
    await tuneFromExplorer(page, 'co2.csv');
    await pickCurveColumns(page, 'co2.csv', 'conc', 'uptake');
    const input = page.locator('.quick-input-widget input.input');
    const title = page.locator('.quick-input-widget .quick-input-title');
    await title.filter({ hasText: 'split the rows of co2.csv into groups' }).waitFor();
    // The plant column, first among the text columns, with its distinct values and how many (CO2's plants in file order).
    await page.locator('.quick-input-widget .monaco-list-row', { hasText: 'Qn1, Qn2, Qn3, Qc1, Qc2, Qc3, …  (12 distinct values)' }).first().waitFor();
    await page.screenshot({ path: join(artifacts, 'editor-group-pick.png') });
    await input.fill('plant');
    await page.keyboard.press('Enter');
    // The grouped panel: the frame whose panel has the group selector.
    let grouped: Frame | undefined;
    const deadline = Date.now() + 60000;
    while (!grouped && Date.now() < deadline) {
      for (const f of page.frames()) if (await f.$('#knotwise-root[data-state="ready"] #kw-group-bar').catch(() => null)) grouped = f;
      if (!grouped) await page.waitForTimeout(250);
    }
    assert.ok(grouped, 'the panel shows the grouped run');
    assert.equal(await grouped.locator('#kw-group option').count(), 12);
    assert.equal(await grouped.locator('#kw-multiples button.kw-small-multiple').count(), 12);
    await grouped.click('#kw-small-button-5');
    await grouped.locator('#kw-group-count', { hasText: '6 of 12 groups by plant' }).waitFor();
    assert.equal(await grouped.inputValue('#kw-group'), '5');
    assert.match((await grouped.textContent('.kw-header h1')) ?? '', /^plant Qc3: uptake against conc/);
    await page.screenshot({ path: join(artifacts, 'editor-groups.png') });
    await grouped.click('#kw-save');
    await grouped.locator('#kw-status', { hasText: /^Saved co2\.groups\.csv and co2\.groups\.fit\.json\./ }).waitFor();
    // The command line on a copy of the file with the workspace's settings (gcv resampling, since the long run above).
    const copy = mkdtempSync(join(tmpdir(), 'knotwise-e2e-groups-'));
    try {
      copyFileSync(join(workspace, 'co2.csv'), join(copy, 'co2.csv'));
      const cli = join(__dirname, '..', '..', 'dist', 'cli.js');
      execFileSync(process.execPath, [cli, 'fit', join(copy, 'co2.csv'), '--x', 'conc', '--y', 'uptake', '--per', 'plant', '--resampling', 'gcv', '--save', '--quiet']);
      const written = readdirSync(copy).filter((f) => f !== 'co2.csv');
      assert.equal(written.length, 14, written.join(' '));
      for (const f of written) assert.equal(readFileSync(join(workspace, f), 'utf8'), readFileSync(join(copy, f), 'utf8'), f);
    } finally {
      rmSync(copy, { recursive: true, force: true });
    }
  });

  it('a surface over two inputs: the menu entry asks for two inputs and the reading of datasets::trees, and the panel shows the heat view with the uncovered corners, slices with bands and residuals', async function () {
    await tuneFromExplorer(page, 'trees.csv', 'Fit a Surface over Two Inputs');
    const input = page.locator('.quick-input-widget input.input');
    const title = page.locator('.quick-input-widget .quick-input-title');
    await title.filter({ hasText: 'the first input of trees.csv' }).waitFor();
    await input.fill('Girth');
    await page.keyboard.press('Enter');
    await title.filter({ hasText: 'the second input of trees.csv' }).waitFor();
    await input.fill('Height');
    await page.keyboard.press('Enter');
    await title.filter({ hasText: 'the reading of trees.csv' }).waitFor();
    await input.fill('Volume');
    await page.keyboard.press('Enter');
    await title.filter({ hasText: 'weights for trees.csv' }).waitFor();
    await page.keyboard.press('Enter');
    let surface: Frame | undefined;
    const deadline = Date.now() + 90000;
    while (!surface && Date.now() < deadline) {
      for (const f of page.frames()) if (await f.$('#knotwise-root[data-state="ready"] #kw-surface-heat').catch(() => null)) surface = f;
      if (!surface) await page.waitForTimeout(250);
    }
    assert.ok(surface, 'the panel shows the surface');
    assert.match((await surface.textContent('#kw-surface-pair')) ?? '', /^df \d × \d/);
    // R: datasets::trees has no tree under 9 in girth taller than 70 ft, so grid corners lie outside the readings.
    assert.ok((await surface.locator('#kw-surface-heat .kw-uncovered').count()) > 0, 'uncovered nodes are shaded');
    assert.equal(await surface.locator('#kw-surface-landscape table').count(), 1);
    assert.ok((await surface.locator('#kw-surface-resid-x svg').count()) === 1 && (await surface.locator('#kw-surface-resid-x2 svg').count()) === 1, 'residuals against each input');
    // Slices at two heights of our own choosing.
    await surface.selectOption('#kw-slice-input', 'x2');
    // Another input slices at its quartiles first (the panel is drawn again), then at the values typed.
    await surface.click('#kw-slice-show');
    await surface.locator('#kw-surface-slices figcaption', { hasText: /^Slices at Height/ }).waitFor();
    await surface.fill('#kw-slice-values', '70, 80');
    await surface.click('#kw-slice-show');
    await surface.locator('#kw-surface-slices figcaption', { hasText: /Height = 70, 80/ }).waitFor();
    await page.screenshot({ path: join(artifacts, 'editor-surface.png') });
  });

  it('no request left 127.0.0.1', function () {
    assert.deepEqual(browser.blocked, []);
  });
});
