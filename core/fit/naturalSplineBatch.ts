import { ExtrapolatingBSplineBasis, knotArray, naturalKnots } from '../basis/naturalSpline';
import { centringOffset } from '../stats/weightedMean';
import { FitError } from '../errors';
import { nullSpace } from '../linalg/nullSpace';
import { accumulateRow, buildCells, type Cells, interleaveCubics, SUMS_PER_CELL } from './powerSums/cells';
import { SplineFromSums } from './powerSums/splineSums';
import type { FitResult } from '../types';
import { RowBasisCurve } from './linearFit';
import { fitNaturalSpline } from './naturalSpline';
import type { PreparedData } from './prepared';
import { dataTotals, summariseLazily } from './summary';

/**
 * Natural cubic regression splines at several df at once, for tuning. One pass of per-cell
 * weighted power sums over the union of all candidates' knots gives every candidate's Gram
 * matrix (docs/design.md, "Power sums"); fitted values and leverage then come from the cell cubics in
 * O(n) per candidate without evaluating B-splines row by row. y is centred at its weighted
 * mean before the sums are taken (and the mean added back), as fitNaturalSpline does. The
 * results equal fitNaturalSpline up to rounding. Each fit's per-row arrays (fitted values,
 * residuals, leverage and what follows from them) are built when first read: usually only
 * the chosen candidate's are. Returns each df's fit, or the FitError that
 * skipped it (with fitNaturalSpline's account of what the data lacks).
 * Cost O(n) + candidates x O(n) (one cubic per row), and O(n) more for each fit whose rows are read.
 * Example: fitNaturalSplineBatch(prepareData({ x, y }), [2, 4, 8]).get(4) // a FitResult, or the FitError that skipped df 4
 */
export function fitNaturalSplineBatch(prepared: PreparedData, dfs: readonly number[]): Map<number, FitResult | FitError> {
  const out = new Map<number, FitResult | FitError>();
  const { data } = prepared;
  const { x, y, w } = data;
  const n = x.length;
  const specs: { df: number; knots: ReturnType<typeof naturalKnots>; basis: ExtrapolatingBSplineBasis }[] = [];
  for (const df of dfs) {
    try {
      const knots = naturalKnots(prepared.sortedX, prepared.distinct, df);
      specs.push({ df, knots, basis: new ExtrapolatingBSplineBasis(knots.lower, knots.upper, knots.interior) });
    } catch (e) {
      if (!(e instanceof FitError)) throw e;
      out.set(df, e);
    }
  }
  if (specs.length === 0) return out;
  const cells = buildCells(
    x,
    specs.map((s) => knotArray(s.knots)),
  );
  // y centred at its weighted mean: the sums and the solve see y - mean, which the B-splines
  // (summing to 1) add back exactly; a small signal on a large offset keeps its digits.
  const offset = centringOffset(y, w);
  const sums = new Float64Array((cells.breaks.length - 1) * SUMS_PER_CELL);
  for (let i = 0; i < n; i++) accumulateRow(sums, cells.cell[i] as number, cells.t[i] as number, (y[i] as number) - offset, w ? (w[i] as number) : 1);
  const totals = dataTotals(data);
  // Every candidate fitted from the sums first; then one pass over the rows gives all their residual sums of squares.
  const fitted: { df: number; knots: (typeof specs)[number]['knots']; basis: ExtrapolatingBSplineBasis; model: SplineFromSums; z: Float64Array; fitPoly: Float64Array }[] = [];
  for (const { df, knots, basis } of specs) {
    const z = nullSpace(basis.naturalConstraint(), 2, basis.size);
    const model = new SplineFromSums(cells, basis, z, `natural spline with df ${df}`);
    if (!model.fit(sums)) {
      // The row-by-row fit says what the data lacks (too few rows, weights too small, ...).
      out.set(df, rowByRowError(prepared, df) ?? new FitError(model.lastError));
      continue;
    }
    fitted.push({ df, knots, basis, model, z, fitPoly: Float64Array.from(model.fitPoly) });
  }
  const rssOf = residualSumsOfSquares(
    fitted.map((f) => f.fitPoly),
    cells,
    y,
    w,
    offset,
  );
  for (const [k, { df, knots, basis, model, z, fitPoly }] of fitted.entries()) {
    const cov = model.covariance();
    const rss = rssOf[k] as number;
    const curve = new RowBasisCurve('natural-spline', df, knots.lower, knots.upper, basis, model.theta, cov, z, offset);
    const coefficients = model.theta.map((c) => c + offset);
    // The fit minus the offset at scaled position t of cell c (a row's cell cubic), the same in both passes below.
    const cubicAt = (c: number, t: number): number => {
      const o = c * 4;
      return (fitPoly[o] as number) + t * ((fitPoly[o + 1] as number) + t * ((fitPoly[o + 2] as number) + t * (fitPoly[o + 3] as number)));
    };
    const fittedRows = (): Float64Array => {
      const fitted = new Float64Array(n);
      for (let i = 0; i < n; i++) fitted[i] = offset + cubicAt(cells.cell[i] as number, cells.t[i] as number);
      return fitted;
    };
    const rows = (): { residuals: Float64Array; leverage: Float64Array } => {
      const p = basis.size;
      const buf = new Float64Array(4);
      const residuals = new Float64Array(n);
      const leverage = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        const c = cells.cell[i] as number;
        const t = cells.t[i] as number;
        const f = cubicAt(c, t);
        residuals[i] = (y[i] as number) - offset - f;
        const first = model.basisAt(c, t, buf);
        let h = 0;
        for (let a = 0; a < 4; a++) {
          const off = (first + a) * p + first;
          const s =
            (cov[off] as number) * (buf[0] as number) + (cov[off + 1] as number) * (buf[1] as number) + (cov[off + 2] as number) * (buf[2] as number) + (cov[off + 3] as number) * (buf[3] as number);
          h += (buf[a] as number) * s;
        }
        leverage[i] = (w ? (w[i] as number) : 1) * h;
      }
      return { residuals, leverage };
    };
    out.set(df, summariseLazily(data, { kind: 'natural-spline', df, curve, coefficients, knots: knotArray(knots), rss, rows, fitted: fittedRows, notes: knots.notes }, totals));
  }
  return out;
}

/** The FitError of the row-by-row fit at df (its message names what the data lacks), or undefined when that fit succeeds. */
function rowByRowError(prepared: PreparedData, df: number): FitError | undefined {
  try {
    fitNaturalSpline(prepared, df);
    return undefined;
  } catch (e) {
    if (e instanceof FitError) return e;
    throw e;
  }
}

/**
 * The weighted residual sum of squares of every candidate, row by row in one pass (the
 * sums' subtraction would lose digits when a fit is close): for each row its cell's cubic
 * of every candidate, in the row order a pass per candidate would take, so each sum is the
 * same to the last bit.
 */
function residualSumsOfSquares(polys: readonly Float64Array[], cells: Cells, y: Float64Array, w: Float64Array | undefined, offset: number): Float64Array {
  const C = polys.length;
  const cellCount = cells.breaks.length - 1;
  const all = interleaveCubics(polys, cellCount, new Float64Array(cellCount * C * 4));
  const rss = new Float64Array(C);
  const n = y.length;
  for (let i = 0; i < n; i++) {
    const t = cells.t[i] as number;
    const yc = (y[i] as number) - offset;
    const wi = w ? (w[i] as number) : 1;
    let o = (cells.cell[i] as number) * C * 4;
    for (let k = 0; k < C; k++, o += 4) {
      const f = (all[o] as number) + t * ((all[o + 1] as number) + t * ((all[o + 2] as number) + t * (all[o + 3] as number)));
      const r = yc - f;
      rss[k] = (rss[k] as number) + wi * r * r;
    }
  }
  return rss;
}
