/**
 * Figures of a surface in the panel besides its heat figure: slices of the surface at a few
 * values of one input, each a curve along the other input with its confidence and
 * prediction bands; and residuals against one input (each row, or the mean residual of bins).
 */
import { plotFrame } from './frame';
import { extent } from './scale';
import { bandPath, coord, linePath, num, reading, svgDocument } from './svg';

/** One slice: the fixed value and the surface along the other input. */
export interface SliceCurve {
  readonly at: number;
  readonly fit: readonly number[];
  readonly ciLower: readonly number[];
  readonly ciUpper: readonly number[];
  readonly piLower: readonly number[];
  readonly piUpper: readonly number[];
}

/** Inputs of surfaceSliceSvg. */
export interface SurfaceSliceSpec {
  readonly id: string;
  /** The values of the input along which every slice runs. */
  readonly along: readonly number[];
  readonly curves: readonly SliceCurve[];
  /** The input held fixed in each slice, the input along the slices, the reading. */
  readonly labels: { readonly fixed: string; readonly along: string; readonly y: string };
  readonly reading?: string | undefined;
}

/**
 * SVG text of the slices figure: per slice its prediction band (class kw-band-pi), its
 * confidence band (kw-band-ci) and its curve (kw-curve kw-slice-k, k its index, which sets
 * the line's dash so slices stay apart without colour), with the fixed value written at the
 * curve's right end. O(slices × points).
 * Example: surfaceSliceSvg({ id: 'fig-slices', along, curves, labels: { fixed: 'Girth', along: 'Height', y: 'Volume' } }).
 */
export function surfaceSliceSvg(spec: SurfaceSliceSpec): string {
  const { along, curves } = spec;
  const f = plotFrame({
    id: spec.id,
    xDomain: extent([along], 0.02),
    yDomain: extent(curves.flatMap((c) => [c.piLower, c.piUpper, c.fit])),
    xLabel: spec.labels.along,
    yLabel: spec.labels.y,
  });
  const xs = along.map((x) => f.sx(x));
  let body = '';
  // Every band first, so no band hides another slice's curve.
  for (const c of curves) {
    body += `<path class="kw-band-pi" d="${bandPath(xs, c.piLower.map(f.sy), c.piUpper.map(f.sy))}"/>`;
    body += `<path class="kw-band-ci" d="${bandPath(xs, c.ciLower.map(f.sy), c.ciUpper.map(f.sy))}"/>`;
  }
  for (const [k, c] of curves.entries()) {
    body += `<path class="kw-curve kw-slice-${k}" data-slice="${k}" d="${linePath(xs, c.fit.map(f.sy))}"/>`;
    const last = c.fit[c.fit.length - 1] as number;
    if (Number.isFinite(last)) body += `<text class="kw-slice-label" x="${coord(f.right - 4)}" y="${coord(f.sy(last) - 4)}" text-anchor="end">${num(c.at)}</text>`;
  }
  const values = curves.map((c) => num(c.at)).join(', ');
  return svgDocument(
    spec.id,
    {
      title: `Slices of the surface: ${spec.labels.y} against ${spec.labels.along} at ${spec.labels.fixed} = ${values}`,
      desc:
        `${curves.length} curves of the fitted ${spec.labels.y} along ${spec.labels.along}, one for each value of ${spec.labels.fixed} (${values}, written at each curve's right end, dashed differently), ` +
        `each with its 95 % confidence band (darker) and prediction band (lighter).` +
        reading(spec.reading),
    },
    f.clipDef + f.axes + `<g clip-path="${f.clip}">${body}</g>`,
  );
}

/** Inputs of surfaceResidualSvg. */
export interface SurfaceResidualSpec {
  readonly id: string;
  readonly kind: 'points' | 'bins';
  readonly x: readonly number[];
  readonly r: readonly number[];
  readonly labels: { readonly x: string; readonly y: string };
}

/**
 * SVG text of residuals against one input: a zero line (kw-zero) and a dot per row
 * (kw-point) or per bin's mean residual (kw-bin). O(points).
 * Example: surfaceResidualSvg({ id: 'fig-res-x', kind: 'points', x, r, labels: { x: 'Girth', y: 'Volume' } }).
 */
export function surfaceResidualSvg(spec: SurfaceResidualSpec): string {
  const f = plotFrame({ id: spec.id, xDomain: extent([spec.x]), yDomain: extent([spec.r, [0]]), xLabel: spec.labels.x, yLabel: `residual of ${spec.labels.y}` });
  const cls = spec.kind === 'bins' ? 'kw-bin' : 'kw-point';
  let body = `<path class="kw-zero" d="M${coord(f.left)} ${coord(f.sy(0))}H${coord(f.right)}"/>`;
  for (let i = 0; i < spec.x.length; i++) body += `<circle class="${cls}" cx="${coord(f.sx(spec.x[i] as number))}" cy="${coord(f.sy(spec.r[i] as number))}" r="${spec.kind === 'bins' ? 3 : 2}"/>`;
  const what = spec.kind === 'bins' ? `the mean residual of each of ${spec.x.length} equal bins of ${spec.labels.x}` : `the residual of each of ${spec.x.length} rows`;
  return svgDocument(
    spec.id,
    {
      title: `Residuals of ${spec.labels.y} against ${spec.labels.x}`,
      desc: `Dots mark ${what}; the line marks zero. A trend or bend along ${spec.labels.x} means the surface misses a shape in that input.`,
    },
    f.clipDef + f.axes + `<g clip-path="${f.clip}">${body}</g>`,
  );
}
