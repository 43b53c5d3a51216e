import { digitsToTell, sig, testText } from '../words/numbers';

/** Most groups named one by one in the words; the rest are counted. */
export const MAX_NAMED_GROUPS = 5;

/** What the words of the common-curve test are made from (core/groups/common.ts). */
export interface CommonCurveFacts {
  readonly groups: number;
  readonly noun: string;
  readonly nouns: string;
  readonly level: number;
  readonly df: number;
  readonly F: number;
  readonly dfNum: number;
  readonly dfDen: number;
  readonly p: number;
  readonly oneServesAll: boolean;
  /** Names of the groups that differ from the common curve, in the order the step-down procedure named them. */
  readonly differing: readonly string[];
  /** The procedure stopped at its limit: more groups may differ. */
  readonly moreMayDiffer?: boolean | undefined;
  readonly cv: { readonly folds: number; readonly common: number; readonly separate: number } | null;
  /** Number of groups left out for too few distinct x. */
  readonly excluded: number;
}

/**
 * One or two sentences on whether one curve serves all groups: the verdict with the F test
 * in the house style (core/words/numbers.ts), the groups that differ (named, up to
 * MAX_NAMED_GROUPS), and how the two models predict held-out rows.
 * Example: 'One curve serves all 5 trees: separate curves do not fit significantly better at
 * the 5 % level (F(16, 15) = 1.21, p = 0.33), and they predict held-out rows no better
 * (10-fold RMSE 8.1 separate, 8 common).'
 */
export function commonCurveWords(f: CommonCurveFacts): string {
  const all = f.groups === 2 ? `both ${f.nouns}` : `all ${f.groups} ${f.nouns}`;
  const test = `at the ${sig(100 * f.level)} % level (${testText('F', [f.dfNum, f.dfDen], f.F, f.p)})`;
  const stepwise = `named step by step, Holm's order over ${f.groups} ${f.nouns}`;
  let text: string;
  if (f.oneServesAll) {
    text = `One curve serves ${all}: separate curves do not fit significantly better ${test}`;
  } else {
    text = `The ${f.groups} ${f.nouns} need separate curves, which fit significantly better than one curve ${test}`;
    const n = f.differing.length;
    text +=
      n > 0
        ? `; ${namedGroups(f.differing, f.noun, f.nouns)} ${n === 1 ? 'differs' : 'differ'} from the common curve (${stepwise}${f.moreMayDiffer ? `; more may differ: the naming stops at ${n}` : ''})`
        : `; no single ${f.noun} differs from the common curve on its own (${stepwise})`;
  }
  if (f.cv) text += cvClause(f.cv, f.oneServesAll);
  text += '.';
  if (f.excluded > 0) text += ` ${f.excluded} ${f.excluded === 1 ? f.noun : f.nouns} with fewer than ${f.df} distinct x values ${f.excluded === 1 ? 'was' : 'were'} left out.`;
  return text;
}

/** How separate curves predict held-out rows compared with one curve, joined to the verdict. */
function cvClause(cv: NonNullable<CommonCurveFacts['cv']>, oneServesAll: boolean): string {
  const digits = digitsToTell([cv.separate, cv.common]);
  const numbers = `(${cv.folds}-fold RMSE ${sig(cv.separate, digits)} separate, ${sig(cv.common, digits)} common)`;
  if (cv.separate < cv.common) {
    const better = `separate curves predict held-out rows ${sig(100 * (1 - cv.separate / cv.common), 2)} % better ${numbers}`;
    return oneServesAll ? `, although ${better}` : `; ${better}`;
  }
  return oneServesAll ? `, and they predict held-out rows no better ${numbers}` : `; yet separate curves predict held-out rows no better ${numbers}`;
}

/** "tree 3", "tree 3 and tree 5", ..., the first MAX_NAMED_GROUPS named and the rest counted. */
function namedGroups(names: readonly string[], noun: string, nouns: string): string {
  const shown = names.slice(0, MAX_NAMED_GROUPS).map((n) => `${noun} ${n}`);
  const rest = names.length - shown.length;
  if (rest > 0) shown.push(`${rest} more ${rest === 1 ? noun : nouns}`);
  return listNames(shown);
}

/** "A", "A and B", "A, B and C". */
export function listNames(names: readonly string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}
