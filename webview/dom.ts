/**
 * Small DOM helpers. Text always goes in through textContent; SVG figures built by core
 * are parsed as XML (never as HTML) and checked against an allow-list before insertion.
 */

type Attrs = Record<string, string | number | boolean | undefined>;
type Child = Node | string | null | undefined | false;

/** Creates an element with attributes and children; strings become text nodes. */
export function el<K extends keyof HTMLElementTagNameMap>(tag: K, attrs: Attrs = {}, ...children: Child[]): HTMLElementTagNameMap[K] {
  const e = document.createElement(tag);
  for (const [k, v] of Object.entries(attrs)) {
    if (v === undefined || v === false) continue;
    e.setAttribute(k, v === true ? '' : String(v));
  }
  for (const c of children) if (c !== null && c !== undefined && c !== false) e.append(typeof c === 'string' ? document.createTextNode(c) : c);
  return e;
}

/** Replaces all children of `parent`. */
export function replaceChildren(parent: Element, ...children: Child[]): void {
  parent.replaceChildren(...children.filter((c): c is Node | string => c !== null && c !== undefined && c !== false));
}

const SVG_NS = 'http://www.w3.org/2000/svg';
const ALLOWED_ELEMENTS = new Set(['svg', 'g', 'title', 'desc', 'defs', 'clipPath', 'rect', 'line', 'path', 'circle', 'text']);
const ALLOWED_ATTRIBUTES = new Set([
  'xmlns',
  'class',
  'viewBox',
  'role',
  'aria-labelledby',
  'aria-hidden',
  'data-figure',
  'data-line',
  'data-df',
  'data-group',
  'data-x',
  'data-slice',
  'id',
  'x',
  'y',
  'x1',
  'x2',
  'y1',
  'y2',
  'width',
  'height',
  'd',
  'cx',
  'cy',
  'r',
  'transform',
  'text-anchor',
  'clip-path',
  'tabindex',
]);

/**
 * Parses SVG text from core/plots into a node of this document. Anything outside the
 * allow-list (scripts, foreign objects, event attributes, links) throws: the plots never
 * produce it, so its presence means something went wrong upstream.
 */
export function svgFromText(text: string): SVGSVGElement {
  const doc = new DOMParser().parseFromString(text, 'image/svg+xml');
  const root = doc.documentElement;
  if (root.namespaceURI !== SVG_NS || root.localName !== 'svg') throw new Error('figure is not SVG');
  if (doc.getElementsByTagName('parsererror').length > 0) throw new Error('figure SVG does not parse');
  for (const node of [root, ...Array.from(root.querySelectorAll('*'))]) {
    if (node.namespaceURI !== SVG_NS || !ALLOWED_ELEMENTS.has(node.localName)) throw new Error(`figure contains <${node.localName}>`);
    for (const a of Array.from(node.attributes)) {
      if (!ALLOWED_ATTRIBUTES.has(a.name)) throw new Error(`figure has attribute ${a.name}`);
    }
  }
  return document.importNode(root, true) as unknown as SVGSVGElement;
}
