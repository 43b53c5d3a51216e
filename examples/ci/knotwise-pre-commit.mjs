#!/usr/bin/env node
// Git pre-commit hook for repositories that commit Knotwise curve tables: runs
// `knotwise check` on the STAGED content (what the commit will hold, not the working tree)
// for every fit record whose data file, outputs or record is part of the commit, and refuses
// the commit when a table no longer matches its data.
//
// Install: copy this file and `pre-commit` beside it into .git/hooks/ (or point
// core.hooksPath at a folder holding them). The command that runs Knotwise is
// `npx --no-install knotwise` (Knotwise as a pinned development dependency); set KNOTWISE to
// another command if needed, e.g. KNOTWISE="node tools/knotwise/cli.js".
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, posix } from 'node:path';

const git = (...args) => {
  const r = spawnSync('git', args, { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`git ${args.join(' ')}: ${r.stderr}`);
  return r.stdout;
};

const staged = new Set(git('diff', '--cached', '--name-only', '--diff-filter=ACMRD', '-z').split('\0').filter(Boolean));
if (staged.size === 0) process.exit(0);

// The staged tree, exactly as the commit will record it.
const root = mkdtempSync(join(tmpdir(), 'knotwise-staged-'));
let code = 0;
try {
  git('checkout-index', '--all', '--force', `--prefix=${root}/`);
  // Records in the staged tree, and the files each one covers (data, table, other outputs).
  const records = [];
  const walk = (dir, rel) => {
    for (const e of readdirSync(dir, { withFileTypes: true })) {
      if (e.name === 'node_modules' || e.name.startsWith('.')) continue;
      const r = rel ? `${rel}/${e.name}` : e.name;
      if (e.isDirectory()) walk(join(dir, e.name), r);
      else if (e.name.endsWith('.fit.json')) records.push(r);
    }
  };
  walk(root, '');
  const affected = records.filter((rec) => {
    if (staged.has(rec)) return true;
    let json;
    try {
      json = JSON.parse(readFileSync(join(root, rec), 'utf8'));
    } catch {
      return true; // A record that cannot be read is checked, and check says why.
    }
    const folder = posix.dirname(rec);
    const covered = [json?.data?.path, json?.table?.file, ...(Array.isArray(json?.outputs) ? json.outputs.map((o) => o?.file) : [])].filter((f) => typeof f === 'string');
    return covered.some((f) => staged.has(posix.normalize(posix.join(folder, f))));
  });
  if (affected.length === 0) process.exit(0);
  const command = (process.env.KNOTWISE ?? 'npx --no-install knotwise').split(' ').filter(Boolean);
  const r = spawnSync(command[0], [...command.slice(1), 'check', ...affected], { cwd: root, stdio: 'inherit' });
  if (r.status !== 0) {
    process.stderr.write(
      `\nknotwise pre-commit: the staged curve tables above do not match their staged data.\n` +
        `Run the "to update" command in each table's folder, stage the updated files with git add, and commit again.\n`,
    );
    code = 1;
  }
} finally {
  rmSync(root, { recursive: true, force: true });
}
process.exit(code);
