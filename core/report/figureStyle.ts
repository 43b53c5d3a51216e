/**
 * Makes a figure from core/plots stand alone: the panel colours figures through its theme
 * stylesheet, while a report's SVG file is shown as an image (in a code review, a Markdown
 * preview), so it carries its own light palette and background.
 */

/** The report's palette for the `kw-*` classes of core/plots (Knotwise's own choice: dark ink, one blue, one orange, one red). */
export const REPORT_FIGURE_CSS = [
  'svg.kw-plot{color:#222;font-family:sans-serif;font-size:11px}',
  '.kw-grid line{stroke:#dddddd;stroke-width:0.6}',
  '.kw-box{fill:none;stroke:#777777;stroke-width:0.8}',
  '.kw-tick{fill:#555555}',
  '.kw-axis-title{fill:#222222;font-size:12px}',
  '.kw-point{fill:#222222;fill-opacity:0.55}',
  '.kw-bin{fill:#222222}',
  '.kw-bin-1{fill-opacity:0.12}.kw-bin-2{fill-opacity:0.25}.kw-bin-3{fill-opacity:0.4}',
  '.kw-bin-4{fill-opacity:0.55}.kw-bin-5{fill-opacity:0.72}.kw-bin-6{fill-opacity:0.9}',
  '.kw-curve{fill:none;stroke:#1f5fa8;stroke-width:2.2}',
  '.kw-band-ci{fill:#1f5fa8;fill-opacity:0.3}',
  '.kw-band-pi{fill:#1f5fa8;fill-opacity:0.12}',
  '.kw-zero,.kw-ref-line{stroke:#1f5fa8;stroke-width:1.2;fill:none}',
  '.kw-err-line{fill:none;stroke:#777777;stroke-width:1}',
  '.kw-err-bar{stroke:#222222;stroke-width:1.4}',
  '.kw-err-point{fill:#222222}',
  '.kw-err-point.kw-chosen{fill:#c05a00;stroke:#222222;stroke-width:1}',
  '.kw-threshold{stroke:#c05a00;stroke-dasharray:5 4;stroke-width:1.4;fill:none}',
  '.kw-band-pi.kw-drift-recorded{fill:#c05a00;fill-opacity:0.15}',
  '.kw-stem{stroke:#777777;stroke-width:0.8}',
  '.kw-influential{fill:#b3261e;stroke:#b3261e;fill-opacity:1}',
  '.kw-heat{fill:#1f5fa8}.kw-heat-1{fill-opacity:0.08}.kw-heat-2{fill-opacity:0.2}.kw-heat-3{fill-opacity:0.32}.kw-heat-4{fill-opacity:0.44}',
  '.kw-heat-5{fill-opacity:0.56}.kw-heat-6{fill-opacity:0.68}.kw-heat-7{fill-opacity:0.8}.kw-heat-8{fill-opacity:0.92}',
  '.kw-uncovered{fill:#999999;fill-opacity:0.55}',
].join('');

/**
 * The figure as a standalone SVG file: XML declaration, the report palette in a <style>
 * element and a white background, inserted after the figure's <title> and <desc>; LF and a final
 * newline; `extraCss` adds rules for classes only some figures use (the grouped report's).
 * Throws Error when the text is not an <svg> element. O(length).
 * Example: standaloneSvg(dataCurveSvg(spec)).startsWith('<?xml').
 */
export function standaloneSvg(svg: string, extraCss = ''): string {
  const open = svg.indexOf('>');
  if (!svg.startsWith('<svg') || open < 0) throw new Error('standaloneSvg: the figure is not an <svg> element');
  // After <title> and <desc> when present, so they stay the first children screen readers look for.
  const desc = svg.indexOf('</desc>');
  const at = desc >= 0 ? desc + '</desc>'.length : open + 1;
  return '<?xml version="1.0" encoding="UTF-8"?>\n' + svg.slice(0, at) + `<style>${REPORT_FIGURE_CSS}${extraCss}</style>` + '<rect width="100%" height="100%" fill="#ffffff"/>' + svg.slice(at) + '\n';
}
