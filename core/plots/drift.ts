/**
 * Figure: the curve a fit record holds and the newly fitted curve, each with its pointwise
 * band, over the union of their x ranges, with the point of largest relative difference
 * marked (core/calibrate/drift.ts). The recorded curve is dashed over the lighter band, the
 * new curve solid over the darker one.
 */
import { sampleAt, sampleBand, type CurveSample, type Drift } from '../calibrate/drift';
import { percent } from '../words/numbers';
import { plotFrame } from './frame';
import { extent } from './scale';
import { bandPath, coord, escapeXml, linePath, num, reading, svgDocument } from './svg';

/** Inputs of driftSvg. Labels may come from the CSV; they are escaped. */
export interface DriftSpec {
  readonly id: string;
  /** The curve sample of the fit record. */
  readonly recorded: CurveSample;
  /** The new curve, sampled the same way (curveSample of the new fit). */
  readonly current: CurveSample;
  /** driftFromRecord or driftBetweenSamples of the two; null when their ranges do not overlap. */
  readonly drift: Drift | null;
  readonly xLabel: string;
  readonly yLabel: string;
  /** How to read the figure, the closing sentences of its description (the figure catalogue's text, core/view/figureCatalogue.ts). */
  readonly reading?: string | undefined;
}

/** Radius of the mark at the largest relative difference (as the marked points of the influence figures). */
const MARK_RADIUS = 3.6;

/** SVG text of the drift figure. Example: driftSvg({ id: 'fig-drift', recorded, current, drift, xLabel: 'x', yLabel: 'y' }). */
export function driftSvg(spec: DriftSpec): string {
  const { recorded: rec, current: cur, drift } = spec;
  const recBand = sampleBand(rec);
  const curBand = sampleBand(cur);
  const frame = plotFrame({
    id: spec.id,
    xDomain: extent([rec.x, cur.x], 0.02),
    yDomain: extent([rec.fit, cur.fit, recBand.lower, recBand.upper, curBand.lower, curBand.upper]),
    xLabel: spec.xLabel,
    yLabel: spec.yLabel,
  });
  const { sx, sy } = frame;
  const px = (s: CurveSample): number[] => s.x.map((v) => sx(v));
  const map = (a: readonly number[]): number[] => a.map((v) => sy(v));
  let mark = '';
  if (drift) {
    // The largest relative difference, or the largest difference when none can be judged.
    const at = drift.largestRelative ?? drift.largest;
    const r = sampleAt(rec, at.x).fit;
    const c = sampleAt(cur, at.x).fit;
    const tip = drift.largestRelative
      ? `largest relative difference: ${num(drift.largestRelative.z, 2)} standard errors at ${spec.xLabel} ${num(at.x, 5)} (difference ${num(at.difference, 3)})`
      : `largest difference: ${num(at.difference, 3)} at ${spec.xLabel} ${num(at.x, 5)}`;
    mark =
      `<path class="kw-stem kw-drift-mark" d="M${coord(sx(at.x))} ${coord(sy(r))}V${coord(sy(c))}"/>` +
      `<circle class="kw-point kw-influential kw-drift-mark" cx="${coord(sx(at.x))}" cy="${coord(sy(c))}" r="${MARK_RADIUS}" data-x="${at.x}"><title>${escapeXml(tip)}</title></circle>`;
  }
  const body =
    frame.clipDef +
    frame.axes +
    `<g clip-path="${frame.clip}">` +
    // Bands first, the recorded (lighter) beneath the new one, then both curves and the mark on top.
    `<path class="kw-band-pi kw-drift-recorded" d="${bandPath(px(rec), map(recBand.lower), map(recBand.upper))}"/>` +
    `<path class="kw-band-ci kw-drift-current" d="${bandPath(px(cur), map(curBand.lower), map(curBand.upper))}"/>` +
    `<path class="kw-threshold kw-drift-recorded" d="${linePath(px(rec), map(rec.fit))}"/>` +
    `<path class="kw-curve kw-drift-current" d="${linePath(px(cur), map(cur.fit))}"/>` +
    mark +
    `</g>`;
  const level = percent(rec.level);
  return svgDocument(
    spec.id,
    {
      title: `Recorded and new ${spec.yLabel} against ${spec.xLabel}, each with its ${level} band`,
      desc:
        `The recorded curve (dashed, lighter band) covers ${spec.xLabel} ${num(rec.lower)} to ${num(rec.upper)}; ` +
        `the new curve (solid, darker band) ${num(cur.lower)} to ${num(cur.upper)}. ` +
        (drift ? drift.words : 'Their x ranges do not overlap, so they cannot be compared.') +
        reading(spec.reading),
    },
    body,
  );
}
