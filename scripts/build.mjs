// Bundles the command line, the resampling worker, the VS Code host and the webview with esbuild.
// Type checking is a separate script (npm run typecheck); esbuild only bundles.
// `node scripts/build.mjs --package` (the `vscode:prepublish` script, run by `npm run package`)
// builds only what the extension loads at run time (the host, the resampling worker it spawns
// and the webview), minified and without source maps, for the .vsix.
import { build } from 'esbuild';
import { existsSync, rmSync } from 'node:fs';

const forPackage = process.argv.includes('--package');
const common = forPackage ? { bundle: true, sourcemap: false, minify: true, logLevel: 'warning', target: 'es2022' } : { bundle: true, sourcemap: true, logLevel: 'warning', target: 'es2022' };
// ml-matrix's package entry wraps one CommonJS file, which esbuild cannot tree-shake; its ES
// module source (the package's `module` field) lets the bundles keep only the classes used.
const node = { ...common, platform: 'node', format: 'cjs', alias: { 'ml-matrix': './node_modules/ml-matrix/src/index.js' } };
const jobs = [{ ...node, entryPoints: ['core/node/resampleWorker.ts'], outfile: 'dist/resampleWorker.js' }];
if (!forPackage) {
  jobs.push({ ...node, entryPoints: ['core/node/cli.ts'], outfile: 'dist/cli.js', banner: { js: '#!/usr/bin/env node' } });
  jobs.push({ ...node, entryPoints: ['bench/run.ts'], outfile: 'dist/bench.js' });
}
if (existsSync('extension/main.ts')) {
  jobs.push({ ...node, entryPoints: ['extension/main.ts'], outfile: 'dist/extension.js', external: ['vscode'] });
}
if (existsSync('webview/main.ts')) {
  jobs.push({ ...common, platform: 'browser', format: 'iife', entryPoints: ['webview/main.ts'], outfile: 'dist/webview/main.js' });
}
if (forPackage) {
  // Source maps of an earlier development build would no longer match the minified files.
  for (const f of ['dist/extension.js.map', 'dist/resampleWorker.js.map', 'dist/webview/main.js.map', 'dist/webview/main.css.map']) {
    rmSync(f, { force: true });
  }
}
await Promise.all(jobs.filter((j) => existsSync(j.entryPoints[0])).map((j) => build(j)));
