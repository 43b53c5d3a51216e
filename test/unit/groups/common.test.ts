/**
 * commonCurveTest: the F test of one curve for all groups against a curve per group, the
 * per-group tests, and the cross-validated errors of both models.
 *
 * Sources: the direct fits of the project on the same rows (fitNaturalSpline on the pooled
 * rows, fitRowBasis on each group's rows and on each fold's training rows: a route through
 * residuals row by row, independent of the sums the module solves from); the exactness of the
 * F test under normal errors (Seber & Lee 2003, "Linear Regression Analysis", 2nd ed., chapter
 * 4, from memory: under one common curve P(p < level) = level); the algebra of nested models
 * (with two groups, "one group has its own curve" is the separate model). Data: invented
 * device readings from a seeded generator. R's values on open datasets are checked in
 * test/reference/groups.test.ts.
 */
import { strict as assert } from 'node:assert';
import { ExtrapolatingBSplineBasis, naturalKnots } from '../../../core/basis/naturalSpline';
import { FitError, InputError } from '../../../core/errors';
import { fitRowBasis } from '../../../core/fit/linearFit';
import { fitNaturalSpline } from '../../../core/fit/naturalSpline';
import { prepareData } from '../../../core/fit/prepared';
import { commonCurveTest, groupFolds, type GroupRows } from '../../../core/groups/common';
import { nullSpace } from '../../../core/linalg/nullSpace';
import { seededNormals } from '../stats/seededNormal';

/** The invented shape all devices share: a saturating response over 0..10. */
const saturating = (x: number): number => 40 * (1 - Math.exp(-x / 3)) + 0.5 * x;
/** A straight line: inside the natural-spline space at every df, so no fit misses it. */
const line = (x: number): number => 2 + 0.5 * x;

/**
 * Invented device readings: `rows` x values spread over lo..hi (both ends included, the rest
 * at seeded positions), y = shape(x) + shift + sd * noise, optional weights 1 + (i mod 3).
 */
function device(name: string, seed: number, rows: number, options: { shift?: number; sd?: number; weighted?: boolean; lo?: number; hi?: number; shape?: (x: number) => number } = {}): GroupRows {
  const { shift = 0, sd = 1, weighted = false, lo = 0, hi = 10, shape = saturating } = options;
  const u = seededNormals(seed, 2 * rows);
  const x = new Float64Array(rows);
  const y = new Float64Array(rows);
  for (let i = 0; i < rows; i++) {
    // Evenly spaced positions, jittered by a seeded amount, ends pinned to lo and hi.
    const jitter = i === 0 || i === rows - 1 ? 0 : 0.3 * Math.tanh(u[rows + i] as number);
    x[i] = lo + ((hi - lo) * (i + jitter)) / (rows - 1);
    y[i] = shape(x[i] as number) + shift + sd * (u[i] as number);
  }
  const w = weighted ? Float64Array.from({ length: rows }, (_, i) => 1 + (i % 3)) : undefined;
  return { name, x, y, w };
}

function close(actual: number, expected: number, rel: number, what: string): void {
  assert.ok(Math.abs(actual - expected) <= rel * Math.max(Math.abs(expected), 1e-300), `${what}: ${actual} vs ${expected}`);
}

/** The pooled rows of the groups, in order. */
function pool(groups: readonly GroupRows[]): { x: Float64Array; y: Float64Array; w: Float64Array | undefined } {
  const x = Float64Array.from(groups.flatMap((g) => [...g.x]));
  const y = Float64Array.from(groups.flatMap((g) => [...g.y]));
  const w = groups.every((g) => g.w) ? Float64Array.from(groups.flatMap((g) => [...(g.w as Float64Array)])) : undefined;
  return { x, y, w };
}

/** The natural-spline basis on the knots of the pooled x at df, and its null-space map. */
function pooledBasis(groups: readonly GroupRows[], df: number): { basis: ExtrapolatingBSplineBasis; z: Float64Array } {
  const prepared = prepareData(pool(groups));
  const k = naturalKnots(prepared.sortedX, prepared.distinct, df);
  const basis = new ExtrapolatingBSplineBasis(k.lower, k.upper, k.interior);
  return { basis, z: nullSpace(basis.naturalConstraint(), 2, basis.size) };
}

/** Value of basis coefficients theta at x. */
function valueAt(basis: ExtrapolatingBSplineBasis, theta: Float64Array, x: number): number {
  const buf = new Float64Array(basis.width);
  const first = basis.row(x, buf);
  let f = 0;
  for (let a = 0; a < basis.width; a++) f += (buf[a] as number) * (theta[first + a] as number);
  return f;
}

/** Rows i of a group where keep(i), as XYData. */
function subset(g: GroupRows, keep: (i: number) => boolean): { x: Float64Array; y: Float64Array; w: Float64Array | undefined } {
  const rows = [...g.x.keys()].filter(keep);
  return {
    x: Float64Array.from(rows, (i) => g.x[i] as number),
    y: Float64Array.from(rows, (i) => g.y[i] as number),
    w: g.w ? Float64Array.from(rows, (i) => (g.w as Float64Array)[i] as number) : undefined,
  };
}

const devices = (shifts: readonly number[], weighted = false): GroupRows[] => shifts.map((shift, j) => device(`D${j + 1}`, 100 + j, 25 + 3 * j, { shift, weighted }));

describe('commonCurveTest', () => {
  it("commonCurveTest places the knots of fitNaturalSpline on the pooled rows, and its common RSS is that fit's RSS", () => {
    // Source: the direct pooled fit of core/fit/naturalSpline.ts (residuals row by row).
    const groups = devices([0, 0.5, -0.3, 1], true);
    for (const df of [3, 5, 7]) {
      const r = commonCurveTest(groups, df, { folds: 0 });
      const direct = fitNaturalSpline(prepareData(pool(groups)), df);
      assert.deepEqual(r.knots, [...direct.knots]);
      close(r.rssCommon, direct.rss, 1e-10, `rssCommon df ${df}`);
      assert.equal(r.n, direct.n);
    }
  });

  it("commonCurveTest: rssSeparate is the sum of each group's own weighted fit on the pooled basis", () => {
    // Source: fitRowBasis on each group's rows with the pooled knots (core/fit/linearFit.ts).
    const groups = devices([0, 2, -1], true);
    const df = 5;
    const { basis, z } = pooledBasis(groups, df);
    let rss = 0;
    for (const g of groups) {
      const fit = fitRowBasis({ x: g.x, y: g.y, w: g.w }, basis, z, g.name);
      fit.residuals.forEach((e, i) => (rss += ((g.w as Float64Array)[i] as number) * e * e));
    }
    const r = commonCurveTest(groups, df, { folds: 0 });
    close(r.rssSeparate, rss, 1e-10, 'rssSeparate');
    assert.equal(r.dfNum, 2 * df);
    assert.equal(r.dfDen, r.n - 3 * df);
  });

  it('commonCurveTest: groups drawn from one curve are served by one curve, and no group is named', () => {
    // Source: construction (every device reads the same shape plus independent noise).
    const r = commonCurveTest(devices([0, 0, 0, 0, 0]), 4, { noun: 'device' });
    assert.ok(r.oneServesAll, r.words);
    assert.ok(r.p >= 0.05);
    assert.ok(r.perGroup.every((d) => !d.differs));
    assert.match(r.words, /^One curve serves all 5 devices: separate curves do not fit significantly better at the 5 % level \(F\(16, \d+\) = [\d.]+, p = [\d.]+\)/);
  });

  it('commonCurveTest: under one common curve the F test rejects at about the level (200 seeded replications)', () => {
    // Source: the F test is exact under normal errors when the curve lies in the model space
    // (Seber & Lee 2003, chapter 4, from memory): P(p < 0.05) = 0.05, so 200 replications
    // reject 10 times on average (binomial sd 3.1); outside 2..22 has probability below 0.001
    // for a correct test. (A shape the spline misses inflates both RSS alike and makes the
    // test conservative, hence the straight line here.)
    let rejections = 0;
    let groupRejections = 0;
    for (let rep = 0; rep < 200; rep++) {
      const groups = [0, 1, 2].map((j) => device(`D${j}`, 10_000 + 10 * rep + j, 15, { shape: line }));
      const r = commonCurveTest(groups, 4, { folds: 0 });
      if (r.p < 0.05) rejections++;
      if ((r.perGroup[0] as { p: number }).p < 0.05) groupRejections++;
    }
    assert.ok(rejections >= 2 && rejections <= 22, `${rejections} of 200 rejected`);
    assert.ok(groupRejections >= 2 && groupRejections <= 22, `${groupRejections} of 200 per-group rejections`);
  });

  it('commonCurveTest names a shifted group as differing, and only that one', () => {
    // Source: construction (device D3 reads 3 noise sds higher than the shape the other 7 share).
    const r = commonCurveTest(devices([0, 0, 3, 0, 0, 0, 0, 0]), 4, { noun: 'device' });
    assert.ok(!r.oneServesAll);
    assert.ok(r.p < 1e-6);
    assert.deepEqual(
      r.perGroup.filter((d) => d.differs).map((d) => d.name),
      ['D3'],
    );
    assert.match(
      r.words,
      /^The 8 devices need separate curves, which fit significantly better than one curve .*; device D3 differs from the common curve \(named step by step, Holm's order over 8 devices\)/,
    );
    const d3 = r.perGroup.find((d) => d.name === 'D3');
    assert.ok(d3 && d3.pAdjusted === Math.min(1, 8 * d3.p));
  });

  it('commonCurveTest judges at the level asked: p between 0.01 and 0.05 rejects at 0.05 only', () => {
    // Source: the option's definition (one curve serves all when p >= level); device D2 reads
    // 1.2 noise sds high on a shared straight line (p = 0.040 with these seeds).
    const groups = [0, 1.2, 0, 0].map((shift, j) => device(`D${j + 1}`, 100 + j, 25 + 3 * j, { shift, shape: line }));
    const at5 = commonCurveTest(groups, 4, { folds: 0 });
    const at1 = commonCurveTest(groups, 4, { folds: 0, level: 0.01 });
    assert.ok(at5.p > 0.01 && at5.p < 0.05, `p = ${at5.p}`);
    assert.equal(at5.oneServesAll, false);
    assert.equal(at1.oneServesAll, true);
    assert.match(at1.words, /at the 1 % level/);
  });

  it('commonCurveTest names no group while the test of all groups keeps one curve (gatekeeping)', () => {
    // Source: the rule of core/groups/common.ts (a group is named only when the test of all
    // groups rejects one curve). Device D5 of 20 reads 1 noise sd high: its own test passes
    // Bonferroni (p x 20 = 0.018 with these seeds), the test of all 20 does not (p = 0.16).
    const groups = Array.from({ length: 20 }, (_, j) => device(`D${j + 1}`, 100 + j, 25 + 3 * j, { shift: j === 4 ? 1 : 0, shape: line }));
    const r = commonCurveTest(groups, 3, { folds: 0, noun: 'device' });
    const d5 = r.perGroup[4] as { pAdjusted: number; differs: boolean };
    assert.ok(r.oneServesAll && r.p > 0.05, `p = ${r.p}`);
    assert.ok(d5.pAdjusted < 0.05, `D5 adjusted p = ${d5.pAdjusted}`);
    assert.ok(r.perGroup.every((d) => !d.differs));
    assert.match(r.words, /^One curve serves all 20 devices/);
  });

  it("commonCurveTest with two groups: each group's own test is the overall test", () => {
    // Source: algebra of nested models (with two groups, one group's own curve and one shared
    // by the other is the separate model).
    const r = commonCurveTest(devices([0, 1.5]), 5, { folds: 0 });
    for (const d of r.perGroup) {
      close(d.F, r.F, 1e-9, `${d.name} F`);
      close(d.p, r.p, 1e-9, `${d.name} p`);
      assert.equal(d.dfDen, r.dfDen);
    }
  });

  it('commonCurveTest: the cross-validated RMSE of both models equals brute-force refits on the same folds', () => {
    // Source: fitRowBasis refitted on each fold's training rows (pooled knots held fixed),
    // errors of the held-out rows, sqrt(sum w e^2 / sum w), with the labels of groupFolds.
    const groups = devices([0, 1, -1, 0.5], true);
    const df = 5;
    const folds = 5;
    const r = commonCurveTest(groups, df, { folds, seed: 7 });
    const labels = groupFolds(groups, folds, 7);
    const { basis, z } = pooledBasis(groups, df);
    let sseCommon = 0;
    let sseSeparate = 0;
    let weight = 0;
    for (let k = 0; k < folds; k++) {
      const trainOf =
        (h: number): ((i: number) => boolean) =>
        (i) =>
          (labels[h] as Uint16Array)[i] !== k;
      const common = fitRowBasis(pool(groups.map((g, h) => ({ ...subset(g, trainOf(h)), name: g.name }))), basis, z, 'common');
      groups.forEach((g, h) => {
        const own = fitRowBasis(subset(g, trainOf(h)), basis, z, g.name);
        g.x.forEach((x, i) => {
          if ((labels[h] as Uint16Array)[i] !== k) return;
          const w = (g.w as Float64Array)[i] as number;
          sseCommon += w * ((g.y[i] as number) - valueAt(basis, common.theta, x)) ** 2;
          sseSeparate += w * ((g.y[i] as number) - valueAt(basis, own.theta, x)) ** 2;
          weight += w;
        });
      });
    }
    assert.ok(r.cv);
    assert.equal(r.cv.folds, folds);
    close(r.cv.common, Math.sqrt(sseCommon / weight), 1e-9, 'cv common');
    close(r.cv.separate, Math.sqrt(sseSeparate / weight), 1e-9, 'cv separate');
  });

  it('groupFolds stratifies by x within each group and draws each group apart', () => {
    // Source: the definition of foldLabels (core/registry/resampling/folds.ts): every block of
    // `folds` rows in x order holds distinct labels.
    const groups = [device('A', 1, 23), device('B', 1, 23)];
    const labels = groupFolds(groups, 5, 3);
    for (const [h, g] of groups.entries()) {
      const order = [...g.x.keys()].sort((a, b) => (g.x[a] as number) - (g.x[b] as number));
      for (let start = 0; start < order.length; start += 5) {
        const block = order.slice(start, start + 5).map((i) => (labels[h] as Uint16Array)[i]);
        assert.equal(new Set(block).size, block.length, `group ${h} block ${start}`);
      }
    }
    // Same x in both groups, yet their own draws.
    assert.notDeepEqual([...(labels[0] as Uint16Array)], [...(labels[1] as Uint16Array)]);
  });

  it('commonCurveTest leaves out a group with fewer distinct x than df, says so, and tests the others alone', () => {
    // Source: construction (the result without the small group, computed directly).
    const groups = devices([0, 1, 0.5]);
    const small: GroupRows = { name: 'tiny', x: Float64Array.of(1, 1, 2), y: Float64Array.of(5, 6, 7) };
    const r = commonCurveTest([...groups, small], 4, { noun: 'device' });
    const alone = commonCurveTest(groups, 4, { noun: 'device' });
    assert.deepEqual(r.excluded, ['tiny']);
    assert.equal(r.groups, 3);
    close(r.F, alone.F, 1e-12, 'F');
    assert.ok(r.notes.some((n) => n.includes('device tiny has fewer than 4 distinct x values')));
    assert.match(r.words, /1 device with fewer than 4 distinct x values was left out\.$/);
  });

  it('commonCurveTest does not depend on the order of the groups or of the rows within them', () => {
    // Source: least squares is invariant under row permutations.
    const groups = devices([0, 1, -1, 2], true);
    const reversed = groups.map((g) => ({ name: g.name, x: g.x.slice().reverse(), y: g.y.slice().reverse(), w: (g.w as Float64Array).slice().reverse() })).reverse();
    const a = commonCurveTest(groups, 5, { folds: 0 });
    const b = commonCurveTest(reversed, 5, { folds: 0 });
    close(b.F, a.F, 1e-10, 'F');
    close(b.rssCommon, a.rssCommon, 1e-10, 'rssCommon');
    for (const d of a.perGroup) close((b.perGroup.find((e) => e.name === d.name) as { F: number }).F, d.F, 1e-9, `${d.name} F`);
  });

  it('commonCurveTest: a common factor of the weights and a large offset of y change nothing', () => {
    // Source: weighted least squares depends on ratios of weights only, and an intercept absorbs an offset.
    const groups = devices([0, 1, -1], true);
    const base = commonCurveTest(groups, 4, { folds: 4 });
    const scaled = commonCurveTest(
      groups.map((g) => ({ ...g, w: (g.w as Float64Array).map((w) => w * 1e-12) })),
      4,
      { folds: 4 },
    );
    const shifted = commonCurveTest(
      groups.map((g) => ({ ...g, y: g.y.map((y) => y + 1e9) })),
      4,
      { folds: 4 },
    );
    close(scaled.F, base.F, 1e-10, 'F, weights scaled');
    close(scaled.rssSeparate, base.rssSeparate * 1e-12, 1e-10, 'rssSeparate, weights scaled');
    close(scaled.cv?.separate ?? NaN, base.cv?.separate ?? NaN, 1e-10, 'cv, weights scaled');
    // y = 1e9 + signal keeps about 7 digits of a unit-sized signal in double precision.
    close(shifted.F, base.F, 1e-5, 'F, y shifted by 1e9');
    close(shifted.cv?.common ?? NaN, base.cv?.common ?? NaN, 1e-5, 'cv, y shifted by 1e9');
  });

  it('commonCurveTest without folds has no cross-validation, and says none', () => {
    // Source: the option's definition (folds 0 switches cross-validation off).
    const r = commonCurveTest(devices([0, 0.2]), 3, { folds: 0 });
    assert.equal(r.cv, null);
    assert.doesNotMatch(r.words, /held-out/);
  });

  it('commonCurveTest drops the cross-validation with a note when a fold leaves a group too few rows', () => {
    // Source: counting (a device with exactly df rows has none to spare for a held-out fold).
    const exact: GroupRows = { name: 'E', x: Float64Array.of(0, 2.5, 5, 7.5, 10), y: Float64Array.of(1, 20, 30, 35, 38) };
    const r = commonCurveTest([...devices([0, 0.5]), exact], 5, { noun: 'device' });
    assert.equal(r.cv, null);
    assert.ok(
      r.notes.some((n) => /Cross-validation was left out: with fold \d+ of 10 held out, the remaining rows of device E cannot determine a curve of df 5/.test(n)),
      r.notes.join(' | '),
    );
    assert.ok(Number.isFinite(r.F));
  });

  it('commonCurveTest refuses a group whose x cover too little of the pooled range, naming it', () => {
    // Source: a B-spline with no row in its support has no information (de Boor 2001, chapter IX).
    const part = device('P', 5, 12, { lo: 0, hi: 3 });
    assert.throws(
      () => commonCurveTest([...devices([0, 0.5]), part], 6, { noun: 'device' }),
      (e: unknown) => e instanceof FitError && /device P: its own curve/.test(e.message) && /no rows where basis function/.test(e.message),
    );
  });

  it('commonCurveTest refuses what it cannot test, with the reason', () => {
    // Source: the counting conditions of the test (at least two groups; N - G df > 0).
    const [a, b] = devices([0, 0]) as [GroupRows, GroupRows];
    const cases: [() => unknown, RegExp][] = [
      [() => commonCurveTest([a], 4), /at least 2 groups with 4 or more distinct x values; there is 1/],
      [() => commonCurveTest([a, { ...b, name: 'D1' }], 4), /names must differ; "D1" appears twice/],
      [() => commonCurveTest([{ ...a, w: new Float64Array(a.x.length).fill(1) }, b], 4), /weights were given for 1 of 2/],
      [() => commonCurveTest([a, b], 1), /whole df of at least 2/],
      [() => commonCurveTest([a, b], 4, { level: 0.7 }), /level .* at most 0.5/],
      [() => commonCurveTest([a, b], 4, { folds: 1 }), /2 to 100 cross-validation folds, or 0/],
      [() => commonCurveTest([{ ...a, y: a.y.map((v, i) => (i === 3 ? NaN : v)), lines: [...a.x.keys()].map((i) => i + 2) }, b], 4), /group D1: y value NaN/],
      [
        () =>
          commonCurveTest(
            [
              { name: 'u', x: Float64Array.of(0, 1, 2, 3), y: Float64Array.of(0, 1, 4, 9) },
              { name: 'v', x: Float64Array.of(0, 1, 2, 3), y: Float64Array.of(1, 2, 5, 9) },
            ],
            4,
          ),
        /more than 8 rows to leave residual degrees of freedom; there are 8/,
      ],
    ];
    for (const [run, message] of cases) assert.throws(run, (e: unknown) => e instanceof InputError && message.test(e.message), String(message));
    // The line of the bad value is kept.
    assert.throws(
      () => commonCurveTest([{ ...a, y: a.y.map((v, i) => (i === 3 ? NaN : v)), lines: [...a.x.keys()].map((i) => i + 2) }, b], 4),
      (e: unknown) => e instanceof InputError && e.place.line === 5,
    );
  });
});
