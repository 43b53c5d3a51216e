/**
 * commonCurveWords: the verdict, the groups named, the cross-validation clause.
 *
 * Source: the house style of numbers and tests (core/words/numbers.ts: "F(16, 15) = 1.21,
 * p = 0.33", "p < 0.0001", 3 significant digits) and the definitions of core/groups/common.ts.
 * The facts are invented.
 */
import { strict as assert } from 'node:assert';
import { commonCurveWords, listNames, MAX_NAMED_GROUPS, type CommonCurveFacts } from '../../../core/groups/commonWords';

const base: CommonCurveFacts = {
  groups: 5,
  noun: 'tree',
  nouns: 'trees',
  level: 0.05,
  df: 4,
  F: 1.2134,
  dfNum: 16,
  dfDen: 15,
  p: 0.3312,
  oneServesAll: true,
  differing: [],
  cv: null,
  excluded: 0,
};

describe('commonCurveWords', () => {
  it('commonCurveWords: one curve serves all, with the F test in the house style', () => {
    assert.equal(commonCurveWords(base), 'One curve serves all 5 trees: separate curves do not fit significantly better at the 5 % level (F(16, 15) = 1.21, p = 0.33).');
    assert.match(commonCurveWords({ ...base, groups: 2, dfNum: 4 }), /^One curve serves both trees:/);
    assert.match(commonCurveWords({ ...base, level: 0.01 }), /at the 1 % level/);
  });

  it('commonCurveWords: one curve serves all, and held-out rows agree or not', () => {
    const worse = commonCurveWords({ ...base, cv: { folds: 10, separate: 8.1, common: 8.04 } });
    assert.match(worse, /\), and they predict held-out rows no better \(10-fold RMSE 8\.1 separate, 8\.04 common\)\.$/);
    const better = commonCurveWords({ ...base, cv: { folds: 5, separate: 7.6, common: 8 } });
    // 1 - 7.6 / 8 = 0.05: "5 % better".
    assert.match(better, /\), although separate curves predict held-out rows 5 % better \(5-fold RMSE 7\.6 separate, 8 common\)\.$/);
  });

  it('commonCurveWords: separate curves needed, with the groups that differ named', () => {
    const text = commonCurveWords({ ...base, oneServesAll: false, F: 10.16, p: 2.47e-5, differing: ['3', '5'], cv: { folds: 10, separate: 7.04, common: 8 } });
    assert.equal(
      text,
      "The 5 trees need separate curves, which fit significantly better than one curve at the 5 % level (F(16, 15) = 10.2, p < 0.0001); tree 3 and tree 5 differ from the common curve (named step by step, Holm's order over 5 trees); separate curves predict held-out rows 12 % better (10-fold RMSE 7.04 separate, 8 common).",
    );
    assert.match(commonCurveWords({ ...base, oneServesAll: false, differing: ['3'] }), /; tree 3 differs from the common curve/);
  });

  it('commonCurveWords says more may differ when the naming stopped at its limit', () => {
    assert.match(
      commonCurveWords({ ...base, oneServesAll: false, differing: ['3', '5'], moreMayDiffer: true }),
      /\(named step by step, Holm's order over 5 trees; more may differ: the naming stops at 2\)/,
    );
  });

  it('commonCurveWords: separate curves needed though none differs alone, and held-out rows no better', () => {
    const text = commonCurveWords({ ...base, oneServesAll: false, p: 0.002, cv: { folds: 10, separate: 9, common: 8 } });
    assert.match(
      text,
      /; no single tree differs from the common curve on its own \(named step by step, Holm's order over 5 trees\); yet separate curves predict held-out rows no better \(10-fold RMSE 9 separate, 8 common\)\.$/,
    );
  });

  it(`commonCurveWords names at most ${MAX_NAMED_GROUPS} groups and counts the rest`, () => {
    const names = ['a', 'b', 'c', 'd', 'e', 'f', 'g'];
    const text = commonCurveWords({ ...base, groups: 9, noun: 'device', nouns: 'devices', oneServesAll: false, p: 1e-9, differing: names });
    assert.match(text, /; device a, device b, device c, device d, device e and 2 more devices differ from the common curve/);
    assert.match(commonCurveWords({ ...base, groups: 9, oneServesAll: false, p: 1e-9, differing: names.slice(0, 6) }), /tree e and 1 more tree differ/);
  });

  it('commonCurveWords: RMSE values that differ print as different numbers', () => {
    // digitsToTell of core/words/numbers.ts: 8.0012 and 8.0049 need 4 digits.
    assert.match(commonCurveWords({ ...base, cv: { folds: 10, separate: 8.0049, common: 8.0012 } }), /RMSE 8\.005 separate, 8\.001 common/);
  });

  it('commonCurveWords says how many groups were left out', () => {
    assert.match(commonCurveWords({ ...base, excluded: 1 }), /\. 1 tree with fewer than 4 distinct x values was left out\.$/);
    assert.match(commonCurveWords({ ...base, excluded: 3 }), /\. 3 trees with fewer than 4 distinct x values were left out\.$/);
  });

  it('listNames joins with commas and a final "and"', () => {
    assert.equal(listNames([]), '');
    assert.equal(listNames(['A']), 'A');
    assert.equal(listNames(['A', 'B']), 'A and B');
    assert.equal(listNames(['A', 'B', 'C']), 'A, B and C');
  });
});
