/**
 * The surface table: the fitted surface and its bands at every node of a grid per input,
 * with each node's coverage flags (docs/design.md, "Surface tables"). Long form, one row per
 * node, the first input outermost: row i * (nodes of v) + j holds (us[i], vs[j]).
 */
import { InputError } from '../errors';
import { opt } from '../words/options';
import type { Coverage } from './coverage';
import type { SurfaceFit } from './fit';
import type { SurfaceGrid } from './tableGrid';

/** The columns of a surface table, in order. */
export const SURFACE_COLUMNS = ['x', 'x2', 'fit', 'se', 'ciLower', 'ciUpper', 'piLower', 'piUpper', 'outside', 'far'] as const;
export type SurfaceColumn = (typeof SURFACE_COLUMNS)[number];
/** The 0/1 flag columns. */
export const SURFACE_FLAGS: readonly string[] = ['outside', 'far'];

/** The surface table. */
export interface SurfaceTable {
  readonly columns: readonly SurfaceColumn[];
  /** One row per node, values in the order of `columns`. */
  readonly rows: readonly (readonly number[])[];
  readonly us: Float64Array;
  readonly vs: Float64Array;
  /** Nodes outside the hull of the readings, and nodes inside it but beyond the reach of every reading. */
  readonly outside: number;
  readonly far: number;
}

/**
 * Evaluates the fit at every node of `grid` (fit, SE, 95 % confidence and prediction bands,
 * core/surface/fit.ts bands) and flags each node outside the readings' convex hull
 * (`outside`) or farther than the reach from every reading (`far`). Throws InputError
 * when some node is flagged and `allowUncovered` is false, saying how many and where the
 * first lies. Cost O(nodes x df^2).
 * Example: surfaceTable(fit, grid, coverageOf(u, v), true).rows[0] -> [u0, v0, fit, se, ...].
 */
export function surfaceTable(fit: SurfaceFit, grid: SurfaceGrid, coverage: Coverage, allowUncovered: boolean, names: { readonly u: string; readonly v: string }): SurfaceTable {
  const { us, vs } = grid;
  const m = us.length * vs.length;
  const pu = new Float64Array(m);
  const pv = new Float64Array(m);
  for (let i = 0; i < us.length; i++) {
    for (let j = 0; j < vs.length; j++) {
      pu[i * vs.length + j] = us[i] as number;
      pv[i * vs.length + j] = vs[j] as number;
    }
  }
  const outsideFlag = new Uint8Array(m);
  const farFlag = new Uint8Array(m);
  let outside = 0;
  let far = 0;
  let first = -1;
  for (let k = 0; k < m; k++) {
    const o = coverage.outsideHull(pu[k] as number, pv[k] as number);
    const f = coverage.far(pu[k] as number, pv[k] as number);
    outsideFlag[k] = o ? 1 : 0;
    farFlag[k] = f ? 1 : 0;
    if (o) outside++;
    if (f && !o) far++;
    if ((o || f) && first < 0) first = k;
  }
  if (first >= 0 && !allowUncovered) {
    const flagged = outsideFlag.reduce((s, o, k) => s + (o || farFlag[k] ? 1 : 0), 0);
    throw new InputError(
      `${flagged} of ${m} table nodes lie where the readings do not reach (${outside} outside the convex hull of the readings, ${flagged - outside} inside it but farther than ${coverage.reach} of each input's range from every reading), the first at ${names.u} = ${pu[first]}, ${names.v} = ${pv[first]}; such nodes are refused unless asked for (${opt('extrapolate')}: they are then written and flagged), or choose grids inside the data`,
    );
  }
  const b = fit.bands(pu, pv);
  const rows: number[][] = new Array(m);
  for (let k = 0; k < m; k++) {
    rows[k] = [
      pu[k] as number,
      pv[k] as number,
      b.fit[k] as number,
      b.se[k] as number,
      b.ciLower[k] as number,
      b.ciUpper[k] as number,
      b.piLower[k] as number,
      b.piUpper[k] as number,
      outsideFlag[k] as number,
      farFlag[k] as number,
    ];
  }
  return { columns: SURFACE_COLUMNS, rows, us, vs, outside, far };
}
