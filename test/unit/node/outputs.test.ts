/**
 * Tests of writing the outputs safely (core/node/outputs.ts, through `knotwise fit`): a file
 * Knotwise did not write is refused without --force, rerunning over Knotwise's own outputs
 * works and gives the same bytes, a hand-edited output counts as not Knotwise's, the data
 * file is byte-identical after a run, no temporary file is left behind, and what a killed
 * run left (a commit marker, temporary files) is completed or removed by the next run
 * without --force (core/outputs/commit.ts; the real kill test is killRecovery.test.ts).
 * Data: datasets::cars (Ezekiel 1930) from test/e2e/fixtures/cars.csv (make-fixtures.R).
 */
import { strict as assert } from 'node:assert';
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { InputError } from '../../../core/errors';
import { folderStep, nodeWriter } from '../../../core/node/atomicWrite';
import { isOurs, recordedFiles, sha256, writeOutputs } from '../../../core/node/outputs';
import { markerName, parseMarkerName, parseTempName, tempName, writeSet, type SetFile } from '../../../core/outputs/commit';
import { copyFixture, runMain } from './runMain';

/** The id of a process that has ended (a child started and waited for). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ['-e', '']);
  assert.equal(r.status, 0);
  return r.pid as number;
}

/** Every file of a folder with its bytes. */
function snapshot(dir: string): Map<string, Buffer> {
  return new Map(readdirSync(dir).map((f) => [f, readFileSync(join(dir, f))]));
}

describe('writing the outputs', () => {
  let dir = '';
  let data = '';
  const fitArgs = (...extra: string[]): string[] => [
    'fit',
    data,
    '--x',
    'speed',
    '--y',
    'dist',
    '--df',
    '2..6',
    '--resampling',
    'bootstrap:20',
    '--seed',
    '3',
    '--emit',
    'c,ts,json',
    '--report',
    ...extra,
  ];

  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-out-'));
    data = copyFixture('cars.csv', join(dir, 'cars.csv'));
  });
  afterEach(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('a table file Knotwise did not write is refused without --force (exit 2, nothing written) and replaced with it', async () => {
    const out = join(dir, 'out');
    const foreign = join(out, 'cars.curve.csv');
    // A hand-made file where the table goes.
    mkdirSync(out);
    writeFileSync(foreign, 'speed,dist\n1,2\n');
    const r = await runMain(...fitArgs('--out', out));
    assert.equal(r.code, 2);
    assert.match(r.stderr, /cars\.curve\.csv exists and was not written by Knotwise; refusing to overwrite it \(use --force to replace it\)/);
    assert.equal(readFileSync(foreign, 'utf8'), 'speed,dist\n1,2\n', 'left as it was');
    assert.deepEqual(readdirSync(out), ['cars.curve.csv'], 'nothing else written');
    const forced = await runMain(...fitArgs('--out', out, '--force'));
    assert.equal(forced.code, 0, forced.stderr);
    assert.match(readFileSync(foreign, 'utf8'), /^x,fit,se,/);
  });

  it('a fit record, header or report Knotwise did not write is refused too', async () => {
    const out = join(dir, 'out');
    for (const name of ['cars.fit.json', 'cars.curve.h', 'cars.report.md']) {
      rmSync(out, { recursive: true, force: true });
      mkdirSync(out);
      writeFileSync(join(out, name), name.endsWith('.json') ? '{"format": "not-ours"}\n' : '/* mine */\n');
      const r = await runMain(...fitArgs('--out', out));
      assert.equal(r.code, 2, name);
      assert.match(r.stderr, new RegExp(`${name.replace(/\./g, '\\.')} exists and was not written by Knotwise`));
    }
  });

  it('rerunning over its own outputs works and gives byte-identical files', async function () {
    this.timeout(60_000);
    const out = join(dir, 'out');
    const first = await runMain(...fitArgs('--out', out));
    assert.equal(first.code, 0, first.stderr);
    const before = snapshot(out);
    assert.deepEqual([...before.keys()].sort(), [
      'cars.curve.csv',
      'cars.curve.h',
      'cars.curve.json',
      'cars.curve.ts',
      'cars.fit.json',
      'cars.report.curve.svg',
      'cars.report.error.svg',
      'cars.report.md',
      'cars.report.normal-quantiles.svg',
      'cars.report.residuals-fitted.svg',
      'cars.report.residuals-x.svg',
    ]);
    const second = await runMain(...fitArgs('--out', out));
    assert.equal(second.code, 0, second.stderr);
    const after = snapshot(out);
    assert.deepEqual([...after.keys()].sort(), [...before.keys()].sort(), 'no temporary files left');
    for (const [name, bytes] of before) assert.ok(bytes.equals(after.get(name) as Buffer), `${name} is byte-identical`);
  });

  it("an output edited by hand is no longer Knotwise's: refused without --force", async () => {
    const out = join(dir, 'out');
    assert.equal((await runMain(...fitArgs('--out', out))).code, 0);
    const table = join(out, 'cars.curve.csv');
    writeFileSync(table, readFileSync(table, 'utf8').replace(/\n4,/, '\n4.0,'));
    const r = await runMain(...fitArgs('--out', out));
    assert.equal(r.code, 2);
    assert.match(r.stderr, /cars\.curve\.csv exists and was not written by Knotwise/);
  });

  it('the data file is byte-identical after a run that writes next to it (--save)', async () => {
    const before = readFileSync(data);
    const r = await runMain(...fitArgs('--save'));
    assert.equal(r.code, 0, r.stderr);
    assert.ok(readFileSync(data).equals(before));
    assert.ok(existsSync(join(dir, 'cars.curve.csv')) && existsSync(join(dir, 'cars.fit.json')));
    assert.ok(readFileSync(data).equals(before), 'still after the record was written');
  });

  it('without --out the outputs go next to the data file; --print-only writes none and refuses --emit/--report', async () => {
    const r = await runMain('fit', data, '--x', 'speed', '--y', 'dist', '--df', '3', '--report');
    assert.equal(r.code, 0, r.stderr);
    assert.ok(existsSync(join(dirname(data), 'cars.curve.csv')) && existsSync(join(dirname(data), 'cars.report.md')));
    const p = await runMain('fit', data, '--x', 'speed', '--y', 'dist', '--df', '3', '--print-only', '--report');
    assert.equal(p.code, 2);
    assert.match(p.stderr, /--emit and --report write files: drop --print-only/);
  });
});

describe('isOurs and writeOutputs', () => {
  let dir = '';
  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-own-'));
  });
  afterEach(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('isOurs: missing files are free; listed files count by name and SHA-256; the record by its format', () => {
    const rec = join(dir, 'a.fit.json');
    const t = join(dir, 'a.curve.csv');
    assert.equal(isOurs(t, rec), true);
    writeFileSync(t, 'x\n1\n');
    assert.equal(isOurs(t, rec), false, 'no record');
    writeFileSync(rec, JSON.stringify({ format: 'knotwise-fit-record', table: { file: 'a.curve.csv', sha256: sha256('x\n1\n') }, outputs: [{ kind: 'c', file: 'a.curve.h', sha256: sha256('h') }] }));
    assert.equal(isOurs(t, rec), true);
    assert.equal(isOurs(rec, rec), true);
    writeFileSync(join(dir, 'a.curve.h'), 'h');
    assert.equal(isOurs(join(dir, 'a.curve.h'), rec), true);
    writeFileSync(join(dir, 'a.curve.h'), 'h2');
    assert.equal(isOurs(join(dir, 'a.curve.h'), rec), false);
    writeFileSync(join(dir, 'b.txt'), 'x\n1\n');
    assert.equal(isOurs(join(dir, 'b.txt'), rec), false, 'same bytes under another name');
    assert.deepEqual([...recordedFiles(JSON.parse(readFileSync(rec, 'utf8'))).keys()], ['a.curve.csv', 'a.curve.h']);
  });

  it('writeOutputs refuses to write over the data file and writes the record last', () => {
    const dataFile = join(dir, 'z.csv');
    writeFileSync(dataFile, 'x,y\n1,2\n');
    assert.throws(
      () =>
        writeOutputs(
          dir,
          [
            { kind: 'table', name: 'z.csv', text: 'bad' },
            { kind: 'record', name: 'z.fit.json', text: '{}' },
          ],
          dataFile,
          true,
        ),
      (e: unknown) => e instanceof InputError && /is the data file; refusing to overwrite it/.test(e.message),
    );
    assert.equal(readFileSync(dataFile, 'utf8'), 'x,y\n1,2\n');
    const paths = writeOutputs(
      dir,
      [
        { kind: 'record', name: 'z.fit.json', text: '{}\n' },
        { kind: 'table', name: 'z.curve.csv', text: 'x\n' },
      ],
      dataFile,
      false,
    );
    assert.deepEqual(
      paths.map((p) => p.slice(dir.length + 1)),
      ['z.curve.csv', 'z.fit.json'],
    );
  });
});

describe('what a killed run left', () => {
  let dir = '';
  let data = '';
  let out = '';
  const fitArgs = (...extra: string[]): string[] => ['fit', data, '--x', 'speed', '--y', 'dist', '--df', '4', '--emit', 'c', '--out', out, ...extra];

  beforeEach(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-left-'));
    data = copyFixture('cars.csv', join(dir, 'cars.csv'));
    out = join(dir, 'out');
  });
  afterEach(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  /**
   * The outputs a run of `fitArgs` writes, by name (from a run in a folder of its own that
   * holds a copy of `out`'s fit record, since a record keeps the curve of the one it replaces).
   */
  async function outputsOf(csv: string): Promise<SetFile[]> {
    const other = join(dir, 'reference');
    mkdirSync(other, { recursive: true });
    if (existsSync(join(out, 'cars.fit.json'))) copyFileSync(join(out, 'cars.fit.json'), join(other, 'cars.fit.json'));
    writeFileSync(data, csv);
    assert.equal((await runMain(...fitArgs().map((a) => (a === out ? other : a)))).code, 0);
    // The same names and bytes as in `out`: the record names the data by a path relative to its folder, the same from both.
    const names = ['cars.curve.csv', 'cars.curve.h', 'cars.fit.json'];
    const files = names.map((name) => ({ name, text: readFileSync(join(other, name), 'utf8') }));
    rmSync(other, { recursive: true });
    return files;
  }

  it('a run killed after its commit marker (half renamed) is completed by the next run, without --force', async () => {
    const cars = readFileSync(data, 'utf8');
    const fewer = cars
      .split('\n')
      .filter((_, i) => i % 5 !== 3)
      .join('\n');
    assert.equal((await runMain(...fitArgs())).code, 0);
    const newSet = await outputsOf(fewer);
    // A process that is gone now wrote the new set until the table was renamed into place, and was killed there.
    const killed = { ...nodeWriter(out), pid: deadPid(), writing: new Set<string>() };
    const steps = writeSet(killed, newSet, 'cars.fit.json');
    const exec = folderStep(out, () => assert.fail('no question'));
    for (let next = steps.next(); !next.done; next = steps.next(exec(next.value))) {
      if (next.value.op === 'rename' && next.value.to === 'cars.curve.h') break;
    }
    const names = readdirSync(out);
    assert.ok(names.includes(markerName('cars.fit.json')));
    assert.equal(readFileSync(join(out, 'cars.curve.csv'), 'utf8'), newSet[0]?.text, 'the new table is in place');
    assert.notEqual(readFileSync(join(out, 'cars.fit.json'), 'utf8'), newSet[2]?.text, 'the old record is still in place');
    // The next run: no --force needed, and afterwards exactly the new set.
    const r = await runMain(...fitArgs());
    assert.equal(r.code, 0, r.stderr);
    assert.deepEqual(readdirSync(out).sort(), ['cars.curve.csv', 'cars.curve.h', 'cars.fit.json']);
    for (const f of newSet) assert.equal(readFileSync(join(out, f.name), 'utf8'), f.text, f.name);
    assert.equal((await runMain('check', join(out, 'cars.fit.json'))).code, 0);
  });

  it('temporary files of a process that is gone are removed; those of a live process and other dot-files stay', async () => {
    mkdirSync(out);
    const gone = tempName('cars.curve.csv', deadPid(), 'abcdef012345');
    const live = tempName('cars.curve.csv', process.ppid, 'abcdef012345');
    const legacyOld = '.cars.curve.csv.0123456789ab.tmp';
    const legacyNew = '.cars.curve.h.0123456789ab.tmp';
    writeFileSync(join(out, gone), 'x'.repeat(1 << 20));
    writeFileSync(join(out, live), 'being written');
    writeFileSync(join(out, legacyOld), 'left by an earlier version');
    writeFileSync(join(out, legacyNew), 'maybe still being written by an earlier version');
    const twoHoursAgo = new Date(Date.now() - 2 * 3600_000);
    utimesSync(join(out, legacyOld), twoHoursAgo, twoHoursAgo);
    writeFileSync(join(out, '.keep'), '');
    const r = await runMain(...fitArgs());
    assert.equal(r.code, 0, r.stderr);
    assert.deepEqual(readdirSync(out).sort(), ['.keep', legacyNew, live, 'cars.curve.csv', 'cars.curve.h', 'cars.fit.json'].sort());
    assert.ok(!readdirSync(out).some((n) => parseMarkerName(n) !== undefined || (parseTempName(n) !== undefined && n !== live)));
  });

  it('a commit marker that names the data file never replaces it (the data stay byte for byte)', async () => {
    const gone = deadPid();
    const before = readFileSync(data);
    const evil = 'speed,dist\n1,1\n';
    const temp = tempName('cars.csv', gone, 'abcdef012345');
    writeFileSync(join(dir, temp), evil);
    const marker = {
      format: 'knotwise-commit',
      version: 1,
      writer: { pid: gone, host: nodeWriter(dir).host },
      record: 'cars.fit.json',
      files: [
        { file: 'cars.csv', temp, sha256: sha256(evil), replaces: sha256(before) },
        { file: 'cars.fit.json', temp: tempName('cars.fit.json', gone, 'abcdef012345'), sha256: sha256('{}'), replaces: null },
      ],
    };
    writeFileSync(join(dir, markerName('cars.fit.json')), JSON.stringify(marker));
    const r = await runMain('fit', data, '--x', 'speed', '--y', 'dist', '--df', '4', '--save');
    assert.equal(r.code, 0, r.stderr);
    assert.ok(readFileSync(data).equals(before));
    assert.ok(!existsSync(join(dir, temp)), 'its temporary file is removed');
    assert.ok(!existsSync(join(dir, markerName('cars.fit.json'))), 'the marker goes with the next commit of that record');
  });

  it('another Knotwise process writing the same record right now: refused (exit 2), its files untouched', async () => {
    assert.equal((await runMain(...fitArgs())).code, 0);
    // The parent of this process stands for a live writer whose marker is in place.
    const marker = {
      format: 'knotwise-commit',
      version: 1,
      writer: { pid: process.ppid, host: nodeWriter(out).host },
      record: 'cars.fit.json',
      files: [{ file: 'cars.fit.json', temp: tempName('cars.fit.json', process.ppid, 'abcdef012345'), sha256: sha256('{}'), replaces: null }],
    };
    writeFileSync(join(out, markerName('cars.fit.json')), JSON.stringify(marker));
    writeFileSync(join(out, marker.files[0]!.temp), '{}');
    const before = new Map(readdirSync(out).map((n) => [n, readFileSync(join(out, n))]));
    const r = await runMain(...fitArgs());
    assert.equal(r.code, 2);
    assert.match(r.stderr, /another Knotwise process \(id \d+\) is writing cars\.fit\.json in this folder right now/);
    for (const [n, b] of before) assert.ok(readFileSync(join(out, n)).equals(b), n);
  });
});
