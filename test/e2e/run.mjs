// Whole-editor layer: the real VS Code workbench (code-server 4.100.3) in headless Chromium,
// driven like a person (docs/testing.md, "Whole editor"). Usage: node test/e2e/run.mjs
// Prints "N passed, M failed" last; exit 1 on failure. Installs code-server first if needed.
import { spawnSync } from 'node:child_process';
import { build } from 'esbuild';
import { mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runMocha } from '../../scripts/e2e-mocha.mjs';
import { codeServerInstalled, repoRoot } from '../../scripts/e2e-workbench.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const t0 = Date.now();
let failures = 1;
try {
  if (!codeServerInstalled()) {
    const r = spawnSync('bash', [join(repoRoot, 'scripts', 'e2e-install.sh')], { stdio: 'inherit' });
    if (r.status !== 0) throw new Error('installing code-server failed');
  }
  const node = { bundle: true, sourcemap: true, platform: 'node', format: 'cjs', target: 'es2022', logLevel: 'warning' };
  await Promise.all([
    build({ ...node, entryPoints: [join(repoRoot, 'extension', 'main.ts')], outfile: join(repoRoot, 'dist', 'extension.js'), external: ['vscode'] }),
    build({ ...node, entryPoints: [join(repoRoot, 'core', 'node', 'resampleWorker.ts')], outfile: join(repoRoot, 'dist', 'resampleWorker.js') }),
    build({ bundle: true, sourcemap: true, platform: 'browser', format: 'iife', target: 'es2022', logLevel: 'warning', entryPoints: [join(repoRoot, 'webview', 'main.ts')], outfile: join(repoRoot, 'dist', 'webview', 'main.js') }),
  ]);
  mkdirSync(join(repoRoot, 'test-artifacts'), { recursive: true });
  console.log(`whole-editor layer: bundles built in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
  failures = await runMocha([join(here, 'editor.test.ts')], { timeout: 90000, title: 'whole-editor layer' });
} catch (err) {
  console.error(err);
  console.log('0 passed, 1 failed');
}
process.exit(failures > 0 ? 1 : 0);
