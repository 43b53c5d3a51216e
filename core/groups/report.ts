/**
 * The review report of a grouped fit (`fit --per ... --report`): one Markdown page that
 * renders in a code review, with every group's curve in one figure, a grid of small figures,
 * the one-curve-for-all test in words, a summary row per group, the groups' warnings, the
 * provenance and how to reproduce and check it. Drawn by the same core/plots builders as the
 * editor's grouped panel (core/view/groups.ts), made standalone like the one-fit report's
 * figures. Pure; buildGroupDeliverables adds the files, so `check` rebuilds them too.
 */
import { groupOverlaySvg } from '../plots/groupOverlay';
import { groupSmallSvg, SMALL_HEIGHT, SMALL_WIDTH } from '../plots/groupSmall';
import { standaloneSvg } from '../report/figureStyle';
import { md } from '../report/markdown';
import { buildGroupsView, type GroupAnalysisView, type GroupSplitView, type GroupSummaryView } from '../view/groups';
import { sig } from '../words/numbers';
import { shellWord } from '../outputs/shellWord';
import type { CommonCurveJson } from './commonJson';

/** Most small figures in the report's grid (differing groups first); the summary lists every group. */
export const REPORT_SMALL_LIMIT = 48;
/** Most rows of the report's summary table; the summary CSV lists every group. */
export const REPORT_ROW_LIMIT = 200;
/** Small figures per row of the grid. */
const GRID_COLUMNS = 4;
/** Height of the caption line above each small figure. */
const CAPTION = 16;

/** The report palette (core/report/figureStyle.ts) for the classes only the grouped figures use. */
const GROUP_FIGURE_CSS = [
  '.kw-group-curve{fill:none;stroke:#1f5fa8;stroke-width:1.3;stroke-opacity:0.75}',
  '.kw-group-curve.kw-group-many{stroke-width:0.7;stroke-opacity:0.5}',
  '.kw-small-dots{fill:none;stroke:#222222;stroke-opacity:0.6;stroke-width:4.6;stroke-linecap:round}',
  '.kw-small-curve{stroke-width:1.8}',
  '.kw-small-name{fill:#222222;font-size:12px}',
].join('');

/** Text for an SVG text node or attribute. */
function xml(text: string): string {
  return text.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** What the grouped report needs. */
export interface GroupReportInput {
  readonly stem: string;
  readonly dataFile: string;
  readonly dataSha256: string;
  readonly rowsRead: number;
  readonly split: GroupSplitView;
  readonly analysis: GroupAnalysisView;
  readonly common: CommonCurveJson | null;
  /** The curve and how its df was chosen, in words (e.g. "natural cubic regression spline; bootstrap, 50 resamples ..."). */
  readonly method: string;
  /** Each group's resampled RMSE and its SE at the chosen df (NaN when not resampled). */
  readonly rmse: ReadonlyMap<string, { readonly mean: number; readonly se: number }>;
  /** Each group's warnings. */
  readonly warnings: ReadonlyMap<string, readonly string[]>;
  /** Each group's table file. */
  readonly tables: ReadonlyMap<string, string>;
  readonly summaryFile: string;
  readonly recordFile: string;
  readonly regenerate: string;
  readonly caution: string;
}

/** One file of the report. */
export interface GroupReportFile {
  readonly kind: 'report' | 'figure';
  readonly name: string;
  readonly text: string;
}

/** A file name as a relative link target (spaces and parentheses percent-encoded). */
function link(file: string): string {
  return encodeURI(file).replace(/\(/g, '%28').replace(/\)/g, '%29');
}

function num(v: number, digits = 4): string {
  return Number.isFinite(v) ? sig(v, digits) : '—';
}

/** The small figures side by side in one SVG: each nested at its place in a grid of GRID_COLUMNS. */
function smallGrid(groups: readonly GroupSummaryView[], view: ReturnType<typeof buildGroupsView>): string {
  const xs = groups.flatMap((g) => [g.lo, g.hi, ...g.x]);
  const ys = groups.flatMap((g) => [...g.curve, ...g.y]).filter((v) => Number.isFinite(v));
  const xRange: [number, number] = [Math.min(...xs), Math.max(...xs)];
  const yRange: [number, number] = [Math.min(...ys), Math.max(...ys)];
  const rows = Math.ceil(groups.length / GRID_COLUMNS);
  const width = GRID_COLUMNS * SMALL_WIDTH;
  const height = rows * (SMALL_HEIGHT + CAPTION);
  const parts = groups.map((g, i) => {
    const svg = groupSmallSvg({
      id: `kw-report-small-${i}`,
      name: g.name,
      x: g.x,
      y: g.y,
      lo: g.lo,
      hi: g.hi,
      curve: g.curve,
      df: g.df,
      rows: g.rows,
      xRange,
      yRange,
      xLabel: view.xLabel,
      yLabel: view.yLabel,
      groupLabel: view.groupLabel,
    });
    const x = (i % GRID_COLUMNS) * SMALL_WIDTH;
    const y = Math.floor(i / GRID_COLUMNS) * (SMALL_HEIGHT + CAPTION);
    const caption = `<text class="kw-small-name" x="${x + 6}" y="${y + CAPTION - 4}">${xml(g.name)} · df ${num(g.df)} · ${g.rows} rows</text>`;
    return caption + svg.replace('<svg ', `<svg x="${x}" y="${y + CAPTION}" width="${SMALL_WIDTH}" height="${SMALL_HEIGHT}" `);
  });
  const title = `Each ${view.groupLabel}: its readings and curve`;
  return (
    `<svg xmlns="http://www.w3.org/2000/svg" class="kw-plot" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img">` +
    `<title>${xml(title)}</title><desc>${groups.length} small figures on shared axes, four to a row, each named above it.</desc>` +
    parts.join('') +
    '</svg>'
  );
}

/**
 * The report's Markdown and figure files: `<stem>.groups.report.md`,
 * `<stem>.groups.report.overlay.svg` and `<stem>.groups.report.small.svg`. Same inputs, same
 * bytes. O(groups x figure points).
 * Example: groupReport(input).map((f) => f.name) -> ['rig.groups.report.md', 'rig.groups.report.overlay.svg', 'rig.groups.report.small.svg'].
 */
export function groupReport(input: GroupReportInput): GroupReportFile[] {
  const view = buildGroupsView({ setId: 0, fileName: input.dataFile, split: input.split, analysis: input.analysis, common: input.common });
  const noun = view.groupLabel;
  const overlayName = `${input.stem}.groups.report.overlay.svg`;
  const smallName = `${input.stem}.groups.report.small.svg`;
  const overlay = standaloneSvg(
    groupOverlaySvg({
      id: 'kw-report-overlay',
      curves: view.groups.map((g) => ({ name: g.name, lo: g.lo, hi: g.hi, y: g.curve })),
      xLabel: view.xLabel,
      yLabel: view.yLabel,
      groupLabel: noun,
    }),
    GROUP_FIGURE_CSS,
  );
  // The test's JSON (core/groups/commonRun.ts): the parts the report prints.
  const common = input.common as
    | (CommonCurveJson & {
        readonly F?: number | null;
        readonly p?: number | null;
        readonly dfNum?: number;
        readonly dfDen?: number;
        readonly df?: number;
        readonly dfFrom?: string;
        readonly perGroup?: readonly { readonly name: string; readonly differs: boolean }[];
      })
    | null;
  const differing = new Set((common?.perGroup ?? []).filter((g) => g.differs).map((g) => g.name));
  const shownGroups = [...view.groups.filter((g) => differing.has(g.name)), ...view.groups.filter((g) => !differing.has(g.name))].slice(0, REPORT_SMALL_LIMIT);
  const small = standaloneSvg(smallGrid(shownGroups, view), GROUP_FIGURE_CSS);
  const G = view.groups.length;
  const rows = view.groups.reduce((s, g) => s + g.rows, 0);
  const lines: string[] = [
    `# Grouped fit of ${md(input.dataFile)}`,
    '',
    `${G} groups by ${md(noun)}, ${rows} rows used of ${input.rowsRead} read (${view.rejected} rejected). ${md(input.method)}`,
    '',
  ];
  const shared = input.analysis.shared?.selection;
  if (shared) lines.push(`One df for all: ${num(shared.df)}. ${md(shared.reason)}`, '');
  lines.push('## Does one curve serve all?', '');
  if (common) {
    lines.push(md(common.words), '');
    if (typeof common.F === 'number' && common.df !== undefined) {
      lines.push(`F(${common.dfNum ?? '—'}, ${common.dfDen ?? '—'}) = ${num(common.F)}, p = ${num(common.p ?? NaN, 3)}, at df ${num(common.df)} (${md(common.dfFrom ?? '')}).`, '');
    }
  } else lines.push('Not tested for this curve or model.', '');
  lines.push(
    "## Every group's curve",
    '',
    `![Every ${md(noun)}'s fitted curve over its own data range, on shared axes.](${link(overlayName)})`,
    '',
    `## Each ${md(noun)}`,
    '',
    `![Small figures of each ${md(noun)}: some of its readings and its curve, on shared axes.](${link(smallName)})`,
    '',
    shownGroups.length < G
      ? `*${shownGroups.length} of ${G} groups${differing.size ? ' (those that differ from the common curve first)' : ''}; the summary below and ${md(input.summaryFile)} list every group.*`
      : `*Every ${md(noun)}, on shared axes.*`,
    '',
    '## Summary',
    '',
    `| ${md(noun)} | rows | df | residual SD | resampled RMSE (SE) | warnings | table |`,
    '| --- | ---: | ---: | ---: | ---: | ---: | --- |',
  );
  for (const g of view.groups.slice(0, REPORT_ROW_LIMIT)) {
    const e = input.rmse.get(g.name);
    const table = input.tables.get(g.name) ?? '';
    lines.push(`| ${md(g.name)} | ${g.rows} | ${num(g.df)} | ${num(g.sigma)} | ${e ? `${num(e.mean)} (${num(e.se, 2)})` : '—'} | ${g.warnings} | ${table ? `[${md(table)}](${link(table)})` : ''} |`);
  }
  if (G > REPORT_ROW_LIMIT) lines.push('', `*The first ${REPORT_ROW_LIMIT} of ${G} groups; ${md(input.summaryFile)} lists every group.*`);
  lines.push('');
  const warned = [...input.warnings].filter(([, w]) => w.length > 0);
  if (warned.length) {
    lines.push('## Warnings', '');
    for (const [name, ws] of warned.slice(0, REPORT_ROW_LIMIT)) for (const w of ws) lines.push(`- ⚠ ${md(noun)} ${md(name)}: ${md(w)}`);
    if (warned.length > REPORT_ROW_LIMIT) lines.push(`- … and ${warned.length - REPORT_ROW_LIMIT} more groups with warnings (see ${md(input.recordFile)}).`);
    lines.push('');
  }
  lines.push(
    '## Data',
    '',
    `- ${md(input.dataFile)}, SHA-256 \`${input.dataSha256}\``,
    '',
    '## Reproduce and check',
    '',
    'Run in the folder holding this report:',
    '',
    '```sh',
    input.regenerate,
    `knotwise check ${shellWord(input.recordFile)}`,
    '```',
    '',
    `> **Caution.** ${md(input.caution)}`,
    '',
  );
  return [
    { kind: 'report', name: `${input.stem}.groups.report.md`, text: lines.join('\n') },
    { kind: 'figure', name: overlayName, text: overlay },
    { kind: 'figure', name: smallName, text: small },
  ];
}
