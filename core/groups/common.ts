import { ExtrapolatingBSplineBasis, naturalKnots } from '../basis/naturalSpline';
import { FitError, InputError } from '../errors';
import { explainDeficiency, times } from '../fit/linearFit';
import { prepareData, type PreparedData } from '../fit/prepared';
import { factorSpd, type SpdFailure } from '../linalg/spd';
import { nullSpace } from '../linalg/nullSpace';
import { foldLabels } from '../registry/resampling/index';
import { pf } from '../stats/distributions';
import { orderByX } from '../stats/orderByX';
import { centringOffset } from '../stats/weightedMean';
import type { XYData } from '../types';
import { CellSums, differenceSquares, sumBlocks, sumsExcept } from './cellSums';
import { commonCurveWords, listNames } from './commonWords';

/** The rows of one group (one device, one tree, one run): x, y and optional prior weights and CSV lines. */
export interface GroupRows {
  readonly name: string;
  readonly x: Float64Array;
  readonly y: Float64Array;
  /** Prior weights (> 0); give them for every group or for none. */
  readonly w?: Float64Array | undefined;
  /** 1-based CSV line of each row, for messages. */
  readonly lines?: Int32Array | readonly number[] | undefined;
}

/** Does one group differ from the curve the others share? */
export interface GroupDifference {
  readonly name: string;
  /** Rows of the group. */
  readonly n: number;
  /** F of this group's own curve (the others sharing one) against one curve for all. */
  readonly F: number;
  /** df, and N - 2 df. */
  readonly dfNum: number;
  readonly dfDen: number;
  /** Upper F tail, unadjusted. */
  readonly p: number;
  /** Bonferroni: min(1, groups x p). */
  readonly pAdjusted: number;
  /** The test of all groups rejects one curve, and the step-down procedure names this group (see `StepDownStep`). */
  readonly differs: boolean;
}

/**
 * One step of naming the groups that differ: the group whose own curve reduces the residual
 * sum of squares most, given those named before have their own curves and the rest share one
 * (F on df and the separate model's N - G df, its mean square as the denominator), with its
 * p-value adjusted in Holm's step-down order (Holm 1979, Scand. J. Statist. 6: the smallest
 * of m remaining p-values times m, never below the previous step's).
 */
export interface StepDownStep {
  readonly name: string;
  readonly F: number;
  readonly p: number;
  readonly pAdjusted: number;
}

/** k-fold cross-validated RMSE of both models on the same folds. */
export interface CrossValidatedErrors {
  readonly folds: number;
  readonly seed: number;
  /** sqrt(sum w e^2 / sum w) over all held-out rows, one curve for all groups. */
  readonly common: number;
  /** The same with each group's own curve. */
  readonly separate: number;
}

/** Result of commonCurveTest. Sums of squares are weighted when the rows carry weights. */
export interface CommonCurveTest {
  readonly df: number;
  /** Groups that took part (see `excluded`). */
  readonly groups: number;
  /** Rows that took part. */
  readonly n: number;
  /** Boundary and interior knots, ascending: those of the natural spline of all rows pooled at this df. */
  readonly knots: readonly number[];
  /** Residual sum of squares of one curve for all groups, on N - df residual df. */
  readonly rssCommon: number;
  /** Sum of the groups' residual sums of squares with their own curves, on N - G df. */
  readonly rssSeparate: number;
  /** (G - 1) df. */
  readonly dfNum: number;
  /** N - G df. */
  readonly dfDen: number;
  readonly F: number;
  readonly p: number;
  readonly level: number;
  readonly perGroup: readonly GroupDifference[];
  /** The groups named as differing, in the order the step-down procedure named them (at most MAX_STEPS). */
  readonly stepDown: readonly StepDownStep[];
  /** True when the procedure stopped at MAX_STEPS with groups still to test: more may differ. */
  readonly stepDownCapped: boolean;
  /** Null when switched off (folds 0) or when some fold cannot be fitted (the notes say why). */
  readonly cv: CrossValidatedErrors | null;
  /** p >= level: separate curves do not fit significantly better than one. */
  readonly oneServesAll: boolean;
  /** Names of the groups left out for having fewer distinct x than df. */
  readonly excluded: readonly string[];
  readonly words: string;
  readonly notes: readonly string[];
}

/** Options of commonCurveTest; every field is optional. */
export interface CommonCurveOptions {
  /** Significance level of the F tests, in (0, 0.5]; default 0.05. */
  readonly level?: number | undefined;
  /** Folds of the cross-validation, 2 to 100, or 0 for none; default 10. */
  readonly folds?: number | undefined;
  /** Seed of the fold draw; default 1. */
  readonly seed?: number | undefined;
  /** What a group is, for the words: 'device', 'tree'; default 'group'. */
  readonly noun?: string | undefined;
  /** Its plural; default noun + 's'. */
  readonly nouns?: string | undefined;
}

/** Defaults of CommonCurveOptions. */
export const COMMON_CURVE_DEFAULTS = { level: 0.05, folds: 10, seed: 1, noun: 'group' } as const;

/** Folds of the cross-validation: the limits of k-fold resampling (core/registry/resampling/folds.ts); 0 switches it off. */
const FOLD_LIMITS = { min: 2, max: 100 } as const;

/**
 * Does one curve serve all groups? Tests, at the given df of a natural cubic regression
 * spline, one curve for all rows (the common model: df coefficients, RSS0 on N - df residual
 * df) against a curve of its own for each group (the separate model: G df coefficients,
 * RSS1 = sum of the groups' RSS on N - G df), with the knots placed once on the x of all rows
 * pooled (docs/design.md, "Natural cubic regression spline"; the same knots as the project's
 * natural spline of the pooled rows at this df), so that the common model is nested in the
 * separate one. Extra-sum-of-squares F test F = ((RSS0 - RSS1) / ((G - 1) df)) / (RSS1 /
 * (N - G df)), referred to F((G - 1) df, N - G df): the test of coincident regressions,
 * Weisberg (2014), "Applied Linear Regression", 4th ed., chapters 5 and 6 (groups as factors
 * and their interactions; F tests of nested models), and Seber & Lee (2003), "Linear
 * Regression Analysis", 2nd ed., chapter 4 (hypothesis tests), both from memory.
 * It equals R's anova(lm(y ~ B), lm(y ~ g * B)) for B the ns() basis on the pooled knots.
 *
 * Per group g: the model where g has its own curve and the others share one, against the
 * common model: F on df and N - 2 df. A group is named as differing when the test of all
 * groups rejects one curve and G p_g is below the level (Bonferroni over the G groups;
 * gatekeeping by the overall test keeps the words consistent, and Bonferroni alone already
 * bounds the familywise error). Each group is compared with the curve all the others share,
 * so a group far from the rest also pulls that shared curve: with few groups, the others may
 * then test as differing too.
 *
 * Cross-validation: k-fold, folds drawn within each group and stratified by x there
 * (core/registry/resampling/folds.ts, group i with the stream of repeat i, see `groupFolds`),
 * both models refitted on the same training rows with the pooled knots held fixed, and the
 * RMSE sqrt(sum w e^2 / sum w) taken over all held-out rows.
 *
 * Numerics. One pass over the rows gathers each group's and each fold's weighted Gram matrix
 * and right-hand side (`CellSums`, y centred at its pooled weighted mean, weights scaled by a
 * power of two as in fitRowBasis); every fit, the per-group models and the folds are solved
 * from sums of those (Cholesky with a condition check, core/linalg/spd.ts); a second pass
 * takes each group's residuals. The differences of RSS are never taken by subtraction: for
 * nested least-squares fits RSS_small - RSS_big = sum w (fitted_big - fitted_small)^2, which
 * per group is the quadratic form (c_big - c_small)' A_g (c_big - c_small) of its Gram matrix,
 * a sum of non-negative terms. Cost O(N) for the rows (two passes plus a sort of the
 * pooled x), O((G folds) p^2 q + G folds q^3) for the sums and the solves.
 *
 * Prior weights are supported (weighted sums of squares, as R's lm with weights); give them
 * for all groups or none. Groups with fewer distinct x than df cannot have a curve of their
 * own: they are left out before the knots are placed, and the notes say so.
 * Throws InputError for fewer than 2 groups taking part, repeated names, bad values (with the
 * group's name and the CSV line), N - G df <= 0, bad options; FitError when a group's rows do
 * not determine its own curve on the pooled knots (its x cover too little of the pooled range).
 * Example: commonCurveTest([{ name: 'A', x, y: ya }, { name: 'B', x, y: yb }], 4, { noun: 'device' }).words
 * -> 'One curve serves both devices: ...'.
 */
export function commonCurveTest(groups: readonly GroupRows[], df: number, options: CommonCurveOptions = {}): CommonCurveTest {
  const o = checkOptions(options);
  if (!Number.isInteger(df) || df < 2) throw new InputError(`the common-curve test needs a whole df of at least 2 (a natural spline); got ${df}`);
  const { kept, excluded } = admitGroups(groups, df, o);
  if (kept.length < 2) {
    const left = excluded.length > 0 ? ` (${excluded.length} left out with fewer than ${df} distinct x values)` : '';
    throw new InputError(`the common-curve test needs at least 2 ${o.nouns} with ${df} or more distinct x values; ${kept.length === 1 ? 'there is 1' : `there are ${kept.length}`}${left}`);
  }
  const G = kept.length;
  const pooled = poolRows(kept.map((k) => k.data));
  // Every group's values were checked on admission; the knots need the pooled x sorted only.
  const { sortedX, distinct } = sortedValues(pooled.x);
  const N = pooled.x.length;
  const dfDen = N - G * df;
  if (dfDen <= 0) {
    throw new InputError(`${G} ${o.nouns} with their own curves of df ${df} need more than ${G * df} rows to leave residual degrees of freedom; there are ${N}`);
  }
  const knots = naturalKnots(sortedX, distinct, df);
  const basis = new ExtrapolatingBSplineBasis(knots.lower, knots.upper, knots.interior);
  const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
  const p = basis.size;
  const q = df;
  const K = o.folds > 0 ? o.folds : 1;
  const allLabels = o.folds > 0 ? groupFolds(groups, o.folds, o.seed) : undefined;
  const labels = kept.map((k) => (allLabels ? (allLabels[k.index] as Uint16Array) : new Uint16Array(k.data.x.length)));

  // Pass 1: the sums of every (group, fold) cell, y centred, weights scaled by a power of two.
  const centre = centringOffset(pooled.y, pooled.w);
  const wUnit = weightUnit(pooled.w);
  const cellSums = new CellSums(basis, z, G * K);
  kept.forEach(({ data }, h) => {
    const { x, y, w } = data;
    const lab = labels[h] as Uint16Array;
    for (let i = 0; i < x.length; i++) cellSums.add(h * K + (lab[i] as number), x[i] as number, (y[i] as number) - centre, (w ? (w[i] as number) : 1) * wUnit);
  });
  const { gram, rhs } = cellSums.finish();
  const q2 = q * q;
  const groupGram = new Float64Array(G * q2);
  const groupRhs = new Float64Array(G * q);
  for (let h = 0; h < G; h++) {
    groupGram.set(sumBlocks(gram, q2, h * K, (h + 1) * K), h * q2);
    groupRhs.set(sumBlocks(rhs, q, h * K, (h + 1) * K), h * q);
  }

  // The fits: each group's own curve, one curve for all, and for each g the others' shared curve.
  const own = kept.map(({ name, data }, h) =>
    solve(groupGram.subarray(h * q2, (h + 1) * q2), groupRhs.subarray(h * q, (h + 1) * q), q, `${o.noun} ${name}: its own curve (natural spline with df ${df} on the knots of all rows)`, (failure) =>
      explainDeficiency(data, basis, z, q, failure),
    ),
  );
  const common = solve(sumBlocks(groupGram, q2, 0, G), sumBlocks(groupRhs, q, 0, G), q, `one natural spline with df ${df} for all ${o.nouns}`);
  const othersGram = sumsExcept(groupGram, G, q2);
  const othersRhs = sumsExcept(groupRhs, G, q);
  const others = kept.map(({ name }, g) => solve(othersGram.subarray(g * q2, (g + 1) * q2), othersRhs.subarray(g * q, (g + 1) * q), q, `the ${o.nouns} other than ${name}`));

  const notes: string[] = [...knots.notes];
  if (excluded.length > 0) {
    const one = excluded.length === 1;
    const who = listNames(excluded.map((e) => `${o.noun} ${e}`));
    notes.push(
      `${who} ${one ? 'has' : 'have'} fewer than ${df} distinct x values, too few for ${one ? 'a curve of its own' : 'curves of their own'} at df ${df}, so ${one ? 'it was' : 'they were'} left out of the test.`,
    );
  }
  const cvFits = o.folds > 0 ? foldFits(gram, rhs, G, K, q, p, z) : undefined;
  if (cvFits && 'failed' in cvFits) {
    const { group, fold } = cvFits.failed;
    const whose = group === undefined ? `all ${o.nouns}` : `${o.noun} ${(kept[group] as Admitted).name}`;
    notes.push(`Cross-validation was left out: with fold ${fold + 1} of ${K} held out, the remaining rows of ${whose} cannot determine a curve of df ${df} on the knots of all rows.`);
  }
  const cvCoefficients = cvFits && !('failed' in cvFits) ? cvFits : undefined;

  // Pass 2: each group's residual sum of squares, and the held-out errors of both models.
  const ownTheta = own.map((g) => times(z, g, p, q));
  const buf = new Float64Array(basis.width);
  const groupRss = new Float64Array(G);
  let sseCommon = 0;
  let sseSeparate = 0;
  let heldOutWeight = 0;
  kept.forEach(({ data }, h) => {
    const { x, y, w } = data;
    const lab = labels[h] as Uint16Array;
    const theta = ownTheta[h] as Float64Array;
    let rss = 0;
    for (let i = 0; i < x.length; i++) {
      const first = basis.row(x[i] as number, buf);
      const yc = (y[i] as number) - centre;
      const wi = (w ? (w[i] as number) : 1) * wUnit;
      const e = yc - dot(buf, theta, first);
      rss += wi * e * e;
      if (cvCoefficients) {
        const k = lab[i] as number;
        const eCommon = yc - dot(buf, cvCoefficients.common[k] as Float64Array, first);
        const eSeparate = yc - dot(buf, cvCoefficients.separate[h * K + k] as Float64Array, first);
        sseCommon += wi * eCommon * eCommon;
        sseSeparate += wi * eSeparate * eSeparate;
        heldOutWeight += wi;
      }
    }
    groupRss[h] = rss;
  });

  // Sums of squares in the units of the original weights (wUnit is a power of two: exact).
  let rss1 = 0;
  for (let h = 0; h < G; h++) rss1 += groupRss[h] as number;
  let extra = 0;
  for (let h = 0; h < G; h++) extra += differenceSquares(groupGram, h * q2, q, own[h] as Float64Array, common);
  const rssSeparate = rss1 / wUnit;
  const extraSS = extra / wUnit;
  const rssCommon = rssSeparate + extraSS;
  const dfNum = (G - 1) * df;
  const overall = fTest(extraSS, dfNum, rssSeparate, dfDen);
  const oneServesAll = !(overall.p < o.level);

  // Which groups differ: named one at a time, so a group far from the rest does not make the
  // curve the others share look wrong for groups that follow it (a single-step test would).
  const named = oneServesAll
    ? { steps: [], capped: false }
    : stepDown(
        groupGram,
        groupRhs,
        own,
        q,
        kept.map((k) => k.name),
        { df, rssSeparate: rss1, dfDen, level: o.level },
      );
  const namedSet = new Set(named.steps.map((st) => st.name));
  const perGroup: GroupDifference[] = kept.map(({ name, data }, g) => {
    // Extra sum of squares of g's own curve: its squares against the common curve on g's rows, plus the others' shared curve against it on theirs.
    const delta = (differenceSquares(groupGram, g * q2, q, own[g] as Float64Array, common) + differenceSquares(othersGram, g * q2, q, others[g] as Float64Array, common)) / wUnit;
    // RSS of that model, RSS0 - delta, written as RSS1 plus what g's own curve leaves of the extra sum of squares.
    const rss = rssSeparate + Math.max(0, extraSS - delta);
    const t = fTest(delta, df, rss, N - 2 * df);
    const pAdjusted = Math.min(1, G * t.p);
    return { name, n: data.x.length, F: t.F, dfNum: df, dfDen: N - 2 * df, p: t.p, pAdjusted, differs: namedSet.has(name) };
  });

  const cv: CrossValidatedErrors | null =
    cvCoefficients && heldOutWeight > 0 ? { folds: K, seed: o.seed, common: Math.sqrt(sseCommon / heldOutWeight), separate: Math.sqrt(sseSeparate / heldOutWeight) } : null;
  notes.push(
    `Each ${o.noun} was also tested on its own: its own curve, the other ${o.nouns} one shared curve, against one curve for all (F on ${df} and ${N - 2 * df} df, Bonferroni over ${G} ${o.nouns} in perGroup). When the test of all ${o.nouns} rejects one curve, the ${o.nouns} that differ are named step by step: the one whose own curve lowers the residual sum of squares most, given those named before keep their own curves and the rest share one (F on ${df} and ${dfDen} df over the separate curves' mean square), while its p-value in Holm's step-down order stays below ${o.level}${named.capped ? `; the procedure stopped after ${MAX_STEPS}, so more may differ` : ''}.`,
  );
  if (cv)
    notes.push(
      `${K}-fold cross-validation with folds drawn within each ${o.noun}, stratified by x, seed ${o.seed}; both models were refitted on the same folds with the knots of all rows held fixed.`,
    );
  const words = commonCurveWords({
    groups: G,
    noun: o.noun,
    nouns: o.nouns,
    level: o.level,
    F: overall.F,
    dfNum,
    dfDen,
    p: overall.p,
    oneServesAll,
    differing: named.steps.map((st) => st.name),
    moreMayDiffer: named.capped,
    cv,
    excluded: excluded.length,
    df,
  });
  return {
    df,
    groups: G,
    n: N,
    knots: [knots.lower, ...knots.interior, knots.upper],
    rssCommon,
    rssSeparate,
    dfNum,
    dfDen,
    F: overall.F,
    p: overall.p,
    level: o.level,
    perGroup,
    stepDown: named.steps,
    stepDownCapped: named.capped,
    cv,
    oneServesAll,
    excluded,
    words,
    notes,
  };
}

/**
 * The cross-validation folds of each group: group i's rows get the labels 0..folds-1 of
 * foldLabels (core/registry/resampling/folds.ts) on its own x order with the stream of repeat
 * i, so folds are stratified by x within every group, every group has its own random draw,
 * and the draw of a group does not depend on the others' rows. O(N).
 * Example: groupFolds([{ x: Float64Array.of(1, 2, 3) }], 3, 1)[0] is a permutation of 0, 1, 2.
 */
export function groupFolds(groups: readonly { readonly x: Float64Array }[], folds: number, seed: number): Uint16Array[] {
  return groups.map((g, i) => {
    const out = new Uint16Array(g.x.length);
    foldLabels(orderByX(g.x), folds, seed, i, out);
    return out;
  });
}

interface CheckedOptions {
  readonly level: number;
  readonly folds: number;
  readonly seed: number;
  readonly noun: string;
  readonly nouns: string;
}

function checkOptions(options: CommonCurveOptions): CheckedOptions {
  const level = options.level ?? COMMON_CURVE_DEFAULTS.level;
  const folds = options.folds ?? COMMON_CURVE_DEFAULTS.folds;
  const seed = options.seed ?? COMMON_CURVE_DEFAULTS.seed;
  const noun = (options.noun ?? COMMON_CURVE_DEFAULTS.noun).trim();
  const nouns = (options.nouns ?? `${noun}s`).trim();
  if (!(level > 0 && level <= 0.5)) throw new InputError(`the level of the common-curve test must be above 0 and at most 0.5; got ${level}`);
  if (!(folds === 0 || (Number.isInteger(folds) && folds >= FOLD_LIMITS.min && folds <= FOLD_LIMITS.max))) {
    throw new InputError(`the common-curve test takes ${FOLD_LIMITS.min} to ${FOLD_LIMITS.max} cross-validation folds, or 0 for none; got ${folds}`);
  }
  if (!Number.isSafeInteger(seed)) throw new InputError(`the seed must be a whole number; got ${seed}`);
  if (noun === '' || nouns === '') throw new InputError('the word for a group must not be empty');
  return { level, folds, seed, noun, nouns };
}

interface Admitted {
  readonly name: string;
  /** Position in the caller's list. */
  readonly index: number;
  readonly data: XYData;
}

/** Checks every group's rows (prepareData, named by group) and leaves out those with fewer distinct x than df. */
function admitGroups(groups: readonly GroupRows[], df: number, { noun, nouns }: CheckedOptions): { kept: Admitted[]; excluded: string[] } {
  const names = new Set<string>();
  const weighted = groups.filter((g) => g.w !== undefined).length;
  if (weighted > 0 && weighted < groups.length) throw new InputError(`prior weights were given for ${weighted} of ${groups.length} ${nouns}: give them for all or for none`);
  const kept: Admitted[] = [];
  const excluded: string[] = [];
  groups.forEach((g, index) => {
    if (names.has(g.name)) throw new InputError(`${noun} names must differ; "${g.name}" appears twice`);
    names.add(g.name);
    if (g.lines && g.lines.length !== g.x.length) throw new InputError(`${noun} ${g.name}: ${g.lines.length} line numbers for ${g.x.length} rows`);
    const data: XYData = { x: g.x, y: g.y, w: g.w, lines: g.lines ? Int32Array.from(g.lines) : undefined };
    let prepared: PreparedData | undefined;
    if (g.x.length > 0 || g.y.length > 0) {
      try {
        prepared = prepareData(data);
      } catch (e) {
        if (e instanceof InputError) throw new InputError(`${noun} ${g.name}: ${e.raw}`, e.place);
        throw e;
      }
    }
    if (!prepared || prepared.distinct < df) excluded.push(g.name);
    else kept.push({ name: g.name, index, data });
  });
  return { kept, excluded };
}

/** The values of x in increasing order (-0 as 0) and how many differ: a numeric sort, no row order kept. O(N log N). */
function sortedValues(x: Float64Array): { sortedX: Float64Array; distinct: number } {
  const sortedX = Float64Array.from(x).sort();
  let distinct = sortedX.length > 0 ? 1 : 0;
  for (let i = 0; i < sortedX.length; i++) {
    sortedX[i] = (sortedX[i] as number) + 0;
    if (i > 0 && sortedX[i] !== sortedX[i - 1]) distinct++;
  }
  return { sortedX, distinct };
}

/** The rows of all groups one after another. O(N). */
function poolRows(parts: readonly XYData[]): XYData {
  let n = 0;
  for (const d of parts) n += d.x.length;
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  const weighted = parts.every((d) => d.w !== undefined);
  const w = weighted ? new Float64Array(n) : undefined;
  const withLines = parts.every((d) => d.lines !== undefined);
  const lines = withLines ? new Int32Array(n) : undefined;
  let at = 0;
  for (const d of parts) {
    x.set(d.x, at);
    y.set(d.y, at);
    if (w && d.w) w.set(d.w, at);
    if (lines && d.lines) lines.set(d.lines, at);
    at += d.x.length;
  }
  return { x, y, w, lines };
}

/** An exact power of two near 1 / (largest weight), as fitRowBasis scales its Gram matrix. */
function weightUnit(w: Float64Array | undefined): number {
  if (!w) return 1;
  let wMax = 0;
  for (let i = 0; i < w.length; i++) if ((w[i] as number) > wMax) wMax = w[i] as number;
  return wMax > 0 ? 2 ** -Math.round(Math.log2(wMax)) : 1;
}

/**
 * Solves A c = b for the q x q Gram matrix A (Cholesky with a condition check); FitError naming
 * `what` when A is rank deficient. Only the decision of the check is used, so its cheap bound
 * is tried first (factorSpd's boundOnly: the same decision).
 */
function solve(a: Float64Array, b: Float64Array, q: number, what: string, explain?: (failure: SpdFailure) => string): Float64Array {
  return factorSpd(a, q, what, explain, true).solve(b);
}

/** Most groups the step-down procedure names; then it stops and says that more may differ. */
export const MAX_STEPS = 20;

/**
 * The step-down naming of the groups that differ (StepDownStep). `gram` and `rhs` hold each
 * group's weighted sums on the pooled knots (scaled by the weight unit, as `rssSeparate` is
 * not: `unit` converts), `own` each group's own coefficients. At each step the groups not yet
 * named share one curve c_R; for each of them, h, the extra sum of squares of giving h its own
 * curve is d(A_h; c_h, c_R) + d(A_R\h; c_R\h, c_R), a sum of non-negative quadratic forms
 * (differenceSquares; no subtraction of sums of squares), with the sums of R without h taken
 * as leave-one-out sums (sumsExcept). Cost O(steps x groups x q^3).
 */
function stepDown(
  gram: Float64Array,
  rhs: Float64Array,
  own: readonly Float64Array[],
  q: number,
  names: readonly string[],
  t: { readonly df: number; readonly rssSeparate: number; readonly dfDen: number; readonly level: number },
): { steps: StepDownStep[]; capped: boolean } {
  const q2 = q * q;
  const left = names.map((_, i) => i);
  const steps: StepDownStep[] = [];
  let previous = 0;
  // A group is named only against a curve that at least two others share: of two groups left,
  // either could be called the one that differs.
  while (left.length >= 3 && steps.length < MAX_STEPS) {
    const m = left.length;
    const blocks = new Float64Array(m * q2);
    const vectors = new Float64Array(m * q);
    left.forEach((g, j) => {
      blocks.set(gram.subarray(g * q2, (g + 1) * q2), j * q2);
      vectors.set(rhs.subarray(g * q, (g + 1) * q), j * q);
    });
    const shared = solve(sumBlocks(blocks, q2, 0, m), sumBlocks(vectors, q, 0, m), q, 'the curve the remaining groups share');
    const restGram = sumsExcept(blocks, m, q2);
    const restRhs = sumsExcept(vectors, m, q);
    let best = -1;
    let bestExtra = -Infinity;
    for (let j = 0; j < m; j++) {
      const g = left[j] as number;
      const rest = solve(restGram.subarray(j * q2, (j + 1) * q2), restRhs.subarray(j * q, (j + 1) * q), q, 'the curve the other remaining groups share');
      const extra = differenceSquares(gram, g * q2, q, own[g] as Float64Array, shared) + differenceSquares(restGram, j * q2, q, rest, shared);
      if (extra > bestExtra) [best, bestExtra] = [j, extra];
    }
    // rssSeparate is in the units of gram (before the division by the weight unit), as the extra sums are.
    const { F, p } = fTest(bestExtra, t.df, t.rssSeparate, t.dfDen);
    const pAdjusted = Math.max(previous, Math.min(1, m * p));
    if (!(pAdjusted < t.level)) break;
    const g = left[best] as number;
    steps.push({ name: names[g] as string, F, p, pAdjusted });
    previous = pAdjusted;
    left.splice(best, 1);
  }
  return { steps, capped: steps.length === MAX_STEPS && left.length >= 3 };
}

/** Upper-tail F test of an extra sum of squares; an exact fit of the bigger model gives F = Infinity (or 0 when nothing is extra). */
function fTest(extra: number, dfNum: number, rss: number, dfDen: number): { F: number; p: number } {
  if (!(rss > 0)) return extra > 0 ? { F: Infinity, p: 0 } : { F: 0, p: 1 };
  const F = extra / dfNum / (rss / dfDen);
  return { F, p: pf(F, dfNum, dfDen, false) };
}

/** Basis coefficients (full basis, p) of both models fitted without each fold, or the first (group, fold) that cannot be fitted. */
type FoldFits = { readonly common: Float64Array[]; readonly separate: Float64Array[] } | { readonly failed: { readonly group: number | undefined; readonly fold: number } };

/**
 * Refits both models without each fold, from the cell sums: a group's training sums are the
 * sums of its other folds (sumsExcept, nothing subtracted), the common model's the training
 * sums of all groups. `separate[h K + k]` is group h without fold k. O(G K (q^2 + q^3 + p q)).
 */
function foldFits(gram: Float64Array, rhs: Float64Array, G: number, K: number, q: number, p: number, z: Float64Array): FoldFits {
  const q2 = q * q;
  const commonGram = new Float64Array(K * q2);
  const commonRhs = new Float64Array(K * q);
  const separate: Float64Array[] = [];
  for (let h = 0; h < G; h++) {
    const trainGram = sumsExcept(gram.subarray(h * K * q2, (h + 1) * K * q2), K, q2);
    const trainRhs = sumsExcept(rhs.subarray(h * K * q, (h + 1) * K * q), K, q);
    for (let j = 0; j < K * q2; j++) commonGram[j] = (commonGram[j] as number) + (trainGram[j] as number);
    for (let j = 0; j < K * q; j++) commonRhs[j] = (commonRhs[j] as number) + (trainRhs[j] as number);
    for (let k = 0; k < K; k++) {
      const c = tryFit(trainGram.subarray(k * q2, (k + 1) * q2), trainRhs.subarray(k * q, (k + 1) * q), q, p, z);
      if (!c) return { failed: { group: h, fold: k } };
      separate.push(c);
    }
  }
  const common: Float64Array[] = [];
  for (let k = 0; k < K; k++) {
    const c = tryFit(commonGram.subarray(k * q2, (k + 1) * q2), commonRhs.subarray(k * q, (k + 1) * q), q, p, z);
    if (!c) return { failed: { group: undefined, fold: k } };
    common.push(c);
  }
  return { common, separate };
}

/** Full-basis coefficients Z c of the fit from one set of sums, or undefined when they are rank deficient. */
function tryFit(a: Float64Array, b: Float64Array, q: number, p: number, z: Float64Array): Float64Array | undefined {
  try {
    return times(z, solve(a, b, q, 'cross-validation fit'), p, q);
  } catch (e) {
    if (e instanceof FitError) return undefined;
    throw e;
  }
}

/** b' theta over the `buf.length` nonzero basis values from index `first`. */
function dot(buf: Float64Array, theta: Float64Array, first: number): number {
  let f = 0;
  for (let a = 0; a < buf.length; a++) f += (buf[a] as number) * (theta[first + a] as number);
  return f;
}
