/**
 * Tests of the bundle resampling (core/stream/bundles.ts, core/registry/resampling/bundles.ts):
 * its rows and weights follow the seeded hash and draw; each resample's RMSE from the
 * per-bundle power sums equals a row-by-row weighted least-squares fit of the same basis on
 * the drawn rows (core/fit/linearFit.ts fitRowBasis, itself checked against R's lm); and it
 * agrees with the ordinary bootstrap (Efron & Tibshirani 1993, chapter 6) on data whose true
 * curve and noise are known: mean RMSE per candidate within 2 %, the same chosen df, and at
 * a df with negligible bias both near sqrt(sigma^2 (1 + df / n)), the expected prediction
 * error of a linear smoother with df parameters (Hastie, Tibshirani & Friedman 2009,
 * section 7.3; the 4 % tolerance is a stated allowance for 50 resamples). Data: seeded
 * invented readings (property tests).
 */
import { strict as assert } from 'node:assert';
import { ExtrapolatingBSplineBasis, naturalKnots } from '../../../core/basis/naturalSpline';
import { fitRowBasis, RowBasisCurve } from '../../../core/fit/linearFit';
import { prepareData } from '../../../core/fit/prepared';
import { nullSpace } from '../../../core/linalg/nullSpace';
import { parseResampling, formatResampling } from '../../../core/registry/resampling/index';
import { bundleCount, bundleCounts, bundleOf, MAX_BUNDLES } from '../../../core/stream/bundles';
import { RandomStream } from '../../../core/tune/rng';
import { tuneCurve } from '../../../core/tune/tune';
import type { XYData } from '../../../core/types';

const SIGMA = 0.3;

/** n readings of sin(x) + 0.5 sin(3x) on x uniform in [0, 10) with normal noise of SD SIGMA (Box-Muller), seeded. */
function readings(n: number, seed: number): XYData {
  const rng = new RandomStream(seed, 0);
  const u = (): number => (rng.int(2 ** 30) + 0.5) / 2 ** 30;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const xi = u() * 10;
    x[i] = xi;
    y[i] = Math.sin(xi) + 0.5 * Math.sin(3 * xi) + SIGMA * Math.sqrt(-2 * Math.log(u())) * Math.cos(2 * Math.PI * u());
  }
  return { x, y };
}

describe('bundles resampling', () => {
  it('reads and writes its text form, with the limits of the bootstrap', () => {
    assert.deepEqual(parseResampling('bundles:50'), { kind: 'bundles', resamples: 50 });
    assert.equal(formatResampling({ kind: 'bundles', resamples: 7 }), 'bundles:7');
    assert.throws(() => parseResampling('bundles:1'), /2 to 5000/);
  });

  it('deals rows evenly: every bundle gets about n / B rows (chi-square below its 0.999 quantile)', () => {
    const n = 200_000;
    const B = bundleCount(n);
    assert.equal(B, MAX_BUNDLES);
    const got = new Float64Array(B);
    for (let i = 0; i < n; i++) {
      const b = bundleOf(i, 1, B);
      got[b] = (got[b] as number) + 1;
    }
    const e = n / B;
    let chi2 = 0;
    for (const g of got) chi2 += (g - e) ** 2 / e;
    // The 0.999 quantile of chi-square on 1,023 df is about 1,168 (qchisq(0.999, 1023) in R).
    assert.ok(chi2 < 1168, `chi-square ${chi2}`);
    let moved = 0;
    for (let i = 0; i < 1000; i++) if (bundleOf(i, 1, B) !== bundleOf(i, 2, B)) moved++;
    // Two independent deals agree on a row with probability 1 / B.
    assert.ok(moved > 990, `another seed deals ${moved} of 1,000 rows elsewhere`);
    const counts = new Uint32Array(B);
    bundleCounts(B, 1, 0, counts);
    assert.equal(
      counts.reduce((a, b) => a + b, 0),
      B,
    );
  });

  it('each resample RMSE equals a row-by-row weighted fit on the drawn rows, error on the rows of the bundles left out (to 1e-9)', async () => {
    const data = readings(3000, 21);
    const prepared = prepareData(data);
    const df = 6;
    const seed = 3;
    const { result } = await tuneCurve(prepared, { kind: 'natural-spline', candidates: [df], resample: { kind: 'bundles', resamples: 4 }, rule: { kind: 'least-error' }, seed });
    const values = result.candidates[0]?.errors.rmse?.values as readonly number[];
    const k = naturalKnots(prepared.sortedX, prepared.distinct, df);
    const basis = new ExtrapolatingBSplineBasis(k.lower, k.upper, k.interior);
    const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
    const n = data.x.length;
    const B = bundleCount(n);
    const counts = new Uint32Array(B);
    for (let r = 0; r < 4; r++) {
      bundleCounts(B, seed, r, counts);
      const train: number[] = [];
      const test: number[] = [];
      for (let i = 0; i < n; i++) (counts[bundleOf(i, seed, B)] === 0 ? test : train).push(i);
      const pick = (a: Float64Array, rows: number[]): Float64Array => Float64Array.from(rows, (i) => a[i] as number);
      const w = Float64Array.from(train, (i) => counts[bundleOf(i, seed, B)] as number);
      const lin = fitRowBasis({ x: pick(data.x, train), y: pick(data.y, train), w }, basis, z, 'reference');
      const curve = new RowBasisCurve('natural-spline', df, k.lower, k.upper, basis, lin.centred, lin.cov, z, lin.offset);
      let sse = 0;
      for (const i of test) sse += ((data.y[i] as number) - curve.value(data.x[i] as number)) ** 2;
      const rmse = Math.sqrt(sse / test.length);
      assert.ok(Math.abs((values[r] as number) / rmse - 1) < 1e-9, `resample ${r}: ${values[r]} against ${rmse}`);
    }
  });

  it('agrees with the ordinary bootstrap: mean RMSE per candidate within 2 %, the same df chosen, both near sigma sqrt(1 + df / n) at df 20', async function () {
    this.timeout(60_000);
    const dfs = [2, 3, 4, 5, 6, 7, 8, 10, 12, 15, 20];
    for (const [n, seed] of [
      [2000, 11],
      [2000, 12],
      [2000, 13],
      [20_000, 14],
      [20_000, 15],
    ] as const) {
      const prepared = prepareData(readings(n, seed));
      const run = (resample: { kind: 'bootstrap' | 'bundles'; resamples: number }) => tuneCurve(prepared, { kind: 'natural-spline', candidates: dfs, resample, rule: { kind: 'one-se' }, seed: 1 });
      const boot = (await run({ kind: 'bootstrap', resamples: 50 })).result;
      const bund = (await run({ kind: 'bundles', resamples: 50 })).result;
      boot.candidates.forEach((c, k) => {
        const a = c.errors.rmse?.mean as number;
        const b = bund.candidates[k]?.errors.rmse?.mean as number;
        assert.ok(Math.abs(b / a - 1) < 0.02, `n ${n}, seed ${seed}, df ${c.df}: bundles ${b}, bootstrap ${a}`);
      });
      assert.equal(bund.selected.df, boot.selected.df, `n ${n}, seed ${seed}: the chosen df`);
      const expected = SIGMA * Math.sqrt(1 + 20 / n);
      for (const r of [boot, bund]) {
        const at20 = r.candidates.find((c) => c.df === 20)?.errors.rmse?.mean as number;
        assert.ok(Math.abs(at20 / expected - 1) < 0.04, `n ${n}, seed ${seed}: ${formatResampling(r.resample)} at df 20 ${at20}, expected ${expected}`);
      }
    }
  });
});
