/**
 * The Knotwise panel in headless Chromium: the real HTML with its CSP, the bundled
 * script, a stubbed host. Payloads come from the real core run on MASS::mcycle (Silverman
 * 1985, shipped with R's MASS package; see test/e2e/fixtures/make-fixtures.R). Expected
 * choices are computed with core's selectDf on the same candidates, so the test checks
 * that the panel shows what the rules decide, not a copy of itself.
 */
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyse } from '../../core/analysis/analysis';
import { binLevel } from '../../core/plots/cloud';
import { num } from '../../core/plots/svg';
import { sig } from '../../core/tune/format';
import { MAX_MESSAGE_TEXT, type HostMessage } from '../../core/protocol';
import { OUTCOME_LIST } from '../../core/registry/outcomes/index';
import { RULE_LIST, ruleWords } from '../../core/registry/rules/index';
import { errorPoints, FIGURE_CATALOGUE, type FigureView } from '../../core/view/figureCatalogue';
import type { PanelPayload } from '../../core/view/model';
import { selectDf } from '../../core/tune/rules';
import type { RuleSpec, Selection } from '../../core/tune/types';
import { buildPanelPayload, detailFor } from '../../core/view/payload';
import { calibrationView } from '../../core/view/calibration';
import { DEFAULT_INVERSE } from '../../core/calibrate/spec';
import { curveSample } from '../../core/calibrate/drift';
import { fitCurve } from '../../core/fit/index';
import type { LaunchedChromium } from '../../scripts/e2e-workbench.mjs' with { 'resolution-mode': 'import' };
import { analysedFixture, mcycleFixture, type Fixture } from './fixture';
import { openPanel, startPanelServer, type OpenOptions, type PanelPage, type PanelServer } from './harness';

const artifacts = join(__dirname, '..', '..', 'test-artifacts');

/** R reference fits (test/reference/r/physics.R: glm with splines::ns, MASS::rlm with psi.huber). */
interface Physics {
  readonly glm: readonly { readonly dataset: string; readonly outcome: string; readonly df: number; readonly deviance: number; readonly rCall: string }[];
  readonly rlm: readonly { readonly dataset: string; readonly df: number; readonly weights: readonly number[]; readonly scale: number; readonly rCall: string }[];
}
/** The few page globals the page functions here read (this file compiles without the DOM library). */
interface PageDoc {
  readonly document: { querySelector(selector: string): { readonly textContent: string | null } | null };
}
interface HTMLDetailsLike {
  readonly open: boolean;
}

const physics = (): Physics => JSON.parse(readFileSync(join(__dirname, '..', 'reference', 'fixtures', 'physics.json'), 'utf8')) as Physics;

describe('Knotwise panel (webview in headless Chromium)', function () {
  let browser: LaunchedChromium;
  let server: PanelServer;
  let mcycle: Fixture;

  before(async function () {
    const wb = await import('../../scripts/e2e-workbench.mjs');
    browser = await wb.launchChromium({ viewport: { width: 1280, height: 1000 } });
    server = await startPanelServer();
    mcycle = await mcycleFixture();
  });

  after(async function () {
    await browser?.close();
    await server?.close();
  });

  async function shown(fixture: Fixture, options: OpenOptions = {}): Promise<PanelPage> {
    const pp = await openPanel(browser, server, fixture, options);
    await pp.send({ type: 'result', payload: fixture.payload });
    await pp.page.waitForSelector('#knotwise-root[data-state="ready"]');
    return pp;
  }

  const expected = (payload: PanelPayload, rule: RuleSpec) => selectDf(payload.candidates, rule, payload.metric, 'editor');

  /**
   * The panel explains `sel` as core does: its reason is core's explanation up to the list of
   * other rules, which the panel lists itself, the simplest-within rule at `tolerance` %
   * (what the tolerance box shows), each choice computed by selectDf.
   */
  async function assertExplains(page: PanelPage['page'], payload: PanelPayload, sel: Selection, tolerance: number): Promise<void> {
    assert.equal(await page.textContent('#kw-chosen-df'), `df ${sel.df}`);
    const reason = (await page.textContent('#kw-reason')) ?? '';
    assert.ok(reason.length > 20 && sel.reason.startsWith(reason), `"${reason}" opens "${sel.reason}"`);
    assert.match(reason, new RegExp(`\\b${sel.df}\\b`), 'the reason names the chosen df');
    // In core's order of the other rules; the simplest-within rule at the box's tolerance.
    const others = sel.alternatives.map((a) => {
      const rule: RuleSpec = a.rule.kind === 'simplest-within' ? { kind: 'simplest-within', percent: tolerance } : a.rule;
      const df = expected(payload, rule).df;
      return `${ruleWords(rule)} → df ${df}${df === sel.df ? ' (the same)' : ''}`;
    });
    assert.deepEqual(await page.$$eval('#kw-alternatives li', (ls) => ls.map((l) => l.textContent)), others);
    assert.equal(await page.inputValue('#kw-tolerance'), String(tolerance), 'the tolerance box shows the tolerance the explanation uses');
    assert.equal(await page.inputValue('#kw-df'), String(sel.df), 'the df chooser shows the chosen df');
  }

  /** Opens a folding section of details by clicking its title, as a person would. */
  async function openFold(page: PanelPage['page'], id: string): Promise<void> {
    await page.click(`#kw-fold-${id} > summary`);
    await page.waitForSelector(`#kw-fold-${id}[open]`);
  }

  it('renders the chosen df, the rule explanation and every figure with a text alternative', async function () {
    const pp = await shown(mcycle);
    const sel = expected(mcycle.payload, mcycle.payload.rule);
    const page = pp.page;
    await assertExplains(page, mcycle.payload, sel, mcycle.payload.tolerancePercent);
    assert.equal(await page.getAttribute('#knotwise-root', 'data-chosen-df'), String(sel.df));
    // Every figure of DESIGN capability 6 is there, each an SVG with role img, a title and a description.
    const figures = await page.$$eval('figure.kw-figure', (fs) =>
      fs.map((f) => {
        const svg = f.querySelector('svg');
        return { id: f.id, role: svg?.getAttribute('role'), title: svg?.querySelector('title')?.textContent ?? '', desc: svg?.querySelector('desc')?.textContent ?? '' };
      }),
    );
    assert.deepEqual(
      figures.map((f) => f.id),
      ['fig-data', 'fig-error', 'fig-resid-x', 'fig-resid-fit', 'fig-qq', 'fig-cooks', 'fig-leverage'],
    );
    for (const f of figures) {
      assert.equal(f.role, 'img', `${f.id} role`);
      assert.ok(f.title.length > 10 && f.desc.length > 20, `${f.id} has a title and a description`);
    }
    assert.match(figures[0]?.title ?? '', new RegExp(`df ${sel.df}\\)`));
    // Both bands and the curve are drawn; one dot per reading (133 rows of mcycle).
    assert.equal(await page.locator('#fig-data path.kw-band-ci').count(), 1);
    assert.equal(await page.locator('#fig-data path.kw-band-pi').count(), 1);
    assert.equal(await page.locator('#fig-data circle.kw-point').count(), 133);
    // The caution and the candidates table.
    assert.match((await page.textContent('#kw-caution')) ?? '', /not a certified calibration/);
    assert.equal(await page.locator('#kw-candidate-body tbody tr').count(), mcycle.payload.candidates.length);
    assert.deepEqual(await pp.cspViolations(), []);
    await page.close();
  });

  it('switching the rule changes the chosen df and the explanation at once', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    const oneSe = expected(mcycle.payload, { kind: 'one-se' });
    const lowest = expected(mcycle.payload, { kind: 'least-error' });
    // Precondition of this fixture (seeded): the two rules disagree, so a change is visible.
    assert.notEqual(oneSe.df, lowest.df);
    const before = pp.sent.length;
    await page.check('#kw-rule-least-error');
    await assertExplains(page, mcycle.payload, lowest, 2);
    const choice = await pp.waitForSent('choice', before);
    assert.deepEqual(choice, { type: 'choice', runId: 1, rule: { kind: 'least-error' }, df: lowest.df });
    assert.match((await page.textContent('#fig-error title')) ?? '', /RMSE/);
    assert.match((await page.textContent('#fig-data svg > title')) ?? '', new RegExp(`df ${lowest.df}\\)`));

    // Tolerance rule with 10 %: whatever selectDf decides, the panel shows.
    await page.check('#kw-rule-simplest-within');
    await page.fill('#kw-tolerance', '10');
    await page.press('#kw-tolerance', 'Enter');
    await page.locator('#kw-tolerance').dispatchEvent('change');
    const tol = expected(mcycle.payload, { kind: 'simplest-within', percent: 10 });
    await assertExplains(page, mcycle.payload, tol, 10);

    // A df by hand: the residual figures follow once the host answers the detail request.
    const manualDf = 4;
    const mark = pp.sent.length;
    await page.selectOption('#kw-df', String(manualDf));
    assert.equal(await page.textContent('#kw-chosen-df'), `df ${manualDf}`);
    const need = await pp.waitForSent('needDetail', mark);
    assert.deepEqual(need, { type: 'needDetail', runId: 1, df: manualDf });
    // The pick keeps the tolerance the box shows for the simplest-within rule among the other rules.
    await assertExplains(page, mcycle.payload, expected(mcycle.payload, { kind: 'pick', df: manualDf }), 10);
    await page.waitForSelector('#fig-qq svg', { state: 'attached' });
    assert.match((await page.textContent('#fig-resid-x svg > title')) ?? '', /\(df 4\)/);
    await page.close();
  });

  it('a result posted before its residual checks shows the curve and the answer at once, "checking the residuals…" until the details come (three themes at 700 px, test-artifacts/webview-checks-follow-<theme>.png)', async function () {
    for (const theme of ['light', 'dark', 'high-contrast'] as const) {
      const pp = await openPanel(browser, server, mcycle, { theme, viewport: { width: 700, height: 900 } });
      const page = pp.page;
      // Another run id than the fixture's: the harness leaves the panel's request to this test.
      const payload: PanelPayload = { ...mcycle.payload, runId: 7, details: [] };
      await pp.send({ type: 'result', payload });
      await page.waitForSelector('#knotwise-root[data-state="ready"]');
      const df = expected(payload, payload.rule).df;
      assert.deepEqual(await pp.waitForSent('needDetail'), { type: 'needDetail', runId: 7, df });
      assert.equal(await page.textContent('#kw-chosen-df'), `df ${df}`);
      assert.ok(((await page.getAttribute('#fig-data path.kw-curve', 'd')) ?? '').length > 0, 'the chosen curve is drawn');
      assert.equal(await page.textContent('#kw-fit-stats'), 'checking the residuals…');
      await page.screenshot({ path: join(artifacts, `webview-checks-follow-${theme}.png`), fullPage: true });
      const detail = detailFor(mcycle.analysis, df);
      assert.ok(detail);
      await pp.send({ type: 'detail', runId: 7, detail });
      await page.waitForFunction("document.getElementById('kw-fit-stats').textContent.startsWith('residual SD')");
      assert.equal(await page.textContent('#kw-chosen-df'), `df ${df}`);
      await page.close();
    }
  });

  it('a column named <img src=x onerror=alert(1)> shows as text and runs nothing', async function () {
    const evil = '<img src=x onerror=alert(1)>';
    const fx = await analysedFixture(
      'mcycle.csv',
      evil,
      'accel',
      { kind: 'natural-spline', candidates: [3, 4, 5, 6], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 },
      `${evil},accel [g]`,
    );
    const pp = await shown(fx);
    const page = pp.page;
    assert.equal(await page.textContent('h1'), `accel against ${evil}`);
    assert.equal(await page.locator('img').count(), 0);
    assert.equal(await page.locator('#knotwise-root img, svg img').count(), 0);
    // The axis title of the data figure carries the name as text.
    const axisTitles = await page.$$eval('#fig-data text.kw-axis-title', (ts) => ts.map((t) => t.textContent));
    assert.ok(axisTitles.includes(evil), `axis titles ${JSON.stringify(axisTitles)}`);
    // Nothing from the name became markup: no element carries an event attribute, and no dialog opened.
    assert.equal(await page.locator('[onerror]').count(), 0);
    assert.deepEqual(pp.dialogs, []);
    await page.close();
  });

  it('the content security policy blocks a script without the nonce', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    const csp = await page.getAttribute('meta[http-equiv="Content-Security-Policy"]', 'content');
    assert.match(csp ?? '', /default-src 'none'/);
    assert.match(csp ?? '', /script-src 'nonce-[A-Za-z0-9+/=]{16,}'/);
    await page.evaluate(`(() => {
      const s = document.createElement('script');
      s.textContent = 'window.__injected = true';
      document.body.append(s);
    })()`);
    // The browser reports the blocked script; an allowed inline script would have run during append().
    await page.waitForFunction(() => (globalThis as unknown as { __knotwiseCsp: string[] }).__knotwiseCsp.some((v) => v.startsWith('script-src')));
    assert.equal(await page.evaluate('window.__injected'), undefined);
    await page.close();
  });

  it('hovering a reading shows its values and CSV line; an influential row reveals its line', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    // The last reading of mcycle.csv (line 134: times 57.6, accel 10.7) stands alone at the right edge.
    const circle = page.locator('#fig-data circle.kw-point').last();
    await circle.hover();
    assert.equal(await circle.getAttribute('data-line'), '134');
    await pp.waitForText('#fig-data .kw-readout', /times 57\.6, accel 10\.7, CSV line 134/);
    // The reading is marked on the figure and its values show beside it.
    assert.match((await circle.getAttribute('class')) ?? '', /\bkw-hovered\b/);
    const tip = page.locator('#fig-data .kw-tip');
    assert.equal(await tip.isVisible(), true);
    assert.match((await tip.textContent()) ?? '', /times 57\.6, accel 10\.7, CSV line 134/);
    const [c, t] = [await circle.boundingBox(), await tip.boundingBox()];
    assert.ok(c && t, 'the reading and its values have boxes');
    // Beside it: the values start or end within 20 CSS pixels of the point, level with it.
    const gap = Math.min(Math.abs(t.x - (c.x + c.width)), Math.abs(c.x - (t.x + t.width)));
    assert.ok(gap <= 20 && t.y <= c.y + c.height && t.y + t.height >= c.y, `values at ${JSON.stringify(t)}, reading at ${JSON.stringify(c)}`);
    await page.locator('#fig-data').screenshot({ path: join(artifacts, 'webview-hover.png') });
    // Leaving the figure takes the mark and the values away.
    await page.mouse.move(1, 1);
    await tip.waitFor({ state: 'hidden' });
    assert.doesNotMatch((await circle.getAttribute('class')) ?? '', /\bkw-hovered\b/);
    await openFold(page, 'influential-rows');
    const button = page.locator('#kw-influence-body button[data-line]').first();
    assert.equal(await button.count(), 1, 'mcycle has influential rows at this df');
    const want = Number(await button.getAttribute('data-line'));
    const mark = pp.sent.length;
    await button.click();
    assert.deepEqual(await pp.waitForSent('revealLine', mark), { type: 'revealLine', line: want });
    await page.close();
  });

  it("a marked point of the Cook's distance figure takes the keyboard focus, shows its values and opens its line (MASS::hills)", async function () {
    // MASS::hills (Atkinson 1986) with a natural spline of df 3: R's lm(y ~ ns(x, df = 2)) puts one row over the
    // Cook's distance threshold (test/reference/fixtures/influence.json, from test/reference/r/influence.R).
    const ref = JSON.parse(readFileSync(join(__dirname, '..', 'reference', 'fixtures', 'influence.json'), 'utf8')) as {
      datasets: { hills: { x: number[]; y: number[] } };
      lm: { name: string; cooksRows: number[] }[];
    };
    const rows = ref.lm.find((c) => c.name === 'hills lm df=3')?.cooksRows ?? [];
    assert.equal(rows.length, 1, 'R puts one row of hills over the threshold');
    const hills = ref.datasets.hills;
    const data = { x: Float64Array.from(hills.x), y: Float64Array.from(hills.y), lines: Int32Array.from(hills.x, (_, i) => i + 2) };
    const analysis = await analyse(data, { kind: 'natural-spline', candidates: [3], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    const payload = buildPanelPayload({ runId: 1, analysis, source: { fileName: 'hills.csv', xLabel: 'dist', yLabel: 'time' }, rejected: 0, heldOut: 0, tolerancePercent: 2 });
    const pp = await shown({ payload, analysis, data });
    const page = pp.page;
    await openFold(page, 'influential-rows');
    const points = page.locator('#fig-cooks circle[tabindex="0"]');
    assert.equal(await points.count(), rows.length);
    // R's row (a 0-based index in the data's order, as influence.R writes it) is CSV line index + 2.
    const line = (rows[0] as number) + 2;
    assert.equal(await points.first().getAttribute('data-line'), String(line));
    await points.first().focus();
    assert.match((await page.locator('#fig-cooks .kw-tip').textContent()) ?? '', new RegExp(`line ${line}`));
    assert.equal(await page.locator('#fig-cooks .kw-tip').isVisible(), true);
    const mark = pp.sent.length;
    await page.keyboard.press('Enter');
    assert.deepEqual(await pp.waitForSent('revealLine', mark), { type: 'revealLine', line });
    await page.close();
  });

  it('every control is reachable with the Tab key', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    const reached = new Set<string>();
    for (let i = 0; i < 40; i++) {
      await page.keyboard.press('Tab');
      const id = (await page.evaluate(`(() => {
        const a = document.activeElement;
        return a ? a.id || a.getAttribute('name') || a.tagName : '';
      })()`)) as string;
      reached.add(id);
    }
    // The rule radios form one tab stop (arrow keys move within the group).
    assert.ok(
      [...reached].some((id) => id.startsWith('kw-rule-')),
      `a rule radio reached (got ${[...reached].join(', ')})`,
    );
    for (const id of ['kw-df', 'kw-save', 'kw-rerun']) assert.ok(reached.has(id), `${id} reached (got ${[...reached].join(', ')})`);
    await page.focus('#kw-rule-one-se');
    await page.keyboard.press('ArrowDown');
    assert.equal(await page.isChecked('#kw-rule-simplest-within'), true, 'arrow keys switch the rule');
    assert.equal(await page.textContent('#kw-chosen-df'), `df ${expected(mcycle.payload, { kind: 'simplest-within', percent: 2 }).df}`);
    await page.close();
  });

  it('save sends the current rule and shows the host answer; stale results are dropped', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    await page.check('#kw-rule-least-error');
    const mark = pp.sent.length;
    await page.click('#kw-save');
    const save = await pp.waitForSent('save', mark);
    assert.equal(save.type, 'save');
    if (save.type !== 'save') return;
    assert.deepEqual(save.rule, { kind: 'least-error' });
    assert.equal(await page.isDisabled('#kw-save'), true);
    await pp.send({ type: 'saved', requestId: save.requestId, files: ['mcycle.curve.csv', 'mcycle.fit.json'] });
    await pp.waitForText('#kw-status', 'Saved mcycle.curve.csv and mcycle.fit.json.');
    assert.equal(await page.isDisabled('#kw-save'), false);
    // A newer run replaces the view; an older one arriving late is ignored.
    const newer: HostMessage = { type: 'result', payload: { ...mcycle.payload, runId: 5, source: { ...mcycle.payload.source, fileName: 'newer.csv' } } };
    await pp.send(newer);
    await pp.send({ type: 'result', payload: { ...mcycle.payload, runId: 4, source: { ...mcycle.payload.source, fileName: 'older.csv' } } });
    assert.match((await page.textContent('.kw-meta')) ?? '', /^newer\.csv/);
    // send() returns once the panel has handled the message, so an old failure would show by now.
    await pp.send({ type: 'failed', runId: 3, message: 'old failure' });
    assert.notEqual(await page.textContent('#kw-status'), 'old failure');
    await pp.send({ type: 'failed', runId: 5, message: 'current failure' });
    assert.equal(await page.textContent('#kw-status'), 'current failure', 'a failure of the shown run does show');
    await page.close();
  });

  it('large n: the message stays under 3 MB and readings are drawn as a density grid', async function () {
    // Property check on seeded invented data (n = 200,000), not a reference value.
    const n = 200_000;
    let s = 12345;
    const rand = () => (s = (s * 1103515245 + 12345) >>> 0) / 2 ** 32;
    const x = new Float64Array(n);
    const y = new Float64Array(n);
    const lines = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      x[i] = 10 * rand();
      y[i] = Math.sin(x[i] as number) + 0.3 * (rand() + rand() + rand() - 1.5);
      lines[i] = i + 2;
    }
    const data = { x, y, lines };
    const analysis = await analyse(data, { kind: 'natural-spline', candidates: [4, 6, 8, 10], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    const payload = buildPanelPayload({ runId: 1, analysis, source: { fileName: 'big.csv', xLabel: 'x', yLabel: 'y' }, rejected: 0, heldOut: 0, tolerancePercent: 2 });
    const bytes = Buffer.byteLength(JSON.stringify(payload));
    assert.ok(bytes < 3_000_000, `payload is ${bytes} bytes`);
    assert.equal(payload.data.kind, 'bins');
    const pp = await shown({ payload, analysis, data });
    const page = pp.page;
    assert.ok((await page.locator('#fig-data .kw-bins rect.kw-bin').count()) > 100);
    assert.equal(await page.locator('#fig-data circle').count(), 0);
    assert.match((await page.textContent('#fig-data svg > desc')) ?? '', /200000 readings drawn as a density grid .* logarithmic scale/);
    // Drawn beneath: the density grid comes before the bands and the curve in document (paint) order.
    const order = await page.$$eval('#fig-data svg .kw-bins, #fig-data svg .kw-band-pi, #fig-data svg .kw-band-ci, #fig-data svg .kw-curve', (es) => es.map((e) => e.getAttribute('class')));
    assert.deepEqual(order, ['kw-bins', 'kw-band-pi', 'kw-band-ci', 'kw-curve']);
    // The shades step on a logarithmic scale of the counts (core/plots/cloud.ts binLevel): each cell's class is
    // its count's, read from its hover text, and several classes are in use.
    if (payload.data.kind !== 'bins') throw new Error('expected a density grid');
    const fullest = Math.max(...payload.data.counts);
    const cells = await page.$$eval('#fig-data .kw-bins rect', (rs) => rs.map((r) => ({ cls: r.getAttribute('class') ?? '', title: r.querySelector('title')?.textContent ?? '' })));
    for (const c of cells) assert.equal(c.cls, `kw-bin kw-bin-${binLevel(Number(/^(\d+) reading/.exec(c.title)?.[1]), fullest)}`, c.title);
    assert.ok(new Set(cells.map((c) => c.cls)).size >= 3, 'several shades in use');
    const legend = await page.$$eval('#fig-data .kw-legend text', (ts) => ts.map((t) => t.textContent ?? ''));
    assert.equal(legend[0], 'readings per cell:');
    assert.match(legend[1] ?? '', /^1(–\d+)?$/);
    assert.match(legend[legend.length - 1] ?? '', new RegExp(`–${fullest}$`));
    assert.equal(await page.locator('#fig-data .kw-legend rect.kw-bin').count(), legend.length - 1);
    await page.locator('#fig-data').screenshot({ path: join(artifacts, 'webview-density.png') });
    await page.close();
  });

  it('the Run again button asks the host to run the analysis again', async function () {
    const pp = await shown(mcycle);
    const mark = pp.sent.length;
    await pp.page.click('#kw-rerun');
    assert.deepEqual(await pp.waitForSent('rerun', mark), { type: 'rerun' });
    assert.match((await pp.page.textContent('#kw-status')) ?? '', /again/);
    // Reachable and usable from the keyboard as well.
    await pp.page.focus('#kw-rerun');
    const mark2 = pp.sent.length;
    await pp.page.keyboard.press('Enter');
    assert.deepEqual(await pp.waitForSent('rerun', mark2), { type: 'rerun' });
    await pp.page.close();
  });

  it('a binomial fit with trials (MASS::menarche) shows the model report with the deviance R gives', async function () {
    const fx = await analysedFixture(
      'menarche.csv',
      'Age',
      'Menarche',
      { kind: 'natural-spline', candidates: [3, 5], resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'least-error' }, seed: 1, outcome: 'proportions' },
      undefined,
      'Total',
    );
    // Counts and proportions are tuned on the deviance, and the panel keeps it to choose with.
    assert.equal(fx.payload.metric, 'deviance');
    const pp = await shown(fx);
    const page = pp.page;
    const sel = expected(fx.payload, fx.payload.rule);
    assert.equal(await page.textContent('#kw-chosen-df'), `df ${sel.df}`);
    assert.match((await page.textContent('#kw-model-words')) ?? '', /proportions \(binomial, logit link\), successes out of the trials in column “Total”/);
    assert.equal(await page.inputValue('#kw-outcome'), 'proportions');
    assert.equal(await page.isDisabled('#kw-robust'), true, 'robust fitting is for least squares only');
    // Reference: glm(cbind(y, trials - y) ~ ns(x, df = k - 1), family = binomial) in physics.json; the
    // panel prints 5 significant digits, so the tolerance is the display precision.
    const ref = physics().glm.find((c) => c.dataset === 'menarche' && c.df === sel.df);
    assert.ok(ref, `physics.json has menarche at df ${sel.df}`);
    const lines = await page.$$eval('#kw-model-lines li', (ls) => ls.map((l) => l.textContent ?? ''));
    assert.ok(
      lines.some((l) => l.includes(`: deviance ${num(ref.deviance, 5)} on `)),
      `${lines.join(' | ')} (R: ${ref.rCall} deviance ${ref.deviance})`,
    );
    assert.ok(lines.some((l) => /converged/.test(l)));
    assert.ok(lines.some((l) => /Pearson dispersion/.test(l)));
    // Residual figures show deviance residuals for proportions.
    assert.match((await page.textContent('#fig-resid-x svg > title')) ?? '', /^Deviance residuals against Age/);
    await page.close();
  });

  it('a robust fit (MASS::mcycle) lists the rows R down-weights by CSV line; a click reveals the line', async function () {
    const fx = await analysedFixture('mcycle.csv', 'times', 'accel', {
      kind: 'natural-spline',
      candidates: [5, 8],
      resample: { kind: 'folds', folds: 5, repeats: 1 },
      rule: { kind: 'least-error' },
      seed: 1,
      robust: true,
    });
    const pp = await shown(fx);
    const page = pp.page;
    const sel = expected(fx.payload, fx.payload.rule);
    // Reference: MASS::rlm(y ~ ns(x, df = k - 1), psi = psi.huber) weights in physics.json; rows
    // are CSV lines 2.. in data order. Weights within 1e-6 of 1 count as not down-weighted.
    const ref = physics().rlm.find((c) => c.dataset === 'mcycle' && c.df === sel.df);
    assert.ok(ref, `physics.json has the robust mcycle fit at df ${sel.df}`);
    const rDown = new Set(ref.weights.flatMap((w, i) => (w < 1 - 1e-6 ? [i + 2] : [])));
    const caption = (await page.textContent('#kw-downweighted caption')) ?? '';
    assert.match(caption, new RegExp(`^${rDown.size} rows down-weighted`), `${caption} (R: ${ref.rCall})`);
    const listed = await page.$$eval('#kw-downweighted button[data-line]', (bs) => bs.map((b) => Number(b.getAttribute('data-line'))));
    assert.ok(listed.length > 0 && listed.every((l) => rDown.has(l)), `listed lines ${listed.join(', ')} are among R's down-weighted rows`);
    // The lowest weight first: R's smallest weight is on the first listed line.
    const lowest = ref.weights.reduce((best, w, i) => (w < (ref.weights[best] as number) ? i : best), 0) + 2;
    assert.equal(listed[0], lowest);
    assert.match((await page.textContent('#kw-model-lines')) ?? '', new RegExp(`robust scale ${num(ref.scale, 4).replace('.', '\\.')}`));
    assert.equal(await page.isChecked('#kw-robust'), true);
    await openFold(page, 'model-report');
    const mark = pp.sent.length;
    await page.click(`#kw-downweighted button[data-line="${lowest}"]`);
    assert.deepEqual(await pp.waitForSent('revealLine', mark), { type: 'revealLine', line: lowest });
    await page.close();
  });

  it('switching the outcome or a shape asks the host to rerun; impossible combinations are disabled, a refusal restores the controls', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    assert.equal(await page.inputValue('#kw-outcome'), 'continuous');
    assert.match((await page.textContent('#kw-model-body')) ?? '', /One weighted least-squares solve/);
    let mark = pp.sent.length;
    await page.check('#kw-shape-increasing');
    assert.deepEqual(await pp.waitForSent('model', mark), { type: 'model', runId: 1, model: { outcome: 'continuous', shape: ['increasing'], robust: false } });
    assert.equal(await page.isDisabled('#kw-shape-decreasing'), true, 'increasing and decreasing exclude each other');
    mark = pp.sent.length;
    await page.selectOption('#kw-outcome', 'counts');
    assert.deepEqual(await pp.waitForSent('model', mark), { type: 'model', runId: 1, model: { outcome: 'counts', shape: ['increasing'], robust: false } });
    assert.equal(await page.isDisabled('#kw-robust'), true, 'robust fitting is for least squares only');
    // The host refuses (mcycle has negative readings): the controls show the run's options again.
    await pp.send({ type: 'failed', runId: 1, message: 'Knotwise could not tune mcycle.csv: a Poisson outcome needs counts' });
    assert.equal(await page.inputValue('#kw-outcome'), 'continuous');
    assert.equal(await page.isChecked('#kw-shape-increasing'), false);
    assert.equal(await page.isDisabled('#kw-shape-decreasing'), false);
    await page.close();
  });

  it('a saved answer shows the files and the line about the table', async function () {
    const pp = await shown(mcycle);
    const mark = pp.sent.length;
    await pp.page.click('#kw-save');
    const save = await pp.waitForSent('save', mark);
    if (save.type !== 'save') throw new Error('expected a save request');
    assert.equal(await pp.page.textContent('#kw-status'), 'Saving…');
    await pp.send({ type: 'saved', requestId: save.requestId, files: ['mcycle.curve.csv', 'mcycle.fit.json'], note: 'The table has 41 rows.' });
    await pp.waitForText('#kw-status', 'Saved mcycle.curve.csv and mcycle.fit.json. The table has 41 rows.');
    await pp.page.close();
  });

  it("the choosers carry the registries' labels, and the panel's words name no command-line flag", async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    const options = await page.$$eval('#kw-outcome option', (os) => os.map((o) => ({ value: o.getAttribute('value'), text: o.textContent })));
    assert.deepEqual(
      options,
      OUTCOME_LIST.map((o) => ({ value: o.id, text: o.label })),
    );
    const rules = await page.$$eval('.kw-rules .kw-radio', (rs) => rs.map((r) => ({ value: r.querySelector('input')?.getAttribute('value'), text: r.querySelector('label')?.textContent })));
    assert.deepEqual(
      rules,
      RULE_LIST.map((r) => ({ value: r.id, text: r.label })),
    );
    assert.deepEqual(await page.$$eval('legend', (ls) => ls.map((l) => l.textContent)), ['How the df is chosen', 'Readings and shape (changing these tunes again)']);
    assert.equal(await page.textContent('label[for="kw-outcome"]'), 'The readings are');
    assert.equal(await page.textContent('label[for="kw-rule-pick"]'), 'A df I pick');
    // Settings, not flags: the panel lives in the editor.
    const text = (await page.textContent('#knotwise-root')) ?? '';
    assert.doesNotMatch(text, /(^|[\s(`])--[a-z]/);
    await page.close();
  });

  it("every figure is the catalogue's: its id, its title as caption, its reading closing the description", async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    const p = mcycle.payload;
    const sel = expected(p, p.rule);
    await page.waitForSelector('#fig-qq svg', { state: 'attached' });
    const view: FigureView = {
      xLabel: p.source.xLabel,
      yLabel: p.source.yLabel,
      df: sel.df,
      data: p.data,
      grid: p.grid,
      curve: p.curves.find((c) => c.df === sel.df),
      tuning: { metric: p.metric, candidates: p.candidates, rule: sel.rule, threshold: sel.threshold },
      detail: p.details.find((d) => d.df === sel.df),
      errorRange: 'decision',
    };
    const shownFigures = await page.$$eval('figure.kw-figure', (fs) =>
      fs.map((f) => ({ id: f.id, caption: f.querySelector('figcaption')?.textContent ?? '', desc: f.querySelector('svg > desc')?.textContent ?? '' })),
    );
    // Every figure the catalogue draws from this view, in its order (one without its data is left out).
    const drawable = FIGURE_CATALOGUE.filter((f) => f.svg(view) !== undefined);
    assert.ok(drawable.length >= 7, 'the curve, the error and the residual and influence figures');
    assert.deepEqual(
      shownFigures.map((f) => f.id),
      drawable.map((f) => f.id),
    );
    for (const [i, f] of drawable.entries()) {
      const got = shownFigures[i];
      assert.equal(got?.caption, f.title(view), f.id);
      assert.ok(got?.desc.endsWith(f.description), `${f.id}: ${got?.desc}`);
    }
    await page.close();
  });

  it('the panel drops what the protocol refuses: wrong fields, huge texts, __proto__ keys', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    const mark = pp.sent.length;
    await page.click('#kw-save');
    const save = await pp.waitForSent('save', mark);
    if (save.type !== 'save') throw new Error('expected a save request');
    const id = save.requestId;
    const refused: unknown[] = [
      { type: 'saved', requestId: id, files: ['a.csv'], note: 'x'.repeat(MAX_MESSAGE_TEXT + 1) },
      { type: 'saved', requestId: String(id), files: ['a.csv'] },
      { type: 'saved', requestId: id, files: 'a.csv' },
      { type: 'saved', requestId: id, files: ['a.csv'], extra: true },
      { type: 'saveFailed', requestId: id, message: 7 },
      { type: 'result', payload: { ...mcycle.payload, runId: 9 }, extra: 1 },
      { type: 'result', payload: { ...mcycle.payload, runId: Infinity } },
      { type: 'running', runId: NaN, message: 'ran' },
      { type: 'explode' },
      'saved',
      null,
    ];
    for (const m of refused) await pp.send(m);
    await pp.sendJson(`{"type":"saveFailed","requestId":${id},"message":"polluted","__proto__":{"admin":true}}`);
    // A "__proto__" key deep inside a payload (JSON.parse keeps it as an own key, as a structured clone does).
    const deep = JSON.stringify({ ...mcycle.payload, runId: 9, source: { ...mcycle.payload.source, fileName: 'polluted.csv', hook: 1 } }).replace('"hook":1', '"__proto__":{"admin":true}');
    assert.match(deep, /"__proto__":\{"admin":true\}/);
    await pp.sendJson(`{"type":"result","payload":${deep}}`);
    assert.equal(await page.textContent('#kw-status'), 'Saving…', 'no refused answer ended the save');
    assert.equal(await page.getAttribute('#knotwise-root', 'data-run-id'), '1', 'no refused result replaced the view');
    assert.equal(await page.getAttribute('#knotwise-root', 'data-error'), null);
    assert.equal(await page.evaluate('({}).admin'), undefined);
    // The well-formed answer still gets through.
    await pp.send({ type: 'saved', requestId: id, files: ['mcycle.curve.csv'] } satisfies HostMessage);
    await pp.waitForText('#kw-status', 'Saved mcycle.curve.csv.');
    await page.close();
  });

  /** The colour a theme variable names, as the page computes colours (rgb(...)), read through a probe element. */
  async function themeColour(page: PanelPage['page'], variable: string): Promise<string> {
    return page.evaluate((v) => {
      const doc = (globalThis as unknown as { document: { createElement(t: string): HTMLProbe; body: { append(e: HTMLProbe): void } } }).document;
      const probe = doc.createElement('span');
      probe.style.color = `var(${v})`;
      doc.body.append(probe);
      const colour = (globalThis as unknown as { getComputedStyle(e: HTMLProbe): { color: string } }).getComputedStyle(probe).color;
      probe.remove();
      return colour;
    }, variable);
  }
  interface HTMLProbe {
    readonly style: { color: string };
    remove(): void;
  }

  /** The gap between two boxes in CSS pixels: 0 when they touch or overlap, else the larger of the horizontal and vertical gaps. */
  const gap = (a: Box, b: Box): number => Math.max(0, a.x - (b.x + b.width), b.x - (a.x + a.width), a.y - (b.y + b.height), b.y - (a.y + a.height));
  interface Box {
    readonly x: number;
    readonly y: number;
    readonly width: number;
    readonly height: number;
  }

  // The badge colour of each theme, to tell the themes apart.
  const badges = new Map<string, string>();
  for (const theme of ['light', 'dark', 'high-contrast'] as const) {
    for (const width of [1400, 700]) {
      it(`${theme} theme at ${width} x 900: the answer, the curve and the error figure in the first 900 pixels, each control beside what it changes (test-artifacts/webview-${theme}-${width}.png)`, async function () {
        const pp = await shown(mcycle, { theme, viewport: { width, height: 900 } });
        const page = pp.page;
        await page.screenshot({ path: join(artifacts, `webview-${theme}-${width}.png`), fullPage: true });
        const box = async (selector: string): Promise<Box> => {
          const b = await page.locator(selector).boundingBox();
          assert.ok(b, `${selector} is shown`);
          return b;
        };
        // The chosen df with its reason, the curve with its bands and the error figure lie entirely in the first screen.
        for (const selector of ['#kw-chosen-df', '#kw-reason', '#fig-data', '#fig-data .kw-band-pi', '#fig-error']) {
          const b = await box(selector);
          assert.ok(b.y >= 0 && b.y + b.height <= 900, `${selector} spans y ${b.y} to ${b.y + b.height} at width ${width}`);
          assert.ok(b.x >= 0 && b.x + b.width <= width, `${selector} spans x ${b.x} to ${b.x + b.width} at width ${width}`);
        }
        // Each control beside what it changes: save and run again beside the chosen df, the rules beside the
        // error figure, each rule's input beside its rule, the model controls beside the figures they refit.
        const near = 48;
        const [save, badge, answer] = [await box('#kw-save'), await box('#kw-chosen-df'), await box('#kw-answer')];
        assert.ok(save.y < badge.y + badge.height && badge.y < save.y + save.height && gap(save, answer) === 0, 'save in the row of the chosen df');
        assert.ok(gap(await box('#kw-rules'), await box('#fig-error')) <= near, 'the rule controls beside the error figure');
        assert.ok(gap(await box('#kw-tolerance'), await box('label[for="kw-rule-simplest-within"]')) <= near / 2, 'the tolerance beside its rule');
        assert.ok(gap(await box('#kw-df'), await box('label[for="kw-rule-pick"]')) <= near / 2, 'the df chooser beside its rule');
        const model = await box('#kw-model-controls');
        assert.ok(Math.min(gap(model, await box('#fig-data')), gap(model, await box('#kw-error-section'))) <= near, 'the model controls beside the figures');
        // The panel wears the theme: the badge and the curve take the theme's colours.
        const badgeColour = (await page.evaluate('getComputedStyle(document.querySelector("#kw-chosen-df")).backgroundColor')) as string;
        assert.equal(badgeColour, await themeColour(page, '--vscode-badge-background'));
        const curve = (await page.evaluate('getComputedStyle(document.querySelector("#fig-data .kw-curve")).stroke')) as string;
        assert.equal(curve, await themeColour(page, '--vscode-charts-blue'));
        const bg = (await page.evaluate('getComputedStyle(document.body).backgroundColor')) as string;
        assert.equal(bg, await themeColour(page, '--vscode-editor-background'));
        badges.set(theme, badgeColour);
        if (theme !== 'light') assert.notEqual(badgeColour, badges.get('light'), `the badge differs between the light and the ${theme} theme`);
        await page.close();
      });
    }
  }

  it('the error figure first shows the window around the decision, where threshold and nearby candidates stand apart; Show all candidates shows every one', async function () {
    const pp = await openPanel(browser, server, mcycle, { viewport: { width: 1400, height: 900 } });
    const page = pp.page;
    await pp.send({ type: 'file', uri: 'file:///data/mcycle.csv', fileName: 'mcycle.csv' } satisfies HostMessage);
    await pp.send({ type: 'result', payload: mcycle.payload });
    const p = mcycle.payload;
    const sel = expected(p, p.rule);
    assert.ok(sel.threshold !== undefined, 'the one-SE rule has a threshold');
    const points = errorPoints(p.candidates, p.metric);
    const best = points.reduce((b, q) => (q.mean < b.mean ? q : b));
    // The candidate the threshold turned away: the next simpler one than the chosen (its mean is above the threshold).
    const away = points.filter((q) => q.df < sel.df).pop();
    assert.ok(away && away.mean > sel.threshold, 'mcycle has a simpler candidate above the threshold');
    /** Vertical distances in CSS pixels from the threshold line to the centres of the turned-away and the least-error candidates. */
    const distances = async (): Promise<{ away: number; best: number }> => {
      const line = await page.locator('#fig-error path.kw-threshold').boundingBox();
      const centre = async (df: number): Promise<number> => {
        const b = await page.locator(`#fig-error circle[data-df="${df}"]`).boundingBox();
        assert.ok(b, `df ${df} is drawn`);
        return b.y + b.height / 2;
      };
      assert.ok(line);
      const y = line.y + line.height / 2;
      return { away: Math.abs((await centre(away.df)) - y), best: Math.abs((await centre(best.df)) - y) };
    };
    const focused = await distances();
    assert.match((await page.textContent('#fig-error figcaption')) ?? '', /around the decision/);
    assert.ok((await page.locator('#fig-error .kw-err-point').count()) < points.length, 'the window leaves some candidates out');
    await page.check('#kw-error-all');
    await page.waitForFunction(() => !/around the decision/.test((globalThis as unknown as PageDoc).document.querySelector('#fig-error figcaption')?.textContent ?? ''));
    assert.equal(await page.locator('#fig-error circle.kw-err-point').count(), points.length, 'every candidate is shown');
    const whole = await distances();
    // Zoomed in, the threshold stands clearly apart from the nearby candidates: several pixels from the
    // turned-away one and at least 3 times as far as over the whole range, for both candidates.
    assert.ok(focused.away >= 5, `turned-away candidate ${focused.away.toFixed(1)} px from the threshold`);
    assert.ok(focused.away >= 3 * whole.away && focused.best >= 3 * whole.best, `focused ${JSON.stringify(focused)}, whole range ${JSON.stringify(whole)}`);
    // The choice of range is kept with the panel's state, and a new result keeps it.
    assert.equal(((await page.evaluate('window.__knotwiseState()')) as { errorRange?: string }).errorRange, 'all');
    await pp.send({ type: 'result', payload: { ...p, runId: 2 } });
    await page.waitForSelector('#knotwise-root[data-run-id="2"]');
    assert.equal(await page.isChecked('#kw-error-all'), true);
    await page.uncheck('#kw-error-all');
    assert.match((await page.textContent('#fig-error figcaption')) ?? '', /around the decision/);
    await page.close();
  });

  it('an invalid tolerance shows a message beside the box and changes nothing; the box then shows the tolerance in effect', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    const p = mcycle.payload;
    await page.check('#kw-rule-simplest-within');
    const two = expected(p, { kind: 'simplest-within', percent: 2 });
    await assertExplains(page, p, two, 2);
    const reason = await page.textContent('#kw-reason');
    for (const bad of ['150', '-1']) {
      const mark = pp.sent.length;
      await page.fill('#kw-tolerance', bad);
      await page.locator('#kw-tolerance-error').waitFor();
      assert.equal(await page.textContent('#kw-tolerance-error'), 'The tolerance must be a percentage from 0 to 100; 2 % stays in effect.');
      assert.equal(await page.getAttribute('#kw-tolerance', 'aria-invalid'), 'true');
      assert.equal(await page.textContent('#kw-reason'), reason, `${bad}: the explanation is unchanged`);
      assert.equal(await page.textContent('#kw-chosen-df'), `df ${two.df}`);
      assert.deepEqual(
        pp.sent.slice(mark).filter((m) => m.type === 'choice'),
        [],
        'no new choice reached the host',
      );
      // Leaving the box: it shows the tolerance in effect again; the message stays to say why.
      await page.locator('#kw-tolerance').blur();
      assert.equal(await page.inputValue('#kw-tolerance'), '2');
      assert.equal(await page.getAttribute('#kw-tolerance', 'aria-invalid'), null);
      assert.equal(await page.locator('#kw-tolerance-error').isVisible(), true);
      await assertExplains(page, p, two, 2);
    }
    // A valid tolerance applies as it is typed and takes the message away.
    await page.fill('#kw-tolerance', '10');
    assert.equal(await page.locator('#kw-tolerance-error').isVisible(), false);
    await assertExplains(page, p, expected(p, { kind: 'simplest-within', percent: 10 }), 10);
    // Under another rule the box keeps its tolerance, and so does the list of other rules.
    await page.check('#kw-rule-one-se');
    assert.equal(await page.isDisabled('#kw-tolerance'), true);
    await assertExplains(page, p, expected(p, { kind: 'one-se' }), 10);
    // A df picked by hand: the chooser and the explanation agree, and a rule choosing again moves the chooser.
    await page.selectOption('#kw-df', '12');
    await assertExplains(page, p, expected(p, { kind: 'pick', df: 12 }), 10);
    await page.check('#kw-rule-least-error');
    await assertExplains(page, p, expected(p, { kind: 'least-error' }), 10);
    await page.close();
  });

  it('details fold: they start folded, the warnings link opens its section, and open sections stay open across a new result and a reloaded webview', async function () {
    const pp = await openPanel(browser, server, mcycle);
    const page = pp.page;
    const file: HostMessage = { type: 'file', uri: 'file:///data/mcycle.csv', fileName: 'mcycle.csv' };
    await pp.send(file);
    await pp.send({ type: 'result', payload: mcycle.payload });
    const openFolds = (): Promise<string[]> => page.$$eval('details.kw-fold', (ds) => ds.filter((d) => (d as HTMLDetailsLike).open).map((d) => d.getAttribute('data-fold') ?? ''));
    assert.deepEqual(await page.$$eval('details.kw-fold', (ds) => ds.map((d) => d.getAttribute('data-fold'))), [
      'residual-checks',
      'influential-rows',
      'calibration',
      'candidates',
      'model-report',
      'notes',
    ]);
    assert.deepEqual(await openFolds(), []);
    assert.equal(await page.locator('#fig-qq').isVisible(), false, 'folded details are out of sight');
    // mcycle's checks flag problems: the answer says how many warnings, and its link opens the checks.
    assert.match((await page.textContent('#kw-warning-note')) ?? '', /^\d+ warnings? for this df; see the residual checks$/);
    await page.click('#kw-warning-link');
    await page.locator('#fig-qq').waitFor();
    await openFold(page, 'candidates');
    assert.deepEqual(await openFolds(), ['residual-checks', 'candidates']);
    assert.deepEqual(((await page.evaluate('window.__knotwiseState()')) as { open?: string[] }).open, ['residual-checks', 'candidates']);
    await page.screenshot({ path: join(artifacts, 'webview-details.png'), fullPage: true });
    // A new result builds the panel again, with the same sections open.
    await pp.send({ type: 'result', payload: { ...mcycle.payload, runId: 2 } });
    await page.waitForSelector('#knotwise-root[data-run-id="2"]');
    assert.deepEqual(await openFolds(), ['residual-checks', 'candidates']);
    // Closing is remembered as well; the keyboard opens a section too.
    await page.click('#kw-fold-candidates > summary');
    await page.focus('#kw-fold-notes > summary');
    await page.keyboard.press('Enter');
    await page.waitForSelector('#kw-fold-notes[open]');
    assert.deepEqual(await openFolds(), ['residual-checks', 'notes']);
    const saved = await page.evaluate('window.__knotwiseState()');
    assert.deepEqual((saved as { open?: string[] }).open, ['residual-checks', 'notes']);
    await page.close();
    // A reloaded webview (hidden and shown again) starts from what it saved.
    const again = await openPanel(browser, server, mcycle, { state: saved });
    await again.send(file);
    await again.send({ type: 'result', payload: { ...mcycle.payload, runId: 2 } });
    await again.page.waitForSelector('#knotwise-root[data-run-id="2"]');
    assert.deepEqual(await again.page.$$eval('details.kw-fold[open]', (ds) => ds.map((d) => d.getAttribute('data-fold'))), ['residual-checks', 'notes']);
    await again.page.close();
  });

  it('details the core adds when it has them: residuals in row order, studentized residuals and the outlier threshold', async function () {
    // Rendering check: mcycle's details with these fields filled from its own fit (residuals in reverse
    // row order, so not in x order; residual over residual SD standing in for the studentized residual).
    const detail = mcycle.payload.details[0];
    assert.ok(detail);
    const residuals = Array.from(mcycle.analysis.chosen.residuals).reverse();
    const rowOrder = {
      row: residuals.map((_, i) => i + 1),
      line: residuals.map((_, i) => residuals.length + 1 - i),
      residual: residuals,
      blockSize: 1,
      lag1: 0,
      runsZ: 0,
      runsPValue: 1,
      sameAsX: false,
      flagged: false,
    };
    const influential = detail.influential.map((r) => ({ ...r, studentized: r.y / detail.sigma }));
    const outlierThreshold = 3.5;
    const payload: PanelPayload = { ...mcycle.payload, details: [{ ...detail, rowOrder, influential, outlierThreshold }] };
    const pp = await shown({ ...mcycle, payload });
    const page = pp.page;
    await openFold(page, 'residual-checks');
    assert.equal(await page.locator('#fig-row-order circle.kw-point').count(), residuals.length);
    assert.equal(await page.textContent('#fig-row-order figcaption'), 'Residuals in the order of the rows in the file');
    await openFold(page, 'influential-rows');
    const heads = await page.$$eval('#kw-influence-body th', (hs) => hs.map((h) => h.textContent));
    assert.ok(heads.includes('studentized residual'), heads.join(', '));
    const column = heads.indexOf('studentized residual');
    const first = await page.$$eval('#kw-influence-body tbody tr:first-child td', (ds) => ds.map((d) => d.textContent));
    assert.equal(first[column], sig(influential[0]?.studentized as number, 3));
    assert.match((await page.textContent('#kw-influence-body caption')) ?? '', new RegExp(`\\|studentized residual\\| over ${outlierThreshold}$`));
    await page.close();
  });

  it('a choice at an end of the candidates says so under the reason, naming the setting that widens them, with a button that asks for the wider candidates', async function () {
    // MASS::mcycle with candidates df 3 to 6 only: the least error is at the largest candidate.
    const fx = await analysedFixture('mcycle.csv', 'times', 'accel', {
      kind: 'natural-spline',
      candidates: [3, 4, 5, 6],
      resample: { kind: 'folds', folds: 5, repeats: 1 },
      rule: { kind: 'least-error' },
      seed: 1,
    });
    const sel = expected(fx.payload, fx.payload.rule);
    assert.ok(sel.edge, 'core flags the edge for this fixture');
    const pp = await shown(fx);
    const more = pp.page.locator('#kw-reason-more');
    assert.equal(await more.isVisible(), true);
    assert.equal(await more.getAttribute('class'), 'kw-warning');
    const text = (await pp.page.textContent('#kw-reason-more-text')) ?? '';
    assert.ok(text.length > 0 && sel.reason.endsWith(text), `"${text}" closes "${sel.reason}"`);
    assert.match(text, /knotwise\.\w+/);
    assert.doesNotMatch(text, /(^|\s)--[a-z]/);
    // The button beside the warning names the wider candidates core proposes and asks the host for them.
    const widen = pp.page.locator('#kw-widen');
    assert.equal(await widen.isVisible(), true);
    assert.equal(await widen.textContent(), `Widen the candidates to ${sel.edge.widen}`);
    const mark = pp.sent.length;
    await widen.click();
    assert.deepEqual(await pp.waitForSent('candidates', mark), { type: 'candidates', runId: 1, candidates: sel.edge.widen });
    assert.equal(await pp.page.getAttribute('#knotwise-root', 'data-state'), 'running', 'the panel shows the rerun');
    await pp.page.close();
  });

  it('without a choice at an end of the candidates there is no widen button, and candidates set in the panel are named and kept', async function () {
    const sel = expected(mcycle.payload, mcycle.payload.rule);
    assert.equal(sel.edge, undefined, 'mcycle with df 3 to 15 is no edge case');
    const pp = await openPanel(browser, server, mcycle);
    await pp.send({ type: 'file', uri: 'file:///data/mcycle.csv', fileName: 'mcycle.csv' } satisfies HostMessage);
    await pp.send({ type: 'result', payload: mcycle.payload });
    await pp.page.waitForSelector('#knotwise-root[data-state="ready"]');
    assert.equal(await pp.page.locator('#kw-widen').isVisible(), false);
    assert.equal(await pp.page.locator('#kw-candidates-words').count(), 0, 'candidates from the settings are not called set in the panel');
    await pp.send({ type: 'result', payload: { ...mcycle.payload, runId: 2, candidatesFromPanel: '3..30' } });
    await pp.page.waitForSelector('#knotwise-root[data-run-id="2"]');
    assert.equal(await pp.page.textContent('#kw-candidates-words'), 'Candidates: df 3..30 (set in this panel; the settings say otherwise)');
    assert.equal(((await pp.page.evaluate('window.__knotwiseState()')) as { candidates?: string }).candidates, '3..30');
    assert.equal(pp.sent.filter((m) => m.type === 'candidates').length, 0, 'nothing asked for wider candidates by itself');
    await pp.page.close();
  });

  it('influential rows: the first ten, every listed row on request (remembered), and how many more the fit record lists', async function () {
    // Rendering check: mcycle's details with every row of its fit listed as influential, most Cook's distance first.
    const detail = mcycle.payload.details[0];
    assert.ok(detail);
    const fit = mcycle.analysis.chosen;
    const lines = mcycle.data.lines as Int32Array;
    const order = Array.from(fit.cooksDistance.keys()).sort((a, b) => (fit.cooksDistance[b] as number) - (fit.cooksDistance[a] as number));
    const influential = order.map((i) => ({
      line: lines[i] as number,
      x: mcycle.data.x[i] as number,
      y: mcycle.data.y[i] as number,
      leverage: fit.leverage[i] as number,
      cooksDistance: fit.cooksDistance[i] as number,
      exceeds: ['listed for this rendering check'],
    }));
    const listed = influential.length;
    const rowsShown = (page: PanelPage['page']): Promise<number> => page.locator('#kw-influence-body tbody tr').count();
    const all: PanelPayload = { ...mcycle.payload, details: [{ ...detail, influential, influentialShown: 10, influentialTotal: listed }] };
    const pp = await openPanel(browser, server, mcycle);
    const file: HostMessage = { type: 'file', uri: 'file:///data/mcycle.csv', fileName: 'mcycle.csv' };
    await pp.send(file);
    await pp.send({ type: 'result', payload: all });
    await openFold(pp.page, 'influential-rows');
    assert.equal(await rowsShown(pp.page), 10);
    assert.equal(await pp.page.textContent('#kw-influence-all'), `Show all ${listed}`);
    assert.equal(await pp.page.getAttribute('#kw-influence-all', 'aria-expanded'), 'false');
    await pp.page.click('#kw-influence-all');
    await pp.page.waitForSelector('#kw-influence-all[aria-expanded="true"]');
    assert.equal(await rowsShown(pp.page), listed);
    assert.equal(await pp.page.textContent('#kw-influence-all'), 'Show the first 10');
    assert.equal(await pp.page.locator('#kw-influence-unlisted').count(), 0, 'every row is listed');
    const firstLine = await pp.page.getAttribute('#kw-influence-body tbody tr:first-child [data-line]', 'data-line');
    assert.equal(Number(firstLine), influential[0]?.line);
    const saved = await pp.page.evaluate('window.__knotwiseState()');
    assert.equal((saved as { allInfluential?: boolean }).allInfluential, true);
    await pp.page.close();
    // More rows over a threshold than the panel lists: a reloaded webview keeps every listed row shown and counts the rest.
    const more = 450;
    const many: PanelPayload = { ...mcycle.payload, runId: 2, details: [{ ...detail, influential, influentialShown: 10, influentialTotal: more }] };
    const again = await openPanel(browser, server, mcycle, { state: saved });
    await again.send(file);
    await again.send({ type: 'result', payload: many });
    await again.page.waitForSelector('#knotwise-root[data-run-id="2"]');
    assert.equal(await rowsShown(again.page), listed);
    assert.equal(await again.page.textContent('#kw-influence-unlisted'), `${more - listed} more rows over a threshold are not listed here; the fit record lists them all.`);
    await again.page.click('#kw-influence-all');
    await again.page.waitForSelector('#kw-influence-all[aria-expanded="false"]');
    assert.equal(await rowsShown(again.page), 10);
    assert.equal(await again.page.textContent('#kw-influence-all'), `Show the first ${listed}`);
    assert.match((await again.page.textContent('#kw-influence-body caption')) ?? '', new RegExp(`^${more} rows over a threshold; the 10 furthest past one are listed here`));
    assert.equal(((await again.page.evaluate('window.__knotwiseState()')) as { allInfluential?: boolean }).allInfluential, undefined);
    await again.page.close();
  });

  it('before the first result the panel shows the run with its progress and a Stop button; a failure offers Run again', async function () {
    const pp = await openPanel(browser, server, mcycle);
    const page = pp.page;
    await pp.send({ type: 'file', uri: 'file:///data/mcycle.csv', fileName: 'mcycle.csv' } satisfies HostMessage);
    await pp.send({ type: 'running', runId: 1, message: 'Tuning 133 rows…' } satisfies HostMessage);
    assert.equal(await page.textContent('#kw-status'), 'Tuning 133 rows…');
    assert.equal(await page.getAttribute('#kw-progress', 'value'), null, 'no fraction yet: the bar has no value');
    await pp.send({ type: 'running', runId: 1, message: 'Resampling…', fraction: 0.4 } satisfies HostMessage);
    assert.equal(await page.textContent('#kw-status'), 'Resampling…');
    assert.equal(await page.evaluate('document.querySelector("#kw-progress").value'), 0.4);
    assert.equal(await page.getAttribute('#knotwise-root', 'aria-busy'), 'true');
    let mark = pp.sent.length;
    await page.click('#kw-stop');
    assert.deepEqual(await pp.waitForSent('stop', mark), { type: 'stop' });
    await pp.send({ type: 'failed', runId: 1, message: 'Tuning was cancelled.' } satisfies HostMessage);
    assert.equal(await page.textContent('#kw-failure'), 'Tuning was cancelled.');
    assert.equal(await page.locator('#kw-progress').count(), 0);
    mark = pp.sent.length;
    await page.click('#kw-rerun');
    assert.deepEqual(await pp.waitForSent('rerun', mark), { type: 'rerun' });
    // The panel shows the new run at once, before the host's first message about it.
    assert.equal(await page.textContent('#kw-status'), 'Running the analysis again…');
    assert.equal(await page.locator('#kw-stop').isVisible(), true);
    await pp.send({ type: 'result', payload: mcycle.payload });
    await page.waitForSelector('#knotwise-root[data-state="ready"]');
    assert.equal(await page.locator('#kw-stop').isVisible(), false);
    await page.close();
  });

  it('during a rerun the result stays with the progress and a Stop button; a cancel keeps it and offers Run again', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    assert.equal(await page.locator('#kw-stop').isVisible(), false);
    assert.equal(await page.locator('#kw-progress').isVisible(), false);
    await pp.send({ type: 'running', runId: 2, message: 'Resampling…', fraction: 0.5 } satisfies HostMessage);
    assert.equal(await page.getAttribute('#knotwise-root', 'data-state'), 'running');
    assert.equal(await page.locator('#kw-progress').isVisible(), true);
    assert.equal(await page.evaluate('document.querySelector("#kw-progress").value'), 0.5);
    const mark = pp.sent.length;
    await page.click('#kw-stop');
    assert.deepEqual(await pp.waitForSent('stop', mark), { type: 'stop' });
    await pp.send({ type: 'failed', runId: 2, message: 'Tuning was cancelled. The result shown is from the run before.' } satisfies HostMessage);
    assert.equal(await page.getAttribute('#knotwise-root', 'data-state'), 'ready');
    assert.equal(await page.textContent('#kw-status'), 'Tuning was cancelled. The result shown is from the run before.');
    assert.equal(await page.locator('#kw-stop').isVisible(), false);
    assert.equal(await page.locator('#kw-progress').isVisible(), false);
    assert.equal(await page.isEnabled('#kw-rerun'), true);
    assert.equal(await page.textContent('#kw-chosen-df'), `df ${expected(mcycle.payload, mcycle.payload.rule).df}`);
    await page.close();
  });

  it('a change to the data shows a banner saying what changed; saving becomes Refit and save; the banner refits', async function () {
    const pp = await shown(mcycle);
    const page = pp.page;
    assert.equal(await page.locator('#kw-banner').isVisible(), false);
    assert.equal(await page.textContent('#kw-save'), 'Save table and record');
    const edited: HostMessage = {
      type: 'dataState',
      runId: 1,
      state: { analysed: 'disk', change: { where: 'editor', added: 2, removed: 0, changed: 1, header: false }, refit: 'automatic', followedOnDisk: false },
    };
    // A state about another run is dropped.
    await pp.send({ ...edited, runId: 7 });
    assert.equal(await page.locator('#kw-banner').isVisible(), false);
    await pp.send(edited);
    assert.equal(await page.locator('#kw-banner').isVisible(), true);
    assert.equal(await page.textContent('#kw-banner-text'), 'Unsaved edits in mcycle.csv since this analysis: 2 rows added, 1 row changed. Saving mcycle.csv refits the curve.');
    assert.equal(await page.textContent('#kw-save'), 'Refit and save');
    assert.equal(await page.getAttribute('#knotwise-root', 'data-data'), 'changed-editor');
    await page.screenshot({ path: join(artifacts, 'webview-banner.png') });
    let mark = pp.sent.length;
    await page.click('#kw-save');
    const save = await pp.waitForSent('refitAndSave', mark);
    assert.deepEqual(save, { type: 'refitAndSave', requestId: (save as { requestId: number }).requestId, runId: 1, rule: mcycle.payload.rule });
    assert.equal(
      pp.sent.slice(mark).some((m) => m.type === 'save'),
      false,
      'no plain save was asked for',
    );
    assert.equal(await page.textContent('#kw-status'), 'Refitting, then saving…');
    if (save.type === 'refitAndSave') await pp.send({ type: 'saveFailed', requestId: save.requestId, message: 'Nothing was saved: the refit was cancelled.' });
    mark = pp.sent.length;
    await page.click('#kw-refit');
    assert.deepEqual(await pp.waitForSent('rerun', mark), { type: 'rerun' });

    const words: [HostMessage, string][] = [
      [
        { type: 'dataState', runId: 1, state: { analysed: 'disk', change: { where: 'disk', added: 0, removed: 3, changed: 0, header: true }, refit: 'asked', followedOnDisk: false } },
        'mcycle.csv changed on disk since this analysis: the header line changed, 3 rows removed. The file is large, so Knotwise asks before refitting (knotwise.refit.askAboveRows).',
      ],
      [
        { type: 'dataState', runId: 1, state: { analysed: 'disk', change: { where: 'disk', added: 1, removed: 0, changed: 0, header: false }, refit: 'manual', followedOnDisk: false } },
        'mcycle.csv changed on disk since this analysis: 1 row added.',
      ],
      [
        { type: 'dataState', runId: 1, state: { analysed: 'disk', change: { where: 'disk', added: 0, removed: 0, changed: 0, header: false }, refit: 'automatic', followedOnDisk: false } },
        'mcycle.csv changed on disk since this analysis: no data row changed (only blank lines, spacing or line endings). Refitting follows.',
      ],
      [
        { type: 'dataState', runId: 1, state: { analysed: 'unsaved', refit: 'automatic', followedOnDisk: false } },
        'This analysis read unsaved edits of mcycle.csv. Review it here; a curve table is saved only from data on disk, so saving first saves mcycle.csv and refits.',
      ],
    ];
    for (const [m, text] of words) {
      await pp.send(m);
      assert.equal(await page.textContent('#kw-banner-text'), text);
      assert.equal(await page.textContent('#kw-save'), 'Refit and save');
    }
    assert.equal(await page.locator('#kw-refit').isVisible(), false, 'nothing to refit: the analysed edits are the data');
    // The file is gone: nothing can be saved, nothing refitted.
    await pp.send({
      type: 'dataState',
      runId: 1,
      state: { analysed: 'disk', change: { where: 'missing', added: 0, removed: 0, changed: 0, header: false }, refit: 'automatic', followedOnDisk: false },
    });
    assert.equal(await page.textContent('#kw-banner-text'), 'mcycle.csv is no longer on disk. This analysis stays for review; nothing can be saved from it.');
    assert.equal(await page.isDisabled('#kw-save'), true);
    assert.equal(await page.locator('#kw-refit').isVisible(), false);
    // Back to the data as analysed (an undo): no banner, a plain save.
    await pp.send({ type: 'dataState', runId: 1, state: { analysed: 'disk', refit: 'automatic', followedOnDisk: true } });
    assert.equal(await page.locator('#kw-banner').isVisible(), false);
    assert.equal(await page.textContent('#kw-save'), 'Save table and record');
    assert.equal(await page.isEnabled('#kw-save'), true);
    assert.match((await page.textContent('#kw-follow-note')) ?? '', /^mcycle\.csv is too large .* Knotwise follows the file on disk/);
    assert.equal(await page.locator('#kw-follow-note').isVisible(), true);
    // A new result starts without a banner.
    await pp.send(edited);
    await pp.send({ type: 'result', payload: { ...mcycle.payload, runId: 2 } });
    assert.equal(await page.locator('#kw-banner').isVisible(), false);
    assert.equal(await page.textContent('#kw-save'), 'Save table and record');
    assert.deepEqual(await pp.cspViolations(), []);
    await page.close();
  });

  it('a refit says what moved: rows, the chosen df and the largest change of the curve', async function () {
    const payload: PanelPayload = {
      ...mcycle.payload,
      refit: { reason: 'saved', rowsBefore: 133, rowsNow: 135, dfBefore: 8, dfNow: 9, ruleDropped: false, largestChange: 4.25, atX: 31.2, ySpread: 270.1 },
    };
    const pp = await shown({ ...mcycle, payload });
    assert.equal(
      await pp.page.textContent('#kw-moved'),
      'Refitted after mcycle.csv changed: 133 → 135 rows; the chosen df moved from 8 to 9; the curve moved by at most 4.25 at times = 31.2 (1.57 % of the spread of accel).',
    );
    await pp.send({ type: 'result', payload: { ...payload, runId: 2, refit: { ...payload.refit, rowsNow: 133, dfNow: 8, reason: 'asked', largestChange: 0, ySpread: 0 } as PanelPayload['refit'] } });
    assert.equal(await pp.page.textContent('#kw-moved'), 'Refitted: 133 rows as before; the chosen df stayed at 8; the curve moved by at most 0 at times = 31.2.');
    await pp.send({ type: 'result', payload: { ...mcycle.payload, runId: 3 } });
    assert.equal(await pp.page.locator('#kw-moved').count(), 0, 'a first run says nothing about moving');
    await pp.page.close();
  });

  it('the panel keeps its file, run, rule and the model options set in it, for a reloaded window', async function () {
    const pp = await openPanel(browser, server, mcycle);
    const page = pp.page;
    await pp.send({ type: 'file', uri: 'file:///data/mcycle.csv', fileName: 'mcycle.csv' } satisfies HostMessage);
    assert.deepEqual(await page.evaluate('window.__knotwiseState()'), { file: 'file:///data/mcycle.csv' });
    await pp.send({ type: 'result', payload: mcycle.payload });
    assert.deepEqual(await page.evaluate('window.__knotwiseState()'), { file: 'file:///data/mcycle.csv', runId: 1, rule: mcycle.payload.rule });
    await page.selectOption('#kw-df', '6');
    assert.deepEqual(await page.evaluate('window.__knotwiseState()'), { file: 'file:///data/mcycle.csv', runId: 1, rule: { kind: 'pick', df: 6 } });
    const fromPanel: PanelPayload = { ...mcycle.payload, runId: 2, rule: { kind: 'pick', df: 6 }, model: { ...mcycle.payload.model, shape: ['nonnegative'], fromPanel: true } };
    await pp.send({ type: 'result', payload: fromPanel });
    assert.deepEqual(await page.evaluate('window.__knotwiseState()'), {
      file: 'file:///data/mcycle.csv',
      runId: 2,
      rule: { kind: 'pick', df: 6 },
      model: { outcome: 'continuous', shape: ['nonnegative'], robust: false },
    });
    await page.close();
  });

  /** `fx` with the calibration section the host adds to the chosen df's details (core/view/calibration.ts). */
  function withCalibrationOf(fx: Fixture, recorded: Parameters<typeof calibrationView>[3], saved: boolean): Fixture {
    const detail = fx.payload.details[0];
    assert.ok(detail);
    const fit = fx.analysis.fits.get(detail.df);
    assert.ok(fit);
    const calibration = calibrationView(fit, DEFAULT_INVERSE, saved, recorded, { x: fx.payload.source.xLabel, y: fx.payload.source.yLabel });
    return { ...fx, payload: { ...fx.payload, details: [{ ...detail, calibration }] } };
  }

  it('calibration use: a curve that turns has no inverse table, said where and in the editor words; no record yet says what the first save does', async function () {
    const pp = await shown(withCalibrationOf(mcycle, 'none', false));
    const page = pp.page;
    await openFold(page, 'calibration');
    const refused = (await page.textContent('#kw-inverse-refused')) ?? '';
    assert.match(refused, /^No inverse table: the fitted curve turns at x = /);
    assert.match(refused, /the setting knotwise\.shape/);
    assert.doesNotMatch(refused, /--shape/);
    assert.match((await page.textContent('#kw-drift-words')) ?? '', /first save writes the curve/);
    assert.equal(await page.isChecked('#kw-inverse-save'), false);
    await page.close();
  });

  it('calibration use (datasets::cars): the inverse table in words, the switch asks the host to save it, and the drift from the recorded curve with its figure', async function () {
    const fx = await analysedFixture('cars.csv', 'speed', 'dist', { kind: 'natural-spline', candidates: [2, 3, 4], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 1 });
    // The recorded curve: the same data 10 ft lower (least squares is linear in y, so the new curve lies 10 ft above it everywhere).
    const lower = fitCurve({ x: fx.data.x, y: Float64Array.from(fx.data.y, (v) => v - 10) }, { kind: 'natural-spline', df: fx.payload.details[0]?.df ?? 2 });
    const pp = await shown(withCalibrationOf(fx, curveSample(lower), false));
    const page = pp.page;
    await openFold(page, 'calibration');
    assert.match((await page.textContent('#kw-inverse-words')) ?? '', /^101 rows from reading .* \(the curve rises throughout the data range\)/);
    assert.match((await page.textContent('#kw-drift-words')) ?? '', /^The new curve .*10 above the recorded curve/);
    assert.equal(await page.locator('#kw-fig-drift-box svg[role="img"]').count(), 1);
    await page.screenshot({ path: join(artifacts, 'webview-calibration.png'), fullPage: true });
    const mark = pp.sent.length;
    await page.click('#kw-inverse-save');
    assert.deepEqual(await pp.waitForSent('inverseTable', mark), { type: 'inverseTable', save: true });
    assert.deepEqual(await pp.cspViolations(), []);
    await page.close();
    // The section in the dark and high-contrast themes at half width: the words and the figure still fit.
    for (const theme of ['dark', 'high-contrast'] as const) {
      const themed = await shown(withCalibrationOf(fx, curveSample(lower), true), { theme, viewport: { width: 700, height: 900 } });
      await openFold(themed.page, 'calibration');
      assert.equal(await themed.page.isChecked('#kw-inverse-save'), true);
      const figure = await themed.page.locator('#kw-fig-drift-box').boundingBox();
      assert.ok(figure && figure.width <= 700, `the drift figure fits the half-width panel (${figure?.width})`);
      await themed.page.locator('#kw-fold-calibration').screenshot({ path: join(artifacts, `webview-calibration-${theme}-700.png`) });
      await themed.page.close();
    }
  });

  it('no request left 127.0.0.1', function () {
    assert.deepEqual(browser.blocked, []);
  });
});
