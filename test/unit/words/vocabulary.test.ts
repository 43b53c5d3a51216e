/**
 * Issue 9's "done when": the command line's help, a fit's summary, its JSON and its review
 * report, and package.json's contributions contain none of the replaced names listed in
 * DEVELOPERS.md ("Words"). Data: datasets::cars (Ezekiel 1930) and MASS::mcycle
 * (Silverman 1985), written by test/e2e/fixtures/make-fixtures.R.
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { copyFixture, REPO, runMain } from '../node/runMain';

/** Replaced names and spellings, each with what replaced it (for the failure message). */
const REPLACED: readonly [RegExp, string][] = [
  [/--family\b/, '--outcome'],
  [/--model\b/, '--curve'],
  [/--resample\b(?!ing)/, '--resampling'],
  [/--huber-k\b/, '--robust-k'],
  [/--nonnegative\b/, '--flag-negative'],
  [/\bboot:/, 'bootstrap:'],
  [/\bcv:\d/, 'folds:'],
  [/(?<![\w-])loo(?![\w-])/, 'leave-one-out'],
  [/\b1se\b/, 'one-se'],
  [/\btol:\d/, 'simplest-within:'],
  [/--rule df:|"df:\d/, 'pick:'],
  [/curveFamily|huberK/, 'knotwise.curve, knotwise.robustK'],
  [/"family"|\bfamily:/, 'curve'],
  [/"(natural|poly|smooth)"|\b(natural|poly|smooth)\|/, 'natural-spline, polynomial, smoothing-spline'],
  [/"(gaussian|poisson|binomial)"|\bgaussian\|/, 'continuous, counts, proportions'],
  [/"lowest"|"rule":\s*"(1se|tolerance|tol:[^"]*|df:[^"]*)"|\blowest\|/, 'least-error, one-se, simplest-within, pick'],
  [/"sigma"|residual standard error/i, 'residual SD'],
  [/null deviance/i, 'deviance explained'],
  [/normal approx\.|normal approx\b(?!imation)/, 'normal approximation'],
  [/\bon \d+ and \d+ df\b/, 'F(d1, d2) = ...'],
];

function assertClean(what: string, text: string): void {
  for (const [pattern, now] of REPLACED) {
    const m = pattern.exec(text);
    assert.equal(m, null, `${what} still says "${m?.[0]}" (now: ${now}): ...${m ? text.slice(Math.max(0, m.index - 60), m.index + 60) : ''}...`);
  }
}

describe('vocabulary (DEVELOPERS.md, "Words")', () => {
  let dir: string;
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'kw-words-'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('the help of every command uses only the new words', async () => {
    for (const argv of [['--help'], ['fit', '--help'], ['check', '--help'], ['demo', '--help']]) {
      const r = await runMain(...argv);
      assert.equal(r.code, 0, `${argv.join(' ')}: ${r.stderr}`);
      assertClean(`knotwise ${argv.join(' ')}`, r.stdout);
    }
  });

  it('a fit summary, its JSON, record and review report use only the new words (tuned, counts and robust runs)', async () => {
    const cars = copyFixture('cars.csv', join(dir, 'cars.csv'));
    const mcycle = copyFixture('mcycle.csv', join(dir, 'mcycle.csv'));
    const runs: string[][] = [
      [cars, '--x', 'speed', '--y', 'dist', '--resampling', 'folds:5', '--rule', 'simplest-within:2', '--flag-negative', '--report', '--emit', 'c,ts,json', '--out', join(dir, 'a')],
      [mcycle, '--x', 'times', '--y', 'accel', '--curve', 'polynomial', '--robust', '--resampling', 'bootstrap:10', '--out', join(dir, 'b'), '--report'],
      [cars, '--x', 'speed', '--y', 'dist', '--outcome', 'counts', '--df', '4', '--out', join(dir, 'c'), '--report'],
      [cars, '--x', 'speed', '--y', 'dist', '--curve', 'smoothing-spline', '--resampling', 'leave-one-out', '--rule', 'least-error', '--out', join(dir, 'd'), '--report'],
    ];
    for (const argv of runs) {
      const text = await runMain('fit', ...argv);
      assert.equal(text.code, 0, text.stderr);
      assertClean(`fit ${argv.join(' ')} (summary)`, text.stdout + text.stderr);
      const plain = argv.slice(0, argv.indexOf('--out')).filter((a, i, all) => a !== '--report' && a !== '--emit' && all[i - 1] !== '--emit');
      const json = await runMain('fit', ...plain, '--print-only', '--json');
      assert.equal(json.code, 0, json.stderr);
      assertClean(`fit --json ${argv.join(' ')}`, json.stdout);
      const out = argv[argv.indexOf('--out') + 1] as string;
      for (const f of readdirSync(out).filter((n) => /\.(json|md|h|ts|csv)$/.test(n))) assertClean(`${f} of ${argv.join(' ')}`, readFileSync(join(out, f), 'utf8'));
    }
  });

  it("package.json's commands, menus and settings (with their package.nls.json texts) use only the new words", () => {
    const pkg = JSON.parse(readFileSync(join(REPO, 'package.json'), 'utf8')) as { contributes: unknown };
    assertClean('package.json contributes', JSON.stringify(pkg.contributes, null, 1));
    // The texts the editor shows for package.json's %key% placeholders.
    assertClean('package.nls.json', readFileSync(join(REPO, 'package.nls.json'), 'utf8'));
  });
});
