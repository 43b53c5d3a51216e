/**
 * Draws readings: one circle per point (with a hover title naming the CSV line), or a
 * density grid when points would overplot. Density levels are classes kw-bin-1..kw-bin-6
 * on a logarithmic scale of the counts, so the stylesheet decides their look; figures
 * with a density grid add its legend (densityLegend) below the axes.
 */
import type { Cloud, CloudBins } from '../view/model';
import type { Frame } from './frame';
import { coord, escapeXml, FIGURE_HEIGHT, num } from './svg';

/** Number of density classes (kw-bin-1 ... kw-bin-6). */
export const BIN_LEVELS = 6;

/** Height a figure grows by to hold the density legend under its axes. */
export const LEGEND_HEIGHT = 22;

/** Names used in hover titles. */
export interface CloudLabels {
  readonly x: string;
  readonly y: string;
}

/**
 * Density class 1..BIN_LEVELS of a count on a logarithmic scale up to `max`: log(count) /
 * log(max) cut into BIN_LEVELS equal parts, so a few crowded cells do not leave every other
 * cell in the palest class (a linear scale would). 0 for an empty cell.
 * Example: binLevel(1, 100) === 1, binLevel(10, 100) === 4, binLevel(100, 100) === 6.
 */
export function binLevel(count: number, max: number): number {
  if (count <= 0 || max <= 0) return 0;
  if (max === 1) return BIN_LEVELS;
  const t = Math.log(count) / Math.log(max);
  return Math.max(1, Math.min(BIN_LEVELS, 1 + Math.floor(t * BIN_LEVELS + 1e-9)));
}

/** The counts one density class covers (both ends included). */
export interface BinLevelRange {
  readonly level: number;
  readonly from: number;
  readonly to: number;
}

/**
 * The whole-number counts each density class covers when the fullest cell holds `max`
 * readings, classes without a whole number left out; together they cover 1..max. Derived
 * from binLevel itself, so the legend and the shading cannot disagree. O(BIN_LEVELS).
 * Example: binLevelRanges(100) -> [{level 1: 1-2}, {2: 3-4}, {3: 5-9}, {4: 10-21}, {5: 22-46}, {6: 47-100}].
 */
export function binLevelRanges(max: number): BinLevelRange[] {
  const top = Math.floor(max);
  if (!(top >= 1)) return [];
  // The smallest count of class `level` or above: start at the exact boundary max^((level-1)/LEVELS), then step to where binLevel changes.
  const firstAtLeast = (level: number): number => {
    let c = Math.max(1, Math.min(top, Math.ceil(Math.pow(top, (level - 1) / BIN_LEVELS))));
    while (c > 1 && binLevel(c - 1, top) >= level) c--;
    while (c <= top && binLevel(c, top) < level) c++;
    return c;
  };
  const out: BinLevelRange[] = [];
  for (let level = 1; level <= BIN_LEVELS; level++) {
    const from = firstAtLeast(level);
    const to = level === BIN_LEVELS ? top : firstAtLeast(level + 1) - 1;
    if (from <= to && binLevel(from, top) === level) out.push({ level, from, to });
  }
  return out;
}

/** The largest count of a density grid. O(cells). */
export function maxCount(cloud: CloudBins): number {
  let max = 0;
  for (const c of cloud.counts) if (c > max) max = c;
  return max;
}

/**
 * The legend of a density grid, drawn in the LEGEND_HEIGHT strip under a figure of
 * FIGURE_HEIGHT: a swatch of each class (the same kw-bin-* classes as the cells) with the
 * counts it covers. Hidden from screen readers: the figure's description says the same
 * (cloudWords). Example: densityLegend(cloud) inside a figure made FIGURE_HEIGHT + LEGEND_HEIGHT tall.
 */
export function densityLegend(cloud: CloudBins): string {
  const ranges = binLevelRanges(maxCount(cloud));
  const y = FIGURE_HEIGHT + 4;
  let s = `<g class="kw-legend" aria-hidden="true"><text class="kw-tick" x="8" y="${y + 10}">readings per cell:</text>`;
  let x = 104;
  for (const r of ranges) {
    const label = r.from === r.to ? String(r.from) : `${String(r.from)}–${String(r.to)}`;
    s += `<rect class="kw-bin kw-bin-${r.level}" x="${x}" y="${y + 1}" width="12" height="11"/>`;
    s += `<text class="kw-tick" x="${x + 16}" y="${y + 10}">${escapeXml(label)}</text>`;
    // Room for the label at about 6 units a character, then a gap.
    x += 16 + 6 * label.length + 12;
  }
  return s + `</g>`;
}

/** SVG marks for a cloud in a frame; points carry data-line so a click can reveal the CSV line. */
export function cloudMarks(cloud: Cloud, frame: Frame, labels: CloudLabels, pointClass = 'kw-point'): string {
  const { sx, sy } = frame;
  if (cloud.kind === 'points') {
    let s = `<g class="${pointClass}s" clip-path="${frame.clip}">`;
    for (let i = 0; i < cloud.x.length; i++) {
      const x = cloud.x[i] as number;
      const y = cloud.y[i] as number;
      if (!Number.isFinite(x) || !Number.isFinite(y)) continue;
      const line = cloud.lines[i] ?? 0;
      const where = line > 0 ? `, CSV line ${line}` : '';
      s +=
        `<circle class="${pointClass}" cx="${coord(sx(x))}" cy="${coord(sy(y))}" r="2.6"${line > 0 ? ` data-line="${line}"` : ''}>` +
        `<title>${escapeXml(`${labels.x} ${num(x, 6)}, ${labels.y} ${num(y, 6)}${where}`)}</title></circle>`;
    }
    return s + `</g>`;
  }
  const { nx, ny, counts } = cloud;
  const dx = (cloud.xMax - cloud.xMin) / nx;
  const dy = (cloud.yMax - cloud.yMin) / ny;
  const max = maxCount(cloud);
  let s = `<g class="kw-bins" clip-path="${frame.clip}">`;
  for (let j = 0; j < ny; j++) {
    for (let i = 0; i < nx; i++) {
      const c = counts[j * nx + i] ?? 0;
      if (c <= 0) continue;
      const x0 = cloud.xMin + i * dx;
      const y0 = cloud.yMin + j * dy;
      const px = sx(x0);
      const py = sy(y0 + dy);
      const w = sx(x0 + dx) - px;
      const h = sy(y0) - py;
      s +=
        `<rect class="kw-bin kw-bin-${binLevel(c, max)}" x="${coord(px)}" y="${coord(py)}" width="${coord(w + 0.3)}" height="${coord(h + 0.3)}">` +
        `<title>${escapeXml(`${c} reading${c === 1 ? '' : 's'}: ${labels.x} ${num(x0, 4)} to ${num(x0 + dx, 4)}, ${labels.y} ${num(y0, 4)} to ${num(y0 + dy, 4)}`)}</title></rect>`;
    }
  }
  return s + `</g>`;
}

/** The x and y ranges covered by a cloud. */
export function cloudRanges(cloud: Cloud): { x: number[]; y: number[] } {
  if (cloud.kind === 'points') return { x: [...cloud.x], y: [...cloud.y] };
  return { x: [cloud.xMin, cloud.xMax], y: [cloud.yMin, cloud.yMax] };
}

/** Words for a figure description: how the readings are drawn (for a density grid, its shades as the legend gives them). */
export function cloudWords(cloud: Cloud): string {
  if (cloud.kind === 'points') return `${cloud.x.length} readings drawn as dots`;
  const ranges = binLevelRanges(maxCount(cloud))
    .map((r) => (r.from === r.to ? String(r.from) : `${String(r.from)} to ${String(r.to)}`))
    .join(', ');
  return (
    `${cloud.total} readings drawn as a density grid of ${cloud.nx} by ${cloud.ny} cells (darker means more readings; ` + `the shades step on a logarithmic scale of readings per cell: ${ranges})`
  );
}
