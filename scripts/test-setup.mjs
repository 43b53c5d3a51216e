// Installs what the browser test layers need, so `npm test` sets itself up on a fresh
// machine: Debian's chromium (and the tool chain code-server's native addon builds with),
// then code-server's VS Code workbench in the git-ignored .e2e/ (scripts/e2e-install.sh).
// As root it installs with apt-get; otherwise it prints the one command to run and fails.
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

const PACKAGES = ['chromium', 'libkrb5-dev', 'python3', 'make', 'g++'];

const has = (pkg) => spawnSync('dpkg', ['-s', pkg], { stdio: 'ignore' }).status === 0;
const missing = existsSync('/usr/bin/dpkg') ? PACKAGES.filter((p) => !has(p)) : existsSync('/usr/bin/chromium') ? [] : ['chromium'];
if (missing.length > 0) {
  const root = typeof process.getuid === 'function' && process.getuid() === 0;
  if (!root || !existsSync('/usr/bin/apt-get')) {
    console.error(`The browser test layers need Debian packages that are missing. Install them with:\n  sudo apt-get update && sudo apt-get install -y ${missing.join(' ')}`);
    process.exit(1);
  }
  console.log(`Installing ${missing.join(', ')} with apt-get ...`);
  const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
  for (const args of [
    ['update', '-qq'],
    ['install', '-y', '-qq', ...missing],
  ]) {
    const r = spawnSync('apt-get', args, { stdio: 'inherit', env });
    if (r.status !== 0) {
      console.error(`apt-get ${args.join(' ')} failed`);
      process.exit(1);
    }
  }
}
const cs = spawnSync('bash', ['scripts/e2e-install.sh'], { stdio: 'inherit' });
process.exit(cs.status ?? 1);
