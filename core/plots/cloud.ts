/**
 * Draws readings: one circle per point (with a hover title naming the CSV line), or a
 * density grid when points would overplot. Density levels are classes kw-bin-1..kw-bin-6
 * so the stylesheet decides their look.
 */
import type { Cloud } from '../view/model';
import type { Frame } from './frame';
import { coord, escapeXml, num } from './svg';

/** Number of density classes (kw-bin-1 ... kw-bin-6). */
export const BIN_LEVELS = 6;

/** Names used in hover titles. */
export interface CloudLabels {
  readonly x: string;
  readonly y: string;
}

/** Density class 1..BIN_LEVELS of a count on a logarithmic scale up to `max`. */
export function binLevel(count: number, max: number): number {
  if (count <= 0 || max <= 0) return 0;
  if (max === 1) return BIN_LEVELS;
  const t = Math.log(count) / Math.log(max);
  return Math.min(BIN_LEVELS, 1 + Math.floor(t * (BIN_LEVELS - 1) + 1e-9));
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
  let max = 0;
  for (const c of counts) if (c > max) max = c;
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

/** Words for a figure description: how the readings are drawn. */
export function cloudWords(cloud: Cloud): string {
  return cloud.kind === 'points' ? `${cloud.x.length} readings drawn as dots` : `${cloud.total} readings drawn as a density grid of ${cloud.nx} by ${cloud.ny} cells (darker means more readings)`;
}
