// Renders media/icon.svg (Knotwise's own drawing: readings, the fitted curve and two knots)
// to the 128 x 128 PNG the extension manifest points at, with Debian's Chromium through
// playwright-core. Usage: node scripts/render-icon.mjs (after changing the SVG).
import { readFileSync } from 'node:fs';
import { chromium } from 'playwright-core';

const svg = readFileSync('media/icon.svg', 'utf8');
const browser = await chromium.launch({
  executablePath: process.env.KNOTWISE_CHROMIUM ?? '/usr/bin/chromium',
  headless: true,
  args: ['--no-sandbox', '--disable-gpu'],
});
try {
  const page = await browser.newPage({ viewport: { width: 128, height: 128 } });
  await page.setContent(`<html><body style="margin:0;background:transparent">${svg}</body></html>`);
  await page.locator('svg').screenshot({ path: 'media/icon.png', omitBackground: true });
} finally {
  await browser.close();
}
