/**
 * The CI recipe of examples/ci/ (issue 13): in a temporary git repository, the pre-commit
 * hook refuses a commit whose staged data no longer match the staged curve table, saying
 * what to run, checks the staged content rather than the working tree, and lets a fresh
 * table through. The workflow file is checked for the command it runs. Data:
 * datasets::cars (Ezekiel 1930) from test/e2e/fixtures/cars.csv.
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { chmodSync, copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { REPO } from '../node/runMain';

describe('CI recipe (examples/ci)', function () {
  this.timeout(180_000);
  let repo: string;
  let env: NodeJS.ProcessEnv;
  const run = (cmd: string, args: string[], cwd = repo) => spawnSync(cmd, args, { cwd, env, encoding: 'utf8' });
  const git = (...args: string[]) => {
    const r = run('git', args);
    return r;
  };

  before(() => {
    repo = mkdtempSync(join(tmpdir(), 'kw-hook-'));
    // A `knotwise` command that runs this checkout's command line (as an installed package would).
    const bin = join(repo, '..', `${repo.split('/').pop()}-bin`);
    mkdirSync(bin, { recursive: true });
    const tsx = pathToFileURL(join(REPO, 'node_modules', 'tsx', 'dist', 'loader.mjs')).href;
    writeFileSync(join(bin, 'knotwise'), `#!/bin/sh\nexec "${process.execPath}" --import "${tsx}" "${join(REPO, 'core', 'node', 'cli.ts')}" "$@"\n`);
    chmodSync(join(bin, 'knotwise'), 0o755);
    env = {
      ...process.env,
      KNOTWISE: join(bin, 'knotwise'),
      PATH: `${bin}:${process.env.PATH ?? ''}`,
      GIT_AUTHOR_NAME: 't',
      GIT_AUTHOR_EMAIL: 't@example.invalid',
      GIT_COMMITTER_NAME: 't',
      GIT_COMMITTER_EMAIL: 't@example.invalid',
    };
    assert.equal(git('init', '-q', '-b', 'main').status, 0);
    mkdirSync(join(repo, 'cal'));
    copyFileSync(join(REPO, 'test', 'e2e', 'fixtures', 'cars.csv'), join(repo, 'cal', 'cars.csv'));
    for (const f of ['pre-commit', 'knotwise-pre-commit.mjs']) {
      copyFileSync(join(REPO, 'examples', 'ci', f), join(repo, '.git', 'hooks', f));
      chmodSync(join(repo, '.git', 'hooks', f), 0o755);
    }
  });
  after(() => {
    rmSync(repo, { recursive: true, force: true });
    rmSync(`${repo}-bin`, { recursive: true, force: true });
  });

  it('a fresh table passes the hook and is committed', () => {
    const fit = run(env.KNOTWISE as string, ['fit', 'cars.csv', '--x', 'speed', '--y', 'dist', '--df', '2..6', '--resampling', 'folds:5'], join(repo, 'cal'));
    assert.equal(fit.status, 0, fit.stderr);
    git('add', '-A');
    const c = git('commit', '-q', '-m', 'calibration');
    assert.equal(c.status, 0, c.stderr + c.stdout);
  });

  it('a commit with changed data but the old table is refused, with what to run', () => {
    const data = join(repo, 'cal', 'cars.csv');
    writeFileSync(data, readFileSync(data, 'utf8').replace(/\n4,2\n/, '\n4,3\n'));
    git('add', 'cal/cars.csv');
    const c = git('commit', '-q', '-m', 'new readings');
    assert.notEqual(c.status, 0, 'the commit is refused');
    assert.match(c.stdout + c.stderr, /to update:.*knotwise fit cars\.csv/s);
    assert.match(c.stderr, /do not match their staged data/);
  });

  it('the hook checks the staged content: the same change left unstaged does not block another commit', () => {
    git('reset', '-q', 'cal/cars.csv');
    writeFileSync(join(repo, 'notes.txt'), 'unrelated\n');
    git('add', 'notes.txt');
    const c = git('commit', '-q', '-m', 'notes');
    assert.equal(c.status, 0, c.stderr + c.stdout);
  });

  it('after running the update and staging it, the commit passes', () => {
    const fit = run(env.KNOTWISE as string, ['fit', 'cars.csv', '--x', 'speed', '--y', 'dist', '--df', '2..6', '--resampling', 'folds:5'], join(repo, 'cal'));
    assert.equal(fit.status, 0, fit.stderr);
    git('add', '-A');
    const c = git('commit', '-q', '-m', 'new readings and table');
    assert.equal(c.status, 0, c.stderr + c.stdout);
    assert.equal(run(env.KNOTWISE as string, ['check']).status, 0);
  });

  it('the workflow installs the pinned dependency and runs the check', () => {
    const yml = readFileSync(join(REPO, 'examples', 'ci', 'curve-tables.yml'), 'utf8');
    assert.match(yml, /run: npm ci/);
    assert.match(yml, /run: npx --no-install knotwise check/);
  });
});
