/**
 * The panel of a grouped run in headless Chromium: the real HTML with its CSP, the bundled
 * script, a stubbed host that answers the panel's group requests. The overview and each
 * group's panel come from the real core run on datasets::CO2 split by plant (Potvin,
 * Lechowicz & Tardif 1990; test/e2e/fixtures/make-fixtures.R); what the panel shows of a
 * group is checked against the overview core built (core/view/groups.ts), whose numbers
 * are checked against the command line in test/unit/view/groups.test.ts.
 */
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { sig } from '../../core/tune/format';
import type { HostMessage } from '../../core/protocol';
import type { GroupsView } from '../../core/view/groups';
import type { LaunchedChromium } from '../../scripts/e2e-workbench.mjs' with { 'resolution-mode': 'import' };
import { co2GroupsFixture, type GroupsFixture } from './fixture';
import { assertWithinWidth, openPanel, resolvedColours, startPanelServer, type OpenOptions, type PanelPage, type PanelServer } from './harness';

const artifacts = join(__dirname, '..', '..', 'test-artifacts');
const SET = 10;

describe('Knotwise panel of a grouped run (webview in headless Chromium)', function () {
  let browser: LaunchedChromium;
  let server: PanelServer;
  let co2: GroupsFixture;

  before(async function () {
    const wb = await import('../../scripts/e2e-workbench.mjs');
    browser = await wb.launchChromium({ viewport: { width: 1280, height: 1000 } });
    server = await startPanelServer();
    co2 = await co2GroupsFixture(SET);
  });

  after(async function () {
    await browser?.close();
    await server?.close();
  });

  /** A panel showing `view` with group 0, as the host sends a grouped run: the overview, then the group's result. */
  async function shown(options: OpenOptions = {}, view: GroupsView = co2.view): Promise<PanelPage> {
    const pp = await openPanel(browser, server, undefined, options);
    await pp.send({ type: 'file', uri: 'file:///data/co2.csv', fileName: 'co2.csv' } satisfies HostMessage);
    await pp.send({ type: 'groups', view } satisfies HostMessage);
    await pp.send({ type: 'groupResult', setId: view.setId, group: 0, payload: co2.payloadFor(0, view.setId) } satisfies HostMessage);
    await pp.page.waitForSelector('#knotwise-root[data-state="ready"]');
    return pp;
  }

  /**
   * Answers the panel's next `selectGroup` (after `from` messages) as the host does: that
   * group's result under run id `runId` (a view of the 12 plants repeated shows plant
   * group % 12); returns the group asked for.
   */
  async function answer(pp: PanelPage, from: number, runId: number): Promise<number> {
    const m = await pp.waitForSent('selectGroup', from);
    if (m.type !== 'selectGroup') throw new Error('expected a group request');
    assert.equal(m.setId, SET);
    await pp.send({ type: 'groupResult', setId: m.setId, group: m.group, payload: co2.payloadFor(m.group % co2.analyses.length, runId) } satisfies HostMessage);
    return m.group;
  }

  it('a grouped run shows the group selector, the overlay figure and a small figure per group, each with a text alternative; the CSP holds', async function () {
    const pp = await shown();
    const page = pp.page;
    const v = co2.view;
    assert.deepEqual(
      await page.$$eval('#kw-group option', (os) => os.map((o) => o.textContent)),
      v.groups.map((g) => `${g.name} · df ${sig(g.df, 4)} · ${g.rows} rows`),
    );
    assert.equal(await page.inputValue('#kw-group'), '0');
    assert.equal(await page.textContent('label[for="kw-group"]'), 'Group');
    assert.equal(await page.textContent('#kw-group-count'), '1 of 12 groups by plant');
    assert.equal(await page.isDisabled('#kw-group-prev'), true, 'no group before the first');
    // The rest of the panel is the first plant's, as a file of its own rows: its chosen df and its name in the title.
    assert.equal(await page.textContent('#kw-chosen-df'), `df ${v.groups[0]?.df}`);
    assert.match((await page.textContent('.kw-header h1')) ?? '', /^plant Qn1: uptake against conc$/);
    assert.equal(await page.textContent('#kw-save'), 'Save every group');
    assert.equal(await page.locator('#kw-fold-calibration').count(), 0, 'no calibration section for groups');
    // The overlay: one curve per plant, the shown one last and bold; a title and a description naming it.
    const overlay = await page.$eval('#fig-groups svg', (svg) => ({
      role: svg.getAttribute('role'),
      title: svg.querySelector('title')?.textContent ?? '',
      desc: svg.querySelector('desc')?.textContent ?? '',
      curves: (Array.from(svg.querySelectorAll('path.kw-group-curve')) as { getAttribute(name: string): string | null }[]).map((p) => [p.getAttribute('data-group'), p.getAttribute('class')]),
    }));
    assert.equal(overlay.role, 'img');
    assert.equal(overlay.title, 'The fitted curves of 12 groups by plant, uptake against conc');
    assert.match(overlay.desc, /The curve of plant Qn1 is drawn bold\./);
    assert.equal(overlay.curves.length, 12);
    assert.deepEqual(overlay.curves.at(-1), ['0', 'kw-group-curve kw-group-selected']);
    // The small figures: one button per plant naming it, its svg with a title and a description; the shown one pressed.
    const small = await page.$$eval('#kw-multiples button.kw-small-multiple', (bs) =>
      bs.map((b) => ({
        label: b.getAttribute('aria-label'),
        pressed: b.getAttribute('aria-pressed'),
        role: b.querySelector('svg')?.getAttribute('role'),
        title: b.querySelector('svg title')?.textContent ?? '',
        desc: b.querySelector('svg desc')?.textContent ?? '',
      })),
    );
    assert.equal(small.length, 12);
    for (const [i, s] of small.entries()) {
      const g = v.groups[i];
      assert.ok(g);
      assert.equal(s.label, `Show plant ${g.name}: df ${sig(g.df, 4)}, ${g.rows} rows`);
      assert.equal(s.pressed, i === 0 ? 'true' : 'false');
      assert.equal(s.role, 'img');
      assert.equal(s.title, `plant ${g.name}: uptake against conc, df ${sig(g.df, 4)}`);
      assert.match(s.desc, new RegExp(`^The 7 readings of plant ${g.name} and its fitted curve`));
    }
    assert.equal(await page.textContent('#kw-groups-common'), `One curve for all? ${v.common}`);
    assert.equal(await page.locator('#kw-groups-shared').count(), 0, 'no shared df in this run');
    assert.match((await page.textContent('#kw-groups-save-note')) ?? '', /every group’s table, the summary of all groups and the group record/);
    // The overview sits above the details.
    const order = await page.$$eval('#knotwise-root > *', (es) => es.map((e) => e.id));
    assert.ok(order.indexOf('kw-group-bar') === 0 && order.indexOf('kw-groups') < order.indexOf('kw-fold-residual-checks'), order.join(' '));
    assert.deepEqual(await pp.cspViolations(), []);
    assert.deepEqual(pp.dialogs, []);
    await page.close();
  });

  it('clicking a small figure asks the host for its group; its result shows that group and the focus stays on the figure', async function () {
    const pp = await shown();
    const page = pp.page;
    let mark = pp.sent.length;
    await page.click('#kw-small-button-4');
    assert.deepEqual(await pp.waitForSent('selectGroup', mark), { type: 'selectGroup', setId: SET, group: 4 });
    await answer(pp, mark, 11);
    await page.waitForSelector('#knotwise-root[data-run-id="11"]');
    const g4 = co2.view.groups[4];
    assert.ok(g4);
    assert.equal(await page.inputValue('#kw-group'), '4');
    assert.equal(await page.textContent('#kw-chosen-df'), `df ${g4.df}`);
    assert.equal(await page.getAttribute('#kw-small-button-4', 'aria-pressed'), 'true');
    assert.equal(await page.getAttribute('#kw-small-button-0', 'aria-pressed'), 'false');
    assert.equal(await page.getAttribute('#fig-groups path.kw-group-selected', 'data-group'), '4');
    assert.equal(await page.evaluate('document.activeElement && document.activeElement.id'), 'kw-small-button-4');
    assert.deepEqual((await page.evaluate('window.__knotwiseState()')) as unknown, { file: 'file:///data/co2.csv', runId: 11, rule: co2.payloadFor(4, 11).rule, group: g4.name });
    // The selector and the next button ask the same way, from the keyboard too.
    mark = pp.sent.length;
    await page.focus('#kw-group');
    await page.selectOption('#kw-group', '7');
    assert.equal(await answer(pp, mark, 12), 7);
    await page.waitForSelector('#knotwise-root[data-run-id="12"]');
    assert.equal(await page.evaluate('document.activeElement && document.activeElement.id'), 'kw-group', 'the focus stays on the selector');
    mark = pp.sent.length;
    await page.focus('#kw-group-next');
    await page.keyboard.press('Enter');
    assert.equal(await answer(pp, mark, 13), 8);
    await page.waitForSelector('#knotwise-root[data-run-id="13"]');
    assert.equal(await page.textContent('#kw-group-count'), '9 of 12 groups by plant');
    // Saving a grouped panel asks the host to save (every group).
    mark = pp.sent.length;
    await page.click('#kw-save');
    const save = await pp.waitForSent('save', mark);
    assert.equal(save.type === 'save' && save.runId, 13);
    await page.close();
  });

  it('a group result of another set or out of range is dropped; a broken overview is refused; a single result leaves the group view', async function () {
    const pp = await shown();
    const page = pp.page;
    const g0 = co2.view.groups[0];
    assert.ok(g0);
    for (const m of [
      { type: 'groupResult', setId: SET + 1, group: 2, payload: co2.payloadFor(2, 20) },
      { type: 'groupResult', setId: SET, group: 12, payload: co2.payloadFor(2, 21) },
      { type: 'groupResult', setId: SET, group: -1, payload: co2.payloadFor(2, 22) },
      { type: 'groups', view: { ...co2.view, setId: SET + 5, groups: [] } },
      { type: 'groups', view: { ...co2.view, setId: SET + 5, groups: [{ ...g0, name: 7 }] } },
      { type: 'groups', view: { ...co2.view, setId: SET + 5, onclick: 'alert(1)' } },
      { type: 'groups', view: { ...co2.view, setId: SET - 1 } },
    ])
      await pp.send(m);
    await pp.sendJson(`{"type":"groups","view":${JSON.stringify({ ...co2.view, setId: SET + 6 }).replace('"groups":[{', '"groups":[{"__proto__":{"admin":true},')}}`);
    assert.equal(await page.getAttribute('#knotwise-root', 'data-run-id'), String(SET), 'nothing replaced the view');
    assert.equal(await page.locator('#kw-group option').count(), 12);
    assert.equal(await page.getAttribute('#knotwise-root', 'data-error'), null);
    assert.equal(await page.evaluate('({}).admin'), undefined);
    // A name from the CSV with markup shows as text.
    const hostile = { ...co2.view, setId: SET + 7, groups: co2.view.groups.map((g, i) => (i === 1 ? { ...g, name: '<img src=x onerror=alert(1)>' } : g)) };
    await pp.send({ type: 'groups', view: hostile } satisfies HostMessage);
    await pp.send({ type: 'groupResult', setId: SET + 7, group: 1, payload: co2.payloadFor(1, SET + 7) } satisfies HostMessage);
    await page.waitForSelector(`#knotwise-root[data-run-id="${SET + 7}"]`);
    assert.match((await page.textContent('#kw-group option:nth-child(2)')) ?? '', /^<img src=x onerror=alert\(1\)> · df/);
    assert.equal(await page.locator('#knotwise-root img').count(), 0);
    assert.deepEqual(pp.dialogs, []);
    // A run of the file as one data set: no group parts any more.
    await pp.send({ type: 'result', payload: co2.payloadFor(3, SET + 8) } satisfies HostMessage);
    await page.waitForSelector(`#knotwise-root[data-run-id="${SET + 8}"]`);
    assert.equal(await page.locator('#kw-group-bar').count(), 0);
    assert.equal(await page.locator('#kw-groups').count(), 0);
    assert.equal(await page.textContent('#kw-save'), 'Save table and record');
    await page.close();
  });

  it('1,008 groups: 48 small figures first and a button that shows them all; the overlay draws every curve thin', async function () {
    // The 12 plants 84 times over, each copy under its own name: the view of a file with 1,008 devices.
    const big: GroupsView = { ...co2.view, groups: Array.from({ length: 84 }, (_, k) => co2.view.groups.map((g) => ({ ...g, name: `${g.name}-${k + 1}` }))).flat() };
    const size = JSON.stringify({ type: 'groups', view: big }).length;
    assert.ok(size < 400_000, `the overview message of 1,008 groups of 7 readings has ${size} characters`);
    const pp = await shown({}, big);
    const page = pp.page;
    assert.equal(await page.locator('#kw-multiples button').count(), 48);
    assert.equal(await page.locator('#fig-groups path.kw-group-many').count(), 1007);
    assert.equal(await page.locator('#fig-groups path.kw-group-selected').count(), 1);
    assert.equal(await page.textContent('#kw-groups-all'), 'Show all 1008 groups');
    await page.click('#kw-groups-all');
    await page.waitForFunction('document.querySelectorAll("#kw-multiples button").length === 1008');
    assert.equal(await page.locator('#kw-groups-all').count(), 0);
    assert.equal(await page.evaluate('document.activeElement && document.activeElement.id'), 'kw-small-button-48', 'the focus moves to the first figure shown now');
    // A group beyond the first 48 shown from the selector keeps its small figure in view of the first 48.
    const mark = pp.sent.length;
    await page.selectOption('#kw-group', '500');
    assert.equal(await answer(pp, mark, SET + 1), 500);
    await page.waitForSelector(`#knotwise-root[data-run-id="${SET + 1}"]`);
    assert.equal(await page.getAttribute('#kw-small-button-500', 'aria-pressed'), 'true');
    assert.deepEqual(await pp.cspViolations(), []);
    await page.close();
  });

  for (const theme of ['light', 'dark', 'high-contrast'] as const) {
    for (const width of [1400, 700]) {
      it(`${theme} theme at ${width} px: the group bar first, the overview within the width, the shown group in the theme's colours (test-artifacts/webview-groups-${theme}-${width}.png)`, async function () {
        const pp = await shown({ theme, viewport: { width, height: 900 } });
        const page = pp.page;
        await page.screenshot({ path: join(artifacts, `webview-groups-${theme}-${width}.png`), fullPage: true });
        await page.locator('#kw-groups').screenshot({ path: join(artifacts, `webview-groups-overview-${theme}-${width}.png`) });
        const bar = await page.locator('#kw-group-bar').boundingBox();
        assert.ok(bar && bar.y < 60 && bar.x + bar.width <= width, `the group bar at the top (${JSON.stringify(bar)})`);
        await assertWithinWidth(page, ['#fig-groups', '#kw-multiples', '#kw-small-button-11'], width);
        const colours = await resolvedColours(
          page,
          { blue: 'var(--vscode-charts-blue)', focus: 'var(--vscode-focusBorder)' },
          { selected: ['#fig-groups path.kw-group-selected', 'stroke'], border: ['#kw-small-button-0', 'borderTopColor'] },
        );
        assert.equal(colours.selected, colours.blue, 'the shown group in the theme’s blue');
        assert.equal(colours.border, colours.focus, 'the shown small figure framed in the focus colour');
        assert.deepEqual(await pp.cspViolations(), []);
        await page.close();
      });
    }
  }

  it('no request left 127.0.0.1', function () {
    assert.deepEqual(browser.blocked, []);
  });
});
