/**
 * Steps of the whole-editor layers that more than one test file takes as a person would.
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
