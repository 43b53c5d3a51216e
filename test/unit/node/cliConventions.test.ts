/**
 * Command-line conventions (core/node/cli.ts with core/node/args.ts, issue 9 item 3):
 * every command's --help exits 0 and lists each option with its default, generated from the
 * option table and the registries; the general help, usage and version; the nearest-option
 * suggestion; negative option values; `-` reading the CSV from standard input (in-process
 * with an injected stdin, and the real script with a pipe); --quiet; and progress on an
 * injected stream with a fake clock. Data: datasets::cars (Ezekiel 1930) and MASS::mcycle
 * (Silverman 1985), written by test/e2e/fixtures/make-fixtures.R.
 */
import { strict as assert } from 'node:assert';
import { spawn } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { defaultWords, optionForm } from '../../../core/node/args';
import { commands } from '../../../core/node/cli';
import { curveKinds } from '../../../core/registry/curves/index';
import { OUTCOME_LIST } from '../../../core/registry/outcomes/index';
import { RESAMPLING_LIST } from '../../../core/registry/resampling/index';
import { RULE_LIST } from '../../../core/registry/rules/index';
import { VERSION } from '../../../core/version';
import { copyFixture, REPO, type Run, runMain, runMainWith } from './runMain';

/** The help text of one option: from its line up to the next option's line, whitespace collapsed. */
function optionText(help: string, form: string): string {
  const lines = help.split('\n');
  const start = lines.findIndex((l) => l.startsWith(`  ${form} `) || l === `  ${form}`);
  assert.ok(start >= 0, `help lists ${form}`);
  let end = start + 1;
  while (end < lines.length && !/^ {2}-/.test(lines[end] as string) && !/^\S/.test(lines[end] as string)) end++;
  return lines.slice(start, end).join(' ').replace(/\s+/g, ' ');
}

/** Asserts exit code 2, nothing on stdout, and exactly one line on stderr equal to `line`. */
function refusedWith(r: Run, line: string | RegExp): void {
  assert.equal(r.code, 2, r.stderr);
  assert.equal(r.stdout, '');
  if (typeof line === 'string') assert.equal(r.stderr, `knotwise: ${line}\n`);
  else assert.match(r.stderr, line);
  assert.doesNotMatch(r.stderr, /ERR_PARSE_ARGS|internal error|\n\s+at /);
}

describe('command-line conventions', () => {
  let dir = '';
  let cars = '';
  let mcycle = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-conventions-'));
    cars = copyFixture('cars.csv', join(dir, 'cars.csv'));
    mcycle = copyFixture('mcycle.csv', join(dir, 'mcycle.csv'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  describe('help', () => {
    for (const spec of commands()) {
      it(`knotwise ${spec.name} --help exits 0 and lists every option with its default; -h and "help ${spec.name}" print the same`, async () => {
        const r = await runMain(spec.name, '--help');
        assert.equal(r.code, 0, r.stderr);
        assert.equal(r.stderr, '');
        assert.match(r.stdout, new RegExp(`^knotwise ${spec.name}: `));
        assert.match(r.stdout, /^Usage:$/m);
        for (const o of spec.options) {
          const text = optionText(r.stdout, optionForm(o));
          assert.ok(text.includes(`(${defaultWords(o)})`), `--${o.name} shows its default "${defaultWords(o)}": ${text}`);
        }
        assert.equal((await runMain(spec.name, '-h')).stdout, r.stdout);
        assert.equal((await runMain('help', spec.name)).stdout, r.stdout);
      });
    }

    it('fit --help lists every curve, outcome, resampling scheme and rule of the registries, and the resampling limits', async () => {
      const help = (await runMain('fit', '--help')).stdout;
      const flat = help.replace(/\s+/g, ' ');
      for (const k of curveKinds()) assert.match(optionText(help, '--curve <kind>'), new RegExp(` ${k.id} `));
      for (const o of OUTCOME_LIST) assert.match(optionText(help, '--outcome <readings>'), new RegExp(` ${o.id} `));
      const resampling = optionText(help, '--resampling <scheme>');
      for (const s of RESAMPLING_LIST) {
        assert.ok(resampling.includes(` ${s.syntax} `), s.syntax);
        for (const [name, l] of Object.entries(s.limits)) assert.ok(resampling.includes(`${name} ${l.min} to ${l.max}`), `limit ${name} of ${s.id}`);
      }
      for (const r of RULE_LIST) assert.ok(optionText(help, '--rule <rule>').includes(` ${r.syntax} `), r.syntax);
      assert.ok(flat.includes('fit - --x <column> --y <column> --print-only'), 'the usage shows - for standard input');
      assert.ok(flat.includes('needs --print-only or --json'), 'the help says what - needs');
    });

    it('knotwise --help, -h and help exit 0 with every command; knotwise alone prints the usage on stderr and exits 2', async () => {
      for (const argv of [['--help'], ['-h'], ['help'], ['help', '--help']]) {
        const r = await runMain(...argv);
        assert.equal(r.code, 0);
        for (const c of commands()) assert.match(r.stdout, new RegExp(`^ {2}${c.name} +${c.summary.replace(/[()]/g, '\\$&')}$`, 'm'));
      }
      const bare = await runMain();
      assert.equal(bare.code, 2);
      assert.equal(bare.stdout, '');
      assert.match(bare.stderr, /^knotwise \S+: smooth curves/);
      assert.match(bare.stderr, /^Commands:$/m);
    });

    it('-V and --version print the version', async () => {
      for (const flag of ['-V', '--version']) {
        const r = await runMain(flag);
        assert.equal(r.code, 0);
        assert.equal(r.stdout, `${VERSION}\n`);
      }
    });
  });

  describe('unknown and malformed options', () => {
    it('name the nearest valid option or command', async () => {
      refusedWith(await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--resample', 'bootstrap:20'), 'unknown option --resample for fit; did you mean --resampling?');
      refusedWith(await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--flag-negatve'), 'unknown option --flag-negatve for fit; did you mean --flag-negative?');
      refusedWith(await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--family', 'gaussian'), 'unknown option --family for fit; run knotwise fit --help for its options');
      refusedWith(await runMain('demo', '--otu', 'x'), 'unknown option --otu for demo; did you mean --out?');
      refusedWith(await runMain('check', '--jsno'), 'unknown option --jsno for check; did you mean --json?');
      refusedWith(await runMain('fti', cars), 'unknown command "fti"; did you mean fit? (knotwise --help lists the commands)');
      refusedWith(await runMain('--grid', '0:1:count=2'), /^knotwise: --grid is not an option of knotwise itself; put options after the command/);
    });

    it("are refused in Knotwise's words, never the runtime's", async () => {
      refusedWith(await runMain('fit', cars, '--x', 'speed', '--y'), '--y <column> needs a value');
      refusedWith(await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--json=yes'), '--json is a switch and takes no value; got "--json=yes"');
      refusedWith(await runMain('fit', cars, cars, '--x', 'speed', '--y', 'dist'), `unexpected argument "${cars}" for fit, which takes one data file`);
      refusedWith(await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--seed', '1', '--seed', '2'), '--seed is given twice ("1" and "2"); give it once');
      refusedWith(await runMain('demo', 'extra'), 'demo takes no argument; got "extra"');
    });
  });

  it('negative values: --grid=-130:70:count=11 and --grid -130:70:count=11 give the same table, from -130 to 70 (MASS::mcycle, acceleration as x)', async () => {
    const a = await runMain('fit', mcycle, '--x', 'accel', '--y', 'times', '--df', '4', '--grid=-130:70:count=11', '--print-only', '--json');
    assert.equal(a.code, 0, a.stderr);
    const b = await runMain('fit', mcycle, '--x', 'accel', '--y', 'times', '--df', '4', '--grid', '-130:70:count=11', '--print-only', '--json');
    assert.equal(b.stdout, a.stdout);
    const t = (JSON.parse(a.stdout) as { table: { columns: string[]; rows: number[][] } }).table;
    const x = t.rows.map((r) => r[t.columns.indexOf('x')]);
    assert.deepEqual(x, [-130, -110, -90, -70, -50, -30, -10, 10, 30, 50, 70]);
  });

  describe('- reads the CSV from standard input', () => {
    const stdin = (bytes: Uint8Array) => ({ readStdin: () => Promise.resolve(bytes), stdinIsTTY: false });

    it('gives the same fit and table as the file, with data.file "-", the bytes\' SHA-256 and no regenerate command', async () => {
      const bytes = readFileSync(cars);
      const fromFile = JSON.parse((await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '2..5', '--resampling', 'folds:5', '--print-only', '--json')).stdout) as Record<string, any>;
      const r = await runMainWith(stdin(bytes), 'fit', '-', '--x', 'speed', '--y', 'dist', '--df', '2..5', '--resampling', 'folds:5', '--json');
      assert.equal(r.code, 0, r.stderr);
      const fromStdin = JSON.parse(r.stdout) as Record<string, any>;
      assert.equal(fromStdin.data.file, '-');
      assert.equal(fromStdin.data.sha256, createHash('sha256').update(bytes).digest('hex'));
      assert.equal(fromStdin.regenerate, null);
      assert.equal(fromStdin.written, undefined);
      assert.deepEqual({ ...fromStdin, data: { ...fromStdin.data, file: 'cars.csv' }, regenerate: fromFile.regenerate }, fromFile);
      // --print-only without --json prints the summary, naming standard input.
      const text = await runMainWith(stdin(bytes), 'fit', '-', '--x', 'speed', '--y', 'dist', '--df', '3', '--print-only');
      assert.equal(text.code, 0, text.stderr);
      assert.match(text.stdout, /^standard input: 50 rows used, 0 rejected$/m);
      assert.ok(!existsSync(join(REPO, '-.curve.csv')) && !existsSync(join(REPO, 'standard input.curve.csv')), 'no files written');
    });

    it('is refused without --print-only or --json, with files asked for, or when standard input is a terminal; bad rows name standard input', async () => {
      const bytes = readFileSync(cars);
      refusedWith(
        await runMainWith(stdin(bytes), 'fit', '-', '--x', 'speed', '--y', 'dist'),
        /^knotwise: data read from standard input \(-\) exist on no disk, so a table written from them could never be checked against them: add --print-only/,
      );
      refusedWith(await runMainWith(stdin(bytes), 'fit', '-', '--x', 'speed', '--y', 'dist', '--json', '--out', dir), /^knotwise: --out writes files, but data read from standard input/);
      refusedWith(await runMainWith(stdin(bytes), 'fit', '-', '--x', 'speed', '--y', 'dist', '--json', '--report'), /^knotwise: --report writes files/);
      refusedWith(
        await runMainWith({ readStdin: () => Promise.reject(new Error('must not be read')), stdinIsTTY: true }, 'fit', '-', '--x', 'speed', '--y', 'dist', '--print-only'),
        /standard input is a terminal: pipe the data in/,
      );
      refusedWith(await runMainWith(stdin(Buffer.from('speed,dist\n4,2\n7,x\n')), 'fit', '-', '--x', 'speed', '--y', 'dist', '--print-only'), /^knotwise: standard input, line 3, column "dist": /);
      refusedWith(await runMainWith(stdin(new Uint8Array(0)), 'fit', '-', '--x', 'speed', '--y', 'dist', '--print-only'), /^knotwise: standard input: the file is empty/);
    });

    it('the built command reads a pipe: knotwise fit - ... --print-only --json', async function () {
      this.timeout(60_000);
      const child = spawn(process.execPath, ['--import', 'tsx', join(REPO, 'core', 'node', 'cli.ts'), 'fit', '-', '--x', 'speed', '--y', 'dist', '--df', '3', '--print-only', '--json'], { cwd: REPO });
      let stdout = '';
      let stderr = '';
      child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
      child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
      child.stdin.end(readFileSync(cars));
      const code = await new Promise<number | null>((resolve) => child.on('close', resolve));
      assert.equal(code, 0, stderr);
      const out = JSON.parse(stdout) as { data: { file: string; rowsUsed: number }; fit: { df: number } };
      assert.equal(out.data.file, '-');
      assert.equal(out.data.rowsUsed, 50);
      assert.equal(out.fit.df, 3);
    });
  });

  describe('--quiet', () => {
    it('prints no summary but still writes the files; --json still prints; errors still reach stderr', async () => {
      const out = join(dir, 'quiet');
      const r = await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '3', '--quiet', '--out', out);
      assert.equal(r.code, 0, r.stderr);
      assert.equal(r.stdout, '');
      assert.equal(r.stderr, '');
      assert.ok(existsSync(join(out, 'cars.curve.csv')) && existsSync(join(out, 'cars.fit.json')));
      const j = await runMain('fit', cars, '--x', 'speed', '--y', 'dist', '--df', '3', '--quiet', '--json', '--print-only');
      assert.equal((JSON.parse(j.stdout) as { fit: { df: number } }).fit.df, 3);
      refusedWith(await runMain('fit', cars, '--x', 'sped', '--y', 'dist', '--quiet', '--print-only'), /no column named "sped"/);
    });
  });

  describe('progress', () => {
    /** A stream that keeps what was written, and a clock that moves 1 s each time it is read. */
    const fake = (isTTY: boolean) => {
      const s = { isTTY, text: '', write: (t: string) => ((s.text += t), true) };
      let now = 0;
      return { stream: s, env: { progressStream: s, clock: () => (now += 1000) } };
    };
    const tuning = ['--df', '2..5', '--resampling', 'bootstrap:20', '--print-only'];

    it('--progress writes lines with the time left to a stream that is not a terminal', async () => {
      const f = fake(false);
      const r = await runMainWith(f.env, 'fit', cars, '--x', 'speed', '--y', 'dist', ...tuning, '--progress');
      assert.equal(r.code, 0, r.stderr);
      const lines = f.stream.text.split('\n').filter((l) => l !== '');
      assert.ok(lines.length >= 2, f.stream.text);
      for (const l of lines) assert.match(l, /^knotwise: .+/);
      // With the clock moving 1 s per report, each resample "takes" 1 s: the estimate is exact.
      const m = lines.map((l) => /^knotwise: resample (\d+) of 20 \(\d+ %\), about (\d+) s left$/.exec(l)).filter((x) => x !== null);
      assert.ok(m.length > 0, f.stream.text);
      for (const x of m) assert.equal(Number(x[2]), 20 - Number(x[1]));
      assert.ok(!f.stream.text.includes('\r'));
    });

    it('shows by itself on a terminal and clears its line at the end; nothing on a log without --progress or with --quiet', async () => {
      const tty = fake(true);
      const r = await runMainWith(tty.env, 'fit', cars, '--x', 'speed', '--y', 'dist', ...tuning);
      assert.equal(r.code, 0, r.stderr);
      assert.match(tty.stream.text, /^\rknotwise: /);
      assert.match(tty.stream.text, /\r {10,}\r$/, 'the line is cleared at the end');
      assert.ok(!tty.stream.text.includes('\n'));
      const log = fake(false);
      await runMainWith(log.env, 'fit', cars, '--x', 'speed', '--y', 'dist', ...tuning);
      assert.equal(log.stream.text, '');
      const quiet = fake(true);
      await runMainWith(quiet.env, 'fit', cars, '--x', 'speed', '--y', 'dist', ...tuning, '--quiet');
      assert.equal(quiet.stream.text, '');
    });
  });
});
