/**
 * The command line as a package (issue 13): the packed tarball installs into an empty folder
 * without fetching anything (the bundle holds its libraries), and `npx knotwise` runs there:
 * the demo writes its outputs and `knotwise check` finds them current. The demo data are
 * invented (examples/generate.ts).
 */
import { strict as assert } from 'node:assert';
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { REPO } from '../node/runMain';

describe('command-line package (npm pack)', function () {
  this.timeout(300_000);
  let dir: string;
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'kw-pack-'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('installs from the tarball into an empty folder with no dependencies, and npx knotwise demo and check work there', () => {
    execFileSync(process.execPath, ['scripts/build.mjs'], { cwd: REPO, stdio: 'pipe' });
    const name = execFileSync(process.execPath, ['scripts/pack-cli.mjs'], { cwd: REPO, encoding: 'utf8' }).trim();
    const tarball = join(REPO, name);
    try {
      const project = join(dir, 'project');
      execFileSync('mkdir', ['-p', project]);
      writeFileSync(join(project, 'package.json'), JSON.stringify({ name: 'uses-knotwise', version: '1.0.0', private: true }));
      // --offline: nothing may be fetched; the package must carry everything it runs.
      const install = spawnSync('npm', ['install', '--offline', '--no-audit', '--no-fund', '--save-dev', '--save-exact', tarball], { cwd: project, encoding: 'utf8' });
      assert.equal(install.status, 0, install.stderr);
      const installed = readdirSync(join(project, 'node_modules')).filter((n) => !n.startsWith('.'));
      assert.deepEqual(installed, ['knotwise-cli'], 'no dependency besides the package itself');
      const version = spawnSync('npx', ['--no-install', 'knotwise', '--version'], { cwd: project, encoding: 'utf8' });
      assert.equal(version.status, 0, version.stderr);
      const demo = spawnSync('npx', ['--no-install', 'knotwise', 'demo', '--out', 'tables'], { cwd: project, encoding: 'utf8' });
      assert.equal(demo.status, 0, demo.stderr);
      const check = spawnSync('npx', ['--no-install', 'knotwise', 'check', 'tables'], { cwd: project, encoding: 'utf8' });
      assert.equal(check.status, 0, check.stdout + check.stderr);
      assert.match(check.stdout, /current/);
    } finally {
      rmSync(tarball, { force: true });
    }
  });
});
