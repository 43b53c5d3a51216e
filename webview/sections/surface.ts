/**
 * The panel of a surface (two inputs and a reading, core/view/surface.ts): the choice in
 * words with the error landscape of the df pairs (the pair shown marked), a df pair picked
 * by hand, the heat figure with the readings and the uncovered nodes, slices at chosen values
 * of either input with their bands, the residuals against each input, Save, and the caution.
 * Text from the CSV (column labels, file name) is inserted as text only.
 */
import { surfaceHeatSvg } from '../../core/plots/surfaceHeat';
import { surfaceResidualSvg, surfaceSliceSvg } from '../../core/plots/surfaceSlices';
import { sig } from '../../core/tune/format';
import { MAX_SLICES, type SurfaceInput, type SurfaceView } from '../../core/view/surface';
import { el, svgFromText } from '../dom';

/** What the surface panel may ask of the host. */
export interface SurfaceActions {
  slices(input: SurfaceInput, at: readonly number[]): void;
  pair(x: number, x2: number): void;
  rule(): void;
  save(): void;
  rerun(): void;
  stop(): void;
}

/** A <figure> holding SVG text and its caption. */
function figure(id: string, svg: string, caption: string): HTMLElement {
  return el('figure', { class: 'kw-figure', id }, svgFromText(svg), el('figcaption', {}, caption));
}

/** The error landscape as a table: a row per df of the first input, a column per df of the second, the pair shown marked. */
function landscapeTable(v: SurfaceView): HTMLElement | null {
  const l = v.landscape;
  if (!l) return null;
  const head = el('tr', {}, el('th', { scope: 'col' }, `df ${v.labels.x} \\ ${v.labels.x2}`), ...l.dfX2.map((d) => el('th', { scope: 'col' }, String(d))));
  const rows = l.dfX.map((dx, i) =>
    el(
      'tr',
      {},
      el('th', { scope: 'row' }, String(dx)),
      ...l.dfX2.map((dx2, j) => {
        const m = l.mean[i * l.dfX2.length + j];
        const shown = dx === v.pair.x && dx2 === v.pair.x2;
        const ruled = dx === l.ruled.x && dx2 === l.ruled.x2;
        const cls = ['kw-cell', shown ? 'kw-cell-shown' : '', ruled ? 'kw-cell-ruled' : ''].filter((c) => c).join(' ');
        const text = m === null || m === undefined ? '–' : sig(m, 3);
        return el('td', { class: cls, 'data-x': dx, 'data-x2': dx2, ...(shown ? { 'aria-current': 'true' } : {}) }, shown ? `${text} ◆` : text);
      }),
    ),
  );
  return el(
    'figure',
    { class: 'kw-figure kw-landscape', id: 'kw-surface-landscape' },
    el('table', { class: 'kw-table' }, el('thead', {}, head), el('tbody', {}, ...rows)),
    el(
      'figcaption',
      {},
      `Mean resampled ${l.metric} of each df pair (rows: df of ${v.labels.x}; columns: df of ${v.labels.x2}); ◆ marks the pair shown, the outlined cell the rule's choice, – a pair that could not be fitted.`,
    ),
  );
}

/** A number box with a label. */
function numberBox(id: string, label: string, value: number, min: number): [HTMLElement, HTMLInputElement] {
  const input = el('input', { type: 'number', id, min, step: 1, value: String(value), class: 'kw-number' });
  return [el('label', { for: id }, label), input];
}

/** The control of a df pair picked by hand, and the way back to the rule's pair. */
function pairControl(v: SurfaceView, a: SurfaceActions): HTMLElement {
  const [lx, bx] = numberBox('kw-pair-x', `df of ${v.labels.x}`, v.pair.x, 1);
  const [lx2, bx2] = numberBox('kw-pair-x2', `df of ${v.labels.x2}`, v.pair.x2, 1);
  const use = el('button', { type: 'button', id: 'kw-pair-use', class: 'kw-secondary' }, 'Use this pair');
  const error = el('p', { class: 'kw-status', id: 'kw-pair-error', role: 'status' });
  use.addEventListener('click', () => {
    const x = Number(bx.value);
    const x2 = Number(bx2.value);
    if (!Number.isInteger(x) || !Number.isInteger(x2) || x < 1 || x2 < 1 || x > 100 || x2 > 100) {
      error.textContent = `Each df must be a whole number from 1 to 100; df ${v.pair.x} × ${v.pair.x2} stays in effect.`;
      return;
    }
    error.textContent = '';
    a.pair(x, x2);
  });
  const back = v.byHand && v.landscape ? el('button', { type: 'button', id: 'kw-pair-rule', class: 'kw-secondary' }, `Back to the rule's df ${v.landscape.ruled.x} × ${v.landscape.ruled.x2}`) : null;
  back?.addEventListener('click', () => a.rule());
  return el('fieldset', { class: 'kw-pair', id: 'kw-pair' }, el('legend', {}, 'A df pair I pick'), lx, bx, lx2, bx2, use, back, error);
}

/** The slices' control: which input is held, and up to MAX_SLICES values (comma-separated). */
function sliceControl(v: SurfaceView, a: SurfaceActions): HTMLElement {
  const select = el(
    'select',
    { id: 'kw-slice-input' },
    el('option', { value: 'x', ...(v.slices.input === 'x' ? { selected: true } : {}) }, v.labels.x),
    el('option', { value: 'x2', ...(v.slices.input === 'x2' ? { selected: true } : {}) }, v.labels.x2),
  );
  const values = el('input', { type: 'text', id: 'kw-slice-values', value: v.slices.curves.map((c) => String(c.at)).join(', '), class: 'kw-text', 'aria-describedby': 'kw-slice-help' });
  const show = el('button', { type: 'button', id: 'kw-slice-show', class: 'kw-secondary' }, 'Show slices');
  const help = el('p', { class: 'kw-status', id: 'kw-slice-help', role: 'status' }, `Up to ${MAX_SLICES} values, separated by commas; empty: the quartiles.`);
  const send = (): void => {
    const input: SurfaceInput = select.value === 'x2' ? 'x2' : 'x';
    const text = values.value.trim();
    // A new input with the old input's values would slice at the wrong place: its quartiles instead.
    const parts = text === '' || input !== v.slices.input ? [] : text.split(',').map((t) => Number(t.trim()));
    if (parts.some((p) => !Number.isFinite(p)) || parts.length > MAX_SLICES) {
      help.textContent = `Give up to ${MAX_SLICES} numbers separated by commas; the slices shown stay.`;
      return;
    }
    // No values: the host slices at the input's quartiles.
    a.slices(input, parts);
  };
  show.addEventListener('click', send);
  values.addEventListener('keydown', (e) => {
    if (e.key === 'Enter') send();
  });
  return el(
    'fieldset',
    { class: 'kw-slice-control', id: 'kw-slice-control' },
    el('legend', {}, 'Slices'),
    el('label', { for: 'kw-slice-input' }, 'Hold'),
    select,
    el('label', { for: 'kw-slice-values' }, 'at'),
    values,
    show,
    help,
  );
}

/** The whole surface panel. */
export function surfaceSection(v: SurfaceView, a: SurfaceActions): HTMLElement[] {
  const { labels } = v;
  const heat = surfaceHeatSvg({
    id: 'fig-surface-heat',
    us: Float64Array.from(v.grid.xs),
    vs: Float64Array.from(v.grid.x2s),
    fit: v.grid.fit,
    uncovered: v.grid.uncovered,
    readingsU: Float64Array.from(v.readings.x),
    readingsV: Float64Array.from(v.readings.x2),
    labels: { u: labels.x, v: labels.x2, y: labels.y },
  });
  const held = v.slices.input === 'x' ? labels.x : labels.x2;
  const along = v.slices.input === 'x' ? labels.x2 : labels.x;
  const slices = surfaceSliceSvg({ id: 'fig-surface-slices', along: v.slices.along, curves: v.slices.curves, labels: { fixed: held, along, y: labels.y } });
  const resid = (input: SurfaceInput): HTMLElement => {
    const r = v.residuals[input];
    const label = input === 'x' ? labels.x : labels.x2;
    const svg = surfaceResidualSvg({ id: `fig-surface-resid-${input}`, kind: r.kind, x: r.x, r: r.r, labels: { x: label, y: labels.y } });
    return figure(`kw-surface-resid-${input}`, svg, `Residuals against ${label}${r.kind === 'bins' ? ` (each dot the mean of one of ${r.x.length} bins)` : ''}`);
  };
  const save = el('button', { type: 'button', id: 'kw-save', class: 'kw-primary' }, 'Save surface table and record');
  save.addEventListener('click', () => a.save());
  const again = el('button', { type: 'button', id: 'kw-rerun', class: 'kw-secondary' }, 'Run again');
  again.addEventListener('click', () => a.rerun());
  const stop = el('button', { type: 'button', id: 'kw-stop', class: 'kw-secondary', hidden: true }, 'Stop');
  stop.addEventListener('click', () => a.stop());
  const rows = `${v.rows.used} rows used` + (v.rows.rejected ? `, ${v.rows.rejected} rejected (see Problems)` : '');
  return [
    el(
      'header',
      { class: 'kw-header' },
      el('h1', {}, `${labels.y} over ${labels.x} and ${labels.x2}`),
      el('p', { class: 'kw-meta' }, `${v.fileName} · ${rows} · tensor-product natural cubic regression spline`),
    ),
    el(
      'section',
      { class: 'kw-answer', id: 'kw-surface-answer', 'aria-label': 'The chosen df pair' },
      el('p', {}, el('span', { class: 'kw-df-badge', id: 'kw-surface-pair' }, `df ${v.pair.x} × ${v.pair.x2}${v.byHand ? ' (picked by hand)' : ''}`)),
      el('p', { id: 'kw-reason', class: 'kw-reason' }, v.explanation),
      el('p', { class: 'kw-meta', id: 'kw-surface-fit' }, v.fitLine),
      el('div', { class: 'kw-actions' }, save, again, stop),
      el('progress', { id: 'kw-progress', max: 1, hidden: true, 'aria-label': 'Progress of the analysis' }),
      el('p', { id: 'kw-status', role: 'status', class: 'kw-status' }),
    ),
    el(
      'div',
      { class: 'kw-surface-figures' },
      figure(
        'kw-surface-heat',
        heat,
        `The fitted ${labels.y}: the stronger the shade, the higher; grey cells lie outside the readings' hull or beyond their reach; dots mark ${v.readings.every > 1 ? `every ${v.readings.every}th reading` : 'the readings'}.`,
      ),
      landscapeTable(v),
    ),
    pairControl(v, a),
    el(
      'div',
      { class: 'kw-surface-figures' },
      figure('kw-surface-slices', slices, `Slices at ${held} = ${v.slices.curves.map((c) => sig(c.at, 4)).join(', ')}, with 95 % confidence (darker) and prediction (lighter) bands`),
      sliceControl(v, a),
    ),
    el('div', { class: 'kw-surface-figures' }, resid('x'), resid('x2')),
    v.notes.length ? el('ul', { class: 'kw-notes', id: 'kw-surface-notes' }, ...v.notes.map((n) => el('li', {}, n))) : null,
    el('footer', { class: 'kw-caution', id: 'kw-caution' }, v.caution),
  ].filter((e): e is HTMLElement => e !== null);
}
