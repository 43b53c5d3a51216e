// Webview layer: the real panel HTML, CSP and bundled script in headless Chromium with a
// stubbed host. Usage: node test/webview/run.mjs   (prints "N passed, M failed" last)
import { build } from 'esbuild';
import { mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runMocha } from '../../scripts/e2e-mocha.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..', '..');
const t0 = Date.now();
let failures = 1;
try {
  await build({
    entryPoints: [join(root, 'webview', 'main.ts')],
    outfile: join(root, 'dist', 'webview', 'main.js'),
    bundle: true,
    sourcemap: true,
    target: 'es2022',
    platform: 'browser',
    format: 'iife',
    logLevel: 'warning',
  });
  mkdirSync(join(root, 'test-artifacts'), { recursive: true });
  console.log(`webview bundle built in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  failures = await runMocha([join(here, 'panel.test.ts'), join(here, 'groups.test.ts'), join(here, 'surface.test.ts')], { timeout: 60000, title: 'webview layer' });
} catch (err) {
  console.error(err);
  console.log('0 passed, 1 failed');
}
process.exit(failures > 0 ? 1 : 0);
