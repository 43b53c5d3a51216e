// Whole-editor layer: the real VS Code workbench (code-server 4.100.3) in headless Chromium,
// driven like a person (docs/testing.md, "Whole editor"). Usage: node test/e2e/run.mjs
// Prints "N passed, M failed" last; exit 1 on failure. Installs code-server first if needed.
// With --packaged (the `packaged` layer): builds knotwise-<version>.vsix with `npm run package`,
// installs it into a fresh workbench and runs test/e2e/packaged.test.ts against it.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { runMocha } from '../../scripts/e2e-mocha.mjs';
import { codeServerInstalled, repoRoot } from '../../scripts/e2e-workbench.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const packaged = process.argv.includes('--packaged');
const t0 = Date.now();
let failures = 1;
try {
  if (!codeServerInstalled()) {
    const r = spawnSync('bash', [join(repoRoot, 'scripts', 'e2e-install.sh')], { stdio: 'inherit' });
    if (r.status !== 0) throw new Error('installing code-server failed');
  }
  mkdirSync(join(repoRoot, 'test-artifacts'), { recursive: true });
  if (packaged) {
    const { version } = JSON.parse(readFileSync(join(repoRoot, 'package.json'), 'utf8'));
    const vsix = join(repoRoot, `knotwise-${version}.vsix`);
    const r = spawnSync('npm', ['run', 'package'], { cwd: repoRoot, stdio: 'inherit' });
    if (r.status !== 0 || !existsSync(vsix)) throw new Error('npm run package failed');
    console.log(`packaged layer: knotwise-${version}.vsix, ${(statSync(vsix).size / 1024).toFixed(1)} KB, built in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
    process.env.KNOTWISE_VSIX = vsix;
    failures = await runMocha([join(here, 'packaged.test.ts')], { timeout: 90000, title: 'packaged layer' });
  } else {
    // The same development bundles as npm run build (the packaged layer's minified ones are replaced).
    const built = spawnSync(process.execPath, [join(repoRoot, 'scripts', 'build.mjs')], { cwd: repoRoot, stdio: 'inherit' });
    if (built.status !== 0) throw new Error('the bundles did not build');
    console.log(`whole-editor layer: bundles built in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
    failures = await runMocha([join(here, 'editor.test.ts')], { timeout: 90000, title: 'whole-editor layer' });
  }
} catch (err) {
  console.error(err);
  console.log('0 passed, 1 failed');
}
process.exit(failures > 0 ? 1 : 0);
