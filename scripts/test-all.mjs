// Runs every test layer in order and ends with one line "N passed, M failed" over all of them.
// Layers: type check, lint (ESLint, including the import rules of the layers), format check
// (Prettier), build, core unit + external-reference tests (mocha on Node), the webview in
// headless Chromium, the extension inside the real VS Code extension host, and the whole
// editor driven in the browser, and the packaged .vsix installed into that editor. A layer that cannot start, or whose runner file is missing,
// counts as one failure. Usage: node scripts/test-all.mjs [layer ...] runs only those layers.
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

const only = process.argv.slice(2);
let passed = 0;
let failed = 0;

function run(name, cmd, args, parse, always = false) {
  if (!always && only.length && !only.includes(name)) return;
  console.log(`\n=== ${name}: ${cmd} ${args.join(' ')}`);
  const started = Date.now();
  const res = spawnSync(cmd, args, { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'], maxBuffer: 256 * 1024 * 1024 });
  process.stdout.write(res.stdout ?? '');
  process.stderr.write(res.stderr ?? '');
  const counts = parse(res.stdout ?? '', res.status);
  passed += counts.passed;
  failed += counts.failed;
  console.log(`=== ${name}: ${counts.passed} passed, ${counts.failed} failed (${((Date.now() - started) / 1000).toFixed(1)} s)`);
}

/** A step with no test count of its own: one pass or one failure. */
const step = (_out, status) => (status === 0 ? { passed: 1, failed: 0 } : { passed: 0, failed: 1 });

/** mocha's spec reporter: "N passing", "M failing". */
const mochaCounts = (out, status) => {
  const p = /(\d+) passing/.exec(out);
  const f = /(\d+) failing/.exec(out);
  const counts = { passed: p ? Number(p[1]) : 0, failed: f ? Number(f[1]) : 0 };
  if (status !== 0 && counts.failed === 0) counts.failed = 1;
  return counts;
};

/** Layers that print their own "N passed, M failed" line last. */
const layerCounts = (out, status) => {
  const all = [...out.matchAll(/^(\d+) passed, (\d+) failed/gm)];
  const last = all[all.length - 1];
  const counts = last ? { passed: Number(last[1]), failed: Number(last[2]) } : { passed: 0, failed: 1 };
  if (status !== 0 && counts.failed === 0) counts.failed = 1;
  return counts;
};

/** A layer whose runner file is missing fails: a renamed or deleted runner must not pass silently. */
function missing(name, file) {
  if (only.length && !only.includes(name)) return;
  console.log(`\n=== ${name}: runner ${file} is missing`);
  failed += 1;
  console.log(`=== ${name}: 0 passed, 1 failed`);
}

// The browser layers install what they need first (chromium, the VS Code workbench).
const BROWSER_LAYERS = ['webview', 'host', 'editor', 'packaged'];
const setupNeeded = only.length === 0 || only.some((l) => BROWSER_LAYERS.includes(l)) || only.includes('setup');

const npx = 'npx';
const runners = [
  ['webview', 'test/webview/run.mjs'],
  ['host', 'test/host/run.mjs'],
  ['editor', 'test/e2e/run.mjs'],
  // The .vsix built by `npm run package`, installed into the workbench (test/e2e/run.mjs --packaged).
  ['packaged', 'test/e2e/run.mjs', '--packaged'],
];
const layers = ['typecheck', 'typecheck-webview', 'lint', 'format', 'build', 'core', 'setup', ...runners.map(([name]) => name)];
for (const name of only.filter((n) => !layers.includes(n))) {
  console.log(`\n=== ${name}: no such layer (layers: ${layers.join(', ')})`);
  failed += 1;
}
run('typecheck', npx, ['tsc', '-p', 'tsconfig.json', '--noEmit'], step);
run('typecheck-webview', npx, ['tsc', '-p', 'webview/tsconfig.json', '--noEmit'], step);
run('lint', npx, ['eslint', '.'], step);
run('format', npx, ['prettier', '--check', '.'], step);
run('build', process.execPath, ['scripts/build.mjs'], step);
run('core', npx, ['mocha', 'test/unit/**/*.test.ts', 'test/reference/**/*.test.ts'], mochaCounts);
if (setupNeeded) run('setup', process.execPath, ['scripts/test-setup.mjs'], step, true);
for (const [name, file, ...flags] of runners) {
  if (existsSync(file)) run(name, process.execPath, [file, ...flags], layerCounts);
  else missing(name, file);
}
console.log(`\n${passed} passed, ${failed} failed`);
process.exitCode = failed === 0 ? 0 : 1;
