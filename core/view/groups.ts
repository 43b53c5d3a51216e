/**
 * The panel's view of a grouped run (the rows of one file split into groups, each tuned as
 * a file of its own, core/groups/): every group's name, rows, chosen df and residual SD, its
 * fitted curve on a few points over its own data range, a few of its readings for a small
 * figure, and the words of "does one curve serve all" and of the shared df. The view stays
 * small however many groups there are: GROUP_CURVE_POINTS values per curve and at most
 * GROUP_READINGS readings per group. The selected group's own panel is an ordinary
 * PanelPayload (core/view/payload.ts), sent beside this view.
 */
import type { FitResult, XYData } from '../types';
import { renderOptions } from '../words/options';
import { roundAll, roundSig } from './round';

/**
 * Points of each group's curve in the view, evenly spaced over the group's data range.
 * 21 points lie on every fifth row of the default 101-row curve table, so the view's curve
 * is the table's at those rows.
 */
export const GROUP_CURVE_POINTS = 21;
/** Most readings of one group the view carries (for its small figure). */
export const GROUP_READINGS = 40;
/** Significant digits of the view's numbers (display only). */
const VIEW_DIGITS = 6;

/** One group in the overview (its name is text from the CSV: insert it as text only). */
export interface GroupSummaryView {
  readonly name: string;
  /** Rows the group's fit used. */
  readonly rows: number;
  /** The chosen df (the shared one when the df is shared). */
  readonly df: number;
  /** Residual SD of the chosen fit (NaN when undefined). */
  readonly sigma: number;
  /** The group's data range: the curve runs from lo to hi. */
  readonly lo: number;
  readonly hi: number;
  /** The fitted curve at GROUP_CURVE_POINTS evenly spaced x from lo to hi. */
  readonly curve: readonly number[];
  /** Some of the group's readings: all of them up to GROUP_READINGS, else the lowest and highest y in each of GROUP_READINGS / 2 slices of x. */
  readonly x: readonly number[];
  readonly y: readonly number[];
  /** Warnings of the group's chosen fit. */
  readonly warnings: number;
}

/** The overview of a grouped run. */
export interface GroupsView {
  /** The run's id: the panel asks for a group of this set by it. */
  readonly setId: number;
  readonly fileName: string;
  /** The column the rows were split by (text from the CSV). */
  readonly groupLabel: string;
  readonly xLabel: string;
  readonly yLabel: string;
  /** Rows left out while splitting (bad cells, empty group cells). */
  readonly rejected: number;
  readonly groups: readonly GroupSummaryView[];
  /** Present when one df was chosen for all groups: the df and why, in the editor's words. */
  readonly shared?: { readonly df: number; readonly reason: string };
  /** Whether one curve serves all groups, in the editor's words; absent when the test does not apply. */
  readonly common?: string;
}

/**
 * The parts of a grouped analysis (core/groups/analyse.ts GroupAnalysis, each group's
 * core/analysis Analysis) and of its split (core/groups/split.ts GroupSplit) the view reads.
 * They are named here, so that the panel's code, which reads this module's types, loads
 * neither the tuning nor the reader.
 */
export interface GroupAnalysisView {
  readonly groups: readonly {
    readonly name: string;
    readonly analysis: {
      readonly n: number;
      readonly data: Pick<XYData, 'x' | 'y'>;
      readonly chosen: Pick<FitResult, 'df' | 'sigma' | 'curve'>;
      readonly diagnostics: { readonly warnings: readonly string[] };
    };
  }[];
  readonly shared?: { readonly selection: { readonly df: number; readonly reason: string } } | undefined;
}

/** The parts of a group split the view reads (see GroupAnalysisView). */
export interface GroupSplitView {
  readonly rejected: readonly unknown[];
  readonly labels: { readonly x: string; readonly y: string };
  readonly groupLabel?: string | undefined;
}

/** What buildGroupsView needs. */
export interface GroupsViewInput {
  readonly setId: number;
  readonly fileName: string;
  readonly split: GroupSplitView;
  readonly analysis: GroupAnalysisView;
  /** Whether one curve serves all (core/groups/commonRun.ts commonCurveFor), null when not tested. */
  readonly common: { readonly words: string } | null;
}

/** Indices of at most GROUP_READINGS rows: all of them, or the lowest and highest y in each slice of x. O(n). */
export function readingsShown(x: ArrayLike<number>, y: ArrayLike<number>, lo: number, hi: number): number[] {
  const n = x.length;
  if (n <= GROUP_READINGS) return Array.from({ length: n }, (_, i) => i);
  const slices = GROUP_READINGS / 2;
  const low = new Int32Array(slices).fill(-1);
  const high = new Int32Array(slices).fill(-1);
  const span = hi - lo;
  for (let i = 0; i < n; i++) {
    const v = y[i] as number;
    const xi = x[i] as number;
    if (!Number.isFinite(v) || !Number.isFinite(xi)) continue;
    const s = span > 0 ? Math.min(slices - 1, Math.max(0, Math.floor(((xi - lo) / span) * slices))) : 0;
    const l = low[s] as number;
    const h = high[s] as number;
    if (l < 0 || v < (y[l] as number)) low[s] = i;
    if (h < 0 || v > (y[h] as number)) high[s] = i;
  }
  const out: number[] = [];
  for (let s = 0; s < slices; s++) {
    const l = low[s] as number;
    const h = high[s] as number;
    if (l >= 0) out.push(l);
    if (h >= 0 && h !== l) out.push(h);
  }
  return out;
}

/**
 * The overview of a grouped run: per group O(n) for its range and readings and
 * GROUP_CURVE_POINTS curve evaluations; the view's size grows with the number of groups,
 * not with the rows. Example: buildGroupsView({ setId: 3, fileName: 'co2.csv', split, analysis, common }).groups[0].df.
 */
export function buildGroupsView(input: GroupsViewInput): GroupsView {
  const { split, analysis } = input;
  const groups = analysis.groups.map((g): GroupSummaryView => {
    const a = g.analysis;
    const fit = a.chosen;
    const lo = fit.curve.lower;
    const hi = fit.curve.upper;
    const curve = new Float64Array(GROUP_CURVE_POINTS);
    for (let k = 0; k < GROUP_CURVE_POINTS; k++) curve[k] = fit.curve.value(k === GROUP_CURVE_POINTS - 1 ? hi : lo + ((hi - lo) * k) / (GROUP_CURVE_POINTS - 1));
    const rows = readingsShown(a.data.x, a.data.y, lo, hi);
    return {
      name: g.name,
      rows: a.n,
      df: fit.df,
      sigma: roundSig(fit.sigma, VIEW_DIGITS),
      lo,
      hi,
      curve: roundAll(curve, VIEW_DIGITS),
      x: rows.map((i) => roundSig(a.data.x[i] as number, VIEW_DIGITS)),
      y: rows.map((i) => roundSig(a.data.y[i] as number, VIEW_DIGITS)),
      warnings: a.diagnostics.warnings.length,
    };
  });
  const shared = analysis.shared;
  return {
    setId: input.setId,
    fileName: input.fileName,
    groupLabel: split.groupLabel ?? 'channel',
    xLabel: split.labels.x,
    yLabel: split.labels.y,
    rejected: split.rejected.length,
    groups,
    // In the editor's words: an option named reads as its setting, never as a command-line flag.
    ...(shared ? { shared: { df: shared.selection.df, reason: renderOptions(shared.selection.reason, 'editor') } } : {}),
    ...(input.common ? { common: renderOptions(input.common.words, 'editor') } : {}),
  };
}
