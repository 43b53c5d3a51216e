/**
 * Tests of the plan's command line (core/outputs/plan.ts): shell quoting, and the property that
 * matters: the regenerate command written into the record and the generated files, run by
 * a POSIX shell in the output folder, rewrites every output byte for byte. Data:
 * datasets::cars (Ezekiel 1930) from test/e2e/fixtures/cars.csv (make-fixtures.R), in a
 * folder whose name needs quoting.
 */
import { strict as assert } from 'node:assert';
import { execFileSync } from 'node:child_process';
import { chmodSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { DEFAULT_OUTPUT, fitCommand, type FitPlan } from '../../../core/outputs/plan';
import { shellWord } from '../../../core/outputs/shellWord';
import { copyFixture, REPO, runMain } from '../node/runMain';

describe('shellWord', () => {
  it('shellWord leaves plain words alone and single-quotes the rest, escaping quotes', () => {
    assert.equal(shellWord('data/cal-2024.csv'), 'data/cal-2024.csv');
    assert.equal(shellWord('speed [mph]'), "'speed [mph]'");
    assert.equal(shellWord("it's"), `'it'\\''s'`);
    assert.equal(shellWord('$HOME'), "'$HOME'");
    // What a POSIX shell makes of the quoted words (printf '%s\n' prints each argument on a line).
    const words = ['a b', "it's", '$HOME', 'x;rm -rf y', 'tab\there', '*'];
    const printed = execFileSync('sh', ['-c', `printf '%s\\n' ${words.map(shellWord).join(' ')}`], { encoding: 'utf8' });
    assert.deepEqual(printed.split('\n').slice(0, -1), words);
  });
});

describe('fitCommand', () => {
  it('fitCommand spells out a tuned plan and leaves out options at their defaults', () => {
    const plan: FitPlan = {
      columns: { x: 'speed [mph]', y: 'dist' },
      tune: true,
      options: { kind: 'natural-spline', resample: { kind: 'folds', folds: 10, repeats: 5 }, rule: { kind: 'one-se' }, seed: 1 },
      output: DEFAULT_OUTPUT,
    };
    assert.equal(fitCommand(plan, '../cars.csv'), "knotwise fit ../cars.csv --x 'speed [mph]' --y dist --curve natural-spline --resampling folds:10x5 --rule one-se --seed 1 --out .");
    const fixed: FitPlan = {
      columns: { x: 'speed', y: 'dist', weights: 'w' },
      tune: false,
      options: { kind: 'smoothing-spline', candidates: [4.5], resample: { kind: 'gcv' }, rule: { kind: 'least-error' }, seed: 0 },
      output: { grid: { kind: 'auto', tolerance: 0.01 }, extrapolate: true, digits: 6, columns: ['x', 'fit'], flagNegative: true, emit: ['c', 'ts'], report: true },
    };
    assert.equal(
      fitCommand(fixed, 'cars.csv'),
      'knotwise fit cars.csv --x speed --y dist --weights w --curve smoothing-spline --df 4.5 --grid auto:0.01 --extrapolate --digits 6 --columns x,fit --flag-negative --emit c,ts --report --out .',
    );
  });

  it('the regenerate command, run by sh in the output folder, rewrites every output byte for byte', async function () {
    this.timeout(120_000);
    const dir = mkdtempSync(join(tmpdir(), 'knotwise-regen-'));
    try {
      const data = copyFixture('cars.csv', join(dir, "field data (it's here)", 'cars.csv'));
      const out = join(dir, 'tables');
      const r = await runMain(
        'fit',
        data,
        '--x',
        'speed [mph]',
        '--y',
        'dist [ft]',
        '--df',
        '2..6',
        '--resampling',
        'bootstrap:20',
        '--rule',
        'simplest-within:3',
        '--seed',
        '5',
        '--grid',
        'auto:1',
        '--columns',
        'x,fit,piLower,piUpper',
        '--flag-negative',
        '--digits',
        '7',
        '--emit',
        'c,ts,json',
        '--report',
        '--out',
        out,
      );
      assert.equal(r.code, 0, r.stderr);
      const record = JSON.parse(readFileSync(join(out, 'cars.fit.json'), 'utf8')) as { regenerate: string };
      const header = readFileSync(join(out, 'cars.curve.h'), 'utf8');
      assert.ok(header.includes(`*   ${record.regenerate}\n`), 'the header carries the same command');
      const before = new Map(readdirSync(out).map((f) => [f, readFileSync(join(out, f))]));
      for (const f of before.keys()) rmSync(join(out, f));
      // A `knotwise` on PATH that runs this checkout's command line.
      const bin = join(dir, 'bin');
      mkdirSync(bin);
      const tsx = pathToFileURL(join(REPO, 'node_modules', 'tsx', 'dist', 'loader.mjs')).href;
      writeFileSync(join(bin, 'knotwise'), `#!/bin/sh\nexec "${process.execPath}" --import "${tsx}" "${join(REPO, 'core', 'node', 'cli.ts')}" "$@"\n`);
      chmodSync(join(bin, 'knotwise'), 0o755);
      execFileSync('sh', ['-c', record.regenerate], { cwd: out, env: { ...process.env, PATH: `${bin}:${process.env.PATH ?? ''}` }, encoding: 'utf8' });
      const after = readdirSync(out);
      assert.deepEqual(after.sort(), [...before.keys()].sort());
      for (const [f, bytes] of before) assert.ok(readFileSync(join(out, f)).equals(bytes), `${f} is byte-identical`);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('recorded commands run as printed for negative numbers, spaces, quotes, a leading dash and non-ASCII names', async function () {
    this.timeout(300_000);
    // Hostile but legal names and values: each case is fitted, its outputs deleted, and the
    // record's regenerate command run by sh in the output folder must rewrite them byte for byte.
    const cases: { name: string; folder: string; file: string; x: string; y: string; extra: string[] }[] = [
      { name: 'negative grid range (temperatures below zero)', folder: 'neg', file: 'cars.csv', x: 'speed', y: 'dist', extra: ['--grid', '-40:85:count=126', '--extrapolate', '--df', '3'] },
      { name: 'negative grid given as --grid=...', folder: 'negeq', file: 'cars.csv', x: 'speed', y: 'dist', extra: ['--grid=-5:30:step=0.5', '--extrapolate', '--df', '4'] },
      { name: 'spaces and quotes in file and column names', folder: 'run "A" it\'s', file: 'cars \'data\' "v2".csv', x: 'speed [mph]', y: "it's dist", extra: ['--df', '3'] },
      { name: 'non-ASCII names', folder: 'données', file: 'mesures α-β.csv', x: 'vitesse µ', y: 'distance Ω', extra: ['--df', '3'] },
      { name: 'a data file whose name starts with a dash', folder: 'dash', file: '-cars.csv', x: 'speed', y: 'dist', extra: ['--df', '3'] },
    ];
    const root = mkdtempSync(join(tmpdir(), 'knotwise-quote-'));
    try {
      const bin = join(root, 'bin');
      mkdirSync(bin);
      const tsx = pathToFileURL(join(REPO, 'node_modules', 'tsx', 'dist', 'loader.mjs')).href;
      writeFileSync(join(bin, 'knotwise'), `#!/bin/sh\nexec "${process.execPath}" --import "${tsx}" "${join(REPO, 'core', 'node', 'cli.ts')}" "$@"\n`);
      chmodSync(join(bin, 'knotwise'), 0o755);
      const cars = readFileSync(join(REPO, 'test', 'e2e', 'fixtures', 'cars.csv'), 'utf8').split('\n');
      for (const c of cases) {
        const dir = join(root, c.folder);
        mkdirSync(dir, { recursive: true });
        // datasets::cars with the case's column names.
        writeFileSync(join(dir, c.file), [`"${c.x.replace(/"/g, '""')}","${c.y.replace(/"/g, '""')}"`, ...cars.slice(1)].join('\n'));
        const out = join(dir, 'out');
        const r = await runMain('fit', join(dir, c.file), '--x', c.x, '--y', c.y, ...c.extra, '--emit', 'c', '--out', out);
        assert.equal(r.code, 0, `${c.name}: ${r.stderr}`);
        const stem = c.file.replace(/\.csv$/, '');
        const record = JSON.parse(readFileSync(join(out, `${stem}.fit.json`), 'utf8')) as { regenerate: string };
        const header = readFileSync(join(out, `${stem}.curve.h`), 'utf8');
        assert.ok(header.includes(`*   ${record.regenerate}\n`), `${c.name}: the C header carries the recorded command as is`);
        const before = new Map(readdirSync(out).map((f) => [f, readFileSync(join(out, f))]));
        for (const f of before.keys()) rmSync(join(out, f));
        execFileSync('sh', ['-c', record.regenerate], { cwd: out, env: { ...process.env, PATH: `${bin}:${process.env.PATH ?? ''}` }, encoding: 'utf8' });
        for (const [f, bytes] of before) assert.ok(readFileSync(join(out, f)).equals(bytes), `${c.name}: ${f} is byte-identical after running "${record.regenerate}"`);
      }
    } finally {
      rmSync(root, { recursive: true, force: true });
    }
  });
});
