/**
 * The residual checks with the design tests' cross products summed on a helper thread
 * (core/analysis/diagnose.ts diagnoseAside, core/analysis/designSums.ts, the lending
 * workerRunner of core/node/pool.ts) against the same checks on one thread (diagnose, whose
 * statistics are checked against R in test/reference). Tolerance 0: the helper adds the
 * same products in the same order, so every number must be the same double. The data are
 * invented and seeded (test/unit/stats/seededNormal.ts); only the agreement is tested.
 */
import { strict as assert } from 'node:assert';
import { analyse } from '../../../core/analysis/analysis';
import { ASIDE_ROWS, diagnose, diagnoseAside } from '../../../core/analysis/diagnose';
import type { ChecksAside, DesignSumsJob } from '../../../core/analysis/designSums';
import { basisFromSpec, ExtrapolatingBSplineBasis } from '../../../core/basis/naturalSpline';
import { workerRunner } from '../../../core/node/pool';
import type { DesignCrossProducts } from '../../../core/stats/designCrossProducts';
import type { AnalysisOptions } from '../../../core/analysis/types';
import type { XYData } from '../../../core/types';
import { seededNormals } from '../stats/seededNormal';

const N = ASIDE_ROWS + 20_000;

/** N rows, x scattered over [0, 10] (not sorted), y a smooth curve plus seeded noise, optional seeded weights in [0.5, 2]. */
function rows(seed: number, weighted: boolean, exact = false): XYData {
  const e = seededNormals(seed, 2 * N);
  const x = Float64Array.from({ length: N }, (_, i) => 5 + 5 * Math.tanh(e[i] as number));
  const y = Float64Array.from(x, (v, i) => (exact ? 2 + 0.5 * v : Math.sin(v) + 0.05 * v * v + 0.2 * (e[N + i] as number)));
  const w = weighted ? Float64Array.from(x, (_, i) => 0.5 + 1.5 / (1 + Math.exp(-(e[(i + 7) % N] as number)))) : undefined;
  return { x, y, w, lines: Int32Array.from(x, (_, i) => i + 2) };
}

const options: AnalysisOptions = { kind: 'natural-spline', candidates: [4, 6, 8], resample: { kind: 'bootstrap', resamples: 4 }, rule: { kind: 'least-error' }, seed: 3 };

/** The runner's aside, recording what each designSums call gave. */
function watched(aside: ChecksAside): ChecksAside & { readonly given: (Promise<DesignCrossProducts | undefined> | undefined)[] } {
  const given: (Promise<DesignCrossProducts | undefined> | undefined)[] = [];
  return {
    given,
    designSums(job: DesignSumsJob) {
      const p = aside.designSums(job);
      given.push(p);
      return p;
    },
  };
}

describe('residual checks with the design sums on a helper thread', function () {
  this.timeout(120_000);

  for (const weighted of [false, true]) {
    it(`${weighted ? 'weighted' : 'unweighted'} rows: analyse with a lending runner gives the one-thread checks to the last bit, the sums coming from the helper`, async () => {
      const data = rows(weighted ? 12 : 11, weighted);
      const runner = workerRunner(2, { lend: true });
      const aside = watched(runner);
      const analysis = await analyse(data, options, runner, undefined, aside);
      assert.equal(aside.given.length, 1, 'one job');
      assert.notEqual(aside.given[0], undefined, 'a worker was lent after the resamples');
      assert.notEqual(await aside.given[0], undefined, 'the helper summed the cross products');
      assert.deepStrictEqual(analysis.diagnostics, diagnose(analysis.data, analysis.chosen));
      assert.ok(analysis.diagnostics.durbinWatson && analysis.diagnostics.breuschPagan, 'both design tests ran');
    });
  }

  it('a fit through every reading abandons the job (the helper gives nothing), and the lent worker serves the next job', async () => {
    const runner = workerRunner(2, { lend: true });
    const exact = rows(13, false, true);
    const first = await analyse(exact, options, runner, undefined, 'when-read');
    const aside = watched(runner);
    const checks = await diagnoseAside(first.data, first.chosen, aside);
    assert.ok(checks.exactFit, 'precondition: an exact fit');
    assert.equal(await aside.given[0], undefined, 'abandoned');
    assert.deepStrictEqual(checks, diagnose(first.data, first.chosen));
    const noisy = rows(14, false);
    const second = await analyse(noisy, options, inlineOnly(), undefined, 'when-read');
    const again = await diagnoseAside(second.data, second.chosen, aside);
    assert.notEqual(await aside.given[1], undefined, 'the same worker summed the next job');
    assert.deepStrictEqual(again, diagnose(second.data, second.chosen));
  });

  it('with no thread to lend (a runner without `lend`), or a helper that gives nothing, the checks sum on their own thread', async () => {
    const data = rows(15, true);
    const runner = workerRunner(2);
    const analysis = await analyse(data, options, runner, undefined, 'when-read');
    const aside = watched(runner);
    const alone = await diagnoseAside(analysis.data, analysis.chosen, aside);
    assert.deepStrictEqual(aside.given, [undefined], 'nothing lent');
    // A helper that fails resolves to no sums (core/node/pool.ts): finish sums them itself.
    const failing: ChecksAside = { designSums: () => Promise.resolve(undefined) };
    const fallback = await diagnoseAside(analysis.data, analysis.chosen, failing);
    const reference = diagnose(analysis.data, analysis.chosen);
    assert.deepStrictEqual(alone, reference);
    assert.deepStrictEqual(fallback, reference);
  });

  it('basisFromSpec rebuilds a natural-spline basis whose rows are the same doubles, inside and beyond the knots', () => {
    const basis = new ExtrapolatingBSplineBasis(-1.5, 7.25, Float64Array.of(0.1, 1.7, 3.3333333333333335, 5.9));
    const again = basisFromSpec(basis.spec());
    const a = new Float64Array(4);
    const b = new Float64Array(4);
    const xs = seededNormals(16, 2000).map((z) => 3 + 4 * z);
    for (const x of [...xs, -1.5, 7.25, 0.1, 5.9]) {
      assert.equal(again.row(x, b), basis.row(x, a), `first index at ${x}`);
      assert.deepStrictEqual(Array.from(b), Array.from(a), `row at ${x}`);
    }
  });
});

/** A runner that resamples on this thread (so it lends nothing). */
function inlineOnly(): Parameters<typeof analyse>[2] {
  return workerRunner(1);
}
