/**
 * The panel of a surface in headless Chromium: the real HTML with its CSP, the bundled
 * script, a stubbed host. The view comes from the real core run on datasets::trees (Ryan,
 * Joiner & Ryan 1976; Volume over Girth and Height; test/e2e/fixtures/make-fixtures.R), so
 * what the panel shows is checked against what core decided (the rule's pair, the
 * landscape, the grid and its coverage), not against a copy of the panel. The view's
 * numbers themselves are checked against R in test/unit/view/surface.test.ts.
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import type { HostMessage } from '../../core/protocol';
import type { SurfaceView } from '../../core/view/surface';
import type { LaunchedChromium } from '../../scripts/e2e-workbench.mjs' with { 'resolution-mode': 'import' };
import { treesSurfaceFixture, type SurfaceFixture } from './fixture';
import { assertWithinWidth, openPanel, resolvedColours, startPanelServer, type OpenOptions, type PanelPage, type PanelServer } from './harness';

const artifacts = join(__dirname, '..', '..', 'test-artifacts');
const RUN = 3;

describe('Knotwise panel of a surface (webview in headless Chromium)', function () {
  let browser: LaunchedChromium;
  let server: PanelServer;
  let trees: SurfaceFixture;

  before(async function () {
    const wb = await import('../../scripts/e2e-workbench.mjs');
    browser = await wb.launchChromium({ viewport: { width: 1280, height: 1000 } });
    server = await startPanelServer();
    trees = await treesSurfaceFixture(RUN);
  });

  after(async function () {
    await browser?.close();
    await server?.close();
  });

  async function shown(options: OpenOptions = {}, view: SurfaceView = trees.view): Promise<PanelPage> {
    const pp = await openPanel(browser, server, undefined, options);
    await pp.send({ type: 'file', uri: 'file:///data/trees.csv', fileName: 'trees.csv' } satisfies HostMessage);
    await pp.send({ type: 'surface', view } satisfies HostMessage);
    await pp.page.waitForSelector('#knotwise-root[data-view="surface"][data-state="ready"]');
    return pp;
  }

  it('shows the rule’s pair in words, the heat figure with every reading and the uncovered nodes, the landscape, the slices and both residual figures', async function () {
    const pp = await shown();
    const page = pp.page;
    const v = trees.view;
    const sel = trees.tune.selected;
    // The pair shown is the one core's rule chose (core/surface/select.ts), and the words are core's.
    assert.equal(await page.textContent('#kw-surface-pair'), `df ${sel.dfU} × ${sel.dfV}`);
    assert.equal(await page.textContent('#kw-reason'), v.explanation);
    assert.ok(v.explanation.includes(`df ${sel.dfU} × ${sel.dfV}`), 'the explanation names the pair');
    assert.equal(await page.textContent('.kw-header h1'), 'Volume over Girth and Height');
    // Every figure is an SVG with role img, a title and a description.
    const figures = await page.$$eval('figure.kw-figure svg', (svgs) =>
      svgs.map((svg) => ({
        id: svg.getAttribute('data-figure'),
        role: svg.getAttribute('role'),
        title: svg.querySelector('title')?.textContent ?? '',
        desc: svg.querySelector('desc')?.textContent ?? '',
      })),
    );
    assert.deepEqual(
      figures.map((f) => f.id),
      ['fig-surface-heat', 'fig-surface-slices', 'fig-surface-resid-x', 'fig-surface-resid-x2'],
    );
    for (const f of figures) assert.ok(f.role === 'img' && f.title.length > 10 && f.desc.length > 20, `${f.id} has a role, a title and a description`);
    // The heat figure: one cell per node of the 21 x 21 grid, grey exactly where core found no reading
    // within reach, and a dot for each of the 31 trees (R: nrow(trees) is 31).
    const nodes = v.grid.xs.length * v.grid.x2s.length;
    const uncovered = v.grid.uncovered.filter((u) => u === 1).length;
    assert.ok(uncovered > 0 && uncovered < nodes, 'trees leaves corners of its grid uncovered (precondition)');
    assert.equal(await page.locator('#kw-surface-heat svg rect.kw-uncovered').count(), uncovered);
    assert.equal(await page.locator('#kw-surface-heat svg rect.kw-heat').count(), nodes - uncovered);
    assert.equal(await page.locator('#kw-surface-heat svg circle.kw-point').count(), 31);
    // The landscape: a cell per candidate pair, the rule's outlined, the pair shown marked.
    const l = v.landscape;
    assert.ok(l);
    assert.equal(await page.locator('#kw-surface-landscape td').count(), l.dfX.length * l.dfX2.length);
    assert.equal(await page.getAttribute('#kw-surface-landscape td.kw-cell-ruled', 'data-x'), String(sel.dfU));
    assert.equal(await page.getAttribute('#kw-surface-landscape td.kw-cell-ruled', 'data-x2'), String(sel.dfV));
    assert.equal(await page.locator('#kw-surface-landscape td[aria-current="true"]').count(), 1);
    // Slices at the quartiles of Girth (R 4.2 quantile(trees$Girth): 11.05, 12.9, 15.25), each with both bands.
    assert.equal(await page.locator('#kw-surface-slices svg path.kw-curve').count(), 3);
    assert.equal(await page.locator('#kw-surface-slices svg path.kw-band-ci').count(), 3);
    assert.equal(await page.locator('#kw-surface-slices svg path.kw-band-pi').count(), 3);
    assert.equal(await page.inputValue('#kw-slice-values'), '11.05, 12.9, 15.25');
    // Residuals: one dot per tree against each input.
    assert.equal(await page.locator('#kw-surface-resid-x svg circle').count(), 31);
    assert.equal(await page.locator('#kw-surface-resid-x2 svg circle').count(), 31);
    assert.match((await page.textContent('#kw-caution')) ?? '', /surface/);
    assert.deepEqual(await pp.cspViolations(), []);
    await page.close();
  });

  it('the slice control asks for slices of either input at the values typed, and refuses what is not a list of numbers', async function () {
    const pp = await shown();
    const page = pp.page;
    let from = pp.sent.length;
    await page.fill('#kw-slice-values', '10, 14.5');
    await page.press('#kw-slice-values', 'Enter');
    assert.deepEqual(await pp.waitForSent('surfaceSlices', from), { type: 'surfaceSlices', runId: RUN, input: 'x', at: [10, 14.5] });
    // Another input: its quartiles (the values typed belong to the other input).
    from = pp.sent.length;
    await page.selectOption('#kw-slice-input', 'x2');
    await page.click('#kw-slice-show');
    assert.deepEqual(await pp.waitForSent('surfaceSlices', from), { type: 'surfaceSlices', runId: RUN, input: 'x2', at: [] });
    // The host's answer: Height held at 70 and 80, drawn with its values in the box.
    await pp.send({ type: 'surface', view: trees.viewWith(RUN, { slices: { input: 'x2', at: [70, 80] } }) } satisfies HostMessage);
    await pp.waitForText('#kw-surface-slices figcaption', /^Slices at Height = 70, 80,/);
    assert.equal(await page.locator('#kw-surface-slices svg path.kw-curve').count(), 2);
    assert.equal(await page.inputValue('#kw-slice-input'), 'x2');
    // Not numbers, or more than five: nothing is sent and the help says why.
    from = pp.sent.length;
    await page.fill('#kw-slice-values', '70, tall');
    await page.click('#kw-slice-show');
    await pp.waitForText('#kw-slice-help', /^Give up to 5 numbers/);
    await page.fill('#kw-slice-values', '1, 2, 3, 4, 5, 6');
    await page.click('#kw-slice-show');
    assert.equal(pp.sent.slice(from).filter((m) => m.type === 'surfaceSlices').length, 0);
    await page.close();
  });

  it('a df pair by hand is asked for, shown as picked by hand with the way back to the rule, and a bad pair changes nothing', async function () {
    const pp = await shown();
    const page = pp.page;
    const sel = trees.tune.selected;
    let from = pp.sent.length;
    await page.fill('#kw-pair-x', '0');
    await page.click('#kw-pair-use');
    await pp.waitForText('#kw-pair-error', `Each df must be a whole number from 1 to 100; df ${sel.dfU} × ${sel.dfV} stays in effect.`);
    assert.equal(pp.sent.slice(from).filter((m) => m.type === 'surfacePair').length, 0);
    await page.fill('#kw-pair-x', '3');
    await page.fill('#kw-pair-x2', '2');
    await page.click('#kw-pair-use');
    assert.deepEqual(await pp.waitForSent('surfacePair', from), { type: 'surfacePair', runId: RUN, x: 3, x2: 2 });
    await pp.send({ type: 'surface', view: trees.viewWith(RUN, { pair: { x: 3, x2: 2 } }) } satisfies HostMessage);
    await pp.waitForText('#kw-surface-pair', 'df 3 × 2 (picked by hand)');
    assert.equal(await page.getAttribute('#knotwise-root', 'data-pair'), '3x2');
    assert.equal(await page.getAttribute('#kw-surface-landscape td[aria-current="true"]', 'data-x'), '3');
    from = pp.sent.length;
    await page.click('#kw-pair-rule');
    assert.deepEqual(await pp.waitForSent('surfaceRule', from), { type: 'surfaceRule', runId: RUN });
    // The host cannot fit a pair: the panel keeps the surface shown and says why.
    await pp.send({ type: 'failed', runId: RUN, message: 'Knotwise could not fit that pair: too few rows. The surface shown is unchanged.' } satisfies HostMessage);
    await pp.waitForText('#kw-status', /could not fit that pair/);
    assert.equal(await page.textContent('#kw-surface-pair'), 'df 3 × 2 (picked by hand)');
    await page.close();
  });

  it('Save asks the host once for the surface shown and reports what was written', async function () {
    const pp = await shown();
    const page = pp.page;
    const from = pp.sent.length;
    await page.click('#kw-save');
    const m = await pp.waitForSent('surfaceSave', from);
    assert.ok(m.type === 'surfaceSave' && m.runId === RUN);
    // A second click while the first save is pending sends nothing more.
    await page.click('#kw-save', { force: true }).catch(() => undefined);
    assert.equal(pp.sent.slice(from).filter((s) => s.type === 'surfaceSave').length, 1);
    await pp.send({ type: 'saved', requestId: m.requestId, files: ['trees.surface.csv', 'trees.surface.json'] } satisfies HostMessage);
    await pp.waitForText('#kw-status', 'Saved trees.surface.csv and trees.surface.json.');
    await page.close();
  });

  it('ignores hostile or stale surface messages and shows CSV text as text', async function () {
    const pp = await shown();
    const page = pp.page;
    const v = trees.view;
    const before = await page.innerHTML('#knotwise-root');
    const bad: unknown[] = [
      { type: 'surface', view: { ...v, extra: 1 } },
      { type: 'surface', view: { ...v, runId: -1 } },
      { type: 'surface', view: { ...v, pair: { x: 0, x2: 2 } } },
      { type: 'surface', view: { ...v, grid: { ...v.grid, fit: v.grid.fit.slice(1) } } },
      { type: 'surface', view: { ...v, readings: { ...v.readings, x: new Array(100000).fill(1) } } },
      { type: 'surface', view: { ...v, slices: { ...v.slices, input: 'y' } } },
      { type: 'surface', view: { ...v, labels: { ...v.labels, x: 42 } } },
      { type: 'surface', view: null },
      { type: 'surface' },
      // An older run than the one shown.
      { type: 'surface', view: trees.viewWith(RUN - 1, { pair: { x: 4, x2: 4 } }) },
    ];
    for (const m of bad) await pp.send(m);
    await pp.sendJson(`{"type":"surface","view":${JSON.stringify(v).replace(/^\{/, '{"__proto__":{"polluted":true},')}}`);
    assert.equal(await page.innerHTML('#knotwise-root'), before, 'nothing changed');
    // Hostile column names: inserted as text, no element made from them.
    const evil = '<img src=x onerror="alert(1)">';
    await pp.send({ type: 'surface', view: { ...trees.viewWith(RUN + 1, {}), labels: { x: evil, x2: 'Height', y: 'Volume' } } } satisfies HostMessage);
    await pp.waitForText('.kw-header h1', `Volume over ${evil} and Height`);
    assert.equal(await page.locator('#knotwise-root img').count(), 0);
    assert.deepEqual(pp.dialogs, []);
    assert.deepEqual(await pp.cspViolations(), []);
    await page.close();
  });

  for (const theme of ['light', 'dark', 'high-contrast'] as const) {
    for (const width of [1400, 700]) {
      it(`${theme} theme at ${width} px: the pair and the heat figure come first, nothing overflows, the heat in the theme's colours (test-artifacts/webview-surface-${theme}-${width}.png)`, async function () {
        const pp = await shown({ theme, viewport: { width, height: 900 } });
        const page = pp.page;
        await page.screenshot({ path: join(artifacts, `webview-surface-${theme}-${width}.png`), fullPage: true });
        for (const selector of ['#kw-surface-pair', '#kw-surface-heat svg']) {
          const b = await page.locator(selector).boundingBox();
          assert.ok(b && b.y < 900, `${selector} within the first 900 pixels (${JSON.stringify(b)})`);
        }
        assert.ok(((await page.evaluate('document.documentElement.scrollWidth')) as number) <= width, 'no sideways scrolling of the page');
        await assertWithinWidth(
          page,
          ['#kw-surface-heat', '#kw-surface-landscape', '#kw-pair', '#kw-surface-slices', '#kw-slice-control', '#kw-surface-resid-x', '#kw-surface-resid-x2', '#kw-caution'],
          width,
        );
        const colours = await resolvedColours(
          page,
          { blue: 'var(--vscode-charts-blue)', fg: 'var(--vscode-foreground)' },
          { heat: ['#kw-surface-heat svg rect.kw-heat', 'fill'], label: ['#kw-surface-slices svg text.kw-slice-label', 'fill'] },
        );
        assert.equal(colours.heat, colours.blue, 'the heat in the theme’s blue');
        assert.equal(colours.label, colours.fg, 'slice labels in the theme’s foreground');
        assert.deepEqual(await pp.cspViolations(), []);
        await page.close();
      });
    }
  }

  it('no request left 127.0.0.1', function () {
    assert.deepEqual(browser.blocked, []);
  });
});
