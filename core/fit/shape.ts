/**
 * Shape constraints of a cubic spline as linear inequalities on its B-spline coefficients.
 *
 * For f = sum_j c_j B_j on the knot vector t (cubic B-splines, order 4), de Boor's
 * derivative formula (A Practical Guide to Splines, revised ed. 2001, chapter X, eq. (15))
 * gives f' = sum_j 3 (c_j - c_{j-1}) / (t_{j+3} - t_j) N_{j,3} and
 * f'' = sum_j 6 e_j N_{j,2} with e_j = (d_j - d_{j-1}) / (t_{j+2} - t_j),
 * d_j = (c_j - c_{j-1}) / (t_{j+3} - t_j), where N_{j,3}, N_{j,2} are the quadratic and
 * linear B-splines, non-negative everywhere. Hence, everywhere in the knot range:
 *
 * - nonnegative: c_j >= 0 for all j is sufficient (B-splines are non-negative);
 * - increasing / decreasing: c_j - c_{j-1} >= 0 (<= 0) is sufficient;
 * - convex / concave: e_j >= 0 (<= 0) is necessary and sufficient, because f'' is
 *   piecewise linear and e_j is f''(t_{j+1}) / 6, its value at a knot.
 *
 * (The sufficiency of coefficient conditions for monotone and non-negative splines is the
 * classical one of de Boor 2001, chapter IX, "Shape preservation", and Ramsay 1988,
 * "Monotone regression splines in action", Statistical Science 3.) Each row is scaled to
 * unit Euclidean norm, which changes no feasible set and keeps the solver well scaled.
 *
 * Natural splines: the natural boundary conditions f''(a) = f''(b) = 0 stay equality
 * constraints through the null-space parametrisation c = Z beta (core/linalg/nullSpace.ts);
 * the inequalities are transformed to (A Z) beta >= 0. The convexity rows at the two
 * boundary knots are e_2 and e_{p-1}, i.e. the natural conditions themselves, and are left
 * out. Beyond the boundary knots a natural spline continues linearly with its boundary
 * slope, so monotone and convex/concave shapes carry on outside the data range, but
 * non-negativity is only guaranteed inside it.
 */
import { InputError } from '../errors';
import type { Shape } from '../types';

/** Every shape, in the canonical order used in notes and records. */
export const SHAPES: readonly Shape[] = ['increasing', 'decreasing', 'nonnegative', 'convex', 'concave'];

/**
 * Checks and normalises a list of shapes: known names only, duplicates removed, canonical
 * order; increasing with decreasing, or convex with concave, is refused (together they
 * force a constant or a straight line, better fitted as such). Throws InputError.
 * Example: checkShapes(['convex', 'increasing']) -> ['increasing', 'convex'].
 */
export function checkShapes(shapes: readonly string[]): Shape[] {
  for (const s of shapes) {
    if (!(SHAPES as readonly string[]).includes(s)) throw new InputError(`unknown shape "${s}"; use a comma list of ${SHAPES.join(', ')}`);
  }
  const out = SHAPES.filter((s) => shapes.includes(s));
  if (out.includes('increasing') && out.includes('decreasing')) {
    throw new InputError('shapes "increasing" and "decreasing" together only allow a constant; fit a polynomial with df 1 instead');
  }
  if (out.includes('convex') && out.includes('concave')) {
    throw new InputError('shapes "convex" and "concave" together only allow a straight line; fit a natural spline with df 2 instead');
  }
  return out;
}

/**
 * Parses a comma list such as "increasing,concave" (spaces and case ignored; "none" or ""
 * means no constraint). Throws InputError for an unknown or contradictory shape.
 * Example: parseShapeList('Increasing, nonnegative') -> ['increasing', 'nonnegative'].
 */
export function parseShapeList(text: string): Shape[] {
  const parts = text
    .split(',')
    .map((s) => s.trim().toLowerCase())
    .filter((s) => s !== '');
  if (parts.length === 1 && parts[0] === 'none') return [];
  return checkShapes(parts);
}

/** Linear inequalities A c >= 0 on the B-spline coefficients. */
export interface ShapeRows {
  /** r x p, row-major, each row of unit norm. */
  readonly a: Float64Array;
  readonly rows: number;
  /** The shape each row enforces. */
  readonly shapeOf: readonly Shape[];
}

/**
 * Constraint rows for `shapes` on the cubic B-spline coefficients of the clamped knot
 * vector `knotVector` (size p = knotVector.length - 4), see the module comment. With
 * `natural` the two convexity rows at the boundary knots are omitted (they are the
 * natural boundary conditions). Cost O(p) rows of O(p) entries.
 * Example: shapeRows(clampedKnots(0, 1, []), ['increasing'], false).rows = 3.
 */
export function shapeRows(knotVector: Float64Array, shapes: readonly Shape[], natural: boolean): ShapeRows {
  const t = knotVector;
  const p = t.length - 4;
  const list: Float64Array[] = [];
  const shapeOf: Shape[] = [];
  const push = (row: Float64Array, shape: Shape): void => {
    let norm = 0;
    for (const v of row) norm += v * v;
    norm = Math.sqrt(norm);
    for (let j = 0; j < p; j++) row[j] = (row[j] as number) / norm;
    list.push(row);
    shapeOf.push(shape);
  };
  for (const shape of shapes) {
    switch (shape) {
      case 'nonnegative':
        for (let j = 0; j < p; j++) {
          const row = new Float64Array(p);
          row[j] = 1;
          push(row, shape);
        }
        break;
      case 'increasing':
      case 'decreasing': {
        const sign = shape === 'increasing' ? 1 : -1;
        for (let j = 1; j < p; j++) {
          const row = new Float64Array(p);
          row[j] = sign;
          row[j - 1] = -sign;
          push(row, shape);
        }
        break;
      }
      case 'convex':
      case 'concave': {
        const sign = shape === 'convex' ? 1 : -1;
        const first = natural ? 3 : 2;
        const last = natural ? p - 2 : p - 1;
        // Knot differences in units of the knot range: the row's direction is unchanged, and
        // its entries (of order 1 / spacing^2) neither overflow nor vanish at any scale of x.
        const range = (t[t.length - 1] as number) - (t[0] as number);
        for (let j = first; j <= last; j++) {
          const hj = range / ((t[j + 3] as number) - (t[j] as number));
          const hj1 = range / ((t[j + 2] as number) - (t[j - 1] as number));
          const den = ((t[j + 2] as number) - (t[j] as number)) / range;
          const row = new Float64Array(p);
          row[j] = (sign * hj) / den;
          row[j - 1] = (sign * (-hj - hj1)) / den;
          row[j - 2] = (sign * hj1) / den;
          push(row, shape);
        }
        break;
      }
    }
  }
  const a = new Float64Array(list.length * p);
  list.forEach((row, i) => a.set(row, i * p));
  return { a, rows: list.length, shapeOf };
}

/** A plain-language phrase for a list of shapes ("increasing and convex"). */
export function shapeWords(shapes: readonly Shape[]): string {
  const words = shapes.map((s) => (s === 'nonnegative' ? 'non-negative' : s));
  return words.length <= 1 ? (words[0] ?? 'unconstrained') : `${words.slice(0, -1).join(', ')} and ${words[words.length - 1] as string}`;
}
