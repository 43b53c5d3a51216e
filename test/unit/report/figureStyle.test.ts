/**
 * Tests of making a core/plots figure stand alone (core/report/figureStyle.ts).
 */
import { strict as assert } from 'node:assert';
import { REPORT_FIGURE_CSS, standaloneSvg } from '../../../core/report/figureStyle';
import { svgDocument } from '../../../core/plots/svg';

describe('standaloneSvg', () => {
  it('standaloneSvg adds the XML declaration, the palette and a background after <title> and <desc>', () => {
    const svg = svgDocument('fig-a', { title: 'T', desc: 'D' }, '<path class="kw-curve" d="M0 0L1 1"/>');
    const out = standaloneSvg(svg);
    assert.ok(out.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg '));
    assert.match(out, /<title id="fig-a-title">T<\/title><desc id="fig-a-desc">D<\/desc><style>.*<\/style><rect width="100%" height="100%" fill="#ffffff"\/><path class="kw-curve"/);
    assert.ok(out.endsWith('</svg>\n'));
  });

  it('the palette styles every kw-* class that core/plots emits for the report figures', () => {
    for (const c of [
      'kw-grid',
      'kw-box',
      'kw-tick',
      'kw-axis-title',
      'kw-point',
      'kw-bin',
      'kw-curve',
      'kw-band-ci',
      'kw-band-pi',
      'kw-zero',
      'kw-ref-line',
      'kw-err-line',
      'kw-err-bar',
      'kw-err-point',
      'kw-chosen',
      'kw-threshold',
      'kw-influential',
    ]) {
      assert.ok(REPORT_FIGURE_CSS.includes(`.${c}`), c);
    }
    assert.doesNotMatch(REPORT_FIGURE_CSS, /var\(--vscode/);
  });

  it('standaloneSvg refuses text that is not an <svg> element', () => {
    assert.throws(() => standaloneSvg('<div>'), /not an <svg> element/);
  });
});
