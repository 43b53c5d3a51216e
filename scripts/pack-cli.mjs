// Packs the command line as an npm package of its own (knotwise-cli-<version>.tgz in the
// project folder): the bundled `dist/cli.js` and its resampling worker, the demo data, the
// README, LICENSE and CHANGELOG. The bundle holds every library it uses, so the package has
// no runtime dependencies to fetch. The VS Code extension is packed separately (npm run package).
import { execFileSync } from 'node:child_process';
import { copyFileSync, mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const root = process.cwd();
const manifest = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));
const stage = join(root, 'dist', 'npm');
rmSync(stage, { recursive: true, force: true });
mkdirSync(join(stage, 'dist'), { recursive: true });
mkdirSync(join(stage, 'examples'), { recursive: true });
for (const f of ['cli.js', 'resampleWorker.js']) copyFileSync(join(root, 'dist', f), join(stage, 'dist', f));
for (const f of ['humidity-sensor.csv', 'fan-temperature-rise.csv', 'defects-per-batch.csv']) copyFileSync(join(root, 'examples', f), join(stage, 'examples', f));
for (const f of ['README.md', 'LICENSE', 'CHANGELOG.md']) copyFileSync(join(root, f), join(stage, f));
const cli = {
  name: 'knotwise-cli',
  version: manifest.version,
  description: 'The knotwise command line: smooth curves and curve tables from measured CSV data, and `knotwise check` for CI.',
  license: manifest.license,
  repository: manifest.repository,
  bin: { knotwise: 'dist/cli.js' },
  files: ['dist/', 'examples/', 'README.md', 'LICENSE', 'CHANGELOG.md'],
  engines: { node: manifest.engines.node },
};
writeFileSync(join(stage, 'package.json'), JSON.stringify(cli, null, 2) + '\n');
const out = execFileSync('npm', ['pack', '--pack-destination', root, '--silent'], { cwd: stage, encoding: 'utf8' }).trim().split('\n').pop();
process.stdout.write(`${out}\n`);
