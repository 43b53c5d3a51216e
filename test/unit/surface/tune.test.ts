/**
 * tuneSurface and selectPair (core/surface/tune.ts, select.ts) on seeded invented data and
 * on datasets::airquality (the fixture of test/reference/r/surface.R, used here only as
 * data). The sums engine is checked against refits from the rows, exact leave-one-out
 * against refits without each row, and the choice against the rules' definitions
 * (docs/design.md, "Selection rules"), each named beside its check.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../../../core/errors';
import { fitSurfaceBasis, landscapeLines, prepareSurface, selectPair, simplerFirst, surfaceBasis, tuneSurface, type SurfaceCandidate, type SurfaceData } from '../../../core/surface/index';

interface Dataset {
  readonly u: number[];
  readonly v: number[];
  readonly y: number[];
}
const fixture = JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'surface.json'), 'utf8')) as { datasets: Record<string, Dataset> };
const aq = fixture.datasets.airquality as Dataset;
const airquality: SurfaceData = { u: Float64Array.from(aq.u), v: Float64Array.from(aq.v), y: Float64Array.from(aq.y), names: { u: 'Temp', v: 'Wind', y: 'Ozone' } };

function weighted(data: SurfaceData): SurfaceData {
  return { ...data, w: Float64Array.from(data.u, (_, i) => 0.5 + ((i * 37) % 11) / 7) };
}

function relClose(what: string, a: number, b: number, rel: number): void {
  assert.ok(Math.abs(a - b) <= rel * Math.abs(b), `${what}: ${a} against ${b}`);
}

describe('tuneSurface', () => {
  for (const resample of [
    { kind: 'bootstrap', resamples: 12 },
    { kind: 'folds', folds: 5, repeats: 2 },
  ] as const) {
    it(`with ${resample.kind} gives from the per-cell sums the errors of refits from the rows (to 1e-9), weighted`, async () => {
      // Source: the sums hold exactly the terms of the Gram matrix, right-hand side and squared
      // error of the rows they summarise (docs/design.md, "Power sums"); the reference is a weighted least-squares refit row by row.
      const data = weighted(airquality);
      const options = { candidatesU: [1, 2, 3, 5], candidatesV: [1, 2, 4], resample, rule: { kind: 'one-se' } as const, seed: 17, rowErrors: true };
      const sums = await tuneSurface(data, { ...options, engine: 'sums' });
      const rows = await tuneSurface(data, { ...options, engine: 'rows' });
      assert.equal(sums.result.candidates.length, 12);
      sums.result.candidates.forEach((c, k) => {
        const r = rows.result.candidates[k] as SurfaceCandidate;
        assert.deepEqual([c.dfU, c.dfV, c.skipped], [r.dfU, r.dfV, r.skipped]);
        for (const m of ['rmse', 'mae', 'maxAbs'] as const) {
          const a = c.errors[m]?.values ?? [];
          const b = r.errors[m]?.values ?? [];
          assert.equal(a.length, b.length);
          a.forEach((x, i) => relClose(`${m} of df ${c.dfU} × ${c.dfV}, resample ${i}`, x, b[i] as number, 1e-9));
        }
        relClose(`aic of df ${c.dfU} × ${c.dfV}`, c.aic as number, r.aic as number, 1e-9);
      });
      assert.deepEqual([sums.result.selected.dfU, sums.result.selected.dfV], [rows.result.selected.dfU, rows.result.selected.dfV]);
    });
  }

  it('draws the same resamples for the same seed and different ones for another seed', async () => {
    // Source: docs/design.md, "Resampling": each resample is defined by (seed, resample index).
    const options = { candidatesU: [2, 3], candidatesV: [2], resample: { kind: 'bootstrap', resamples: 5 } as const, rule: { kind: 'least-error' } as const };
    const a = await tuneSurface(airquality, { ...options, seed: 1 });
    const b = await tuneSurface(airquality, { ...options, seed: 1 });
    const c = await tuneSurface(airquality, { ...options, seed: 2 });
    assert.deepEqual(a.result.candidates[0]?.errors.rmse?.values, b.result.candidates[0]?.errors.rmse?.values);
    assert.notDeepEqual(a.result.candidates[0]?.errors.rmse?.values, c.result.candidates[0]?.errors.rmse?.values);
  });

  it('with leave-one-out gives each pair the RMSE of refits without each row', async () => {
    // Source: brute force, the pair's basis (knots from all rows) refitted n times without row i; the exact formula e_i = r_i / (1 - h_i) is what the tuning uses.
    const data = weighted({ ...airquality, u: airquality.u.subarray(0, 60), v: airquality.v.subarray(0, 60), y: airquality.y.subarray(0, 60) });
    const { result } = await tuneSurface(data, { candidatesU: [2, 3], candidatesV: [1, 3], resample: { kind: 'leave-one-out' }, rule: { kind: 'least-error' }, seed: 0 });
    const prepared = prepareSurface(data);
    const w = data.w as Float64Array;
    for (const c of result.candidates) {
      const basis = surfaceBasis(prepared, c);
      let se = 0;
      let sw = 0;
      for (let i = 0; i < 60; i++) {
        const keep = (a: Float64Array): Float64Array => Float64Array.from([...a.subarray(0, i), ...a.subarray(i + 1)]);
        const without = prepareSurface({ u: keep(data.u), v: keep(data.v), y: keep(data.y), w: keep(w) });
        const e = (data.y[i] as number) - fitSurfaceBasis(without, basis).predict(data.u[i] as number, data.v[i] as number);
        se += (w[i] as number) * e * e;
        sw += w[i] as number;
      }
      relClose(`leave-one-out RMSE of df ${c.dfU} × ${c.dfV}`, c.errors.rmse?.mean as number, Math.sqrt(se / sw), 1e-9);
    }
  });

  it('with gcv compares (RSS/n)/(1-df/n)^2 of each pair and chooses the least', async () => {
    // Source: Craven & Wahba 1979 (docs/design.md, "Resampling"); the RSS of each pair from its row-by-row fit.
    const { result } = await tuneSurface(airquality, { candidatesU: [1, 2, 3], candidatesV: [1, 2, 3], resample: { kind: 'gcv' }, rule: { kind: 'one-se' }, seed: 0 });
    const prepared = prepareSurface(airquality);
    let best = { score: Infinity, dfU: 0, dfV: 0 };
    for (const c of result.candidates) {
      const fit = fitSurfaceBasis(prepared, surfaceBasis(prepared, c));
      const n = fit.n;
      const score = fit.rss / n / (1 - c.df / n) ** 2;
      relClose(`gcv of df ${c.dfU} × ${c.dfV}`, c.errors.gcv?.mean as number, score, 1e-9);
      if (score < best.score) best = { score, dfU: c.dfU, dfV: c.dfV };
    }
    assert.deepEqual([result.selected.dfU, result.selected.dfV], [best.dfU, best.dfV]);
    assert.match(result.selected.reason, /needs a standard error/);
  });

  it('keeps a pair the data cannot support as skipped, with the reason, and the error landscape over the grid', async () => {
    // Source: docs/design.md, "df" (a df above the distinct values is skipped with the reason).
    const v = Float64Array.from(airquality.v, (x) => Math.round(x / 6)); // wind 2.3 .. 20.7 -> 0 .. 3: 4 distinct values
    const { result, fit } = await tuneSurface(
      { ...airquality, v },
      { candidatesU: [2, 3], candidatesV: [2, 6], resample: { kind: 'folds', folds: 5, repeats: 1 }, rule: { kind: 'least-error' }, seed: 4 },
    );
    const skipped = result.candidates.filter((c) => c.skipped !== undefined);
    assert.deepEqual(
      skipped.map((c) => [c.dfU, c.dfV]),
      [
        [2, 6],
        [3, 6],
      ],
    );
    assert.match(skipped[0]?.skipped as string, /df 6 in Wind needs at least 6 distinct values of Wind; the data has 4/);
    const { landscape } = result;
    assert.deepEqual(
      [landscape.dfU, landscape.dfV],
      [
        [2, 3],
        [2, 6],
      ],
    );
    for (const c of result.candidates) {
      const k = landscape.dfU.indexOf(c.dfU) * 2 + landscape.dfV.indexOf(c.dfV);
      if (c.skipped) assert.ok(Number.isNaN(landscape.mean[k]));
      else assert.equal(landscape.mean[k], c.errors.rmse?.mean);
    }
    assert.equal(fit.df, result.selected.dfU * result.selected.dfV);
    const lines = landscapeLines(result, { u: 'Temp', v: 'Wind' });
    assert.equal(lines.length, 4);
    assert.match(lines[0] as string, /Mean RMSE by df of Temp \(rows\) and df of Wind \(columns\)/);
    assert.match(lines.join('\n'), /\*/);
  });

  it('refuses a metric the scheme cannot give', async () => {
    // Source: docs/design.md, "Resampling" (GCV has a score, no resamples).
    await assert.rejects(tuneSurface(airquality, { resample: { kind: 'bootstrap', resamples: 5 }, rule: { kind: 'one-se' }, seed: 1, metric: 'gcv' }), InputError);
  });
});

describe('selectPair', () => {
  const cand = (dfU: number, dfV: number, mean: number, se = 0.1): SurfaceCandidate => ({ dfU, dfV, df: dfU * dfV, errors: { rmse: { mean, se, values: [] } } });
  const names = { u: 'speed', v: 'load' };

  it('orders pairs by dfU x dfV, then dfU + dfV, then dfU', () => {
    // Source: the order documented in docs/design.md, "Surfaces" (fewer coefficients, then fewer basis functions).
    const order = [cand(6, 2, 1), cand(3, 4, 1), cand(2, 5, 1), cand(4, 3, 1), cand(1, 1, 1)].sort(simplerFirst).map((c) => `${c.dfU}x${c.dfV}`);
    assert.deepEqual(order, ['1x1', '2x5', '3x4', '4x3', '6x2']);
  });

  it('breaks ties of the least error towards the simpler pair', () => {
    // Source: docs/design.md, "Selection rules" (ties go to the smaller df), with pairs ordered as above.
    const s = selectPair([cand(6, 2, 0.5), cand(3, 4, 0.5), cand(4, 3, 0.5), cand(5, 5, 0.7)], { kind: 'least-error' }, 'rmse', names);
    assert.deepEqual([s.dfU, s.dfV], [3, 4]);
  });

  it('applies the one-SE rule to the simplest pair under the threshold and names pairs, never ranks, in its words', () => {
    // Source: Breiman, Friedman, Olshen & Stone 1984, section 3.4.3: the simplest candidate within one SE of the least mean error.
    const cands = [cand(2, 2, 1.3), cand(3, 2, 1.05), cand(2, 4, 1.02), cand(4, 4, 1.0, 0.06), cand(6, 5, 1.01)];
    const s = selectPair(cands, { kind: 'one-se' }, 'rmse', names);
    assert.deepEqual([s.dfU, s.dfV], [3, 2]);
    assert.equal(s.threshold, 1.06);
    assert.match(
      s.ruleReason,
      /^Least mean RMSE 1(\.0+)? at df 4 × 4 \(SE 0\.06\)\. One-SE threshold 1\.06\. The simplest pair at or under it is df 3 × 2 \(1\.05\), chosen\. The next simpler pair, df 2 × 2, has 1\.3, above it\.$/,
    );
    assert.match(s.reason, /Other rules: least mean error → df 4 × 4; simplest within 2 % of the least error → df 2 × 4\./);
    assert.doesNotMatch(s.reason, /7000\d{3}/);
  });

  it('takes a picked pair only when it is an evaluated candidate', () => {
    // Source: docs/design.md, "Selection rules" (a df picked by the person must be an evaluated candidate).
    const cands = [cand(2, 2, 1.3), cand(3, 3, 1.1)];
    const s = selectPair(cands, { kind: 'pick', dfU: 2, dfV: 2 }, 'rmse', names);
    assert.deepEqual([s.dfU, s.dfV], [2, 2]);
    assert.match(s.ruleReason, /df 2 × 2 was picked by the person/);
    assert.throws(() => selectPair(cands, { kind: 'pick', dfU: 4, dfV: 2 }, 'rmse', names), /df 4 × 2 was picked but is not an evaluated candidate \(candidates: df 2 × 2, df 3 × 3\)/);
  });

  it('says when the choice uses the largest candidate df of an input', () => {
    // Source: docs/design.md, "Selection rules" (a choice at an end of the candidates: the best df may lie beyond them).
    const s = selectPair([cand(2, 2, 1.3), cand(3, 2, 1.2), cand(4, 2, 1.0)], { kind: 'least-error' }, 'rmse', names);
    assert.deepEqual(s.edge, ['u']);
    assert.match(s.caveats, /^df 4 × 2 uses the largest candidate df of speed \(4\): the best df of speed may lie beyond the candidates; widen them\.$/);
  });
});
