/**
 * The results of a streamed fit in the shapes the outputs read (docs/design.md,
 * "Streaming"): a FitResult without per-row arrays, and the residual checks of the chosen
 * fit in their streamed forms (the influential rows from bounded lists of the rows with the
 * largest measures, the normal-quantile plot from a seeded sample of rows).
 */
import { checkWarnings } from '../analysis/warnings';
import type { Diagnostics } from '../analysis/types';
import { ExtrapolatingBSplineBasis } from '../basis/naturalSpline';
import { RowBasisCurve } from '../fit/linearFit';
import { fitStatistics, type DataTotals } from '../fit/summary';
import { INFLUENCE_SHOWN, influenceThresholds, type InfluenceRule, type InfluentialRow } from '../stats/influence';
import { normalQuantiles } from '../stats/normalQuantiles';
import type { FitResult } from '../types';

/** Rows kept per measure for the influence rules (the most extreme ones). */
export const KEPT_EXTREMES = 2000;
/** Rows of the normal-quantile plot's sample, about. */
export const QQ_SAMPLE_ROWS = 20_000;
/** Points of the normal-quantile plot (as core/analysis/diagnose.ts). */
const QQ_POINTS = 400;
/** Leverage this close to 1 leaves no residual to studentize (as core/stats/influence.ts). */
const LEVERAGE_ONE = 1e-10;

/** What a streamed fit knows of one candidate after its passes. */
export interface StreamedCandidate {
  readonly df: number;
  readonly basis: ExtrapolatingBSplineBasis;
  readonly z: Float64Array;
  readonly theta: Float64Array;
  readonly cov: Float64Array;
  readonly knots: Float64Array;
  readonly rss: number;
}

/**
 * A FitResult from a fit's sums: the curve, coefficients and the statistics of
 * summariseFit (core/fit/summary.ts fitStatistics) from the residual sum of squares;
 * `looRmse` from the pass that computed the leverages (NaN when none did). Per-row arrays
 * are not kept: reading them throws. O(p^2).
 */
export function streamedFit(c: StreamedCandidate, n: number, totals: DataTotals, offset: number, looRmse: number, notes: readonly string[]): FitResult {
  const { sw: _sw, ...stats } = fitStatistics(n, c.df, c.rss, totals);
  const curve = new RowBasisCurve('natural-spline', c.df, c.basis.lower, c.basis.upper, c.basis, c.theta, c.cov, c.z, offset);
  const notKept = (): never => {
    throw new Error('a fit streamed from a file keeps no per-row arrays (fitted values, residuals, leverage, Cook distances)');
  };
  const fit = {
    kind: 'natural-spline' as const,
    df: c.df,
    n,
    curve,
    coefficients: c.theta.map((v) => v + offset),
    knots: c.knots,
    ...stats,
    looRmse,
    notes: [...notes],
  };
  return Object.defineProperties(fit, {
    fitted: { get: notKept, enumerable: false },
    residuals: { get: notKept, enumerable: false },
    leverage: { get: notKept, enumerable: false },
    cooksDistance: { get: notKept, enumerable: false },
  }) as unknown as FitResult;
}

/** One row's measures kept for the influence rules. */
interface Kept {
  readonly index: number;
  readonly line: number;
  readonly h: number;
  readonly w: number;
  readonly r: number;
}

/** The rows with the largest `score`, at most `cap` of them (kept in batches: sorted and cut when twice as many). */
class Extremes {
  private rows: { score: number; row: Kept }[] = [];
  /** The smallest score cut from the list (0 when nothing was cut). */
  cutAt = 0;
  constructor(private readonly cap: number) {}
  add(score: number, row: Kept): void {
    if (!(score > this.cutAt)) return;
    this.rows.push({ score, row });
    if (this.rows.length >= 2 * this.cap) this.trim();
  }
  private trim(): void {
    this.rows.sort((a, b) => b.score - a.score || a.row.index - b.row.index);
    const cut = this.rows[this.cap];
    if (cut) this.cutAt = Math.max(this.cutAt, cut.score);
    this.rows.length = Math.min(this.rows.length, this.cap);
  }
  list(): Kept[] {
    this.trim();
    return this.rows.map((e) => e.row);
  }
}

/**
 * The residual checks of the chosen fit over a streamed pass: give every row to `row`
 * (its index among the rows used, CSV line, weight, residual y - fit, leverage, and whether
 * it is in the normal plot's sample), then `finish` with the fit. Measures as
 * core/stats/influence.ts and core/fit/summary.ts define them. Memory O(KEPT_EXTREMES +
 * sample).
 */
export class StreamedChecks {
  private readonly cooks = new Extremes(KEPT_EXTREMES);
  private readonly outliers = new Extremes(KEPT_EXTREMES);
  private readonly leverages = new Extremes(KEPT_EXTREMES);
  private readonly sample: number[] = [];
  private loo = 0;
  private sw = 0;
  private looInfinite = false;

  row(index: number, line: number, w: number, r: number, h: number, sampled: boolean): void {
    this.sw += w;
    if (1 - h <= LEVERAGE_ONE) {
      if (Math.abs(r) > 0) this.looInfinite = true;
    } else {
      const e = r / (1 - h);
      this.loo += w * e * e;
    }
    // Orders that do not depend on the residual SD: Cook's distance and |studentized| grow with these.
    const q = 1 - h;
    const cooks = (w * r * r * h) / (q * q);
    const outlier = (w * r * r) / q;
    // Most rows go into no list: their measures are below what the lists keep.
    if (!(cooks > this.cooks.cutAt || outlier > this.outliers.cutAt || h > this.leverages.cutAt)) {
      if (sampled) this.sample.push((r * Math.sqrt(w)) / Math.sqrt(Math.max(1e-12, q)));
      return;
    }
    const kept = { index, line, h, w, r };
    this.cooks.add(cooks, kept);
    this.outliers.add(outlier, kept);
    this.leverages.add(h, kept);
    if (sampled) this.sample.push((r * Math.sqrt(w)) / Math.sqrt(Math.max(1e-12, q)));
  }

  /** The exact leave-one-out RMSE sqrt(sum w e^2 / sum w), e = r / (1 - h) (Infinity when a row of leverage 1 has a residual). */
  get looRmse(): number {
    return this.looInfinite ? Infinity : Math.sqrt(this.loo / this.sw);
  }

  /**
   * The checks: influential rows by the three rules of influenceThresholds among the kept
   * extremes (every row that breaks a rule is among them unless a list was cut above its
   * threshold, which `notes` then says), the normal-quantile plot of the sample's
   * standardized residuals, and the warnings. Returns the notes on what was streamed.
   */
  finish(fit: FitResult, n: number): { diagnostics: Diagnostics; notes: string[] } {
    const df = fit.df;
    const sigma2 = fit.sigma * fit.sigma;
    const thresholds = influenceThresholds(n, df, 'student');
    const [tLimit, dLimit, hLimit] = thresholds.map((t) => t.value) as [number, number, number];
    const rdf = n - df;
    const seen = new Map<number, Kept>();
    for (const list of [this.cooks.list(), this.outliers.list(), this.leverages.list()]) for (const k of list) seen.set(k.index, k);
    const flagged: { row: InfluentialRow; score: number }[] = [];
    for (const k of seen.values()) {
      const q = 1 - k.h;
      const cooks = q <= LEVERAGE_ONE ? NaN : (k.w * k.r * k.r * k.h) / (df * sigma2 * q * q);
      let t = NaN;
      if (rdf - 1 > 0 && q > LEVERAGE_ONE && sigma2 > 0) {
        const s = (k.r * Math.sqrt(k.w)) / Math.sqrt(sigma2 * q);
        const rest = rdf - s * s;
        t = rest > 0 ? s * Math.sqrt((rdf - 1) / rest) : s > 0 ? Infinity : -Infinity;
      }
      const a = Math.abs(t) / tLimit;
      const d = cooks / dLimit;
      const hh = k.h / hLimit;
      if (!(a > 1 || d > 1 || hh > 1)) continue;
      const exceeds: InfluenceRule[] = [];
      if (Math.abs(t) > tLimit) exceeds.push('outlier');
      if (cooks > dLimit) exceeds.push('cooks');
      if (k.h > hLimit) exceeds.push('leverage');
      flagged.push({ row: { index: k.index, line: k.line, leverage: k.h, cooksDistance: cooks, studentized: t, exceeds }, score: Math.max(a > 1 ? a : 0, d > 1 ? d : 0, hh > 1 ? hh : 0) });
    }
    flagged.sort((a, b) => b.score - a.score || a.row.index - b.row.index);
    const rows = flagged.map((f) => f.row);
    const notes: string[] = [];
    const cut =
      (this.cooks.cutAt > 0 && this.cooks.cutAt / (df * sigma2) > dLimit) ||
      this.leverages.cutAt > hLimit ||
      (this.outliers.cutAt > 0 && rdf - 1 > 0 && Math.sqrt(this.outliers.cutAt / sigma2) > tLimit);
    if (cut)
      notes.push(`More than ${KEPT_EXTREMES.toLocaleString('en-US')} rows stand out by one rule; the ${rows.length.toLocaleString('en-US')} listed are the most extreme ones kept while streaming.`);
    const out: { -readonly [K in keyof Diagnostics]: Diagnostics[K] } = { influential: { thresholds, rows, total: rows.length, shown: Math.min(INFLUENCE_SHOWN, rows.length) }, warnings: [] };
    const scale = fit.sigma;
    if (this.sample.length >= 3 && scale > 0) {
      const qq = normalQuantiles(
        Float64Array.from(this.sample, (v) => v / scale),
        QQ_POINTS,
      );
      out.normalQuantiles = { theoretical: Array.from(qq.theoretical), sample: Array.from(qq.sample) };
    }
    out.warnings = checkWarnings(out, fit, n);
    return { diagnostics: out, notes };
  }
}
