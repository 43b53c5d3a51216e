// Bundles the command line, the resampling worker, the VS Code host and the webview with esbuild.
// Type checking is a separate script (npm run typecheck); esbuild only bundles.
import { build } from 'esbuild';
import { existsSync } from 'node:fs';

const common = { bundle: true, sourcemap: true, logLevel: 'warning', target: 'es2022' };
const node = { ...common, platform: 'node', format: 'cjs' };
const jobs = [
  { ...node, entryPoints: ['core/node/cli.ts'], outfile: 'dist/cli.js', banner: { js: '#!/usr/bin/env node' } },
  { ...node, entryPoints: ['core/node/resampleWorker.ts'], outfile: 'dist/resampleWorker.js' },
];
jobs.push({ ...node, entryPoints: ['bench/run.ts'], outfile: 'dist/bench.js' });
if (existsSync('extension/main.ts')) {
  jobs.push({ ...node, entryPoints: ['extension/main.ts'], outfile: 'dist/extension.js', external: ['vscode'] });
}
if (existsSync('webview/main.ts')) {
  jobs.push({ ...common, platform: 'browser', format: 'iife', entryPoints: ['webview/main.ts'], outfile: 'dist/webview/main.js' });
}
await Promise.all(jobs.filter((j) => existsSync(j.entryPoints[0])).map((j) => build(j)));
