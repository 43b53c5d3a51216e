/**
 * External reference check of commonCurveTest (core/groups/common.ts) against R 4.2
 * stats::anova of nested lm fits on a splines::ns basis with the pooled knots held fixed,
 * fixture from test/reference/r/groups.R (regenerate with `Rscript test/reference/r/groups.R`
 * from the repository root).
 *
 * Datasets (open, shipped with R): datasets::Orange (5 trees, the same 7 ages), datasets::CO2
 * (12 plants, the same 7 concentrations; also with deterministic prior weights 100 / conc) and
 * datasets::Theoph (12 subjects, each sampled at its own times).
 *
 * Tolerance: 1e-8 relative, with an absolute floor of 1e-10 times the scale of the quantity
 * (max |x| for knots, the squared scale of y for sums of squares, 1 for F and p).
 */
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { commonCurveTest, type CommonCurveTest, type GroupRows } from '../../core/groups/common';

const SOURCE = 'R 4.2 anova(lm(y ~ B), lm(y ~ g * B)) with B = splines::ns on the pooled knots, fixture from test/reference/r/groups.R';
const REL = 1e-8;
const ABS = 1e-10;

interface FixtureDataset {
  readonly source: string;
  readonly x: number[];
  readonly y: number[];
  readonly g: string[];
  readonly w: number[] | null;
}

interface FixtureGroup {
  readonly name: string;
  readonly rss: number;
  readonly dfNum: number;
  readonly dfDen: number;
  readonly F: number;
  readonly p: number;
}

interface FixtureCase {
  readonly name: string;
  readonly dataset: string;
  readonly df: number;
  readonly rCall: string;
  readonly n: number;
  readonly groups: number;
  readonly interiorKnots: number[];
  readonly boundaryKnots: number[];
  readonly rssCommon: number;
  readonly rssSeparate: number;
  readonly dfNum: number;
  readonly dfDen: number;
  readonly F: number;
  readonly p: number;
  readonly perGroup: FixtureGroup[];
  /** The groups named step by step (test/reference/r/groups.R step_down), empty when the overall test keeps one curve. */
  readonly stepDown: { readonly name: string; readonly F: number; readonly p: number; readonly pAdjusted: number }[];
}

interface Fixture {
  readonly generatedBy: string;
  readonly rVersion: string;
  readonly datasets: Record<string, FixtureDataset>;
  readonly cases: FixtureCase[];
}

const fixture = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'groups.json'), 'utf8')) as Fixture;

/** |actual - expected| <= REL |expected| + ABS scale, else a message with both numbers. */
function checkClose(what: string, actual: number, expected: number, scale: number): void {
  const tol = REL * Math.abs(expected) + ABS * scale;
  const diff = Math.abs(actual - expected);
  if (!(diff <= tol)) assert.fail(`${what}: got ${actual}, R has ${expected} (difference ${diff.toExponential(3)}, tolerance ${tol.toExponential(3)}) [${SOURCE}]`);
}

/** The dataset's rows split by group, groups in order of first appearance. */
function groupsOf(d: FixtureDataset): GroupRows[] {
  const names = [...new Set(d.g)];
  return names.map((name) => {
    const rows = d.g.flatMap((g, i) => (g === name ? [i] : []));
    const pick = (v: readonly number[]): Float64Array => Float64Array.from(rows, (i) => v[i] as number);
    return { name, x: pick(d.x), y: pick(d.y), w: d.w ? pick(d.w) : undefined };
  });
}

function maxAbs(v: readonly number[]): number {
  return v.reduce((m, a) => Math.max(m, Math.abs(a)), 0);
}

describe(`commonCurveTest against ${SOURCE}`, () => {
  it('fixture covers Orange and CO2 at three df each, unequal x (Theoph) and prior weights', () => {
    // Source: the fixture itself (test/reference/r/groups.R); guards against a regenerated fixture losing coverage.
    for (const name of ['orange', 'co2', 'theoph']) assert.ok(fixture.cases.filter((c) => c.dataset === name).length >= 3, name);
    // One group far from two others is named alone (the shifted Orange trees).
    assert.deepEqual(
      fixture.cases.filter((c) => c.dataset === 'orange3_shift').map((c) => c.stepDown.map((st) => st.name)),
      [['3'], ['3']],
    );
    assert.ok(fixture.cases.some((c) => fixture.datasets[c.dataset]?.w));
  });

  for (const c of fixture.cases) {
    const ds = fixture.datasets[c.dataset] as FixtureDataset;
    const sy2 = maxAbs(ds.y) ** 2;
    describe(`${c.name} (${c.rCall}; ${ds.source})`, () => {
      let r: CommonCurveTest;
      before(() => {
        r = commonCurveTest(groupsOf(ds), c.df, { folds: 0 });
      });

      it('knots equal attr(ns(x, df = df - 1), "Boundary.knots" / "knots") of the pooled x', () => {
        // R: attr(splines::ns(x, df = k - 1), "knots") on all rows [test/reference/r/groups.R]
        const expected = [c.boundaryKnots[0] as number, ...c.interiorKnots, c.boundaryKnots[1] as number];
        assert.equal(r.knots.length, expected.length);
        expected.forEach((k, j) => checkClose(`knot ${j}`, r.knots[j] as number, k, maxAbs(ds.x)));
      });

      it('groups, rows and both df equal those of anova(m0, m1)', () => {
        // R: nlevels(g), length(x), anova(m0, m1)$Df[2] and $Res.Df[2] [test/reference/r/groups.R]
        assert.equal(r.groups, c.groups);
        assert.equal(r.n, c.n);
        assert.equal(r.dfNum, c.dfNum);
        assert.equal(r.dfDen, c.dfDen);
      });

      it('RSS of the common and the separate model, F and p equal anova(m0, m1)', () => {
        // R: anova(m0, m1)$RSS, $F, $"Pr(>F)" [test/reference/r/groups.R]
        checkClose('rssCommon', r.rssCommon, c.rssCommon, sy2);
        checkClose('rssSeparate', r.rssSeparate, c.rssSeparate, sy2);
        checkClose('F', r.F, c.F, 1);
        checkClose('p', r.p, c.p, 1);
      });

      it('each group on its own: F, p and df equal anova(m0, lm(y ~ B * (g == h)))', () => {
        // R: anova(m0, mh) for every level h [test/reference/r/groups.R]
        assert.equal(r.perGroup.length, c.perGroup.length);
        for (const e of c.perGroup) {
          const got = r.perGroup.find((d) => d.name === e.name);
          assert.ok(got, `group ${e.name}`);
          assert.equal(got.dfNum, e.dfNum, `group ${e.name} dfNum`);
          assert.equal(got.dfDen, e.dfDen, `group ${e.name} dfDen`);
          checkClose(`group ${e.name} F`, got.F, e.F, 1);
          checkClose(`group ${e.name} p`, got.p, e.p, 1);
          checkClose(`group ${e.name} Bonferroni p`, got.pAdjusted, Math.min(1, c.groups * e.p), 1);
        }
      });

      it("the groups named step by step, with F, p and Holm's adjusted p, equal the R procedure on lm deviances", () => {
        // R: step_down() on deviance(lm(y ~ gS * B)) for growing S, Holm's order [test/reference/r/groups.R]
        assert.deepEqual(
          r.stepDown.map((st) => st.name),
          c.stepDown.map((st) => st.name),
        );
        c.stepDown.forEach((e, j) => {
          const got = r.stepDown[j];
          assert.ok(got);
          // The F of an extra sum of squares R takes as a difference of deviances: 1e-6 relative.
          assert.ok(Math.abs(got.F - e.F) <= 1e-6 * Math.abs(e.F), `step ${j + 1} (${e.name}) F: got ${got.F}, R has ${e.F} [${SOURCE}]`);
          assert.ok(Math.abs(got.p - e.p) <= 1e-6 * Math.abs(e.p) + 1e-14, `step ${j + 1} p: got ${got.p}, R has ${e.p}`);
          assert.ok(Math.abs(got.pAdjusted - e.pAdjusted) <= 1e-6 * Math.abs(e.pAdjusted) + 1e-14, `step ${j + 1} adjusted p`);
        });
        const named = new Set(c.stepDown.map((st) => st.name));
        for (const g of r.perGroup) assert.equal(g.differs, named.has(g.name), `group ${g.name}: differs exactly when named`);
      });
    });
  }
});
