/**
 * The kill test of crash-safe outputs (core/outputs/commit.ts, docs/design.md "Outputs"): a
 * real child process runs the command line (`knotwise fit`, this checkout's core/node/cli.ts
 * bundled by esbuild into a temporary folder, as scripts/build.mjs does) and is killed with
 * SIGKILL at seeded random moments while it writes: a rewrite of existing outputs from
 * changed data, and a first write into an empty folder. After each kill the folder must hold
 * exactly the old set, exactly the new set, or a state with a commit marker whose files are
 * each old or new; then a rerun without --force (the same command line, run in this
 * process) must succeed, leave exactly the new set and no temporary file, and `knotwise
 * check` must pass.
 *
 * The moments: the test watches the output folder and, once the child's first temporary
 * file appears (the write phase has begun), waits a random delay drawn from a seeded
 * generator between 0 and 1.5 times the write phase measured on uncut runs (the median of
 * three, each from the first temporary file to the last change of the folder, the marker's
 * removal), so kills land throughout the write phase and some just after it. The grid is large (8,000 points, with
 * C, TypeScript and JSON code: about 3 MB) so that writing takes a moment.
 * Data: datasets::cars (Ezekiel 1930) from test/e2e/fixtures/cars.csv (make-fixtures.R),
 * and the same rows without every fifth one as the changed data.
 */
import { build } from 'esbuild';
import { strict as assert } from 'node:assert';
import { spawn } from 'node:child_process';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, watch, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseMarkerName, parseTempName } from '../../../core/outputs/commit';
import { copyFixture, REPO, runMain } from './runMain';

/** Kills per series (a rewrite, a first write). */
const KILLS = 20;
/** Seed of the kill moments. */
const SEED = 10_04;

/** mulberry32: a small seeded generator of uniform numbers in [0, 1). */
function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Every file of a folder with its bytes. */
function snapshot(dir: string): Map<string, Buffer> {
  return new Map(readdirSync(dir).map((f) => [f, readFileSync(join(dir, f))]));
}

/**
 * How a folder relates to an old and a new set of outputs: 'old' or 'new' (exactly that
 * set), 'mixed' (each file old or new), with '+marker' and '+temp' when a commit marker or
 * temporary files are there too; 'broken: ...' for anything else.
 */
function classify(dir: string, oldSet: ReadonlyMap<string, Buffer>, newSet: ReadonlyMap<string, Buffer>): string {
  const snap = snapshot(dir);
  const names = [...snap.keys()];
  const temps = names.filter((n) => parseTempName(n) !== undefined);
  const marker = names.some((n) => parseMarkerName(n) !== undefined);
  const outputs = names.filter((n) => parseTempName(n) === undefined && parseMarkerName(n) === undefined);
  const same = (set: ReadonlyMap<string, Buffer>): boolean => outputs.length === set.size && outputs.every((n) => set.get(n)?.equals(snap.get(n) as Buffer) === true);
  const tail = `${marker ? '+marker' : ''}${temps.length ? '+temp' : ''}`;
  if (same(oldSet)) return `old${tail}`;
  if (same(newSet)) return `new${tail}`;
  const each = outputs.every((n) => oldSet.get(n)?.equals(snap.get(n) as Buffer) === true || newSet.get(n)?.equals(snap.get(n) as Buffer) === true);
  return each && marker
    ? `mixed${tail}`
    : `broken: ${names.map((n) => `${n}=${oldSet.get(n)?.equals(snap.get(n) as Buffer) ? 'old' : newSet.get(n)?.equals(snap.get(n) as Buffer) ? 'new' : 'other'}`).join(', ')}`;
}

describe('a kill of the command line while it writes', function () {
  this.timeout(600_000);
  let dir = '';
  let data = '';
  let out = '';
  let carsText = '';
  let fewerText = '';
  const args = (): string[] => ['fit', data, '--x', 'speed', '--y', 'dist', '--df', '4', '--grid', '12:20:count=8000', '--emit', 'c,ts,json', '--out', out, '--quiet'];
  let cli = '';

  /**
   * Runs the command line with `argv` as a child process. With `delay` (a function of
   * nothing, in ms) it is killed with SIGKILL that long after its first temporary file
   * appears in `out`. Resolves when it has ended, with what it printed and the time from that
   * first temporary file to the last change of the folder seen (the write phase).
   */
  function child(argv: readonly string[], delay?: () => number): Promise<{ code: number | null; signal: NodeJS.Signals | null; output: string; writeMs: number | undefined }> {
    return new Promise((resolve, reject) => {
      let firstTemp: number | undefined;
      let lastChange = 0;
      let timer: NodeJS.Timeout | undefined;
      const p = spawn(process.execPath, [cli, ...argv], { stdio: ['ignore', 'pipe', 'pipe'] });
      let output = '';
      p.stdout.on('data', (d: Buffer) => (output += d.toString()));
      p.stderr.on('data', (d: Buffer) => (output += d.toString()));
      const watcher = watch(out, (_event, name) => {
        lastChange = performance.now();
        if (firstTemp !== undefined || typeof name !== 'string' || parseTempName(name) === undefined) return;
        firstTemp = lastChange;
        if (delay) timer = setTimeout(() => p.kill('SIGKILL'), delay());
      });
      p.on('error', reject);
      p.on('exit', (code, signal) => {
        watcher.close();
        if (timer) clearTimeout(timer);
        resolve({ code, signal, output, writeMs: firstTemp === undefined ? undefined : lastChange - firstTemp });
      });
    });
  }

  before(async () => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-kill-'));
    cli = join(dir, 'bin', 'cli.js');
    await build({ entryPoints: [join(REPO, 'core', 'node', 'cli.ts')], outfile: cli, bundle: true, platform: 'node', format: 'cjs', target: 'es2022', logLevel: 'warning' });
    data = copyFixture('cars.csv', join(dir, 'cars.csv'));
    out = join(dir, 'out');
    carsText = readFileSync(data, 'utf8');
    fewerText = carsText
      .split('\n')
      .filter((_, i) => i % 5 !== 3)
      .join('\n');
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  /** The kill series over `trials`: each prepares the folder and names the old and new sets; the rerun must repair. */
  async function series(name: string, writeMs: number, random: () => number, prepare: () => { oldSet: Map<string, Buffer>; newSet: Map<string, Buffer> }): Promise<Map<string, number>> {
    const states = new Map<string, number>();
    for (let i = 0; i < KILLS; i++) {
      const { oldSet, newSet } = prepare();
      const ran = await child(args(), () => random() * 1.5 * writeMs);
      assert.ok(ran.signal === 'SIGKILL' || ran.code === 0, `${name} ${i}: ${ran.output}`);
      assert.ok(ran.writeMs !== undefined, `${name} ${i}: the write phase was reached`);
      const state = `${classify(out, oldSet, newSet)}${ran.signal === 'SIGKILL' ? '' : ' (ended before the kill)'}`;
      assert.doesNotMatch(state, /^broken/, `${name} ${i}: after the kill: ${state}`);
      states.set(state, (states.get(state) ?? 0) + 1);
      const rerun = await runMain(...args());
      assert.equal(rerun.code, 0, `${name} ${i} (${state}): the rerun without --force: ${rerun.stderr}`);
      const after = snapshot(out);
      assert.deepEqual([...after.keys()].sort(), [...newSet.keys()].sort(), `${name} ${i} (${state}): exactly the new set, no temporary file or marker`);
      for (const [f, bytes] of newSet) assert.ok(bytes.equals(after.get(f) as Buffer), `${name} ${i} (${state}): ${f} is the new one`);
      const check = await runMain('check', join(out, 'cars.fit.json'));
      assert.equal(check.code, 0, `${name} ${i} (${state}): knotwise check: ${check.stdout}${check.stderr}`);
    }
    return states;
  }

  it(`${KILLS} kills during a rewrite from changed data and ${KILLS} during a first write: old set, new set or repaired by the rerun`, async () => {
    const random = seeded(SEED);
    // Uncut runs: the outputs of both data sets, and how long the write phase takes (median of three).
    const uncut = async (): Promise<number> => {
      const r = await child(args());
      assert.equal(r.code, 0, r.output);
      return r.writeMs as number;
    };
    const median = (v: number[]): number => v.sort((a, b) => a - b)[1] as number;
    const firstMs: number[] = [];
    for (let i = 0; i < 3; i++) {
      rmSync(out, { recursive: true, force: true });
      mkdirSync(out);
      firstMs.push(await uncut());
    }
    const setCars = snapshot(out);
    const rewriteMs: number[] = [];
    // A rewrite's record keeps the curve it replaced (its baseline, core/calibrate/baseline.ts):
    // the new set of a rewrite is what an uncut rewrite over the other data's set writes.
    let setCarsOverFewer = setCars;
    for (const text of [fewerText, carsText, fewerText]) {
      writeFileSync(data, text);
      rewriteMs.push(await uncut());
      if (text === carsText) setCarsOverFewer = snapshot(out);
    }
    const setFewer = snapshot(out);
    assert.equal(setFewer.size, 5);
    for (const [f, bytes] of setCars) assert.ok(!bytes.equals(setFewer.get(f) as Buffer), `${f} changes with the data`);
    const firstUncut = { writeMs: median(firstMs) };
    const rewriteUncut = { writeMs: median(rewriteMs) };

    // Rewrites: the folder holds one data set's outputs; the data change to the other; the run is killed.
    let current: 'cars' | 'fewer' = 'fewer';
    const rewrites = await series('rewrite', rewriteUncut.writeMs as number, random, () => {
      const oldSet = current === 'cars' ? setCarsOverFewer : setFewer;
      current = current === 'cars' ? 'fewer' : 'cars';
      writeFileSync(data, current === 'cars' ? carsText : fewerText);
      return { oldSet, newSet: current === 'cars' ? setCarsOverFewer : setFewer };
    });

    // First writes: an empty folder, the original data.
    const firsts = await series('first write', firstUncut.writeMs as number, random, () => {
      rmSync(out, { recursive: true, force: true });
      mkdirSync(out);
      writeFileSync(data, carsText);
      return { oldSet: new Map(), newSet: setCars };
    });

    const line = (m: Map<string, number>): string =>
      [...m]
        .sort()
        .map(([s, n]) => `${s} ${n}`)
        .join(', ');
    console.log(
      `      write phase ${(rewriteUncut.writeMs as number).toFixed(0)} ms (rewrite), ${(firstUncut.writeMs as number).toFixed(0)} ms (first write); states after the kill: rewrite: ${line(rewrites)}; first write: ${line(firsts)}`,
    );
    // Kills landed inside the write phase (temporary files or a marker were there), not only before or after it.
    for (const [name, m] of [
      ['rewrite', rewrites],
      ['first write', firsts],
    ] as const) {
      const inside = [...m].filter(([s]) => /\+/.test(s)).reduce((a, [, n]) => a + n, 0);
      assert.ok(inside > 0, `${name}: no kill landed inside the write phase (${line(m)})`);
    }
  });
});
