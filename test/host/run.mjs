// Extension-host layer: mocha inside the real VS Code extension host (code-server 4.100.3's
// workbench in headless Chromium, docs/testing.md, "Extension host"), loaded through the workbench's
// extensionDevelopmentPath / extensionTestsPath payload.
// Usage: node test/host/run.mjs   (prints "N passed, M failed" last; exit 1 on failure)
import { spawnSync } from 'node:child_process';
import { build } from 'esbuild';
import { copyFileSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { launchChromium, freshRunDir, repoRoot, seconds, startCodeServer } from '../../scripts/e2e-workbench.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const fixtures = join(repoRoot, 'test', 'e2e', 'fixtures');
const t0 = Date.now();
const RESULT_TAG = 'KNOTWISE-HOST-RESULT ';
const TIMEOUT_MS = 240_000;

/** Bundles what the extension host loads: the extension, the resample worker, the panel, the CLI and the test suite. */
/** The product's bundles as npm run build makes them, and the host suite bundled for the extension host. */
async function buildAll() {
  const built = spawnSync(process.execPath, [join(repoRoot, 'scripts', 'build.mjs')], { cwd: repoRoot, stdio: 'inherit' });
  if (built.status !== 0) throw new Error('the bundles did not build');
  await build({
    bundle: true,
    sourcemap: true,
    platform: 'node',
    format: 'cjs',
    target: 'es2022',
    logLevel: 'warning',
    entryPoints: [join(here, 'suite', 'index.ts')],
    outfile: join(repoRoot, 'dist', 'test', 'host', 'index.js'),
    external: ['vscode', 'mocha'],
  });
}

let passed = 0;
let failed = 0;
let server;
let browser;
let runDir;
try {
  await buildAll();
  console.log(`host layer: bundles built in ${seconds(t0)}`);
  runDir = freshRunDir('host');
  const workspace = join(runDir, 'workspace');
  mkdirSync(join(workspace, '.vscode'), { recursive: true });
  for (const f of ['mcycle.csv', 'mcycle-bad.csv', 'cars.csv', 'menarche.csv', 'co2.csv', 'trees.csv']) copyFileSync(join(fixtures, f), join(workspace, f));
  writeFileSync(join(workspace, '.vscode', 'settings.json'), JSON.stringify({ 'knotwise.resampling': 'leave-one-out', 'knotwise.rule': 'least-error', 'knotwise.candidates': '3..15' }, null, 2));
  server = await startCodeServer({ runDir });
  console.log(`host layer: code-server up on port ${server.port} after ${seconds(t0)}`);
  browser = await launchChromium();
  const { page } = browser;
  const exit = new Promise((resolve) => {
    page.exposeFunction('codeAutomationExit', (code) => resolve(Number(code))).catch(() => resolve(1));
  });
  page.on('console', (msg) => {
    const text = msg.text();
    const at = text.indexOf(RESULT_TAG);
    if (at >= 0) {
      const r = JSON.parse(text.slice(at + RESULT_TAG.length));
      passed = r.passes;
      failed = r.failures;
      return;
    }
    // Mocha's reporter lines from the extension host (marked by the suite), echoed as they come.
    const mark = text.indexOf('[knotwise-host] ');
    if (mark >= 0) console.log(text.slice(mark + 16));
  });
  const payload = [
    ['extensionDevelopmentPath', server.remotePath(repoRoot)],
    ['extensionTestsPath', server.remotePath(join(repoRoot, 'dist', 'test', 'host', 'index.js'))],
  ];
  await page.goto(server.workbenchUrl(workspace, payload));
  const code = await Promise.race([exit, new Promise((resolve) => setTimeout(() => resolve('timeout'), TIMEOUT_MS))]);
  if (code === 'timeout') {
    console.log(`host layer: no result within ${TIMEOUT_MS / 1000} s`);
    await page.screenshot({ path: join(repoRoot, 'test-artifacts', 'host-timeout.png') }).catch(() => {});
    failed += 1;
  } else if (code !== 0 && failed === 0) {
    failed = 1;
  }
  if (browser.missedWorker.length) {
    console.log(`host layer: webview resource requests missed the workbench's service worker (aborted, not counted):\n  ${browser.missedWorker.join('\n  ')}`);
  }
  if (browser.blocked.length) {
    console.log(`host layer: requests outside 127.0.0.1 were attempted:\n  ${browser.blocked.join('\n  ')}`);
    failed += 1;
  } else {
    passed += 1;
    console.log('  ✔ no request left 127.0.0.1');
  }
} catch (err) {
  console.error(err);
  if (server) console.error(server.log.join('').slice(-4000));
  failed += 1;
} finally {
  await browser?.close();
  await server?.stop();
  if (runDir && failed === 0) rmSync(runDir, { recursive: true, force: true });
}
console.log(`host layer: ${seconds(t0)}`);
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 ? 1 : 0);
