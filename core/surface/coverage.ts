/**
 * Where the readings of a surface reach (docs/design.md, "Surface tables"): the convex hull
 * of the (u, v) points and the distance from a point to the nearest reading, both in
 * coordinates scaled per input by its data range, so that neither input's units weigh more.
 */
import { InputError } from '../errors';

/** Default reach: a table node farther than this from every reading (in shares of each input's range) is flagged. A Knotwise default: a quarter of the range keeps the nodes between readings taken at five or more levels of an input. */
export const DEFAULT_REACH = 0.25;
/** Limits of the reach. */
export const REACH_LIMITS = { min: 0.001, max: 1.5 } as const;
/** Relative slack of the hull test, so a node on an edge of the hull (a corner of gridded data) counts as inside. */
const HULL_SLACK = 1e-12;
/** Most bins per side of the reach index. */
const MAX_BINS = 2048;
/** Bins per reach along each side of the index. */
const BINS_PER_REACH = 4;

/** The readings' region: hull and reach index over scaled coordinates. */
export interface Coverage {
  /** Data range of each input (the scaling). */
  readonly rangeU: readonly [number, number];
  readonly rangeV: readonly [number, number];
  /** Hull vertices in scaled coordinates, counter-clockwise, no three collinear (1 or 2 points when the data are so). */
  readonly hull: { readonly u: Float64Array; readonly v: Float64Array };
  readonly reach: number;
  /** 1 when (u, v) lies outside the convex hull of the readings. */
  outsideHull(u: number, v: number): boolean;
  /** 1 when no reading lies within `reach` of (u, v) in scaled units. */
  far(u: number, v: number): boolean;
}

/** Checks a reach; throws InputError naming the limits. */
export function checkReach(reach: number, name = 'the reach'): number {
  if (!(reach >= REACH_LIMITS.min && reach <= REACH_LIMITS.max))
    throw new InputError(`${name} must be a number from ${REACH_LIMITS.min} to ${REACH_LIMITS.max} (a share of each input's data range); got ${reach}`);
  return reach;
}

function cross(ou: number, ov: number, au: number, av: number, bu: number, bv: number): number {
  return (au - ou) * (bv - ov) - (av - ov) * (bu - ou);
}

/**
 * Convex hull of points by Andrew's monotone chain (A. M. Andrew, "Another efficient
 * algorithm for convex hulls in two dimensions", Information Processing Letters 9(5),
 * 1979, 216-219): points sorted by u then v, lower and upper chains kept convex by the
 * sign of the cross product (collinear points dropped). Returns the vertices
 * counter-clockwise. O(m log m) for m points.
 * Example: convexHull(Float64Array.of(0, 1, 0, 1, 0.5), Float64Array.of(0, 0, 1, 1, 0.5)) -> the 4 corners.
 */
export function convexHull(u: Float64Array, v: Float64Array): { u: Float64Array; v: Float64Array } {
  const m = u.length;
  const idx = Array.from({ length: m }, (_, i) => i);
  idx.sort((a, b) => (u[a] as number) - (u[b] as number) || (v[a] as number) - (v[b] as number));
  const hu: number[] = [];
  const hv: number[] = [];
  const push = (k: number, floor: number): void => {
    const pu = u[k] as number;
    const pv = v[k] as number;
    while (hu.length >= floor + 2 && cross(hu[hu.length - 2] as number, hv[hv.length - 2] as number, hu[hu.length - 1] as number, hv[hv.length - 1] as number, pu, pv) <= 0) {
      hu.pop();
      hv.pop();
    }
    hu.push(pu);
    hv.push(pv);
  };
  for (const k of idx) push(k, 0);
  const lower = hu.length;
  for (let j = m - 2; j >= 0; j--) push(idx[j] as number, lower - 1);
  // The last point repeats the first.
  if (hu.length > 1) {
    hu.pop();
    hv.pop();
  }
  // Repeated points only: one vertex.
  if (hu.length === 2 && hu[0] === hu[1] && hv[0] === hv[1]) return { u: Float64Array.of(hu[0] as number), v: Float64Array.of(hv[0] as number) };
  return { u: Float64Array.from(hu), v: Float64Array.from(hv) };
}

/**
 * The points that can be vertices of the hull: those not strictly inside the polygon of the
 * extreme points in eight directions (Akl and Toussaint, "A fast convex hull algorithm",
 * Information Processing Letters 7(5), 1978, 219-222), so a million readings sort only the
 * few near the boundary. The hull of what is kept equals the hull of all. O(n).
 */
function hullCandidates(su: Float64Array, sv: Float64Array): { u: Float64Array; v: Float64Array } {
  const n = su.length;
  const dirs = [
    [1, 0],
    [1, 1],
    [0, 1],
    [-1, 1],
    [-1, 0],
    [-1, -1],
    [0, -1],
    [1, -1],
  ] as const;
  const best = dirs.map(() => -1);
  const score = dirs.map(() => -Infinity);
  for (let i = 0; i < n; i++) {
    const a = su[i] as number;
    const b = sv[i] as number;
    for (let d = 0; d < 8; d++) {
      const dir = dirs[d] as readonly [number, number];
      const s = dir[0] * a + dir[1] * b;
      if (s > (score[d] as number)) {
        score[d] = s;
        best[d] = i;
      }
    }
  }
  // The extreme points in the order of their directions (counter-clockwise), repeats dropped.
  const pu: number[] = [];
  const pv: number[] = [];
  for (const k of best) {
    const a = su[k] as number;
    const b = sv[k] as number;
    if (pu.length && pu[pu.length - 1] === a && pv[pv.length - 1] === b) continue;
    if (pu.length > 1 && pu[0] === a && pv[0] === b) continue;
    pu.push(a);
    pv.push(b);
  }
  const keepU: number[] = [];
  const keepV: number[] = [];
  const m = pu.length;
  for (let i = 0; i < n; i++) {
    const a = su[i] as number;
    const b = sv[i] as number;
    let inside = m >= 3;
    for (let j = 0; j < m && inside; j++) {
      const k = (j + 1) % m;
      if (!(cross(pu[j] as number, pv[j] as number, pu[k] as number, pv[k] as number, a, b) > 0)) inside = false;
    }
    if (!inside) {
      keepU.push(a);
      keepV.push(b);
    }
  }
  return { u: Float64Array.from(keepU), v: Float64Array.from(keepV) };
}

/**
 * The coverage of readings at (u[i], v[i]): each input scaled to [0, 1] by its data range
 * (a constant input maps to 0), the convex hull of the scaled points, and a bin index of
 * side about `reach` for the nearest-reading test. A node is outside when it lies outside
 * the hull (edges and vertices count as inside, with a relative slack of 1e-12); far when
 * no reading lies within `reach` (Euclidean, scaled units). Cost O(n) to index (plus the
 * hull of the few boundary candidates), O(readings in the 3 x 3 neighbouring bins) per test.
 * Example: coverageOf(u, v, 0.1).outsideHull(20, 5).
 */
export function coverageOf(u: Float64Array, v: Float64Array, reach = DEFAULT_REACH): Coverage {
  const n = u.length;
  let u0 = Infinity;
  let u1 = -Infinity;
  let v0 = Infinity;
  let v1 = -Infinity;
  for (let i = 0; i < n; i++) {
    const a = u[i] as number;
    const b = v[i] as number;
    if (a < u0) u0 = a;
    if (a > u1) u1 = a;
    if (b < v0) v0 = b;
    if (b > v1) v1 = b;
  }
  const du = u1 > u0 ? u1 - u0 : 1;
  const dv = v1 > v0 ? v1 - v0 : 1;
  const scaleU = (x: number): number => (x - u0) / du;
  const scaleV = (x: number): number => (x - v0) / dv;
  const su = new Float64Array(n);
  const sv = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    su[i] = scaleU(u[i] as number);
    sv[i] = scaleV(v[i] as number);
  }
  const cand = hullCandidates(su, sv);
  const hull = convexHull(cand.u, cand.v);
  // Bins of side about a quarter of the reach (at most MAX_BINS per side), readings listed per
  // bin (counting sort): a node is settled by a filled bin wholly within the reach, so only
  // the bins the circle's edge crosses are searched reading by reading.
  const bins = Math.max(1, Math.min(MAX_BINS, Math.ceil(BINS_PER_REACH / reach)));
  const side = 1 / bins;
  const binOf = (s: number): number => Math.min(bins - 1, Math.max(0, Math.floor(s / side)));
  const start = new Int32Array(bins * bins + 1);
  for (let i = 0; i < n; i++) (start[binOf(su[i] as number) * bins + binOf(sv[i] as number) + 1] as number)++;
  for (let b = 0; b < bins * bins; b++) start[b + 1] = (start[b + 1] as number) + (start[b] as number);
  const fill = start.slice(0, bins * bins);
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    const b = binOf(su[i] as number) * bins + binOf(sv[i] as number);
    order[fill[b] as number] = i;
    fill[b] = (fill[b] as number) + 1;
  }
  const span = Math.ceil(reach / side);
  const r2 = reach * reach;
  const hu = hull.u;
  const hv = hull.v;
  const h = hu.length;
  return {
    rangeU: [u0, u1],
    rangeV: [v0, v1],
    hull,
    reach,
    outsideHull(a, b) {
      const x = scaleU(a);
      const y = scaleV(b);
      if (h === 1) return Math.abs(x - (hu[0] as number)) > HULL_SLACK || Math.abs(y - (hv[0] as number)) > HULL_SLACK;
      if (h === 2) {
        // A segment: on it within the slack.
        const ex = (hu[1] as number) - (hu[0] as number);
        const ey = (hv[1] as number) - (hv[0] as number);
        const len2 = ex * ex + ey * ey;
        const t = ((x - (hu[0] as number)) * ex + (y - (hv[0] as number)) * ey) / len2;
        if (t < -HULL_SLACK || t > 1 + HULL_SLACK) return true;
        return Math.abs(cross(hu[0] as number, hv[0] as number, hu[1] as number, hv[1] as number, x, y)) > HULL_SLACK * Math.sqrt(len2);
      }
      for (let j = 0; j < h; j++) {
        const k = j + 1 === h ? 0 : j + 1;
        const ax = hu[j] as number;
        const ay = hv[j] as number;
        const ex = (hu[k] as number) - ax;
        const ey = (hv[k] as number) - ay;
        if (ex * (y - ay) - ey * (x - ax) < -HULL_SLACK * Math.hypot(ex, ey)) return true;
      }
      return false;
    },
    far(a, b) {
      const x = scaleU(a);
      const y = scaleV(b);
      const bx = Math.floor(x / side);
      const by = Math.floor(y / side);
      for (let i = Math.max(0, bx - span); i <= Math.min(bins - 1, bx + span); i++) {
        // Nearest and farthest offsets of the bin's columns from x (the last bin reaches to infinity: values clamped into it).
        const x0 = i * side - x;
        const x1 = i === bins - 1 ? Infinity : x0 + side;
        const nearX = x0 > 0 ? x0 : x1 < 0 ? -x1 : 0;
        const farX = Math.max(Math.abs(x0), Math.abs(x1));
        for (let j = Math.max(0, by - span); j <= Math.min(bins - 1, by + span); j++) {
          const b0 = i * bins + j;
          const first = start[b0] as number;
          const last = start[b0 + 1] as number;
          if (first === last) continue;
          const y0 = j * side - y;
          const y1 = j === bins - 1 ? Infinity : y0 + side;
          const nearY = y0 > 0 ? y0 : y1 < 0 ? -y1 : 0;
          if (nearX * nearX + nearY * nearY > r2) continue;
          const farY = Math.max(Math.abs(y0), Math.abs(y1));
          if (farX * farX + farY * farY <= r2) return false;
          for (let p = first; p < last; p++) {
            const q = order[p] as number;
            const ex = (su[q] as number) - x;
            const ey = (sv[q] as number) - y;
            if (ex * ex + ey * ey <= r2) return false;
          }
        }
      }
      return true;
    },
  };
}
