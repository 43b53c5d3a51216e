/**
 * From the unconstrained smoothing spline to the shape-constrained one: the feasibility
 * check, the constrained solve on the band system, the fitted values, leverage and bands at
 * the active set, and the notes.
 */
import { BSplineEvaluator } from '../../basis/bspline';
import type { FitResult, ModelReport, Shape } from '../../types';
import { shapeRows, shapeWords } from '../shape';
import { makeCurve } from '../smoothingSpline/curve';
import { perRow, type Pooled } from '../smoothingSpline/ties';
import { summariseFit } from '../summary';
import { FEASIBILITY_TOLERANCE, satisfies } from './feasibility';
import { lineSystem } from './lineSystem';
import { penalisedSystem } from './penalisedSystem';
import { solveConstrained } from './solveConstrained';
import { maxAbs } from './vectors';

/**
 * The constrained fit from the unconstrained one (`base`, same rows), by the method of
 * core/fit/shapedSmoothing/index.ts (Lawson & Hanson 1974, "Solving Least Squares
 * Problems", chapters 23 and 27). Cost O(m) when no row binds, else that of
 * solveConstrained plus O(m) for the fitted values and leverage.
 * @example constrain(poolTies(data), fitSmoothingSpline(data, 6), ['increasing'])
 */
export function constrain(pooled: Pooled, base: FitResult, shapes: readonly Shape[]): FitResult {
  const model: ModelReport = { outcome: 'continuous', link: 'identity', shape: shapes, iterations: 1, converged: true };
  if (shapes.length === 0) return { ...base, model };
  const rows = shapeRows(base.knots, shapes, false);
  const unchanged = (): FitResult => ({
    ...base,
    notes: [...base.notes, ...shapeNotes(shapes, rows.rows, 0, 0, base.df, base.df)],
    model: { ...model, constraints: { total: rows.rows, active: 0, effectiveDf: base.df } },
  });
  if (satisfies(rows, base.coefficients, FEASIBILITY_TOLERANCE * maxAbs(base.coefficients))) return unchanged();
  const system = base.lambdaScaled === Infinity ? lineSystem(pooled) : penalisedSystem(pooled, base.lambdaScaled as number);
  const sol = solveConstrained(system, rows);
  if (sol.activeCount === 0) return unchanged();
  const { theta, band } = system.toSpline(sol.beta, sol.band);
  // Fitted values and hat diagonal at the pooled x, then per row.
  const { m, u, w: W } = pooled;
  const ev = new BSplineEvaluator(base.knots);
  const value = new Float64Array(m);
  const lev = new Float64Array(m);
  let trace = 0;
  for (let j = 0; j < m; j++) {
    const first = ev.eval(u[j] as number, 0);
    let f = 0;
    let h = 0;
    for (let a = 0; a < 4; a++) {
      const ba = ev.value[a] as number;
      f += ba * (theta[first + a] as number);
      h += ba * ba * (band[4 * (first + a)] as number);
      for (let b = a + 1; b < 4; b++) h += 2 * ba * (ev.value[b] as number) * (band[4 * (first + a) + (b - a)] as number);
    }
    value[j] = f;
    lev[j] = (W[j] as number) * h;
    trace += lev[j] as number;
  }
  const fitted = new Float64Array(pooled.n);
  const leverage = new Float64Array(pooled.n);
  perRow(pooled, value, lev, fitted, leverage);
  const notes = [...base.notes, ...shapeNotes(shapes, rows.rows, sol.activeCount, sol.rank, base.df, trace)];
  if (!sol.converged)
    notes.push(
      'Shape constraints: the non-negative least-squares search stopped at its iteration cap, so the curve may miss the constrained optimum (and a constraint by a little); treat it with caution.',
    );
  const fit = summariseFit(pooled.data, {
    kind: 'smoothing-spline',
    df: base.df,
    curve: makeCurve(base.knots, theta, band, base.df),
    coefficients: theta,
    knots: base.knots,
    fitted,
    leverage,
    lambda: base.lambda as number,
    lambdaScaled: base.lambdaScaled as number,
    notes,
  });
  return { ...fit, model: { ...model, converged: sol.converged, constraints: { total: rows.rows, active: sol.rank, effectiveDf: trace } } };
}

/** The notes on the shape constraints of a fit: how many rows, how many active, what the bands assume. */
function shapeNotes(shapes: readonly Shape[], total: number, active: number, rank: number, df: number, trace: number): string[] {
  const notes = [
    `Shape: ${shapeWords(shapes)}, guaranteed everywhere in the data range through ${total} linear inequalities on the smoothing spline's B-spline coefficients, at the lambda of the unconstrained fit; ` +
      (active === 0
        ? 'none is active, so the curve equals the unconstrained smoothing spline.'
        : `${active} active${rank < active ? ` (${rank} independent)` : ''}, which lowers the hat-matrix trace from ${df.toFixed(3)} to ${trace.toFixed(3)}. ` +
          'The bands treat the active constraints as fixed equalities, an approximation that ignores the chance of a different active set; with active constraints the curve need not have zero curvature at the ends of the data range.'),
  ];
  if (shapes.includes('nonnegative')) notes.push('Non-negativity is guaranteed within the data range only: beyond it the curve continues linearly and may cross zero.');
  return notes;
}
