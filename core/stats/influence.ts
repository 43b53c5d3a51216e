import { InputError } from '../errors';

/** Default number of rows listed; the total count is always reported. */
export const INFLUENCE_LIST_LIMIT = 50;

/** Which rule a row exceeds. */
export type InfluenceRule = 'leverage > 2 df / n' | "Cook's D > 4 / n" | "Cook's D > 1";

/** One threshold with the publication it comes from. */
export interface InfluenceThreshold {
  readonly measure: 'leverage' | 'cooks';
  readonly rule: InfluenceRule;
  readonly value: number;
  readonly source: string;
}

/** A row that exceeds at least one threshold. */
export interface InfluentialRow {
  /** 0-based row index in the fitted data. */
  readonly index: number;
  /** 1-based CSV line when lines were given, else the 1-based row number. */
  readonly line: number;
  readonly leverage: number;
  readonly cooksDistance: number;
  readonly exceeds: readonly InfluenceRule[];
}

/** Thresholds, the listed rows (most influential first) and how many rows exceed any threshold. */
export interface InfluenceReport {
  readonly thresholds: readonly InfluenceThreshold[];
  readonly rows: readonly InfluentialRow[];
  readonly total: number;
}

/**
 * Rows with high leverage or large Cook's distance, most influential first (by Cook's
 * distance, then leverage, then row order). Thresholds, with n rows and df the trace of
 * the hat matrix (intercept included):
 * - leverage h_i > 2 df / n: Hoaglin & Welsch (1978), "The hat matrix in regression and
 *   ANOVA", The American Statistician 32(1), 17-22;
 * - Cook's D_i > 4 / n: common practice (e.g. Bollen & Jackman 1990, "Regression
 *   diagnostics: an expository treatment of outliers and influential cases", in Fox &
 *   Long (eds.), Modern Methods of Data Analysis);
 * - Cook's D_i > 1: Cook & Weisberg (1982), "Residuals and Influence in Regression",
 *   Chapman & Hall.
 * Non-finite Cook's distances (rows with leverage 1) count as exceeding only through
 * their leverage. At most `limit` rows are listed; `total` counts all. Cost O(n + k log k)
 * for k flagged rows.
 * Throws InputError for arrays of different lengths, n = 0 or df <= 0.
 * Example: with n = 50 and df = 2 the leverage threshold is 0.08 and Cook's 0.08 and 1.
 */
export function influentialRows(leverage: Float64Array, cooksDistance: Float64Array, df: number, lines?: Int32Array, limit: number = INFLUENCE_LIST_LIMIT): InfluenceReport {
  const n = leverage.length;
  if (n === 0) throw new InputError('influence: there are no rows');
  if (cooksDistance.length !== n) {
    throw new InputError(`influence: ${n} leverages but ${cooksDistance.length} Cook's distances`);
  }
  if (lines && lines.length !== n) throw new InputError(`influence: ${n} rows but ${lines.length} line numbers`);
  if (!(df > 0)) throw new InputError(`influence: df must be > 0, got ${df}`);
  if (!(Number.isInteger(limit) && limit >= 0)) throw new InputError(`influence: list limit must be a whole number >= 0, got ${limit}`);
  const thresholds: InfluenceThreshold[] = [
    {
      measure: 'leverage',
      rule: 'leverage > 2 df / n',
      value: (2 * df) / n,
      source: 'Hoaglin & Welsch (1978), The hat matrix in regression and ANOVA, The American Statistician 32(1)',
    },
    {
      measure: 'cooks',
      rule: "Cook's D > 4 / n",
      value: 4 / n,
      source: 'common practice (Bollen & Jackman 1990, Regression diagnostics, in Modern Methods of Data Analysis)',
    },
    {
      measure: 'cooks',
      rule: "Cook's D > 1",
      value: 1,
      source: 'Cook & Weisberg (1982), Residuals and Influence in Regression',
    },
  ];
  const leverageLimit = (2 * df) / n;
  const cooksLimit = 4 / n;
  const flagged: number[] = [];
  for (let i = 0; i < n; i++) {
    const h = leverage[i] as number;
    const d = cooksDistance[i] as number;
    if (h > leverageLimit || d > cooksLimit) flagged.push(i);
  }
  // NaN Cook's distances sort after every number.
  const key = (i: number): number => {
    const d = cooksDistance[i] as number;
    return Number.isNaN(d) ? -Infinity : d;
  };
  flagged.sort((a, b) => key(b) - key(a) || (leverage[b] as number) - (leverage[a] as number) || a - b);
  const rows: InfluentialRow[] = [];
  for (let k = 0; k < Math.min(limit, flagged.length); k++) {
    const i = flagged[k] as number;
    const h = leverage[i] as number;
    const d = cooksDistance[i] as number;
    const exceeds: InfluenceRule[] = [];
    if (h > leverageLimit) exceeds.push('leverage > 2 df / n');
    if (d > cooksLimit) exceeds.push("Cook's D > 4 / n");
    if (d > 1) exceeds.push("Cook's D > 1");
    rows.push({ index: i, line: lines ? (lines[i] as number) : i + 1, leverage: h, cooksDistance: d, exceeds });
  }
  return { thresholds, rows, total: flagged.length };
}
