/**
 * Tests of the error figure's window around a decision (core/view/errorFocus.ts). The worked
 * case is datasets::cars (Ezekiel 1930; test/reference/fixtures/fits.json) tuned with the
 * one-SE rule; the invariants are seeded property tests on invented candidate errors.
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { analyse } from '../../../core/analysis/analysis';
import type { ErrorPoint } from '../../../core/plots/errorByDf';
import { selectDf } from '../../../core/tune/rules';
import { decisionWindow } from '../../../core/view/errorFocus';
import { errorPoints } from '../../../core/view/figureCatalogue';

const CARS = (JSON.parse(readFileSync(join(__dirname, '..', '..', 'reference', 'fixtures', 'fits.json'), 'utf8')) as { datasets: { cars: { x: number[]; y: number[] } } }).datasets.cars;

/** Candidate errors: df 2..(1 + n), means and standard errors drawn by fast-check. */
const candidates = fc
  .array(fc.record({ mean: fc.double({ min: 0.01, max: 100, noNaN: true }), se: fc.oneof(fc.double({ min: 0, max: 10, noNaN: true }), fc.constant(NaN)) }), { minLength: 3, maxLength: 30 })
  .map((a) => a.map((e, i): ErrorPoint => ({ df: i + 2, ...e })));

describe('decisionWindow', () => {
  it('decisionWindow (cars, one-SE rule) covers the chosen df, the least-error df and the threshold, and leaves stiffer candidates out', async () => {
    const data = { x: Float64Array.from(CARS.x), y: Float64Array.from(CARS.y), lines: Int32Array.from(CARS.x, (_, i) => i + 2) };
    const a = await analyse(data, { kind: 'polynomial', candidates: [1, 2, 3, 4, 5, 6, 7, 8], resample: { kind: 'folds', folds: 5, repeats: 4 }, rule: { kind: 'one-se' }, seed: 7 });
    const points = errorPoints(a.tune.candidates, a.tune.metric);
    const sel = selectDf(a.tune.candidates, { kind: 'one-se' }, a.tune.metric);
    const w = decisionWindow(points, sel.df, sel.threshold);
    const best = points.reduce((b, p) => (p.mean < b.mean ? p : b));
    // The window is there only when it differs from the whole; for this fixture the constant (df 1) is far off.
    assert.ok(w, 'the window zooms in');
    for (const df of [sel.df, best.df]) assert.ok(df >= w.df[0] && df <= w.df[1], `df ${df} in ${w.df.join('..')}`);
    for (const v of [sel.threshold as number, best.mean]) assert.ok(v > w.error[0] && v < w.error[1], `${v} in ${w.error.join('..')}`);
    const constant = points.find((p) => p.df === 1);
    assert.ok(constant && constant.mean > w.error[1], 'the constant curve lies above the window');
  });

  it('decisionWindow always holds the chosen df, the least error and the threshold, within the candidates (property, seed 14)', () => {
    fc.assert(
      fc.property(candidates, fc.nat(), fc.double({ min: 0, max: 0.5, noNaN: true }), (points, pick, lift) => {
        const chosen = points[pick % points.length] as ErrorPoint;
        const best = points.reduce((b, p) => (p.mean < b.mean ? p : b));
        const threshold = Math.max(chosen.mean, best.mean) * (1 + lift);
        const w = decisionWindow(points, chosen.df, threshold);
        if (!w) return;
        assert.ok(w.df[0] >= 2 && w.df[1] <= points.length + 1 && w.df[0] < w.df[1]);
        for (const df of [chosen.df, best.df]) assert.ok(df >= w.df[0] && df <= w.df[1]);
        for (const v of [threshold, chosen.mean, best.mean]) assert.ok(v >= w.error[0] && v <= w.error[1], `${v} outside ${w.error.join('..')}`);
      }),
      { seed: 14, numRuns: 500 },
    );
  });

  it('decisionWindow caps the error range, so a far-off candidate cannot squeeze the decision (property, seed 15)', () => {
    fc.assert(
      fc.property(candidates, fc.double({ min: 1e3, max: 1e6, noNaN: true }), (points, far) => {
        // The stiffest candidate far above the rest, the least error at the last one and the one-SE rule's threshold.
        const pts = points.map((p, i) => (i === 0 ? { ...p, mean: far } : p));
        const best = pts.reduce((b, p) => (p.mean < b.mean ? p : b));
        const se = Number.isFinite(best.se) ? best.se : 0;
        const w = decisionWindow(pts, best.df, best.mean + se);
        if (!w) return;
        const unit = Math.max(se, 0);
        if (unit === 0) return;
        // At most the decision's own spread plus 3 + 2 units of it, padded by 8 % at each end.
        const top = best.mean + se;
        const bottom = best.mean - se;
        assert.ok(w.error[1] - w.error[0] <= (top - bottom + 5 * unit) * 1.16 * (1 + 1e-9), `${w.error.join('..')} for ${best.mean} ± ${se}`);
      }),
      { seed: 15, numRuns: 300 },
    );
  });

  it('decisionWindow is undefined with fewer than three candidates, without the chosen df, or when the window would show everything', () => {
    const two: ErrorPoint[] = [
      { df: 2, mean: 2.12, se: 0.1 },
      { df: 3, mean: 2, se: 0.1 },
    ];
    assert.equal(decisionWindow(two, 3, 2.1), undefined);
    const three: ErrorPoint[] = [...two, { df: 4, mean: 2.05, se: 0.1 }];
    assert.equal(decisionWindow(three, 9, 2.1), undefined, 'the chosen df is no candidate');
    // All three close together: the window would be the whole figure.
    assert.equal(decisionWindow(three, 3, 2.1), undefined);
    // One of them far above (30 units of the decision's spread): the window leaves it out.
    const far = decisionWindow([{ df: 2, mean: 5, se: 0.1 }, ...three.slice(1)], 3, 2.1);
    assert.ok(far && far.error[1] < 5, 'the far-off candidate is outside the window');
    // No spread at all (equal means, no SE, no threshold): nothing to zoom on.
    const flat: ErrorPoint[] = [2, 3, 4, 5].map((df) => ({ df, mean: 1, se: NaN }));
    assert.equal(decisionWindow(flat, 3), undefined);
  });
});
