/**
 * Surfaces on the command line (issue 17): `fit --x <u> --x2 <v> --y <y>` writes the 2-D
 * table, code, report and surface record; the table's fit and bands at the nodes equal R's
 * (R 4.2 stats::lm on the row-wise product of splines::ns bases, with predict(..., se.fit =
 * TRUE) and its t intervals: fixture test/reference/fixtures/surface.json from
 * test/reference/r/surface.R, datasets::trees and datasets::airquality); `check` finds the
 * outputs current and then a changed byte of the table or the data; options of curves that
 * do not apply are refused; the emitted C header compiles (gcc -fsyntax-only) and the
 * TypeScript module and JSON evaluate to the table's numbers.
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { appendFileSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runInNewContext } from 'node:vm';
import ts from 'typescript';
import { REPO, runCheckIn, runMain } from './runMain';

interface Dataset {
  readonly uName: string;
  readonly vName: string;
  readonly yName: string;
  readonly u: number[];
  readonly v: number[];
  readonly y: number[];
  readonly w: number[] | null;
}
interface Case {
  readonly dataset: string;
  readonly dfU: number;
  readonly dfV: number;
  readonly pointsU: number[];
  readonly pointsV: number[];
  readonly predFit: number[];
  readonly predSe: number[];
  readonly ciLower: number[];
  readonly ciUpper: number[];
  readonly piLower: number[];
  readonly piUpper: number[];
}
const FIXTURE = JSON.parse(readFileSync(join(REPO, 'test', 'reference', 'fixtures', 'surface.json'), 'utf8')) as { datasets: Record<string, Dataset>; cases: Case[] };
const HAS_GCC = spawnSync('gcc', ['--version']).status === 0;

/** The fixture's data set as a CSV (full precision). */
function writeDataset(dir: string, name: string): string {
  const d = FIXTURE.datasets[name] as Dataset;
  const w = d.w;
  const lines = [`${d.uName},${d.vName},${d.yName}${w ? ',w' : ''}`, ...d.u.map((x, i) => `${x},${d.v[i]},${d.y[i]}${w ? `,${w[i]}` : ''}`)];
  const file = join(dir, `${name}.csv`);
  writeFileSync(file, lines.join('\n') + '\n');
  return file;
}

/** The CSV rows of a surface table, as numbers, keyed by "x,x2". */
function tableRows(text: string): { columns: string[]; rows: Map<string, number[]> } {
  const [head, ...body] = text.trim().split('\n');
  const rows = new Map<string, number[]>();
  for (const line of body) {
    const cells = line.split(',');
    rows.set(`${Number(cells[0])},${Number(cells[1])}`, cells.map(Number));
  }
  return { columns: (head as string).split(','), rows };
}

function close(what: string, got: number, want: number, rel: number): void {
  assert.ok(Math.abs(got - want) <= rel * Math.max(1, Math.abs(want)), `${what}: ${got} vs ${want}`);
}

describe('surfaces on the command line', function () {
  this.timeout(120_000);
  let dir: string;
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'kw-surface-'));
  });
  afterEach(() => rmSync(dir, { recursive: true, force: true }));

  for (const name of ['trees', 'airquality', 'airquality_w', 'trees_w']) {
    it(`writes a table whose fit, SE and 95 % bands at the nodes equal R's (${name})`, async () => {
      const c = FIXTURE.cases.find((k) => k.dataset === name && k.dfU >= 3 && k.dfV >= 2) as Case;
      const d = FIXTURE.datasets[name] as Dataset;
      const file = writeDataset(dir, name);
      // The fixture's prediction points as the node lists (17 digits, so the nodes are R's points exactly).
      const list = (xs: number[]): string => [...new Set(xs)].join(',');
      const weights = d.w ? ['--weights', 'w'] : [];
      const r = await runMain(
        'fit',
        file,
        '--x',
        d.uName,
        '--x2',
        d.vName,
        '--y',
        d.yName,
        ...weights,
        '--df',
        `${c.dfU}x${c.dfV}`,
        '--grid',
        list(c.pointsU),
        '--grid2',
        list(c.pointsV),
        '--extrapolate',
        '--digits',
        '17',
        '--quiet',
      );
      assert.equal(r.code, 0, r.stderr);
      const t = tableRows(readFileSync(join(dir, `${name}.surface.csv`), 'utf8'));
      assert.deepEqual(t.columns, ['x', 'x2', 'fit', 'se', 'ciLower', 'ciUpper', 'piLower', 'piUpper', 'outside', 'far']);
      c.pointsU.forEach((u, k) => {
        const row = t.rows.get(`${u},${c.pointsV[k]}`);
        assert.ok(row, `node ${u}, ${c.pointsV[k]}`);
        const want = [c.predFit[k], c.predSe[k], c.ciLower[k], c.ciUpper[k], c.piLower[k], c.piUpper[k]] as number[];
        want.forEach((w, j) => close(`${t.columns[j + 2]} at point ${k}`, row[j + 2] as number, w, 1e-9));
      });
    });
  }

  it('tunes, writes table, code, report and record, and check finds them current, then a changed table byte and changed data', async () => {
    const file = writeDataset(dir, 'trees');
    const r = await runMain('fit', file, '--x', 'Girth', '--x2', 'Height', '--y', 'Volume', '--df', '1..3', '--resampling', 'folds:5', '--extrapolate', '--emit', 'c,ts,json', '--report');
    assert.equal(r.code, 0, r.stderr);
    assert.match(r.stdout, /Mean RMSE by df of Girth \(rows\) and df of Height \(columns\)/);
    assert.match(r.stdout, /The simplest pair at or under it is df \d × \d/);
    const rec = JSON.parse(readFileSync(join(dir, 'trees.surface.fit.json'), 'utf8')) as Record<string, unknown> & { outputs: { file: string }[]; choice: { df: { x: number; x2: number } } };
    assert.equal(rec.format, 'knotwise-surface-record');
    assert.deepEqual(
      rec.outputs.map((o) => o.file),
      ['trees.surface.csv', 'trees.surface.h', 'trees.surface.ts', 'trees.surface.json', 'trees.surface.report.md', 'trees.surface.heat.svg'],
    );
    const report = readFileSync(join(dir, 'trees.surface.report.md'), 'utf8');
    assert.match(report, /## The choice/);
    assert.match(report, /!\[.*\]\(trees\.surface\.heat\.svg\)/);
    assert.match(readFileSync(join(dir, 'trees.surface.heat.svg'), 'utf8'), /kw-uncovered/);
    // The caution names the surface, in the record, the report, the C header and the terminal.
    const caution = /This surface is an empirical fit to the readings shown, not a certified calibration\./;
    assert.match(String(rec.caution), caution);
    for (const f of ['trees.surface.report.md', 'trees.surface.h']) assert.match(readFileSync(join(dir, f), 'utf8').replace(/\n \* /g, ' '), caution, f);
    assert.match(r.stdout, /Caution: This surface is/);
    let c = await runCheckIn(dir);
    assert.equal(c.code, 0, c.stdout + c.stderr);
    assert.match(c.stdout, /current\s+trees\.surface\.fit\.json/);
    // A changed byte of the table.
    const tablePath = join(dir, 'trees.surface.csv');
    const table = readFileSync(tablePath, 'utf8');
    writeFileSync(
      tablePath,
      table.replace(/\n(\d)/, (_m, d: string) => `\n${(Number(d) + 1) % 10}`),
    );
    c = await runCheckIn(dir);
    assert.equal(c.code, 1, c.stdout);
    assert.match(c.stdout, /trees\.surface\.csv/);
    writeFileSync(tablePath, table);
    // Changed data.
    appendFileSync(file, '15,80,40\n');
    c = await runCheckIn(dir);
    assert.equal(c.code, 1, c.stdout);
    assert.match(c.stdout, /data "?trees\.csv"? changed: SHA-256 was [0-9a-f]{16}\.\.\., now [0-9a-f]{16}\.\.\.; rows used 31, now 32/);
    assert.match(
      c.stdout,
      /to update: knotwise fit trees\.csv --x Girth --x2 Height --y Volume --df 1\.\.3x1\.\.3 --resampling folds:5 --rule one-se --seed 1 --extrapolate --emit c,ts,json --report --out \./,
    );
  });

  it('check names the key at fault in a surface record it cannot read', async () => {
    const file = writeDataset(dir, 'trees');
    const r = await runMain('fit', file, '--x', 'Girth', '--x2', 'Height', '--y', 'Volume', '--df', '2x2', '--extrapolate', '--quiet');
    assert.equal(r.code, 0, r.stderr);
    const path = join(dir, 'trees.surface.fit.json');
    const rec = JSON.parse(readFileSync(path, 'utf8')) as { spec: Record<string, unknown>; version: number };
    rec.spec.reach = 'wide';
    writeFileSync(path, JSON.stringify(rec, null, 2) + '\n');
    let c = await runCheckIn(dir);
    assert.equal(c.code, 2, c.stdout);
    assert.match(c.stdout, /surface record: "spec\.reach" must be a number/);
    rec.spec.reach = 0.25;
    rec.version = 99;
    writeFileSync(path, JSON.stringify(rec, null, 2) + '\n');
    c = await runCheckIn(dir);
    assert.equal(c.code, 2, c.stdout);
    assert.match(c.stdout, /surface record version 99; this Knotwise reads version 1/);
  });

  it('emits a C header that compiles and a TypeScript module and JSON that hold the table', async function () {
    const file = writeDataset(dir, 'trees');
    const r = await runMain(
      'fit',
      file,
      '--x',
      'Girth',
      '--x2',
      'Height',
      '--y',
      'Volume',
      '--df',
      '3x2',
      '--grid',
      '8.3:20.6:count=5',
      '--grid2',
      '63:87:count=4',
      '--extrapolate',
      '--emit',
      'c,ts,json',
    );
    assert.equal(r.code, 0, r.stderr);
    const t = tableRows(readFileSync(join(dir, 'trees.surface.csv'), 'utf8'));
    const rows = [...t.rows.values()];
    // TypeScript: transpiled by the TypeScript compiler and evaluated; fit[i][j] is row i * 4 + j.
    const src = readFileSync(join(dir, 'trees.surface.ts'), 'utf8');
    const js = ts.transpileModule(src, { compilerOptions: { module: ts.ModuleKind.CommonJS, strict: true } }).outputText;
    const mod = { exports: {} as Record<string, unknown> };
    runInNewContext(js, { module: mod, exports: mod.exports });
    const m = mod.exports as { x: number[]; x2: number[]; fit: number[][]; outside: number[][] };
    assert.equal(m.x.length, 5);
    assert.equal(m.x2.length, 4);
    rows.forEach((row, k) => {
      assert.equal(m.fit[Math.floor(k / 4)]?.[k % 4], row[2]);
      assert.equal(m.outside[Math.floor(k / 4)]?.[k % 4], row[8]);
    });
    const json = JSON.parse(readFileSync(join(dir, 'trees.surface.json'), 'utf8')) as { x: number[]; columns: { fit: number[][]; far: number[][] } };
    rows.forEach((row, k) => {
      assert.equal(json.columns.fit[Math.floor(k / 4)]?.[k % 4], row[2]);
      assert.equal(json.columns.far[Math.floor(k / 4)]?.[k % 4], row[9]);
    });
    if (!HAS_GCC) return this.skip();
    const main = join(dir, 'main.c');
    writeFileSync(
      main,
      '#include "trees.surface.h"\nint main(void) { return (int)(trees_surface_fit[TREES_SURFACE_X_LENGTH - 1][TREES_SURFACE_X2_LENGTH - 1] * 0.0) + trees_surface_outside[0][0] * 0; }\n',
    );
    const cc = spawnSync('gcc', ['-std=c99', '-pedantic', '-Wall', '-Wextra', '-Werror', '-fsyntax-only', main], { cwd: dir, encoding: 'utf8' });
    assert.equal(cc.status, 0, cc.stderr);
  });

  it('refuses nodes the readings do not reach without --extrapolate, naming how many', async () => {
    const file = writeDataset(dir, 'trees');
    const r = await runMain('fit', file, '--x', 'Girth', '--x2', 'Height', '--y', 'Volume', '--df', '2x2');
    assert.equal(r.code, 2);
    assert.match(r.stderr, /trees\.csv: \d+ of 441 table nodes lie where the readings do not reach .*--extrapolate/);
  });

  it('refuses the options of curves that do not apply to surfaces, and surface options without --x2', async () => {
    const file = writeDataset(dir, 'trees');
    const base = ['fit', file, '--x', 'Girth', '--x2', 'Height', '--y', 'Volume'];
    for (const [extra, message] of [
      [['--shape', 'increasing'], /--shape does not apply to a surface of two inputs \(--x2\)/],
      [['--outcome', 'counts'], /--outcome does not apply/],
      [['--per', 'Girth'], /--per does not apply/],
      [['--inverse'], /--inverse does not apply/],
      [['--holdout', '0.2'], /--holdout does not apply/],
      [['--curve', 'polynomial'], /--curve polynomial: a surface of two inputs/],
      [['--rule', 'pick:3'], /pick:<df of --x>x<df of --x2>/],
      [['--df', '2x3x4'], /<list>x<list>/],
      [['--reach', '5'], /--reach must be a number from/],
    ] as const) {
      const r = await runMain(...base, ...extra);
      assert.equal(r.code, 2, extra.join(' '));
      assert.match(r.stderr, message);
    }
    const r = await runMain('fit', file, '--x', 'Girth', '--y', 'Volume', '--grid2', '60:80:count=3');
    assert.equal(r.code, 2);
    assert.match(r.stderr, /--grid2 is for surfaces of two inputs/);
  });
});
