/**
 * The surface as a heat figure: each table node's cell shaded by the fitted value in a few
 * levels, cells of nodes the readings do not reach shaded apart, and the readings marked.
 */
import { plotFrame } from './frame';
import { coord, num, reading, svgDocument } from './svg';

/** Shading levels of the fitted value (kw-heat-1 .. kw-heat-LEVELS). */
export const HEAT_LEVELS = 8;
/** Most readings marked; more are thinned evenly in row order. */
export const MAX_MARKED = 2000;

/** What the heat figure needs. */
export interface SurfaceHeatSpec {
  readonly id: string;
  readonly us: Float64Array;
  readonly vs: Float64Array;
  /** Fitted value at node (us[i], vs[j]) at i * vs.length + j. */
  readonly fit: ArrayLike<number>;
  /** 1 where the node is flagged (outside the hull or beyond the reach). */
  readonly uncovered: ArrayLike<number>;
  /** The readings' inputs. */
  readonly readingsU: Float64Array;
  readonly readingsV: Float64Array;
  readonly labels: { readonly u: string; readonly v: string; readonly y: string };
  /** How to read the figure (closing sentences of the description). */
  readonly reading?: string;
}

/** Cell edges of a node vector: midpoints between nodes, the ends half a step out (a single node gets a unit width). */
function edges(nodes: Float64Array): Float64Array {
  const n = nodes.length;
  const e = new Float64Array(n + 1);
  if (n === 1) {
    e[0] = (nodes[0] as number) - 0.5;
    e[1] = (nodes[0] as number) + 0.5;
    return e;
  }
  for (let i = 1; i < n; i++) e[i] = ((nodes[i - 1] as number) + (nodes[i] as number)) / 2;
  e[0] = (nodes[0] as number) - ((e[1] as number) - (nodes[0] as number));
  e[n] = (nodes[n - 1] as number) + ((nodes[n - 1] as number) - (e[n - 1] as number));
  return e;
}

/**
 * The heat figure's SVG: x axis the first input, y axis the second; each node's cell is a
 * rectangle of class kw-heat kw-heat-k, k the level of the fitted value among HEAT_LEVELS
 * equal steps between the least and greatest fitted value of the covered nodes (uncovered
 * nodes: class kw-uncovered, no level); the readings as kw-point dots (at most MAX_MARKED).
 * Colours come from the stylesheet (core/report/figureStyle.ts for the report). Pure;
 * O(nodes + MAX_MARKED).
 * Example: surfaceHeatSvg(spec).startsWith('<svg').
 */
export function surfaceHeatSvg(spec: SurfaceHeatSpec): string {
  const eu = edges(spec.us);
  const ev = edges(spec.vs);
  const f = plotFrame({ id: spec.id, xDomain: [eu[0] as number, eu[eu.length - 1] as number], yDomain: [ev[0] as number, ev[ev.length - 1] as number], xLabel: spec.labels.u, yLabel: spec.labels.v });
  const nv = spec.vs.length;
  let lo = Infinity;
  let hi = -Infinity;
  for (let k = 0; k < spec.fit.length; k++) {
    const y = spec.fit[k] as number;
    if (spec.uncovered[k] || !Number.isFinite(y)) continue;
    if (y < lo) lo = y;
    if (y > hi) hi = y;
  }
  const level = (y: number): number => (hi > lo ? Math.min(HEAT_LEVELS, 1 + Math.floor(((y - lo) / (hi - lo)) * HEAT_LEVELS)) : 1);
  let cells = `<g clip-path="${f.clip}">`;
  for (let i = 0; i < spec.us.length; i++) {
    const x0 = f.sx(eu[i] as number);
    const x1 = f.sx(eu[i + 1] as number);
    for (let j = 0; j < nv; j++) {
      const y0 = f.sy(ev[j + 1] as number);
      const y1 = f.sy(ev[j] as number);
      const k = i * nv + j;
      const cls = spec.uncovered[k] ? 'kw-uncovered' : `kw-heat kw-heat-${level(spec.fit[k] as number)}`;
      cells += `<rect class="${cls}" x="${coord(x0)}" y="${coord(y0)}" width="${coord(x1 - x0)}" height="${coord(y1 - y0)}"/>`;
    }
  }
  const n = spec.readingsU.length;
  const every = Math.max(1, Math.ceil(n / MAX_MARKED));
  for (let r = 0; r < n; r += every) cells += `<circle class="kw-point" cx="${coord(f.sx(spec.readingsU[r] as number))}" cy="${coord(f.sy(spec.readingsV[r] as number))}" r="1.6"/>`;
  cells += '</g>';
  const flagged = Array.from(spec.uncovered).filter((x) => x).length;
  const desc =
    `The fitted ${spec.labels.y} over ${spec.labels.u} (across) and ${spec.labels.v} (up), one cell per table node in ${HEAT_LEVELS} shades from ${num(lo)} (lightest) to ${num(hi)} (darkest); ` +
    `${flagged} of ${spec.fit.length} nodes the readings do not reach are shaded grey; dots mark ${every > 1 ? `every ${every}th of the ` : 'the '}${n} readings.` +
    reading(spec.reading);
  return svgDocument(spec.id, { title: `Surface of ${spec.labels.y} over ${spec.labels.u} and ${spec.labels.v}`, desc }, f.clipDef + f.axes + cells);
}
