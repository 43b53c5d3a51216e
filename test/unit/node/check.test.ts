/**
 * Tests of `knotwise check` (core/node/check.ts): a current set of outputs passes; a
 * one-byte change in the data or in the table (or the C header) is caught, saying which
 * file changed and how; errors exit with 2; with no argument every *.fit.json under the
 * folder is checked, skipping node_modules and dot folders, and one that is not a record is
 * an error, as is a folder without records; `--json` gives one object with every record's
 * state and `--quiet` nothing on stdout, with the same exit codes. Data: MASS::mcycle
 * (Silverman 1985) and datasets::cars (Ezekiel 1930), written by
 * test/e2e/fixtures/make-fixtures.R. Record tampering and random byte changes:
 * checkMutation.test.ts.
 */
import { strict as assert } from 'node:assert';
import { execFile } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { checkRecord, findRecords, runCheck } from '../../../core/node/check';
import { VERSION } from '../../../core/version';
import { copyFixture, REPO, runCheckIn, runMain, type Run } from './runMain';

/** Runs `knotwise check` in `cwd` with output captured. */
const check = runCheckIn;

/** One record's state in `check --json`. */
interface RecordState {
  readonly file: string;
  readonly status: string;
  readonly reasons: string[];
  readonly notes: string[];
  readonly writtenBy: string | null;
  readonly advice: string | null;
}

/** Parses `check --json` output: exactly one JSON object on one line. */
function checkJson(r: Run): { knotwise: string; records: RecordState[]; counts: Record<string, number>; exitCode: number } {
  assert.equal(r.stdout.split('\n').filter((l) => l !== '').length, 1, `one line: ${r.stdout}`);
  return JSON.parse(r.stdout) as { knotwise: string; records: RecordState[]; counts: Record<string, number>; exitCode: number };
}

/** Replaces the byte at `offset` of a file by `to`; returns a function that restores the file. */
function changeByte(path: string, offset: number, to: string): () => void {
  const before = readFileSync(path);
  const after = Buffer.from(before);
  after[offset] = to.charCodeAt(0);
  assert.notEqual(after[offset], before[offset], 'the byte really changes');
  writeFileSync(path, after);
  return () => writeFileSync(path, before);
}

describe('knotwise check', () => {
  let dir = '';
  let data = '';
  let out = '';
  let record = '';

  before(async function () {
    this.timeout(120_000);
    dir = mkdtempSync(join(tmpdir(), 'knotwise-check-'));
    data = copyFixture('mcycle.csv', join(dir, 'data', 'mcycle.csv'));
    out = join(dir, 'tables');
    const r = await runMain(
      'fit',
      data,
      '--x',
      'times',
      '--y',
      'accel',
      '--df',
      '4..12',
      '--resampling',
      'folds:5',
      '--seed',
      '7',
      '--grid',
      'auto:2',
      '--emit',
      'c,ts,json',
      '--report',
      '--out',
      out,
    );
    assert.equal(r.code, 0, r.stderr);
    record = join(out, 'mcycle.fit.json');
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('check exits 0 and says "current" when data and every output are unchanged', async () => {
    const r = await check(dir, join('tables', 'mcycle.fit.json'));
    assert.equal(r.code, 0, r.stdout);
    assert.match(r.stdout, /^current tables\/mcycle\.fit\.json$/m);
    assert.match(r.stdout, /1 record\(s\): 1 current, 0 changed, 0 could not be checked/);
  });

  it('check catches a one-byte change in the data: exit 1, data SHA-256 differs, and the table no longer matches', async function () {
    this.timeout(60_000);
    // Line 10 of mcycle.csv is "7.8,-2.7"; make it "7.8,-2.8" (the last digit before the newline).
    const text = readFileSync(data, 'utf8');
    const lineStart = text.split('\n').slice(0, 9).join('\n').length + 1;
    assert.equal(text.slice(lineStart, lineStart + 8), '7.8,-2.7');
    const restore = changeByte(data, lineStart + 7, '8');
    try {
      const r = await check(dir);
      assert.equal(r.code, 1, r.stdout);
      assert.match(r.stdout, /^CHANGED tables\/mcycle\.fit\.json$/m);
      assert.match(r.stdout, /data \.\.\/data\/mcycle\.csv changed: SHA-256 was [0-9a-f]{16}\.\.\., now [0-9a-f]{16}\.\.\./);
      assert.match(r.stdout, /mcycle\.curve\.csv differs from the rebuilt table at line \d+ \(x = [-0-9.e+]+\), column \w+: \S+ in the file, \S+ rebuilt; \d+ lines? differs?\./);
      assert.match(r.stdout, /to update: cd tables && knotwise fit \.\.\/data\/mcycle\.csv --x times --y accel/);
    } finally {
      restore();
    }
    assert.equal((await check(dir)).code, 0, 'current again once the data is restored');
  });

  it('check catches a one-byte change in the table, naming the line, the x, the column and both values', async () => {
    const table = join(out, 'mcycle.curve.csv');
    const lines = readFileSync(table, 'utf8').split('\n');
    // The last digit of the fit value on line 6 (the 5th row).
    const header = (lines[0] as string).split(',');
    const row = (lines[5] as string).split(',');
    const fitText = row[header.indexOf('fit')] as string;
    const offset = lines.slice(0, 5).join('\n').length + 1 + (row.slice(0, header.indexOf('fit')).join(',').length + 1) + fitText.length - 1;
    const last = fitText[fitText.length - 1] as string;
    const changed = last === '1' ? '2' : '1';
    const restore = changeByte(table, offset, changed);
    try {
      const r = await check(dir, 'tables');
      assert.equal(r.code, 1, r.stdout);
      const edited = fitText.slice(0, -1) + changed;
      assert.ok(r.stdout.includes(`mcycle.curve.csv differs from the rebuilt table at line 6 (x = ${row[0]}), column fit: ${edited} in the file, ${fitText} rebuilt; 1 line differs.`), r.stdout);
      assert.doesNotMatch(r.stdout, /data .* changed/);
    } finally {
      restore();
    }
  });

  it('check catches a one-byte change in the emitted C header and a missing report figure', async () => {
    const h = join(out, 'mcycle.curve.h');
    const restore = changeByte(h, readFileSync(h, 'utf8').indexOf('static const double') + 7, 'x');
    const fig = join(out, 'mcycle.report.curve.svg');
    renameSync(fig, fig + '.away');
    try {
      const r = await check(dir, join('tables', 'mcycle.fit.json'));
      assert.equal(r.code, 1);
      assert.match(r.stdout, /mcycle\.curve\.h differs from the rebuilt one at line \d+: "static xonst double/);
      assert.match(r.stdout, /mcycle\.report\.curve\.svg is missing/);
    } finally {
      restore();
      renameSync(fig + '.away', fig);
    }
  });

  it('check exits 2 when a record cannot be checked: not JSON, another format, data file missing', async () => {
    const bad = join(dir, 'bad');
    mkdirSync(bad, { recursive: true });
    writeFileSync(join(bad, 'broken.fit.json'), '{ "format": "knotwise-fit-record", ');
    writeFileSync(join(bad, 'other.fit.json'), '{"format": "someone-else"}\n');
    const r1 = await check(dir, join('bad', 'broken.fit.json'));
    assert.equal(r1.code, 2);
    assert.match(r1.stdout, /ERROR {3}bad\/broken\.fit\.json\n {2}.*broken\.fit\.json: not valid JSON/);
    const r2 = await check(dir, join('bad', 'other.fit.json'));
    assert.equal(r2.code, 2);
    assert.match(r2.stdout, /not a fit record: "format" is "someone-else", expected "knotwise-fit-record"/);
    // A record whose data has gone.
    const moved = join(dir, 'data', 'mcycle.csv');
    renameSync(moved, moved + '.away');
    try {
      const r3 = await check(dir, join('tables', 'mcycle.fit.json'));
      assert.equal(r3.code, 2);
      assert.match(r3.stdout, /the data file \.\.\/data\/mcycle\.csv \(data\.path in the record\) was not found/);
    } finally {
      renameSync(moved + '.away', moved);
      rmSync(bad, { recursive: true, force: true });
    }
  });

  it('check with no argument finds records below the folder, skipping node_modules and dot folders; a *.fit.json that is not a record is an error, not skipped', async () => {
    for (const hidden of ['node_modules', '.git', join('sub', '.cache')]) {
      mkdirSync(join(dir, hidden), { recursive: true });
      writeFileSync(join(dir, hidden, 'x.fit.json'), 'not even JSON');
    }
    try {
      assert.deepEqual(
        findRecords(dir).map((p) => p.slice(dir.length + 1)),
        [join('tables', 'mcycle.fit.json')],
      );
      const r = await check(dir);
      assert.equal(r.code, 0, r.stdout);
      assert.match(r.stdout, /1 record\(s\): 1 current/);
      // Another format, an empty file, a truncated record and a wrongly typed one: each named, exit 2, in every mode.
      const good = readFileSync(record, 'utf8');
      const bad: Record<string, [string, RegExp]> = {
        'foreign.fit.json': ['{"format": "someone-else"}\n', /not a fit record: "format" is "someone-else"/],
        'empty.fit.json': ['', /not a fit record: the file is empty/],
        'cut.fit.json': [good.slice(0, Math.floor(good.length / 2)), /not valid JSON .*the file looks truncated/],
        'typed.fit.json': [good.replace(/"rowsUsed": (\d+)/, '"rowsUsed": "$1"'), /does not follow its schema .*"data\.rowsUsed" must be a whole number; it is "\d+"/],
      };
      mkdirSync(join(dir, 'sub'), { recursive: true });
      for (const [name, [text]] of Object.entries(bad)) writeFileSync(join(dir, 'sub', name), text);
      for (const argv of [[], ['sub'], ['.'], ...Object.keys(bad).map((n) => [join('sub', n)])]) {
        const e = await check(dir, ...argv);
        assert.equal(e.code, 2, `check ${argv.join(' ')}: ${e.stdout}`);
        assert.doesNotMatch(e.stdout, /no fit records/);
        for (const [name, [, why]] of Object.entries(bad)) {
          if (argv.length === 1 && argv[0]?.endsWith('.fit.json') && !argv[0].endsWith(name)) continue;
          assert.match(e.stdout, new RegExp(`^ERROR {3}sub/${name.replace(/\./g, '\\.')}\n {2}.*${why.source}`, 'm'), `check ${argv.join(' ')}: ${name}`);
        }
      }
      const j = checkJson(await check(dir, '--json'));
      assert.deepEqual(j.counts, { current: 1, changed: 0, error: 4 });
      assert.deepEqual(
        j.records.map((s) => [s.file, s.status]),
        [
          ...Object.keys(bad)
            .sort()
            .map((n) => [join('sub', n), 'error']),
          [join('tables', 'mcycle.fit.json'), 'current'],
        ],
      );
    } finally {
      for (const p of ['node_modules', '.git', 'sub']) rmSync(join(dir, p), { recursive: true, force: true });
    }
  });

  it('check of a folder without records exits 2 with "no fit records under <folder>", with no argument and with a folder argument', async () => {
    const empty = mkdtempSync(join(tmpdir(), 'knotwise-empty-'));
    try {
      mkdirSync(join(empty, 'node_modules', 'pkg'), { recursive: true });
      writeFileSync(join(empty, 'node_modules', 'pkg', 'a.fit.json'), readFileSync(record));
      const e = await check(empty);
      assert.equal(e.code, 2, e.stdout);
      assert.equal(e.stdout, 'ERROR   .\n  no fit records (*.fit.json) under .\n');
      mkdirSync(join(empty, 'none'));
      const f = await check(empty, 'none');
      assert.equal(f.code, 2);
      assert.match(f.stdout, /^ {2}no fit records \(\*\.fit\.json\) under none$/m);
      // A folder with records beside one without: still exit 2, and the records are checked.
      mkdirSync(join(dir, 'no-records'));
      const both = await check(dir, 'tables', 'no-records', 'gone.fit.json');
      rmSync(join(dir, 'no-records'), { recursive: true });
      assert.equal(both.code, 2);
      assert.match(both.stdout, /^current tables\/mcycle\.fit\.json$/m);
      assert.match(both.stdout, /^ERROR {3}no-records\n {2}no fit records \(\*\.fit\.json\) under no-records$/m);
      assert.match(both.stdout, /^ERROR {3}gone\.fit\.json\n {2}.*gone\.fit\.json: no such file$/m);
      assert.match(both.stdout, /knotwise check: 2 record\(s\): 1 current, 0 changed, 1 could not be checked; 1 folder\(s\) without records$/m);
      const quiet = await check(empty, '--quiet');
      assert.equal(quiet.stdout, '');
      assert.equal(quiet.stderr, 'knotwise check: .: no fit records (*.fit.json) under .\n');
    } finally {
      rmSync(empty, { recursive: true, force: true });
    }
  });

  it("checkRecord gives the status and the record's regenerate command; runCheck refuses an unknown option", async function () {
    this.timeout(60_000);
    const res = await checkRecord(record);
    assert.equal(res.status, 'current');
    assert.match(res.regenerate ?? '', /--grid auto:2 --emit c,ts,json --report --out \.$/);
    await assert.rejects(runCheck(['--all'], dir), /unknown option --all for check; run knotwise check --help for its options/);
    await assert.rejects(runCheck(['--jsn'], dir), /unknown option --jsn for check; did you mean --json\?/);
  });

  it("check --json prints one object with each record's file, status, reasons and advice, and keeps the exit codes (0 current, 1 changed, 2 error)", async function () {
    this.timeout(60_000);
    const current = await check(dir, '--json', join('tables', 'mcycle.fit.json'));
    assert.equal(current.code, 0, current.stdout);
    const j0 = checkJson(current);
    assert.equal(j0.knotwise, VERSION);
    assert.deepEqual(j0.records, [{ file: join('tables', 'mcycle.fit.json'), status: 'current', reasons: [], notes: [], writtenBy: VERSION, advice: null }]);
    assert.deepEqual(j0.counts, { current: 1, changed: 0, error: 0 });
    assert.equal(j0.exitCode, 0);
    // A changed table: status changed, the reason names the file, the advice is the command that rebuilds it.
    const table = join(out, 'mcycle.curve.csv');
    const bytes = readFileSync(table);
    const restore = changeByte(table, bytes.length - 2, bytes[bytes.length - 2] === 0x31 ? '2' : '1');
    try {
      const changed = await check(dir, '--json');
      assert.equal(changed.code, 1, changed.stdout);
      const j1 = checkJson(changed);
      assert.equal(j1.exitCode, 1);
      const rec = j1.records[0] as RecordState;
      assert.equal(rec.status, 'changed');
      assert.ok(
        rec.reasons.some((m) => /^mcycle\.curve\.csv differs from the rebuilt table at line \d+/.test(m)),
        rec.reasons.join('\n'),
      );
      assert.match(rec.advice ?? '', /^cd tables && knotwise fit \.\.\/data\/mcycle\.csv --x times --y accel .* --out \.$/);
    } finally {
      restore();
    }
    // A record that cannot be checked: status error, exit code 2, still one JSON object on stdout.
    const bad = join(dir, 'broken.fit.json');
    writeFileSync(bad, '{ "format": ');
    try {
      const error = await check(dir, '--json', 'broken.fit.json');
      assert.equal(error.code, 2);
      const j2 = checkJson(error);
      assert.equal(j2.exitCode, 2);
      assert.equal(j2.records[0]?.status, 'error');
      assert.match(j2.records[0]?.reasons[0] ?? '', /not valid JSON/);
      assert.equal(j2.records[0]?.advice, null);
    } finally {
      rmSync(bad);
    }
    // No records: the folder as one entry with status error, and exit code 2.
    const empty = mkdtempSync(join(tmpdir(), 'knotwise-empty-'));
    try {
      const none = await check(empty, '--json');
      assert.equal(none.code, 2);
      const j3 = checkJson(none);
      assert.deepEqual(j3.records, [{ file: '.', status: 'error', reasons: ['no fit records (*.fit.json) under .'], notes: [], writtenBy: null, advice: null }]);
      assert.deepEqual(j3.counts, { current: 0, changed: 0, error: 1 });
      assert.equal(j3.exitCode, 2);
    } finally {
      rmSync(empty, { recursive: true, force: true });
    }
  });

  it('check --quiet prints nothing on stdout, keeps the exit code, and names records that could not be checked on stderr', async function () {
    this.timeout(60_000);
    const ok = await check(dir, '--quiet');
    assert.equal(ok.code, 0);
    assert.equal(ok.stdout, '');
    assert.equal(ok.stderr, '');
    const table = join(out, 'mcycle.curve.csv');
    const bytes = readFileSync(table);
    const restore = changeByte(table, bytes.length - 2, bytes[bytes.length - 2] === 0x31 ? '2' : '1');
    try {
      const changed = await check(dir, '--quiet');
      assert.equal(changed.code, 1);
      assert.equal(changed.stdout, '');
    } finally {
      restore();
    }
    const bad = join(dir, 'broken.fit.json');
    writeFileSync(bad, '{ "format": ');
    try {
      const error = await check(dir, '--quiet', 'broken.fit.json');
      assert.equal(error.code, 2);
      assert.equal(error.stdout, '');
      assert.match(error.stderr, /^knotwise check: broken\.fit\.json: .*not valid JSON/);
      // --json wins over --quiet for stdout.
      const both = await check(dir, '--quiet', '--json', 'broken.fit.json');
      assert.equal(checkJson(both).records[0]?.status, 'error');
    } finally {
      rmSync(bad);
    }
  });

  it('knotwise check as a process exits 1 when the table changed (the exit code CI and a pre-commit hook see)', async function () {
    this.timeout(60_000);
    const table = join(out, 'mcycle.curve.csv');
    const bytes = readFileSync(table);
    const restore = changeByte(table, bytes.length - 2, bytes[bytes.length - 2] === 0x31 ? '2' : '1');
    try {
      const code = await new Promise<number>((resolve) => {
        execFile(process.execPath, ['--import', 'tsx', join(REPO, 'core', 'node', 'cli.ts'), 'check'], { cwd: dir, timeout: 60_000 }, (error) =>
          resolve(error ? (typeof error.code === 'number' ? error.code : -1) : 0),
        );
      });
      assert.equal(code, 1);
    } finally {
      restore();
    }
  });
});
