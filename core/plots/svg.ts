/**
 * Small helpers for writing SVG text: escaping, number formatting and the document shell
 * with its <title> and <desc>. Colours never appear here: elements carry `kw-*` classes
 * that the panel's stylesheet (or the report's) maps to theme colours.
 */
import { sig } from '../words/numbers';

/** Escapes text for use in SVG/XML element content and attribute values. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string);
}

/** A coordinate with at most two decimals (keeps the SVG text short). */
export function coord(v: number): string {
  if (!Number.isFinite(v)) return '0';
  const r = Math.round(v * 100) / 100;
  return Object.is(r, -0) ? '0' : String(r);
}

/** A number for people in the house style (core/words/numbers.ts), 4 significant digits unless asked. */
export function num(v: number, digits = 4): string {
  return sig(v, digits);
}

/** Options shared by every figure. */
export interface FigureText {
  /** Short title (read by screen readers, shown on hover). */
  readonly title: string;
  /** One or two sentences describing what the figure shows. */
  readonly desc: string;
}

/** The closing sentences of a description that say how to read the figure: a space and the text, or nothing. */
export function reading(text: string | undefined): string {
  return text ? ` ${text}` : '';
}

/** Outer size of every figure in SVG user units; the page scales it to its width. */
export const FIGURE_WIDTH = 560;
export const FIGURE_HEIGHT = 320;

/**
 * Wraps figure content in an <svg> with role="img", a <title> and a <desc>, each referenced
 * by aria-labelledby. `id` must be unique within the page (used for the title and clip ids).
 */
export function svgDocument(id: string, text: FigureText, body: string, width = FIGURE_WIDTH, height = FIGURE_HEIGHT): string {
  const safeId = id.replace(/[^A-Za-z0-9_-]/g, '');
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" class="kw-plot" viewBox="0 0 ${width} ${height}" role="img" ` +
    `aria-labelledby="${safeId}-title ${safeId}-desc" data-figure="${safeId}">` +
    `<title id="${safeId}-title">${escapeXml(text.title)}</title>` +
    `<desc id="${safeId}-desc">${escapeXml(text.desc)}</desc>` +
    body +
    `</svg>`
  );
}

/** Polyline path through (xs[i], ys[i]), breaking at non-finite values. */
export function linePath(xs: readonly number[], ys: readonly number[]): string {
  let d = '';
  let pen = false;
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i] as number;
    const y = ys[i] as number;
    if (!Number.isFinite(x) || !Number.isFinite(y)) {
      pen = false;
      continue;
    }
    d += `${pen ? 'L' : 'M'}${coord(x)} ${coord(y)}`;
    pen = true;
  }
  return d;
}

/** Closed area between an upper and a lower line over the same xs (points with non-finite values are left out). */
export function bandPath(xs: readonly number[], lower: readonly number[], upper: readonly number[]): string {
  const top: string[] = [];
  const bottom: string[] = [];
  for (let i = 0; i < xs.length; i++) {
    const x = xs[i] as number;
    const lo = lower[i] as number;
    const hi = upper[i] as number;
    if (!Number.isFinite(x) || !Number.isFinite(lo) || !Number.isFinite(hi)) continue;
    top.push(`${coord(x)} ${coord(hi)}`);
    bottom.push(`${coord(x)} ${coord(lo)}`);
  }
  if (top.length < 2) return '';
  return `M${top.join('L')}L${bottom.reverse().join('L')}Z`;
}
