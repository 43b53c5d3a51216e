/**
 * A grouped run's parts of the panel: the group selector at the top (the rest of the panel
 * shows the selected group as it would show a file of its own), and the overview of every
 * group above the details: one figure with every group's curve, a small figure per group
 * (each a button that shows its group; the first SMALL_MULTIPLES_SHOWN, the rest on
 * request), whether one curve serves all, and why the df is shared when it is.
 */
import { groupOverlaySvg } from '../../core/plots/groupOverlay';
import { groupSmallSvg } from '../../core/plots/groupSmall';
import { extent } from '../../core/plots/scale';
import { sig } from '../../core/tune/format';
import type { GroupsView, GroupSummaryView } from '../../core/view/groups';
import { el, svgFromText } from '../dom';

/** Small figures shown before the person asks for all of them. */
export const SMALL_MULTIPLES_SHOWN = 48;

/** What the group parts may ask of the panel. */
export interface GroupActions {
  /** Show group `index`. */
  select(index: number): void;
  /** Show every group's small figure. */
  showAll(): void;
}

/** A group in words: its name, df and rows. */
function groupWords(g: GroupSummaryView): string {
  return `${g.name} · df ${sig(g.df, 4)} · ${g.rows} rows`;
}

/** The group selector: a list of the groups with previous and next buttons. */
export function groupBar(view: GroupsView, index: number, actions: GroupActions): HTMLElement {
  const select = el('select', { id: 'kw-group' });
  for (const [i, g] of view.groups.entries()) select.append(el('option', { value: i, selected: i === index }, groupWords(g)));
  select.addEventListener('change', () => actions.select(Number(select.value)));
  const step = (id: string, text: string, label: string, to: number): HTMLButtonElement => {
    const b = el('button', { type: 'button', id, class: 'kw-secondary', 'aria-label': label, disabled: to < 0 || to >= view.groups.length }, text);
    b.addEventListener('click', () => actions.select(to));
    return b;
  };
  const n = view.groups.length;
  return el(
    'nav',
    { class: 'kw-group-bar', id: 'kw-group-bar', 'aria-label': 'Groups of this file' },
    el('label', { for: 'kw-group' }, 'Group'),
    select,
    step('kw-group-prev', '‹ Previous', 'Previous group', index - 1),
    step('kw-group-next', 'Next ›', 'Next group', index + 1),
    el('span', { class: 'kw-meta', id: 'kw-group-count' }, `${index + 1} of ${n} groups by ${view.groupLabel}`),
  );
}

/** The ranges every small figure shares: every group's data range and every value drawn. */
function sharedDomains(view: GroupsView): { x: [number, number]; y: [number, number] } {
  const xs = view.groups.flatMap((g) => [g.lo, g.hi]);
  return {
    x: extent([xs], 0),
    y: extent(
      view.groups.flatMap((g) => [g.curve, g.y]),
      0,
    ),
  };
}

/** One small figure as a button that shows its group. */
function smallFigure(view: GroupsView, i: number, selected: boolean, domains: { x: [number, number]; y: [number, number] }, actions: GroupActions): HTMLElement {
  const g = view.groups[i] as GroupSummaryView;
  const svg = svgFromText(
    groupSmallSvg({
      id: `kw-small-${i}`,
      name: g.name,
      x: g.x,
      y: g.y,
      lo: g.lo,
      hi: g.hi,
      curve: g.curve,
      df: g.df,
      rows: g.rows,
      xRange: domains.x,
      yRange: domains.y,
      xLabel: view.xLabel,
      yLabel: view.yLabel,
      groupLabel: view.groupLabel,
    }),
  );
  const button = el(
    'button',
    {
      type: 'button',
      class: selected ? 'kw-small-multiple kw-selected' : 'kw-small-multiple',
      id: `kw-small-button-${i}`,
      'data-group': i,
      'aria-pressed': selected ? 'true' : 'false',
      'aria-label': `Show ${view.groupLabel} ${g.name}: df ${sig(g.df, 4)}, ${g.rows} rows`,
      'aria-describedby': `kw-small-${i}-desc`,
    },
    svg,
    el(
      'span',
      { class: 'kw-small-caption' },
      el('strong', {}, g.name),
      ` df ${sig(g.df, 4)}`,
      g.warnings ? el('span', { class: 'kw-warning' }, ` · ${g.warnings} warning${g.warnings === 1 ? '' : 's'}`) : null,
    ),
  );
  button.addEventListener('click', () => actions.select(i));
  return button;
}

/**
 * The overview section of every group. `showAll`: every small figure, else the first
 * SMALL_MULTIPLES_SHOWN (and the selected group's when it comes later).
 */
export function groupsOverview(view: GroupsView, index: number, showAll: boolean, actions: GroupActions): HTMLElement {
  const n = view.groups.length;
  const overlay = svgFromText(
    groupOverlaySvg({
      id: 'fig-groups-svg',
      curves: view.groups.map((g) => ({ name: g.name, lo: g.lo, hi: g.hi, y: g.curve })),
      selected: index,
      xLabel: view.xLabel,
      yLabel: view.yLabel,
      groupLabel: view.groupLabel,
      reading: 'Curves that run apart from the bundle belong to groups that behave differently; the small figures below show each group with its readings.',
    }),
  );
  const domains = sharedDomains(view);
  const shown =
    showAll || n <= SMALL_MULTIPLES_SHOWN ? view.groups.map((_, i) => i) : [...Array.from({ length: SMALL_MULTIPLES_SHOWN }, (_, i) => i), ...(index >= SMALL_MULTIPLES_SHOWN ? [index] : [])];
  const grid = el('div', { class: 'kw-multiples', id: 'kw-multiples', role: 'group', 'aria-label': `One small figure per group; choose one to show it` });
  for (const i of shown) grid.append(smallFigure(view, i, i === index, domains, actions));
  let more: HTMLElement | null = null;
  if (shown.length < n) {
    const all = el('button', { type: 'button', id: 'kw-groups-all', class: 'kw-secondary' }, `Show all ${n} groups`);
    all.addEventListener('click', () => actions.showAll());
    more = el('p', { class: 'kw-muted' }, `${shown.length} of ${n} groups shown. `, all);
  }
  const rejected = view.rejected ? ` ${view.rejected} row${view.rejected === 1 ? ' was' : 's were'} left out (see Problems).` : '';
  return el(
    'section',
    { class: 'kw-groups', id: 'kw-groups', 'aria-labelledby': 'kw-groups-title' },
    el('h2', { id: 'kw-groups-title' }, 'Every group'),
    el('p', { class: 'kw-meta', id: 'kw-groups-meta' }, `${n} groups by ${view.groupLabel} in ${view.fileName}, each tuned and fitted as a file of its own rows.${rejected}`),
    view.shared ? el('p', { id: 'kw-groups-shared' }, view.shared.reason) : null,
    view.common ? el('p', { id: 'kw-groups-common' }, el('strong', {}, 'One curve for all? '), view.common) : null,
    el(
      'p',
      { class: 'kw-muted', id: 'kw-groups-save-note' },
      'Saving writes every group’s table, the summary of all groups and the group record, each group at the df the rule of the settings (knotwise.rule) chose, as the command line does; a rule or df picked in this panel is for looking only.',
    ),
    el(
      'div',
      { class: 'kw-figures kw-groups-figures' },
      el('figure', { class: 'kw-figure', id: 'fig-groups' }, overlay, el('figcaption', {}, `Every group’s fitted curve over its own range of ${view.xLabel}; the group shown is drawn bold`)),
    ),
    el('h3', {}, 'Each group'),
    grid,
    more,
  );
}
