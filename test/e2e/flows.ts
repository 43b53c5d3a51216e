/**
 * Steps of the whole-editor layers that more than one test file (or the benchmark's editor
 * part, bench/editor.ts) takes as a person would.
 */
import type { Page } from 'playwright-core';

/**
 * Right-clicks `fileName` in the explorer and chooses Knotwise's Tune entry (or `entry`, e.g.
 * the surface command's). The menu lists the entry once the extension host has registered
 * it, so the right-click is repeated (up to 60 s) until it does.
 */
export async function tuneFromExplorer(page: Page, fileName: string, entry = 'Tune a Curve for This Data'): Promise<void> {
  const row = page.getByRole('treeitem', { name: fileName });
  await row.waitFor({ timeout: 60000 });
  const item = page.locator('.monaco-menu .action-label', { hasText: entry });
  const deadline = Date.now() + 60000;
  for (;;) {
    await row.click({ button: 'right' });
    const shown = await item.waitFor({ timeout: 3000 }).then(
      () => true,
      () => false,
    );
    if (shown) break;
    await page.keyboard.press('Escape');
    if (Date.now() > deadline) throw new Error('the explorer menu never offered Knotwise');
  }
  await item.click();
  // A click that lands while the menu is still settling only highlights the entry; Enter runs it.
  const closed = await item.waitFor({ state: 'hidden', timeout: 1000 }).then(
    () => true,
    () => false,
  );
  if (!closed) await page.keyboard.press('Enter');
}

/**
 * Answers the column picks of a curve that `tuneFromExplorer` (or the command palette)
 * opened for `fileName`, as a person would: types the x column and presses Enter, types the
 * y column and presses Enter, then presses Enter on the weights pick's first entry (no
 * weights). With `xPreview`, first waits for the x pick to show that preview of a column's
 * first values. Resolves with the time (Date.now()) just before the weights pick was
 * accepted: the last pick of a file with no column left for a fourth.
 */
export async function pickCurveColumns(page: Page, fileName: string, x: string, y: string, xPreview?: string): Promise<number> {
  const input = page.locator('.quick-input-widget input.input');
  const title = page.locator('.quick-input-widget .quick-input-title');
  await title.filter({ hasText: `the x column of ${fileName}` }).waitFor();
  if (xPreview !== undefined) await page.locator('.quick-input-widget .monaco-list-row', { hasText: xPreview }).first().waitFor();
  await input.fill(x);
  await page.keyboard.press('Enter');
  await title.filter({ hasText: 'the y column' }).waitFor();
  await input.fill(y);
  await page.keyboard.press('Enter');
  await title.filter({ hasText: 'weights' }).waitFor();
  const accepted = Date.now();
  await page.keyboard.press('Enter');
  return accepted;
}

/**
 * Closes every editor (a Knotwise panel among them) through the command palette, as a
 * person would, and waits until no Curve review tab is left. The workbench takes the
 * keyboard back from a panel first.
 */
export async function closeAllEditors(page: Page): Promise<void> {
  await page.locator('.part.sidebar .title-label').first().click();
  await page.keyboard.press('F1');
  const input = page.locator('.quick-input-widget input.input');
  await input.waitFor();
  await input.fill('>View: Close All Editors');
  await page
    .getByRole('option', { name: /View: Close All Editors/ })
    .first()
    .click();
  await page.locator('.tab', { hasText: 'Curve review' }).first().waitFor({ state: 'detached' });
}
