/**
 * Tests of the fit streamed from a file in passes (core/node/streamPipeline.ts,
 * core/node/streamFile.ts) under a tiny memory budget: it gives the whole read's fit (the
 * same knots exactly, coefficients and statistics to 1e-12, the same candidate errors with
 * bundles, the same rejected rows and influential rows, the same table); the bootstrap runs
 * as bundles and the record and the explanation say so; a file that changes between passes
 * stops the run; bad cells and values are reported with file, line and column as a whole
 * read reports them; what cannot stream is refused with what to do; and `knotwise check`
 * rebuilds a streamed record and notices a change of the data. The whole read is itself
 * checked against R elsewhere (test/reference/); here the reference is that read, an exact
 * property. Data: seeded invented readings (property tests).
 */
import { strict as assert } from 'node:assert';
import { appendFileSync, mkdtempSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { runPipeline, type PipelineRun } from '../../../core/node/pipeline';
import { DEFAULT_OUTPUT, type FitPlan } from '../../../core/outputs/plan';
import { RandomStream } from '../../../core/tune/rng';
import type { Progress } from '../../../core/tune/types';
import { runCheckIn, runMain } from '../node/runMain';

/** `rows` readings of 2 sin(x) + x / 10 with normal noise (SD 0.2) on x in [0, 20), six decimals, with a few planted outliers; `extra` lines are appended. */
function writeReadings(path: string, rows: number, seed: number, extra = ''): void {
  const rng = new RandomStream(seed, 0);
  const u = (): number => (rng.int(2 ** 30) + 0.5) / 2 ** 30;
  const parts = ['x,y,note\n'];
  for (let i = 0; i < rows; i++) {
    const x = u() * 20;
    let y = 2 * Math.sin(x) + x / 10 + 0.2 * Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
    if (i % 40_000 === 7) y += 3;
    parts.push(`${x.toFixed(6)},${y.toFixed(6)},r${i % 7}\n`);
    // Rows a whole read leaves out: a missing reading, a bad number, a wrong field count.
    if (i === 1000) parts.push('5.5,,r\n');
    if (i === 2000) parts.push('6.5,1.2.3,r\n');
    if (i === 3000) parts.push('7.5,1\n');
  }
  writeFileSync(path, parts.join('') + extra);
}

function plan(resample: FitPlan['options']['resample'], memoryBudget?: number, more: Partial<FitPlan> = {}): FitPlan {
  return {
    columns: { x: 'x', y: 'y' },
    tune: true,
    options: { kind: 'natural-spline', candidates: [2, 3, 4, 5, 6, 8, 10, 12], resample, rule: { kind: 'one-se' }, seed: 4 },
    output: DEFAULT_OUTPUT,
    ...(memoryBudget !== undefined ? { memoryBudget } : {}),
    ...more,
  };
}

function relClose(a: number, b: number, tol: number, what: string): void {
  assert.ok(Math.abs(a - b) <= tol * Math.max(Math.abs(a), Math.abs(b), 1e-300), `${what}: ${a} against ${b}`);
}

/** A progress that runs `at` once when the message of pass `pass` arrives. */
function onPass(pass: number, at: () => void): Progress {
  let done = false;
  return {
    report: (_d, _t, message) => {
      if (!done && message.startsWith(`pass ${pass} `)) {
        done = true;
        at();
      }
    },
    cancelled: () => false,
  };
}

describe('streamed fit (data larger than the memory budget)', function () {
  this.timeout(120_000);
  let dir = '';
  let file = '';
  let whole: PipelineRun;
  let streamed: PipelineRun;

  before(async () => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-stream-'));
    file = join(dir, 'big.csv');
    writeReadings(file, 200_000, 9);
    whole = await runPipeline(file, plan({ kind: 'bundles', resamples: 12 }), dir);
    streamed = await runPipeline(file, plan({ kind: 'bundles', resamples: 12 }, 1), dir);
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  it('streams under a budget of 1 MiB, and the same file is read whole at the default budget', () => {
    assert.ok(streamed.streamed !== undefined, 'streamed');
    assert.ok((streamed.streamed?.passes as number) >= 4);
    assert.equal(whole.streamed, undefined);
  });

  it('gives the knots of the whole read exactly and its coefficients and statistics to 1e-12', () => {
    const a = streamed.fit;
    const b = whole.fit;
    assert.equal(a.df, b.df);
    assert.deepEqual(Array.from(a.knots), Array.from(b.knots));
    a.coefficients.forEach((c, k) => relClose(c, b.coefficients[k] as number, 1e-12, `coefficient ${k}`));
    for (const key of ['rss', 'sigma', 'r2', 'aic', 'aicc', 'bic', 'gcv', 'looRmse'] as const) relClose(a[key], b[key], 1e-12, key);
    assert.equal(streamed.rowsUsed, whole.rowsUsed);
    assert.equal(streamed.table.rowCount, whole.table.rowCount);
    assert.equal(streamed.table.sha256, whole.table.sha256);
  });

  it("gives every candidate the whole read's knots, bundle errors and information criteria", () => {
    const a = streamed.analysis?.tune.candidates ?? [];
    const b = whole.analysis?.tune.candidates ?? [];
    assert.equal(a.length, b.length);
    a.forEach((c, k) => {
      const d = b[k];
      assert.equal(c.df, d?.df);
      relClose(c.errors.rmse?.mean as number, d?.errors.rmse?.mean as number, 1e-12, `df ${c.df} mean RMSE`);
      relClose(c.errors.rmse?.se as number, d?.errors.rmse?.se as number, 1e-9, `df ${c.df} SE`);
      relClose(c.aic as number, d?.aic as number, 1e-12, `df ${c.df} AIC`);
      assert.deepEqual(Array.from(streamed.analysis?.fits.get(c.df)?.knots ?? []), Array.from(whole.analysis?.fits.get(c.df)?.knots ?? []), `df ${c.df} knots`);
    });
    assert.equal(streamed.analysis?.tune.selected.df, whole.analysis?.tune.selected.df);
  });

  it('lists the rejected rows and the influential rows of the whole read, and writes the same table', () => {
    assert.deepEqual(streamed.selection.rejected, whole.selection.rejected);
    assert.equal(streamed.selection.rejected.length, 3);
    const a = streamed.diagnostics.influential;
    const b = whole.diagnostics.influential;
    assert.ok(b.total >= 5, `the planted outliers stand out (${b.total})`);
    assert.equal(a.total, b.total);
    a.rows.forEach((r, k) => {
      const s = b.rows[k];
      assert.equal(r.line, s?.line);
      assert.deepEqual(r.exceeds, s?.exceeds);
      relClose(r.cooksDistance, s?.cooksDistance as number, 1e-9, `Cook's distance of line ${r.line}`);
      relClose(r.studentized, s?.studentized as number, 1e-9, `studentized residual of line ${r.line}`);
      relClose(r.leverage, s?.leverage as number, 1e-9, `leverage of line ${r.line}`);
    });
    assert.equal(streamed.deliverables.files[0]?.text, whole.deliverables.files[0]?.text);
  });

  it('states the streaming in the fit notes, the explanation and the record, and records the budget', () => {
    const record = streamed.deliverables.record as { spec: { memoryBudget?: number; resampling: string }; fit: { notes: string[] }; selection: { reason: string }; regenerate: string };
    assert.equal(record.spec.memoryBudget, 1);
    assert.match(record.regenerate, /--memory-budget 1 /);
    assert.match(record.fit.notes.join(' '), /streamed from the file in \d+ passes/);
    assert.match(record.fit.notes.join(' '), /Shapiro-Wilk, Durbin-Watson, Breusch-Pagan, lack of fit and the row-order check were not run/);
    assert.match(record.selection.reason, /resampled by bundles:12 .*streamed from disk in passes above the memory budget/);
    const plain = whole.deliverables.record as { spec: Record<string, unknown> };
    assert.equal('memoryBudget' in plain.spec, false, 'a run at the default budget records none');
  });

  it('runs the bootstrap as bundles with as many resamples, and says so in the record', async () => {
    const run = await runPipeline(file, plan({ kind: 'bootstrap', resamples: 12 }, 1), dir);
    const record = run.deliverables.record as { spec: { resampling: string }; regenerate: string };
    assert.equal(record.spec.resampling, 'bundles:12');
    assert.match(record.regenerate, /--resampling bundles:12/);
    assert.deepEqual(run.streamed?.asked, { kind: 'bootstrap', resamples: 12 });
    relClose(run.fit.coefficients[0] as number, streamed.fit.coefficients[0] as number, 0, 'the same fit as bundles:12');
  });

  it('stops with a message when the file grows between passes', async () => {
    const copy = join(dir, 'growing.csv');
    writeReadings(copy, 20_000, 3);
    await assert.rejects(
      runPipeline(copy, plan({ kind: 'bundles', resamples: 4 }, 1), dir, undefined, { progress: onPass(3, () => appendFileSync(copy, '1,2,r\n')) }),
      (e: unknown) => e instanceof InputError && /the file changed while it was read in passes \(pass 3: its size differs/.test(e.message) && e.place.file === copy,
    );
  });

  it('stops with a message when bytes change between passes while the size and modification time stay', async () => {
    const copy = join(dir, 'edited.csv');
    writeReadings(copy, 20_000, 3);
    const { atime, mtime } = statSync(copy);
    const edit = (): void => {
      const text = readFileSync(copy, 'utf8');
      const at = text.indexOf(',', 5000) + 1;
      // Another digit in a reading: the same size, the same x.
      const swapped = text.slice(0, at) + (text[at] === '1' ? '2' : '1') + text.slice(at + 1);
      writeFileSync(copy, swapped);
      utimesSync(copy, atime, mtime);
    };
    await assert.rejects(
      runPipeline(copy, plan({ kind: 'bundles', resamples: 4 }, 1), dir, undefined, { progress: onPass(2, edit) }),
      (e: unknown) => e instanceof InputError && /the file changed while it was read in passes \(pass 2: its (SHA-256|modification time) differs/.test(e.message),
    );
  });
});

describe('streamed fit with weights', function () {
  this.timeout(120_000);
  it("gives the whole read's knots, coefficients, statistics and bundle errors to 1e-12 with a column of prior weights", async () => {
    const dir = mkdtempSync(join(tmpdir(), 'knotwise-stream-w-'));
    try {
      const file = join(dir, 'weighted.csv');
      const rng = new RandomStream(17, 0);
      const u = (): number => (rng.int(2 ** 30) + 0.5) / 2 ** 30;
      const lines = ['x,y,w'];
      for (let i = 0; i < 60_000; i++) {
        const x = u() * 5;
        const w = 0.5 + u() * 3;
        lines.push(`${x.toFixed(5)},${(Math.exp(-x) + (0.1 / Math.sqrt(w)) * Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u())).toFixed(6)},${w.toFixed(3)}`);
      }
      writeFileSync(file, lines.join('\n') + '\n');
      const weighted = (budget?: number): FitPlan => ({ ...plan({ kind: 'bundles', resamples: 10 }, budget), columns: { x: 'x', y: 'y', weights: 'w' } });
      const s = await runPipeline(file, weighted(1), dir);
      const w = await runPipeline(file, weighted(), dir);
      assert.ok(s.streamed && !w.streamed);
      assert.deepEqual(Array.from(s.fit.knots), Array.from(w.fit.knots));
      s.fit.coefficients.forEach((c, k) => relClose(c, w.fit.coefficients[k] as number, 1e-12, `coefficient ${k}`));
      for (const key of ['sigma', 'r2', 'aic', 'bic', 'gcv', 'looRmse'] as const) relClose(s.fit[key], w.fit[key], 1e-12, key);
      s.analysis?.tune.candidates.forEach((c, k) => relClose(c.errors.rmse?.mean as number, w.analysis?.tune.candidates[k]?.errors.rmse?.mean as number, 1e-12, `df ${c.df}`));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('streamed fit: bad input', function () {
  this.timeout(60_000);
  let dir = '';
  before(() => {
    dir = mkdtempSync(join(tmpdir(), 'knotwise-stream-bad-'));
  });
  after(() => rmSync(dir, { recursive: true, force: true }));

  /** The error of runPipeline on `text` streamed and read whole: both must fail alike. */
  async function bothFail(name: string, text: string): Promise<[InputError, InputError]> {
    const file = join(dir, name);
    writeFileSync(file, text);
    const errors: InputError[] = [];
    for (const budget of [1, undefined]) {
      try {
        await runPipeline(file, plan({ kind: 'bundles', resamples: 4 }, budget), dir);
        assert.fail(`${name} (${budget === undefined ? 'whole' : 'streamed'}) should fail`);
      } catch (e) {
        assert.ok(e instanceof InputError, String(e));
        errors.push(e);
      }
    }
    return errors as [InputError, InputError];
  }

  const rows = (n: number, bad: (i: number) => string | undefined): string => {
    const lines = ['x,y'];
    for (let i = 0; i < n; i++) lines.push(bad(i) ?? `${i / 10},${Math.sin(i / 10).toFixed(4)}`);
    return lines.join('\n') + '\n';
  };

  it('reports a value beyond the limits with the file, line and column, as a whole read does', async () => {
    const [s, w] = await bothFail(
      'huge-x.csv',
      rows(500, (i) => (i === 321 ? '1e301,2' : undefined)),
    );
    assert.equal(s.message, w.message);
    assert.equal(s.place.line, 323);
    assert.equal(s.place.column, 'x');
  });

  it('refuses a column of text naming a cell, its line and column, as a whole read does', async () => {
    const [s, w] = await bothFail(
      'text-y.csv',
      rows(500, (i) => (i > 2 ? `${i},n${i}` : undefined)),
    );
    assert.equal(s.message, w.message);
    assert.match(s.message, /column "y" is not numeric/);
    assert.equal(s.place.line, w.place.line);
    assert.equal(s.place.column, 'y');
  });

  it('reports an empty file and a file without data rows as a whole read does', async () => {
    for (const [name, text] of [
      ['empty.csv', ''],
      ['header-only.csv', 'x,y\n'],
      ['no-usable.csv', 'x,y\nNA,1\n2,NA\n'],
    ] as const) {
      const [s, w] = await bothFail(name, text);
      assert.equal(s.message, w.message, name);
    }
  });

  it('lists bad cells with their line, column and reason as a whole read does', async () => {
    const file = join(dir, 'cells.csv');
    writeFileSync(
      file,
      rows(3000, (i) => (i === 10 ? '1,abc' : i === 20 ? '2,1.234,5' : i === 30 ? '3;4' : i === 40 ? '4,-' : i === 50 ? '0x10,1' : undefined)),
    );
    const s = await runPipeline(file, plan({ kind: 'bundles', resamples: 4 }, 1), dir);
    const w = await runPipeline(file, plan({ kind: 'bundles', resamples: 4 }), dir);
    assert.ok(s.streamed && !w.streamed);
    assert.deepEqual(s.selection.rejected, w.selection.rejected);
    assert.deepEqual(
      s.selection.rejected.map((r) => [r.line, r.column]),
      [
        [12, 'y'],
        [22, ''],
        [32, ''],
        [42, 'y'],
        [52, 'x'],
      ],
    );
  });

  it('refuses, with what to do, what it does not stream', async () => {
    const file = join(dir, 'ok.csv');
    writeFileSync(
      file,
      rows(400, () => undefined),
    );
    const refuse = async (p: FitPlan, pattern: RegExp): Promise<void> => {
      await assert.rejects(runPipeline(file, p, dir), (e: unknown) => e instanceof InputError && pattern.test(e.message) && /raise --memory-budget/.test(e.message));
    };
    await refuse(plan({ kind: 'folds', folds: 10, repeats: 1 }, 1), /--resampling folds:10 is not available streamed/);
    await refuse({ ...plan({ kind: 'bundles', resamples: 4 }, 1), output: { ...DEFAULT_OUTPUT, report: true } }, /--report/);
    await refuse({ ...plan({ kind: 'bundles', resamples: 4 }, 1), options: { ...plan({ kind: 'bundles', resamples: 4 }).options, kind: 'polynomial' } }, /the curve polynomial/);
    await refuse(plan({ kind: 'bundles', resamples: 4 }, 1, { options: { ...plan({ kind: 'bundles', resamples: 4 }).options, holdout: 0.2 } }), /--holdout/);
  });
});

describe('knotwise fit --memory-budget', () => {
  it('refuses a budget outside its limits, and help lists the option with its default', async () => {
    const bad = await runMain('fit', 'data.csv', '--x', 'x', '--y', 'y', '--memory-budget', '0');
    assert.equal(bad.code, 2);
    assert.match(bad.stderr, /the memory budget is a whole number of MiB from 1 to 1048576; got "0"/);
    const help = await runMain('fit', '--help');
    assert.match(help.stdout, /--memory-budget <MiB>/);
    assert.match(help.stdout, /320/);
  });
});

describe('knotwise check on a streamed record', function () {
  this.timeout(120_000);
  it('passes on the record a streamed fit wrote, and fails after a change of the data', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'knotwise-stream-check-'));
    try {
      const file = join(dir, 'cal.csv');
      writeReadings(file, 30_000, 5);
      const fit = await runMain('fit', file, '--x', 'x', '--y', 'y', '--df', '2,4,6,8', '--resampling', 'bootstrap:8', '--memory-budget', '1', '--out', dir, '--quiet');
      assert.equal(fit.code, 0, fit.stderr);
      const ok = await runCheckIn(dir);
      assert.equal(ok.code, 0, ok.stdout + ok.stderr);
      const text = readFileSync(file, 'utf8');
      writeFileSync(
        file,
        text.replace(/\n(\d+\.\d)\d/, (_m, head: string) => `\n${head}9`),
      );
      const changed = await runCheckIn(dir);
      assert.equal(changed.code, 1, changed.stdout + changed.stderr);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
